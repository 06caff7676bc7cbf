package plan_test

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/paulmach/orb"

	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/reach/plan"
	"glidereach/wind"
)

// trainer returns the built-in trainer's setup in wind w (nil: calm),
// with the profile's margins (reserve 300 m, clearance 100 m).
func trainer(t testing.TB, w *wind.Profile) *plan.Setup {
	t.Helper()
	ac, err := reach.Builtin("trainer")
	if err != nil {
		t.Fatal(err)
	}
	s, err := plan.NewSetup(ac, reach.Conditions{}, 0, w, math.NaN(), math.NaN())
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// east returns the point d metres east of (lat, lon) along the geodesic
// (Vincenty, checked in reach/geodesy against published values).
func east(t testing.TB, lat, lon, d float64) geodesy.LatLon {
	t.Helper()
	p, _, err := geodesy.Direct(geodesy.LatLon{Lat: lat, Lon: lon}, 90, d)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func TestNewSetupAtmosphereAndMargins(t *testing.T) {
	s := trainer(t, nil)
	// ICAO Doc 7488 / U.S. Standard Atmosphere 1976 (REFERENCES.md §1b):
	// ρ = 1.225000 kg/m³ at 0 m and 0.736116 kg/m³ at 5000 m.
	for _, c := range []struct{ h, rho float64 }{{0, 1.225}, {5000, 0.736116}} {
		if got := s.Atm.Density(c.h); math.Abs(got-c.rho) > 1e-4 {
			t.Errorf("density at %.0f m: %.6f kg/m³, want %.6f", c.h, got, c.rho)
		}
	}
	// The trainer profile's own margins (reach/builtin.go).
	if s.Reserve != 300 || s.Clearance != 100 || len(s.Winds) != 1 {
		t.Errorf("reserve %v, clearance %v, %d winds; want 300, 100, 1", s.Reserve, s.Clearance, len(s.Winds))
	}
	// A bad condition names its request field.
	ac, _ := reach.Builtin("trainer")
	_, err := plan.NewSetup(ac, reach.Conditions{Bugs: -1}, 0, nil, math.NaN(), math.NaN())
	var ie *plan.InputError
	if !errors.As(err, &ie) || ie.Field != "Bugs" {
		t.Errorf("bugs −1: %v, want an InputError naming Bugs", err)
	}
	// A wind uncertainty of ±10°, ±5 m/s gives the 3 × 3 grid (wind.Perturb).
	w, _ := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 270, Speed: 10}})
	s2 := trainer(t, w)
	s2.WithWindError(10, 5)
	if len(s2.Winds) != 9 || s2.Winds[0] != w {
		t.Errorf("%d winds, first the forecast %v; want 9, true", len(s2.Winds), s2.Winds[0] == w)
	}
}

func TestReachFlatCalm(t *testing.T) {
	// Flat ground at 0 m, still air, the trainer (glide ratio 9 at every
	// altitude: a best_glide polar scales speed and sink alike) from 1500 m
	// with a 300 m reserve: the footprint is the disc of radius
	// (1500 − 300)·9 = 10.8 km (tan γ = 1/E; Anderson, Introduction to
	// Flight, ch. 6), within the 0.5 % accuracy bar of DESIGN.md plus a
	// cell. A field 9 km east is reached with 1500 − 9000/9 = 500 m above
	// it and needs 300 + 9000/9 = 1300 m.
	const lat, lon = -0.5, -24.5
	f := east(t, lat, lon, 9000)
	res, err := plan.Reach(context.Background(), plan.ReachRequest{
		Setup: trainer(t, nil), Ground: plan.Ground{Flat: 0}, Lat: lat, Lon: lon, Alt: 1500,
		Fields: []plan.Field{{Name: "East", Lat: f.Lat, Lon: f.Lon}},
	})
	if err != nil {
		t.Fatal(err)
	}
	cell := res.Footprint.Ground.Cell
	if want := 1200 * 9.0; math.Abs(res.Farthest-want) > 0.005*want+cell {
		t.Errorf("farthest %.0f m, want %.0f m (±0.5 %% + a %.0f m cell)", res.Farthest, want, cell)
	}
	if len(res.Fields) != 1 {
		t.Fatalf("%d fields", len(res.Fields))
	}
	fr := res.Fields[0]
	if !fr.Reachable || math.Abs(fr.ArrivalAGLM-500) > 0.005*1000+cell/9 {
		t.Errorf("field: reachable %v, arrival %.1f m; want true, 500 m", fr.Reachable, fr.ArrivalAGLM)
	}
	if math.Abs(fr.RequiredMSL-1300) > 0.005*1000+cell/9 {
		t.Errorf("field: required %.1f m, want 1300 m", fr.RequiredMSL)
	}
	// The two figures agree: the start is above the required altitude by
	// the arrival's margin above the reserve (within a metre or two of
	// near-optimal paths, which may bend at different cells).
	if d := (1500 - fr.RequiredMSL) - fr.MarginM; math.Abs(d) > 0.005*1000+cell/9 {
		t.Errorf("start − required = %.1f m, margin %.1f m", 1500-fr.RequiredMSL, fr.MarginM)
	}
	if fr.Note != "" || res.Edge != nil {
		t.Errorf("note %q, edge %v", fr.Note, res.Edge)
	}
}

func TestReachInputErrors(t *testing.T) {
	s := trainer(t, nil)
	for _, c := range []struct {
		name  string
		req   plan.ReachRequest
		field string
	}{
		{"start below the ground", plan.ReachRequest{Setup: s, Ground: plan.Ground{Flat: 500}, Lat: 0, Lon: 0, Alt: 400}, "Alt"},
		{"glides reach the pole", plan.ReachRequest{Setup: s, Ground: plan.Ground{Flat: 0}, Lat: 89.99, Lon: 0, Alt: 3000}, "From"},
	} {
		_, err := plan.Reach(context.Background(), c.req)
		var ie *plan.InputError
		if !errors.As(err, &ie) || ie.Field != c.field {
			t.Errorf("%s: %v, want an InputError naming %s", c.name, err, c.field)
		}
	}
}

func TestFinalGlideFlatCalm(t *testing.T) {
	// Flat ground, still air, trainer (glide ratio 9): the required
	// altitude is goal + reserve + D/9 (tan γ = 1/E; Anderson, Introduction
	// to Flight, ch. 6), within 0.2 %; D along the equator is a·Δλ exactly
	// (WGS84 a, NIMA TR8350.2).
	const D = 15000.0
	dlon := D / geodesy.A * 180 / math.Pi
	s := trainer(t, nil)
	s.Reserve = 250
	res, err := plan.FinalGlide(context.Background(), plan.FinalRequest{
		Setup: s, Ground: plan.Ground{Flat: 0}, Route: []geodesy.LatLon{{Lat: 0, Lon: -24.5}, {Lat: 0, Lon: -24.5 + dlon}},
		Alt: 2200, GoalElev: 150,
	})
	if err != nil {
		t.Fatal(err)
	}
	want := 150 + 250 + D/9
	if g := res.Glide; math.Abs(g.Required-want) > 0.002*(want-150) || g.Status != reach.FinalOK {
		t.Errorf("required %.1f m, status %v; want %.1f m, ok", g.Required, g.Status, want)
	}
	if res.Worst != 0 || res.FromRequired != nil || res.Before != nil {
		t.Errorf("worst %d, from required %v, before %v", res.Worst, res.FromRequired, res.Before)
	}
	// Too coarse a step names its field.
	_, err = plan.FinalGlide(context.Background(), plan.FinalRequest{Setup: s, Ground: plan.Ground{},
		Route: []geodesy.LatLon{{Lat: 0, Lon: -24.5}, {Lat: 0, Lon: -24.5 + dlon}}, Alt: 2200, Step: 5000})
	var ie *plan.InputError
	if !errors.As(err, &ie) || ie.Field != "Step" {
		t.Errorf("step 5000 m: %v, want an InputError naming Step", err)
	}
}

func TestFinalGlideWorstOfWinds(t *testing.T) {
	// The same glide east with a wind uncertainty: the figure is that of
	// the wind needing the most altitude, and never less than in the
	// forecast wind alone (the worst-of-winds rule, DEVELOPERS.md).
	w, _ := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 90, Speed: 5}})
	route := []geodesy.LatLon{{Lat: 0, Lon: -24.5}, {Lat: 0, Lon: -24.4}}
	one, err := plan.FinalGlide(context.Background(), plan.FinalRequest{Setup: trainer(t, w), Route: route, Alt: 2500})
	if err != nil {
		t.Fatal(err)
	}
	s := trainer(t, w)
	s.WithWindError(20, 3)
	all, err := plan.FinalGlide(context.Background(), plan.FinalRequest{Setup: s, Route: route, Alt: 2500})
	if err != nil {
		t.Fatal(err)
	}
	if all.Glide.Required < one.Glide.Required {
		t.Errorf("worst of winds %.1f m below the forecast's %.1f m", all.Glide.Required, one.Glide.Required)
	}
	// A headwind from the east, 3 m/s stronger: the worst case here
	// (common practice, no source: more headwind, less range).
	if all.Worst < 0 || s.Winds[all.Worst].Layers()[0].Speed != 8 {
		t.Errorf("worst wind %d (%v), want the 8 m/s one", all.Worst, s.Winds[all.Worst].Layers())
	}
}

// box is a lon/lat box zone.
type box orb.Bound

func (b box) Contains(lat, lon float64) bool { return orb.Bound(b).Contains(orb.Point{lon, lat}) }
func (b box) Bounds() orb.Bound              { return orb.Bound(b) }

func TestCoverageFlatCalm(t *testing.T) {
	// Flat ground at 0 m, still air, the trainer at 1500 m with a 300 m
	// reserve: one field covers the disc of radius r = (1500 − 300)·9 =
	// 10.8 km (glide cone, tan γ = 1/E; Anderson, Introduction to Flight),
	// so the covered area of a box holding the disc is πr² (common
	// practice, no source), within 1 %.
	z := box{Min: orb.Point{-24.75, -0.75}, Max: orb.Point{-24.25, -0.25}}
	res, err := plan.Coverage(context.Background(), plan.CoverageRequest{
		Setup: trainer(t, nil), Ground: plan.Ground{}, Zone: z, Alt: 1500,
		Fields: []plan.Field{{Name: "Centre", Lat: -0.5, Lon: -24.5}},
	})
	if err != nil {
		t.Fatal(err)
	}
	r := 1200 * 9.0
	if want := math.Pi * r * r; math.Abs(res.Coverage.CoveredArea-want) > 0.01*want {
		t.Errorf("covered %.4g m², want %.4g m² (πr²)", res.Coverage.CoveredArea, want)
	}
	if math.Abs(res.CoveredArea-res.Coverage.CoveredArea) > 0.02*res.Coverage.CoveredArea {
		t.Errorf("polygons %.4g m², cells %.4g m²: the two must agree within 2 %%", res.CoveredArea, res.Coverage.CoveredArea)
	}
	if res.Top != 1500 || len(res.Fields) != 1 || res.Fields[0].Note != "" {
		t.Errorf("top %v, fields %+v", res.Top, res.Fields)
	}
}

func TestRouteFlatCalm(t *testing.T) {
	// Flat ground at 0 m, still air, the trainer at 1500 m with a 300 m
	// reserve, one field on the route at 20 km: it is in reach along
	// |s − 20 km| ≤ r = (1500 − 300)·9 = 10.8 km (glide cone, tan γ = 1/E;
	// Anderson, Introduction to Flight), so the covered fraction of a 60 km
	// route is 2r/60 km, and the least altitude at the field is its
	// reserve, 300 m, within a cell's glide.
	const lat0, lon0, L, step = -0.5, -24.8, 60000.0, 250.0
	var pts []reach.RoutePoint
	for d := 0.0; d <= L; d += step {
		p := east(t, lat0, lon0, d)
		pts = append(pts, reach.RoutePoint{Lat: p.Lat, Lon: p.Lon, Dist: d, Alt: 1500})
	}
	f := east(t, lat0, lon0, 20000)
	res, err := plan.Route(context.Background(), plan.RouteRequest{
		Setup: trainer(t, nil), Ground: plan.Ground{}, Points: pts, Step: step,
		Fields: []plan.Field{{Name: "On route", Lat: f.Lat, Lon: f.Lon}},
	})
	if err != nil {
		t.Fatal(err)
	}
	want := 2 * 10800 / L
	if got := res.Profile.CoveredFraction; math.Abs(got-want) > 2*step/L+0.005*want {
		t.Errorf("covered fraction %.4f, want %.4f", got, want)
	}
	at := res.Profile.Samples[int(20000/step)]
	if cell := res.Required.Ground.Cell; math.Abs(at.Least-300) > cell/9+1 {
		t.Errorf("least altitude at the field %.1f m, want 300 m", at.Least)
	}
	if res.Ceiling != 1500+plan.RouteSearchAbove || len(res.Targets) != 1 {
		t.Errorf("ceiling %v, %d targets", res.Ceiling, len(res.Targets))
	}
}

func TestApproachIntoWind(t *testing.T) {
	// Into a uniform wind from 240° the final track is 240° (common
	// practice: land into the wind), for a field with no set directions,
	// 3 km from an aircraft at 900 m above it on flat ground.
	w, _ := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 240, Speed: 5}})
	s := trainer(t, w)
	g := plan.Ground{Flat: 100}
	f := east(t, -0.5, -24.5, 3000)
	field := plan.Field{Name: "Strip", Lat: f.Lat, Lon: f.Lon}
	ter, err := plan.ReadApproachTerrain(g, -0.5, -24.5, field, nil)
	if err != nil {
		t.Fatal(err)
	}
	res, err := plan.Approach(context.Background(), plan.ApproachRequest{
		Setup: s, Terrain: ter, Lat: -0.5, Lon: -24.5, Alt: 1000, Field: field, LandingDir: math.NaN(),
	})
	if err != nil {
		t.Fatal(err)
	}
	if !res.Plan.Feasible || math.Abs(res.Plan.LandingDir-240) > 0.5 {
		t.Errorf("feasible %v, landing %.1f°: %s; want a plan landing 240°", res.Plan.Feasible, res.Plan.LandingDir, res.Plan.Reason)
	}
	if !res.FieldFromTerrain || res.Field.Elevation != 100 || res.StartElev != 100 || res.FailedWind != -1 {
		t.Errorf("field elevation %v from terrain %v, start ground %v, failed wind %d", res.Field.Elevation, res.FieldFromTerrain, res.StartElev, res.FailedWind)
	}
	// A field beyond 150 km is refused, naming From.
	far := east(t, -0.5, -24.5, 200e3)
	_, err = plan.Approach(context.Background(), plan.ApproachRequest{Setup: s, Terrain: ter, Lat: -0.5, Lon: -24.5, Alt: 1000,
		Field: plan.Field{Name: "Far", Lat: far.Lat, Lon: far.Lon}, LandingDir: math.NaN()})
	var ie *plan.InputError
	if !errors.As(err, &ie) || ie.Field != "From" {
		t.Errorf("far field: %v, want an InputError naming From", err)
	}
}

func TestReachFieldBeyondOneWindsBound(t *testing.T) {
	// Flat ground at 0 m, the trainer (glide ratio 9) from 1500 m: a
	// field's ceiling is the start + 4000 m = 5500 m. In still air no glide
	// from 5500 m with the 300 m reserve covers more than (5500 − 300)·9 =
	// 46.8 km (tan γ = 1/E; Anderson, Introduction to Flight, ch. 6), so a
	// field 60 km east is out of reach in that wind, while a 15 m/s wind
	// from the west carries the glide there. With both winds the field must
	// hold in each (the worst-of-winds rule): out of reach, decided from
	// the still air's range bound, with no figure (the note is the one a
	// field off the footprint's window always has).
	const lat, lon = -0.5, -24.5
	f := east(t, lat, lon, 60000)
	fields := []plan.Field{{Name: "Far east", Lat: f.Lat, Lon: f.Lon}}
	tail, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 270, Speed: 15}})
	if err != nil {
		t.Fatal(err)
	}
	calm, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 0, Speed: 0}})
	if err != nil {
		t.Fatal(err)
	}
	judge := func(winds ...*wind.Profile) plan.FieldResult {
		t.Helper()
		s := trainer(t, winds[0])
		s.Winds = winds
		res, err := plan.Reach(context.Background(), plan.ReachRequest{
			Setup: s, Ground: plan.Ground{Flat: 0}, Lat: lat, Lon: lon, Alt: 1500, Fields: fields})
		if err != nil {
			t.Fatal(err)
		}
		return res.Fields[0]
	}
	// In the tailwind alone the backward run finds a figure (so the verdict
	// below comes from the still air).
	if fr := judge(tail); math.IsNaN(fr.RequiredMSL) || fr.RequiredMSL > 5500 {
		t.Fatalf("tailwind alone: required %.0f m (%q), want a figure below 5500 m", fr.RequiredMSL, fr.Note)
	}
	for _, fr := range []plan.FieldResult{judge(calm), judge(tail, calm), judge(calm, tail)} {
		if !math.IsNaN(fr.RequiredMSL) || fr.Reachable || fr.Note != "beyond the computed window: out of reach" {
			t.Errorf("required %.0f m, reachable %v, note %q; want none, false, beyond the computed window: out of reach",
				fr.RequiredMSL, fr.Reachable, fr.Note)
		}
	}
}
