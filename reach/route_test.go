package reach

import (
	"context"
	"math"
	"testing"

	"glidereach/terrain"
)

// straightRoute samples the frame line y = 0 of g from x0 to x1 (m) every
// step metres at altitude alt.
func straightRoute(g *terrain.Local, x0, x1, step, alt float64) []RoutePoint {
	var pts []RoutePoint
	for d := 0.0; d <= x1-x0+1e-9; d += step {
		lat, lon := g.Frame.Inverse(x0+d, 0)
		pts = append(pts, RoutePoint{Lat: lat, Lon: lon, Dist: d, Alt: alt})
	}
	return pts
}

func TestRouteGapsTwoFieldsFlat(t *testing.T) {
	// A straight route past two fields on flat ground in still air: a field
	// at distance b from the line is in reach from altitude H along the
	// stretch where the distance to it is at most r = (H − elev − reserve)·E
	// (the glide cone; tan γ = 1/E, Anderson, Introduction to Flight), i.e.
	// |x − x_f| ≤ √(r² − b²) (circle–line intersection, analytic geometry,
	// common practice, no source). The gap ends must lie within one sample
	// step of those positions.
	const E, elev, reserve, H, step = 10.0, 100.0, 300.0, 1400.0, 250.0
	r := (H - elev - reserve) * E // 10 km
	g := terrain.NewFlat(terrain.NewFrame(-0.5, -24.5), -43000, -19000, 100, 861, 381, elev)
	type field struct{ x, y float64 }
	fl := []field{{-15000, 4000}, {12000, -6000}}
	var targets []Target
	for _, f := range fl {
		lat, lon := g.Frame.Inverse(f.x, f.y)
		targets = append(targets, Target{Lat: lat, Lon: lon, Elev: elev, Reserve: reserve})
	}
	res, err := Required(context.Background(), g, targets, ConstantLoss(E), RequiredOptions{Clearance: 100, Ceiling: 2500})
	if err != nil {
		t.Fatal(err)
	}
	const x0, x1 = -40000.0, 40000.0
	prof, err := res.Route(straightRoute(g, x0, x1, step, H), 2500)
	if err != nil {
		t.Fatal(err)
	}
	// Covered stretches (route distance = x − x0).
	var cov [][2]float64
	for _, f := range fl {
		h := math.Sqrt(r*r - f.y*f.y)
		cov = append(cov, [2]float64{f.x - h - x0, f.x + h - x0})
	}
	want := [][2]float64{{0, cov[0][0]}, {cov[0][1], cov[1][0]}, {cov[1][1], x1 - x0}}
	if len(prof.Gaps) != len(want) {
		t.Fatalf("got %d gaps, want %d: %+v", len(prof.Gaps), len(want), prof.Gaps)
	}
	for i, w := range want {
		gp := prof.Gaps[i]
		if math.Abs(gp.Start-w[0]) > step || math.Abs(gp.End-w[1]) > step {
			t.Errorf("gap %d: %.0f..%.0f m, want %.0f..%.0f m (± %.0f)", i, gp.Start, gp.End, w[0], w[1], step)
		}
	}
	wantFrac := (cov[0][1] - cov[0][0] + cov[1][1] - cov[1][0]) / (x1 - x0)
	if math.Abs(prof.CoveredFraction-wantFrac) > 2*step/(x1-x0) {
		t.Errorf("covered fraction %.4f, want %.4f", prof.CoveredFraction, wantFrac)
	}
	// The altitude that closes the middle gap closes it when flown there.
	mid := prof.Gaps[1]
	if !(mid.CloseAlt > H) {
		t.Fatalf("middle gap close altitude %.1f m, want above %.0f m", mid.CloseAlt, H)
	}
	pts := straightRoute(g, x0, x1, step, H)
	for i := range pts {
		if pts[i].Dist >= mid.Start-step && pts[i].Dist <= mid.End+step {
			pts[i].Alt = mid.CloseAlt
		}
	}
	p2, err := res.Route(pts, 2500)
	if err != nil {
		t.Fatal(err)
	}
	if len(p2.Gaps) != 2 {
		t.Errorf("flying the middle gap at %.0f m leaves %d gaps, want 2: %+v", mid.CloseAlt, len(p2.Gaps), p2.Gaps)
	}
	// Best field and margin semantics on a covered sample next to field 0.
	for _, s := range prof.Samples {
		if math.Abs(s.Dist-(fl[0].x-x0)) < step/2 {
			if s.Best != 0 || !s.Covered {
				t.Errorf("sample abeam field 0: best %d covered %v", s.Best, s.Covered)
			}
			// Least = elev + reserve + b/E abeam the field (glide cone).
			if wl := elev + reserve + 4000/E; math.Abs(s.Least-wl) > 0.005*(wl-elev) {
				t.Errorf("least altitude abeam field 0: %.1f m, want %.1f m", s.Least, wl)
			}
			if math.Abs(s.Margin-(H-s.Least)) > 1e-9 {
				t.Errorf("margin %.3f, want planned − least = %.3f", s.Margin, H-s.Least)
			}
		}
	}
}

func TestRouteGapEdgeCases(t *testing.T) {
	// Table of hand-made sample runs: the gaps and their ends follow from
	// linear interpolation of the margin (common practice, no source).
	nan := math.NaN()
	mk := func(margins ...float64) []RouteSample {
		s := make([]RouteSample, len(margins))
		for i, m := range margins {
			s[i] = RouteSample{RoutePoint: RoutePoint{Dist: float64(i) * 100, Alt: 1000}, Margin: m, Least: 1000 - m, Covered: m >= 0}
		}
		return s
	}
	cases := []struct {
		name    string
		samples []RouteSample
		want    [][2]float64
	}{
		{"all covered", mk(10, 20, 30), nil},
		{"all uncovered", mk(-10, -20, -30), [][2]float64{{0, 200}}},
		{"middle gap interpolated", mk(10, -10, -30, 30), [][2]float64{{50, 250}}},
		{"gap at the end", mk(30, 10, -10), [][2]float64{{150, 200}}},
		{"no value next to a covered sample", mk(10, nan, 10), [][2]float64{{0, 200}}},
		{"zero margin is covered", mk(0, -1, 0), [][2]float64{{0, 200}}},
	}
	for _, tc := range cases {
		gaps := routeGaps(tc.samples)
		if len(gaps) != len(tc.want) {
			t.Errorf("%s: %d gaps, want %d", tc.name, len(gaps), len(tc.want))
			continue
		}
		for i, w := range tc.want {
			if math.Abs(gaps[i].Start-w[0]) > 1e-9 || math.Abs(gaps[i].End-w[1]) > 1e-9 {
				t.Errorf("%s: gap %d %.1f..%.1f, want %.1f..%.1f", tc.name, i, gaps[i].Start, gaps[i].End, w[0], w[1])
			}
		}
	}
	if g := routeGaps(mk(10, nan, 10)); !math.IsNaN(g[0].CloseAlt) {
		t.Errorf("a gap with no field in reach has close altitude %v, want NaN", g[0].CloseAlt)
	}
	r := &RequiredResult{Ground: flatWindow(-0.5, -24.5, 3, 10, 0)}
	if _, err := r.Route(nil, 0); err == nil {
		t.Error("empty route accepted")
	}
	if _, err := r.Route([]RoutePoint{{Dist: 10}, {Dist: 5}}, 0); err == nil {
		t.Error("route out of order accepted")
	}
}
