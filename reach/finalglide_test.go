package reach

import (
	"context"
	"errors"
	"math"
	"testing"

	"glidereach/reach/geodesy"
	"glidereach/terrain"
	"glidereach/wind"
)

// constantDensity is an atmosphere whose density is ρ₀ at every altitude:
// ISA pressure with the temperature p_ISA(h)/(R·ρ₀). It removes the density
// change with altitude so that closed-form glide figures hold along the
// whole glide (a test device, not a physical atmosphere).
var constantDensity = Atmosphere{Temp: func(h float64) (float64, bool) {
	_, p, _ := ISA(h)
	return p / (RAir * ISADensity0), true
}}

// testGlider is a best_glide-polar aircraft whose speed to fly stays inside
// its usable range for the winds of these tests (usable 18.2..70 m/s).
func testGlider(vbg, e float64) *Aircraft {
	return &Aircraft{Name: "test glider", RefMass: 400, StallIAS: 14, MaxIAS: 70,
		Polar: &BestGlidePolar{Speed: vbg, Ratio: e}}
}

func uniformWind(t testing.TB, fromDeg, speed float64) *wind.Profile {
	t.Helper()
	p, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: fromDeg, Speed: speed}})
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func mustFinal(t testing.TB, route []geodesy.LatLon, startAlt float64, perf Performance, opts FinalGlideOptions) *FinalGlideResult {
	t.Helper()
	res, err := FinalGlide(context.Background(), route, startAlt, perf, opts)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func TestFinalGlideStillAirFlat(t *testing.T) {
	// Still air, flat ground: the required altitude is goal + reserve + D/E
	// (tan γ = 1/E; Anderson, Introduction to Flight, ch. 6, gliding
	// flight), within 0.2 %. Rule of thumb: at a glide ratio of 10 one
	// nautical mile costs about 608 ft (common practice, no source). The
	// leg runs along the equator, itself a geodesic, so D = a·Δλ exactly
	// (WGS84 a, NIMA TR8350.2).
	ac := &Aircraft{Name: "ten", RefMass: 700, StallIAS: 20, MaxIAS: 60, Polar: &BestGlidePolar{Speed: 30, Ratio: 10}}
	for _, nm := range []float64{1, 10, 40} {
		D := nm * 1852
		dlon := D / geodesy.A * 180 / math.Pi
		route := []geodesy.LatLon{{Lat: 0, Lon: -24.5}, {Lat: 0, Lon: -24.5 + dlon}}
		for _, goal := range []float64{0, 450} {
			res := mustFinal(t, route, math.NaN(), Performance{Aircraft: ac}, FinalGlideOptions{GoalElev: goal, Reserve: 300})
			want := goal + 300 + D/10
			if math.Abs(res.Required-want) > 0.002*(want-goal) {
				t.Errorf("%v nm, goal %v m: required %.2f m, want %.2f m", nm, goal, res.Required, want)
			}
			perNM := (res.Required - goal - 300) / nm / 0.3048
			if math.Abs(perNM-608) > 0.002*608 {
				t.Errorf("%v nm: %.1f ft per nm at glide ratio 10, rule of thumb 608 ft", nm, perNM)
			}
			if res.Status != FinalOK || math.Abs(res.AboveReserve) > 0.01 {
				t.Errorf("started at the required altitude: status %v, %.3f m above the reserve", res.Status, res.AboveReserve)
			}
		}
	}
}

// bestGlideInWind returns the speed-to-fly ratio x = V/V_bg and the ground
// glide ratio of the best_glide polar w(V) = A V³ + B/V (A = 1/(2E V_bg²),
// B = V_bg²/(2E)) in a tailwind Wt (negative = headwind), derived here and
// independent of the code under test:
//
// maximise (V + Wt)/w(V): d/dV = 0 ⇔ w − (V + Wt)·w' = 0 (the tangent from
// (−Wt, 0) to the polar; MacCready/Reichmann speed-to-fly construction,
// memory). With w' = 3AV² − B/V², multiplying by V²·2E/V_bg³ and writing
// x = V/V_bg, u = Wt/V_bg gives the quintic
//
//	2x⁵ + 3u·x⁴ − 2x − u = 0
//
// (x = 1 when u = 0), solved by bisection on x > max(0, −u). Then
// w = (x³ + 1/x)·V_bg/(2E), so the ground glide ratio is
// E_g = 2E·(x + u)/(x³ + 1/x) and the ground speed V + Wt.
func bestGlideInWind(vbg, e, wt float64) (x, eg float64) {
	u := wt / vbg
	f := func(x float64) float64 { return 2*math.Pow(x, 5) + 3*u*math.Pow(x, 4) - 2*x - u }
	lo, hi := math.Max(0.2, -u+1e-9), 5.0
	for i := 0; i < 200; i++ {
		m := (lo + hi) / 2
		if f(m) > 0 {
			hi = m
		} else {
			lo = m
		}
	}
	x = (lo + hi) / 2
	return x, 2 * e * (x + u) / (x*x*x + 1/x)
}

func TestBestGlideInWindDerivation(t *testing.T) {
	// The derivation reproduces the worked values for the example polar of
	// REFERENCES.md §2a/§3 (V_bg 22.5776 m/s, E 28.0250; own calculation
	// there, recomputed in Python): headwind 10 → V* 26.4216, E_g 16.5911;
	// tailwind 10 → V* 20.8025, E_g 40.9465.
	for _, c := range []struct{ wt, v, eg float64 }{{-10, 26.4216, 16.5911}, {-5, 24.1127, 22.0229}, {5, 21.5357, 34.3780}, {10, 20.8025, 40.9465}} {
		x, eg := bestGlideInWind(22.5776, 28.0250, c.wt)
		if math.Abs(x*22.5776-c.v) > 2e-3 || math.Abs(eg-c.eg) > 2e-3 {
			t.Errorf("wind %+v: V %.4f E_g %.4f, want %.4f %.4f", c.wt, x*22.5776, eg, c.v, c.eg)
		}
	}
}

func TestFinalGlideUniformWindClosedForm(t *testing.T) {
	// Uniform head- and tailwind on a meridian leg (track 000°, a geodesic
	// of constant track), constant density: the leg's ground glide ratio,
	// its time D/(V + Wt) and the required altitude match the closed form of
	// bestGlideInWind within 0.1 %.
	const vbg, e = 25.0, 30.0
	ac := testGlider(vbg, e)
	route := []geodesy.LatLon{{Lat: -0.7, Lon: -24.5}, {Lat: -0.45, Lon: -24.5}}
	D, _, _, err := geodesy.Inverse(route[0], route[1])
	if err != nil {
		t.Fatal(err)
	}
	for _, wt := range []float64{-12, -5, 0, 5, 10} {
		from := 180.0 // tailwind on track 000 blows from the south
		if wt < 0 {
			from = 0
		}
		x, eg := bestGlideInWind(vbg, e, wt)
		perf := Performance{Aircraft: ac, Atm: constantDensity, Wind: uniformWind(t, from, math.Abs(wt))}
		res := mustFinal(t, route, math.NaN(), perf, FinalGlideOptions{GoalElev: 120, Reserve: 250})
		l := res.Legs[0]
		wantTime := D / (x*vbg + wt)
		if math.Abs(l.GroundRatio-eg) > 1e-3*eg {
			t.Errorf("tailwind %+v: ground glide ratio %.4f, closed form %.4f", wt, l.GroundRatio, eg)
		}
		if math.Abs(l.Time-wantTime) > 1e-3*wantTime || math.Abs(res.Time-wantTime) > 1e-3*wantTime {
			t.Errorf("tailwind %+v: time %.1f s, closed form %.1f s", wt, l.Time, wantTime)
		}
		if want := 120 + 250 + D/eg; math.Abs(res.Required-want) > 1e-3*(want-370) {
			t.Errorf("tailwind %+v: required %.1f m, closed form %.1f m", wt, res.Required, want)
		}
		if math.Abs(l.TAS-x*vbg) > 0.01 || math.Abs(l.Tailwind-wt) > 1e-9 {
			t.Errorf("tailwind %+v: speed to fly %.3f m/s (closed form %.3f), tailwind %.3f", wt, l.TAS, x*vbg, l.Tailwind)
		}
	}
}

func TestFinalGlideTwoLegsSum(t *testing.T) {
	// Two legs with different tracks in a uniform wind (constant density):
	// the height lost is the sum of each leg's D·(w/G) with the speed to fly
	// optimised directly (not through the table) on the leg's track, the
	// wind split along and across it by the wind triangle (common
	// practice, no source). Within 0.1 %.
	ac := testGlider(25, 30)
	const from, speed = 250.0, 9.0
	perf := Performance{Aircraft: ac, Atm: constantDensity, Wind: uniformWind(t, from, speed)}
	route := []geodesy.LatLon{{Lat: -0.6, Lon: -24.6}, {Lat: -0.45, Lon: -24.42}, {Lat: -0.62, Lon: -24.3}}
	res := mustFinal(t, route, 3000, perf, FinalGlideOptions{GoalElev: 50, Reserve: 200})
	sum := 0.0
	for i, l := range res.Legs {
		to := from + 180 // direction the air moves towards
		rel := (l.MeanTrackDeg - to) * math.Pi / 180
		along, cross := speed*math.Cos(rel), speed*math.Sin(rel)
		s := ac.SpeedToFly(ISADensity0, along, cross, Conditions{})
		want := l.Distance * s.Loss
		sum += want
		if math.Abs(l.HeightLost-want) > 1e-3*want {
			t.Errorf("leg %d (track %.0f°): lost %.2f m, direct %.2f m", i+1, l.MeanTrackDeg, l.HeightLost, want)
		}
	}
	if got := res.Required - 250; math.Abs(got-sum) > 1e-3*sum {
		t.Errorf("required − goal − reserve = %.2f m, sum of legs %.2f m", got, sum)
	}
	if got := 3000 - res.Arrival; math.Abs(got-sum) > 1e-3*sum {
		t.Errorf("height lost from 3000 m = %.2f m, sum of legs %.2f m", got, sum)
	}
	if math.Abs(res.Legs[1].StartAlt-res.Legs[0].EndAlt) > 1e-9 {
		t.Errorf("leg 2 starts at %.3f m, leg 1 ends at %.3f m", res.Legs[1].StartAlt, res.Legs[0].EndAlt)
	}
}

func TestFinalGlideMatchesFootprint(t *testing.T) {
	skipUnderRace(t)
	// Layered wind and ISA: the required altitude of FinalGlide (RK4 along
	// the geodesic) equals the start altitude found by bisection on the
	// forward footprint solver's arrival at the goal (any-angle propagation
	// over a flat grid with its own descent integrator): two independent
	// paths through the code, within 0.5 %.
	ac, _ := Builtin("trainer")
	w := layeredWind(t, 1.5)
	atm := Atmosphere{}
	const reserve = 300.0
	start := geodesy.LatLon{Lat: -0.5, Lon: -24.5}
	for _, brg := range []float64{60, 250} {
		goal, _, err := geodesy.Direct(start, brg, 12000)
		if err != nil {
			t.Fatal(err)
		}
		res := mustFinal(t, []geodesy.LatLon{start, goal}, math.NaN(), Performance{Aircraft: ac, Atm: atm, Wind: w}, FinalGlideOptions{Reserve: reserve})
		tab, err := NewTable(ac, atm, w, Conditions{}, -300, 4000)
		if err != nil {
			t.Fatal(err)
		}
		g := flatWindow(start.Lat, start.Lon, 281, 100, 0)
		arrive := func(h float64) float64 {
			f, err := Footprint(context.Background(), g, Start{Lat: start.Lat, Lon: start.Lon, Alt: h}, tab, FootprintOptions{Reserve: reserve, Clearance: 0})
			if err != nil {
				t.Fatal(err)
			}
			a, ok := f.ArrivalAt(goal.Lat, goal.Lon)
			if !ok {
				return math.Inf(-1)
			}
			return a
		}
		lo, hi := reserve, reserve+12000/3.0
		for hi-lo > 1 {
			m := (lo + hi) / 2
			if arrive(m) >= reserve {
				hi = m
			} else {
				lo = m
			}
		}
		want := (lo + hi) / 2
		if math.Abs(res.Required-want) > 0.005*want {
			t.Errorf("track %v°: final glide needs %.1f m, footprint bisection %.1f m (±0.5 %%)", brg, res.Required, want)
		}
		t.Logf("track %v°: final %.1f m, footprint %.1f m", brg, res.Required, want)
	}
}

// ridgeLocal is flat ground at base with a ridge running east–west across
// the frame's y axis: a triangular cross-section of half-width half (m)
// whose crest (height crest m MSL) is the cell row at y = yc.
func ridgeLocal(frame terrain.Frame, cell, yc, half, base, crest float64) *terrain.Local {
	n := 401
	l := terrain.NewFlat(frame, -float64(n-1)/2*cell, -100*cell, cell, n, n, base)
	l.Flat = false
	for r := 0; r < n; r++ {
		_, y := l.XY(0, r)
		d := math.Abs(y - yc)
		if d >= half {
			continue
		}
		z := float32(base + (crest-base)*(1-d/half))
		for c := 0; c < n; c++ {
			l.Elev[r*n+c] = z
		}
	}
	return l
}

func TestFinalGlideRidgeBlocked(t *testing.T) {
	// A ridge across a northbound line in still air: the deepest intrusion
	// lies at the crest (the glide slope 1/E is shallower than the ridge's
	// flanks), found within one cell; the extra start altitude it reports
	// clears the floor when added (recomputed), and 1 m less does not. The
	// analytic extra, crest + clearance + (distance to crest)/E − start,
	// holds within 1 m (tan γ = 1/E, Anderson, ch. 6; the best_glide ratio
	// does not change with density).
	ac := testGlider(25, 30)
	const cell, yc, crest, base, clearance = 50.0, 8000.0, 1400.0, 100.0, 100.0
	start := geodesy.LatLon{Lat: -0.5, Lon: -24.5}
	frame := terrain.NewFrame(start.Lat, start.Lon)
	l := ridgeLocal(frame, cell, yc, 600, base, crest)
	sampler := func(lat, lon float64) (float64, bool) { return l.Sample(frame.Forward(lat, lon)) }
	goal, _, _ := geodesy.Direct(start, 0, 15000)
	route := []geodesy.LatLon{start, goal}
	opts := FinalGlideOptions{GoalElev: base, Reserve: 200, Clearance: clearance, Terrain: sampler, Step: cell}
	const h0 = 1500.0
	res := mustFinal(t, route, h0, Performance{Aircraft: ac}, opts)
	tr := res.Terrain
	if !tr.Blocked || res.Status != FinalBlocked {
		t.Fatalf("not blocked: %+v", tr)
	}
	if math.Abs(tr.BlockDist-yc) > cell {
		t.Errorf("blocked at %.0f m, crest at %.0f m (±%v m)", tr.BlockDist, yc, cell)
	}
	want := crest + clearance + yc/30 - h0
	if math.Abs(tr.Extra-want) > 1 {
		t.Errorf("extra %.2f m, analytic %.2f m", tr.Extra, want)
	}
	if !tr.Verified {
		t.Error("extra altitude not verified")
	}
	up := mustFinal(t, route, h0+tr.Extra, Performance{Aircraft: ac}, opts)
	if up.Terrain.Blocked || up.Terrain.LowestClearance < 0 {
		t.Errorf("start %.1f m (+%.1f): still blocked, lowest clearance %.1f m", h0+tr.Extra, tr.Extra, up.Terrain.LowestClearance)
	}
	if math.Abs(up.Terrain.LowestDist-yc) > cell || math.Abs(up.Terrain.LowestClearance-clearance) > 0.5 {
		t.Errorf("cleared line: lowest clearance %.2f m at %.0f m, want %.0f m at the crest", up.Terrain.LowestClearance, up.Terrain.LowestDist, clearance)
	}
	if less := mustFinal(t, route, h0+tr.Extra-1, Performance{Aircraft: ac}, opts); !less.Terrain.Blocked {
		t.Errorf("1 m below the reported extra is not blocked: the extra is not the least")
	}
	if tr.LeastClearAlt < res.Required || math.Abs(tr.LeastClearAlt-(h0+tr.Extra)) > 0.1 {
		t.Errorf("least clearing altitude %.1f m, required %.1f m, start+extra %.1f m", tr.LeastClearAlt, res.Required, h0+tr.Extra)
	}
}

func TestFinalGlideFlatNotBlocked(t *testing.T) {
	// Flat terrain at the goal's elevation with a reserve below the
	// clearance: the line that arrives at the reserve is not blocked (the
	// demanded clearance tapers to the reserve at the goal).
	ac := testGlider(25, 30)
	start := geodesy.LatLon{Lat: -0.5, Lon: -24.5}
	goal, _, _ := geodesy.Direct(start, 120, 20000)
	flat := func(lat, lon float64) (float64, bool) { return 80, true }
	res := mustFinal(t, []geodesy.LatLon{start, goal}, math.NaN(), Performance{Aircraft: ac},
		FinalGlideOptions{GoalElev: 80, Reserve: 50, Clearance: 150, Terrain: flat, Step: 90})
	if res.Terrain.Blocked || res.Status != FinalOK {
		t.Errorf("status %v, terrain %+v", res.Status, res.Terrain)
	}
	if math.Abs(res.Terrain.LowestClearance-50) > 0.01 || math.Abs(res.Terrain.LowestDist-20000) > 1 {
		t.Errorf("lowest clearance %.2f m at %.0f m, want the 50 m reserve at the goal", res.Terrain.LowestClearance, res.Terrain.LowestDist)
	}
}

func TestFinalGlideShortOverFlatIsNotBlocked(t *testing.T) {
	// Flat ground at the goal's elevation, still air, a start far too low:
	// the line meets the ground because the glide is short, not because
	// terrain is in the way — status short, with the shortfall D/E +
	// reserve − start (tan γ = 1/E; Anderson, Introduction to Flight). A
	// ridge that needs more than the reserve does keeps the status blocked
	// even when the glide is also short.
	ac := testGlider(25, 30)
	start := geodesy.LatLon{Lat: -0.5, Lon: -24.5}
	goal, _, _ := geodesy.Direct(start, 0, 15000)
	route := []geodesy.LatLon{start, goal}
	flat := func(lat, lon float64) (float64, bool) { return 100, true }
	opts := FinalGlideOptions{GoalElev: 100, Reserve: 200, Clearance: 100, Terrain: flat, Step: 50}
	res := mustFinal(t, route, 400, Performance{Aircraft: ac}, opts)
	if res.Status != FinalShort {
		t.Errorf("short over flat ground: status %v, want short", res.Status)
	}
	if want := 400 - (100 + 200 + 15000/30.0); math.Abs(res.AboveReserve-want) > 0.5 {
		t.Errorf("above the reserve %.1f m, want %.1f m", res.AboveReserve, want)
	}
	frame := terrain.NewFrame(start.Lat, start.Lon)
	l := ridgeLocal(frame, 50, 8000, 600, 100, 1400)
	opts.Terrain = func(lat, lon float64) (float64, bool) { return l.Sample(frame.Forward(lat, lon)) }
	if r := mustFinal(t, route, 400, Performance{Aircraft: ac}, opts); r.Status != FinalBlocked || !(r.Terrain.LeastClearAlt > r.RequiredStraight+100) {
		t.Errorf("short and behind a ridge: status %v, least clearing %.0f m, required without the terrain %.0f m", r.Status, r.Terrain.LeastClearAlt, r.RequiredStraight)
	}
}

func TestFinalGlideAffordableMacCready(t *testing.T) {
	// The highest affordable MacCready setting, flown, arrives at the
	// reserve within 1 m (definition of the setting; common practice, no
	// source), and is faster than setting 0.
	ac, _ := Builtin("sailplane")
	w := layeredWind(t, 1)
	start := geodesy.LatLon{Lat: -0.5, Lon: -24.5}
	tp, _, _ := geodesy.Direct(start, 200, 30000)
	goal, _, _ := geodesy.Direct(tp, 310, 25000)
	route := []geodesy.LatLon{start, tp, goal}
	opts := FinalGlideOptions{GoalElev: 150, Reserve: 200}
	perf := Performance{Aircraft: ac, Atm: Atmosphere{ISADev: 10}, Wind: w}
	res := mustFinal(t, route, 2600, perf, opts)
	mc := res.MacCready
	if math.IsNaN(mc.Affordable) || mc.Affordable <= 0 || mc.AtLimit {
		t.Fatalf("affordable %+v (required %.0f m)", mc, res.Required)
	}
	perf.Cond.MacCready = mc.Affordable
	flown := mustFinal(t, route, 2600, perf, opts)
	if flown.AboveReserve < -1e-6 || flown.AboveReserve > 1 {
		t.Errorf("MacCready %.3f m/s arrives %.2f m above the reserve, want 0..1 m", mc.Affordable, flown.AboveReserve)
	}
	if !(mc.Saved > 0) || math.Abs(mc.TimeAffordable-flown.Time) > 1e-6*flown.Time {
		t.Errorf("time saved %.0f s; time at the setting %.0f s vs recomputed %.0f s", mc.Saved, mc.TimeAffordable, flown.Time)
	}
	t.Logf("affordable MC %.2f m/s saves %.0f s of %.0f s", mc.Affordable, mc.Saved, mc.Time0)

	// Too low for even setting 0: none affordable.
	low := mustFinal(t, route, res.Required-50, Performance{Aircraft: ac, Atm: Atmosphere{ISADev: 10}, Wind: w}, opts)
	if !math.IsNaN(low.MacCready.Affordable) || low.Status != FinalShort {
		t.Errorf("50 m below the required altitude: affordable %v, status %v", low.MacCready.Affordable, low.Status)
	}
}

func TestFinalGlideNoHeadway(t *testing.T) {
	// A headwind stronger than the trainer's maximum speed (120 kt ≈ 62 m/s)
	// on the second leg: status no headway on that leg, not an error.
	ac, _ := Builtin("trainer")
	w := uniformWind(t, 90, 70) // from the east
	start := geodesy.LatLon{Lat: -0.5, Lon: -24.5}
	tp, _, _ := geodesy.Direct(start, 270, 5000)
	goal, _, _ := geodesy.Direct(tp, 90, 20000)
	res := mustFinal(t, []geodesy.LatLon{start, tp, goal}, 3000, Performance{Aircraft: ac, Wind: w}, FinalGlideOptions{Reserve: 300})
	if res.Status != FinalNoHeadway || res.NoHeadwayLeg != 1 || !res.Legs[1].NoHeadway || !math.IsInf(res.Required, 1) {
		t.Errorf("status %v, leg %d, legs %+v, required %v", res.Status, res.NoHeadwayLeg, res.Legs, res.Required)
	}
	if res.Status.String() != "no_headway" {
		t.Errorf("status string %q", res.Status)
	}
}

func TestFinalGlideErrors(t *testing.T) {
	ac, _ := Builtin("trainer")
	p := Performance{Aircraft: ac}
	a, b := geodesy.LatLon{Lat: -0.5, Lon: -24.5}, geodesy.LatLon{Lat: -0.4, Lon: -24.5}
	cases := []struct {
		name  string
		route []geodesy.LatLon
		alt   float64
		perf  Performance
		opts  FinalGlideOptions
	}{
		{"one point", []geodesy.LatLon{a}, 1000, p, FinalGlideOptions{}},
		{"zero-length leg", []geodesy.LatLon{a, a, b}, 1000, p, FinalGlideOptions{}},
		{"bad latitude", []geodesy.LatLon{a, {Lat: 95, Lon: 0}}, 1000, p, FinalGlideOptions{}},
		{"no aircraft", []geodesy.LatLon{a, b}, 1000, Performance{}, FinalGlideOptions{}},
		{"negative reserve", []geodesy.LatLon{a, b}, 1000, p, FinalGlideOptions{Reserve: -1}},
		{"NaN clearance", []geodesy.LatLon{a, b}, 1000, p, FinalGlideOptions{Clearance: math.NaN()}},
		{"negative step", []geodesy.LatLon{a, b}, 1000, p, FinalGlideOptions{Step: -5}},
		{"start too high", []geodesy.LatLon{a, b}, 30000, p, FinalGlideOptions{}},
		{"bad conditions", []geodesy.LatLon{a, b}, 1000, Performance{Aircraft: ac, Cond: Conditions{Bugs: 5}}, FinalGlideOptions{}},
		{"far too far", []geodesy.LatLon{a, {Lat: 30, Lon: -24.5}}, 1000, p, FinalGlideOptions{Step: 5000}},
	}
	for _, c := range cases {
		res, err := FinalGlide(context.Background(), c.route, c.alt, c.perf, c.opts)
		if err == nil {
			t.Errorf("%s: no error (status %v)", c.name, res.Status)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := FinalGlide(ctx, []geodesy.LatLon{a, b}, 1000, p, FinalGlideOptions{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}

func BenchmarkFinalGlide(b *testing.B) {
	// 100 km in two legs, layered wind, terrain sampled every 30 m (flat
	// sampler: the cost is the glide, not the DEM).
	ac, _ := Builtin("sailplane")
	w := layeredWind(b, 1)
	start := geodesy.LatLon{Lat: -0.5, Lon: -24.5}
	tp, _, _ := geodesy.Direct(start, 30, 50000)
	goal, _, _ := geodesy.Direct(tp, 160, 50000)
	route := []geodesy.LatLon{start, tp, goal}
	flat := func(lat, lon float64) (float64, bool) { return 100, true }
	perf := Performance{Aircraft: ac, Wind: w}
	opts := FinalGlideOptions{GoalElev: 100, Reserve: 200, Clearance: 100, Terrain: flat, Step: 30}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := FinalGlide(context.Background(), route, 3000, perf, opts); err != nil {
			b.Fatal(err)
		}
	}
}

func TestTrackTableMatchesTable(t *testing.T) {
	// The lazily filled table of the MacCready search is NewTable's grid
	// and interpolation: it must give the same values (to rounding).
	ac, _ := Builtin("sailplane")
	w := layeredWind(t, 1)
	perf := Performance{Aircraft: ac, Atm: Atmosphere{ISADev: 5}, Wind: w, Cond: Conditions{Bugs: 0.05}}
	full, err := perf.table(1.2, 130, 2870)
	if err != nil {
		t.Fatal(err)
	}
	lazy := newTrackTable(perf, 1.2, 130, 2870)
	for i := 0; i < 2000; i++ {
		h := 100 + float64(i%97)*29.3
		b := float64(i) * 0.7311
		if a, c := full.Loss(h, b), lazy.Loss(h, b); math.Abs(a-c) > 1e-12*a {
			t.Fatalf("Loss(%v, %v): table %v, track table %v", h, b, a, c)
		}
		if a, c := full.At(h, b).GroundSpeed, lazy.groundSpeed(h, b); math.Abs(a-c) > 1e-9 {
			t.Fatalf("ground speed (%v, %v): table %v, track table %v", h, b, a, c)
		}
	}
}
