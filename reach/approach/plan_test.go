package approach

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/wind"
)

// The field of the tests is invented, on open ocean.
const fLat, fLon = -0.5, -24.5

func trainer(t *testing.T) *reach.Aircraft {
	t.Helper()
	ac, err := reach.Builtin("trainer")
	if err != nil {
		t.Fatal(err)
	}
	return ac
}

// at returns the point dist metres from the field on bearing brg.
func at(t *testing.T, brg, dist float64) (lat, lon float64) {
	t.Helper()
	p, _, err := geodesy.Direct(geodesy.LatLon{Lat: fLat, Lon: fLon}, brg, dist)
	if err != nil {
		t.Fatal(err)
	}
	return p.Lat, p.Lon
}

func request(t *testing.T, ac *reach.Aircraft, w reach.WindField, brg, dist, alt float64) Request {
	lat, lon := at(t, brg, dist)
	return Request{Field: Field{Name: "Test field", Lat: fLat, Lon: fLon, Elev: 100},
		Aircraft: ac, Wind: w, Clearance: 100, Lat: lat, Lon: lon, Alt: alt, LandingDir: math.NaN()}
}

// In calm air on flat ground each pattern leg loses exactly its length
// divided by the glide ratio at the approach speed in the air mass. At a
// fixed IAS the still-air ratio V/w does not depend on density (the polar
// scales by √(k/σ) on both axes: Anderson, Introduction to Flight, ch. 6,
// from memory), so it is IAS/w₀(IAS) of the profile's polar.
func TestCalmLegsAddUp(t *testing.T) {
	ac := trainer(t)
	req := request(t, ac, nil, 45, 6000, 1500)
	req.LandingDir = 90
	res, err := Plan(context.Background(), req)
	if err != nil {
		t.Fatal(err)
	}
	if !res.Feasible || res.Variant != "full pattern" {
		t.Fatalf("feasible %v variant %q: %s", res.Feasible, res.Variant, res.Reason)
	}
	E := res.ApproachIAS / ac.Polar.Sink(res.ApproachIAS)
	for _, l := range res.Legs[1:] {
		want := l.Length / E
		if math.Abs(l.HeightLost-want) > 0.005*want {
			t.Errorf("%s: lost %.3f m over %.1f m, want %.3f (E %.3f)", l.Name, l.HeightLost, l.Length, want, E)
		}
	}
	// The approach speed by default is 1.3 × stall (common practice, no
	// source; DESIGN.md's stall margin) in calm air.
	if math.Abs(res.ApproachIAS-1.3*ac.StallIAS) > 1e-9 {
		t.Errorf("approach speed %v, want 1.3 × stall %v", res.ApproachIAS, 1.3*ac.StallIAS)
	}
	// The gates' heights: the final's start is at least FinalHeight and
	// the clean glide × (1 + margin); each gate higher than the next.
	g := res.Gates
	if len(g) != 4 || g[0].Name != "entry" || g[3].Name != "touchdown" {
		t.Fatalf("gates %+v", g)
	}
	for i := 0; i+1 < len(g); i++ {
		if !(g[i].AltMSL > g[i+1].AltMSL) || !(g[i].DistToTouchdown > g[i+1].DistToTouchdown) {
			t.Errorf("gate %s not above and before %s", g[i].Name, g[i+1].Name)
		}
	}
	if g[3].HeightAboveField != 0 || g[2].HeightAboveField-g[2].TurnHeight < res.Params.FinalHeight-1e-9 {
		t.Errorf("final gate %.1f m above the field after a %.1f m turn, want ≥ %v", g[2].HeightAboveField, g[2].TurnHeight, res.Params.FinalHeight)
	}
	// Landing direction 090: final track 090, the downwind 270.
	if res.Legs[3].Track != 90 || math.Abs(res.Legs[1].Track-270) > 1e-6 {
		t.Errorf("tracks final %v downwind %v", res.Legs[3].Track, res.Legs[1].Track)
	}
	// The turns onto base and final are quarter turns to the left (the
	// default left-hand pattern), each losing the closed-form height
	// w·n^{3/2}·(π/2)/ω (Welch, Welch and Irving, bank-angle table method).
	for _, gi := range []int{1, 2} {
		if math.Abs(g[gi].TurnDeg+90) > 1e-6 {
			t.Errorf("%s turn %v°, want -90", g[gi].Name, g[gi].TurnDeg)
		}
	}
	if res.Excess < 0 || res.Holding.Circles < 1 {
		t.Errorf("from 1500 m at 6 km the aircraft is high: excess %v, circles %d", res.Excess, res.Holding.Circles)
	}
	if res.Arrival-res.Holding.HeightLost < res.Required-1e-6 {
		t.Errorf("after %d circles %.0f m is below the required %.0f m", res.Holding.Circles, res.Arrival-res.Holding.HeightLost, res.Required)
	}
}

// In a uniform wind the chosen direction is into the wind, the final's
// ground speed is TAS minus the headwind, and drift angles are
// asin(crosswind/TAS) (the wind triangle, common practice of air
// navigation, no source).
func TestUniformWind(t *testing.T) {
	ac := trainer(t)
	w, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 250, Speed: 15 * knot}})
	if err != nil {
		t.Fatal(err)
	}
	req := request(t, ac, w, 0, 5000, 1200)
	res, err := Plan(context.Background(), req)
	if err != nil {
		t.Fatal(err)
	}
	if !res.Feasible {
		t.Fatal(res.Reason)
	}
	// Into a wind from 250 the final track is 250.
	if math.Abs(res.LandingDir-250) > 1e-6 {
		t.Errorf("landing direction %v, want 250", res.LandingDir)
	}
	fin := res.Legs[len(res.Legs)-1]
	if fin.Name != "final" {
		t.Fatalf("last leg %q", fin.Name)
	}
	if math.Abs(fin.GroundSpeed-(fin.TAS-15*knot)) > 0.15 || math.Abs(fin.Drift) > 1e-9 {
		t.Errorf("final ground speed %.3f, TAS %.3f − headwind %.3f; drift %v", fin.GroundSpeed, fin.TAS, 15*knot, fin.Drift)
	}
	// Approach speed: 1.3 × stall + half the headwind.
	if want := 1.3*ac.StallIAS + 7.5*knot; math.Abs(res.ApproachIAS-want) > 1e-9 {
		t.Errorf("approach speed %v, want %v", res.ApproachIAS, want)
	}
	// A field landing on 320 in the same wind: 110° between track and wind.
	req.Field.Directions = []float64{320}
	res, err = Plan(context.Background(), req)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Legs) < 2 {
		t.Fatalf("no legs: %s", res.Reason)
	}
	for _, l := range res.Legs[1:] {
		th := l.Track * math.Pi / 180
		// Wind from 250 blows towards 070: velocity (sin 70°, cos 70°)·W.
		we, wn := 15*knot*math.Sin(70*math.Pi/180), 15*knot*math.Cos(70*math.Pi/180)
		cross := we*math.Cos(th) - wn*math.Sin(th)
		want := math.Asin(cross/l.TAS) * 180 / math.Pi
		if math.Abs(l.Drift-want) > 1e-9 {
			t.Errorf("%s: drift %v°, want asin(%.2f/%.2f) = %v°", l.Name, l.Drift, cross, l.TAS, want)
		}
	}
	// A crosswind limit below the crosswind refuses the direction, with
	// the reason.
	req.Params.MaxCrosswind = 5 * knot
	res, err = Plan(context.Background(), req)
	if err != nil {
		t.Fatal(err)
	}
	if res.Feasible || !strings.Contains(res.Reason, "crosswind 14 kt is over the limit of 5 kt") {
		t.Errorf("feasible %v: %s", res.Feasible, res.Reason)
	}
}

// A field just reachable ahead, behind the aircraft at the same distance
// and altitude, is out of reach because of the turn, and the reason says so.
func TestTurnDecides(t *testing.T) {
	ac := trainer(t)
	fail := func(hdg float64) *Failure {
		return &Failure{HeadingDeg: hdg, IAS: 100 * knot, ReactionTime: 3, Efficiency: 0.5, Bank: 30}
	}
	// The aircraft is 8 km north of the field; heading 180 is towards it.
	plan := func(alt, hdg float64) *Result {
		req := request(t, ac, nil, 0, 8000, alt)
		req.LandingDir = 180
		req.Failure = fail(hdg)
		res, err := Plan(context.Background(), req)
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
	lo, hi := 150.0, 2500.0
	if !plan(hi, 180).Feasible {
		t.Fatal("not feasible from 2500 m")
	}
	for hi-lo > 1 {
		m := (lo + hi) / 2
		if plan(m, 180).Feasible {
			hi = m
		} else {
			lo = m
		}
	}
	alt := hi + 5
	ahead, behind := plan(alt, 180), plan(alt, 0)
	if !ahead.Feasible {
		t.Fatalf("ahead from %.0f m: %s", alt, ahead.Reason)
	}
	if behind.Feasible || !behind.TurnDecides || !strings.Contains(behind.Reason, "the turn of") || !strings.Contains(behind.Reason, "decides it") {
		t.Errorf("behind from %.0f m: feasible %v, %s", alt, behind.Feasible, behind.Reason)
	}
	// The energy trade is credited: 100 kt to the speed to fly, η = 0.5
	// (EnergyCredit, checked in reach/transition).
	if ahead.Sequence == nil || ahead.Sequence.Stages[1].Height >= 0 {
		t.Errorf("no energy credit: %+v", ahead.Sequence)
	}
	if ahead.DecideBy == nil {
		t.Error("no decide-by point")
	}
}

func TestBadInput(t *testing.T) {
	ac := trainer(t)
	for _, c := range []struct {
		input string
		mod   func(*Request)
	}{
		{"landing_dir", func(r *Request) { r.LandingDir = 400 }},
		{"landing_directions", func(r *Request) { r.Field.Directions = []float64{-5} }},
		{"approach_speed", func(r *Request) { r.ApproachIAS = ac.StallIAS }},
		{"strip", func(r *Request) {
			r.Field.Strip = &[2]geodesy.LatLon{{Lat: fLat, Lon: fLon}, {Lat: fLat, Lon: fLon}}
		}},
		{"bank", func(r *Request) { r.Failure = &Failure{HeadingDeg: 10, Bank: 75} }},
		{"speed", func(r *Request) { r.Failure = &Failure{HeadingDeg: 10, IAS: 10, Bank: 30} }},
		{"heading", func(r *Request) { r.Failure = &Failure{HeadingDeg: 361, Bank: 30} }},
		{"pattern_side", func(r *Request) { r.Side = "up" }},
	} {
		req := request(t, ac, nil, 0, 5000, 1200)
		c.mod(&req)
		_, err := Plan(context.Background(), req)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Input != c.input {
			t.Errorf("%s: %v", c.input, err)
		}
	}
}

// Low: the full pattern does not hold, a shortened variant does, and each
// variant's gates keep the final's minimum height.
func TestLowTakesShortenedVariant(t *testing.T) {
	ac := trainer(t)
	// 3 km out on the extended final at 450 m above the field.
	req := request(t, ac, nil, 270, 3000, 550)
	req.LandingDir = 90
	res, err := Plan(context.Background(), req)
	if err != nil {
		t.Fatal(err)
	}
	if !res.Feasible || res.Variant == "full pattern" {
		t.Fatalf("feasible %v variant %q: %s", res.Feasible, res.Variant, res.Reason)
	}
	if res.Excess < 0 {
		t.Errorf("excess %v", res.Excess)
	}
	// From far below nothing holds and the reason says how short.
	req = request(t, ac, nil, 270, 8000, 300)
	req.LandingDir = 90
	res, err = Plan(context.Background(), req)
	if err != nil {
		t.Fatal(err)
	}
	if res.Feasible || !strings.Contains(res.Reason, "out of reach") {
		t.Errorf("from 300 m at 8 km: feasible %v, %s", res.Feasible, res.Reason)
	}
}

// A ridge under the final refuses that direction; the opposite direction
// (from a strip usable both ways) is taken instead.
func TestTerrainUnderFinal(t *testing.T) {
	ac := trainer(t)
	// A light wind from the north prefers landing north (track 000).
	w, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 360, Speed: 4 * knot}})
	if err != nil {
		t.Fatal(err)
	}
	req := request(t, ac, w, 0, 6000, 1500)
	north, _ := at(t, 0, 700)
	south, _ := at(t, 180, 700)
	req.Field.Strip = &[2]geodesy.LatLon{{Lat: north, Lon: fLon}, {Lat: south, Lon: fLon}}
	// Without terrain the plan lands north.
	res, err := Plan(context.Background(), req)
	if err != nil {
		t.Fatal(err)
	}
	if !res.Feasible || math.Abs(res.LandingDir) > 0.01 && math.Abs(res.LandingDir-360) > 0.01 {
		t.Fatalf("flat: feasible %v direction %v: %s", res.Feasible, res.LandingDir, res.Reason)
	}
	// A 250 m wall across the final 1.1 km south of the field.
	wallLat, _ := at(t, 180, 1100)
	req.Ground = func(lat, lon float64) (float64, bool) {
		if math.Abs(lat-wallLat) < 0.0005 && math.Abs(lon-fLon) < 0.002 {
			return 350, true
		}
		return 100, true
	}
	res, err = Plan(context.Background(), req)
	if err != nil {
		t.Fatal(err)
	}
	if !res.Feasible || math.Abs(res.LandingDir-180) > 0.01 {
		t.Fatalf("wall: feasible %v direction %v (want 180): %s", res.Feasible, res.LandingDir, res.Reason)
	}
	refused := false
	for _, d := range res.Directions {
		if math.Abs(d.Deg) < 0.01 || math.Abs(d.Deg-360) < 0.01 {
			refused = strings.Contains(d.Result, "terrain under the final leg")
		}
	}
	if !refused {
		t.Errorf("north not refused by terrain: %+v", res.Directions)
	}
}

// The kind's least pattern heights hold at the gates (common practice, no
// source): a sailplane's base at least 150 m and the full pattern's entry
// at least 250 m above the field, though its glide would need less.
func TestLeastPatternHeights(t *testing.T) {
	ac, err := reach.Builtin("sailplane")
	if err != nil {
		t.Fatal(err)
	}
	req := request(t, ac, nil, 0, 4000, 900)
	req.LandingDir = 180
	res, err := Plan(context.Background(), req)
	if err != nil {
		t.Fatal(err)
	}
	if !res.Feasible || res.Variant != "full pattern" || res.Kind != reach.KindSailplane {
		t.Fatalf("feasible %v variant %q kind %q: %s", res.Feasible, res.Variant, res.Kind, res.Reason)
	}
	for _, g := range res.Gates {
		min := map[string]float64{"entry": 250, "base": 150}[g.Name]
		if g.HeightAboveField < min-1e-9 {
			t.Errorf("%s gate %.1f m above the field, want ≥ %v", g.Name, g.HeightAboveField, min)
		}
	}
	// A sailplane glides 1:40: the clean pattern would need far less, so
	// the heights were kept and the plan says so.
	found := false
	for _, n := range res.Notes {
		found = found || strings.Contains(n, "least pattern heights")
	}
	if !found {
		t.Errorf("notes %v", res.Notes)
	}
}
