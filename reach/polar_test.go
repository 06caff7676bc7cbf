package reach

import (
	"math"
	"strings"
	"testing"
)

// illustration is the rough sailplane polar of REFERENCES.md §2a: C_D0 = 0.020,
// aspect ratio 20, e = 1, wing loading 350 N/m² (S = 1 m²), figures commonly
// used for illustration (common practice, no source). The stall is put low so
// that no clamp hides the pure-model optima.
func illustration(t testing.TB) (*Aircraft, *DragPolar) {
	t.Helper()
	p, err := NewDragPolar(0.020, 20, 1, 1, 350/G0)
	if err != nil {
		t.Fatal(err)
	}
	ac := &Aircraft{Name: "illustration", RefMass: 350 / G0, StallIAS: 5, MaxIAS: 80, Polar: p}
	if err := ac.Validate(); err != nil {
		t.Fatal(err)
	}
	return ac, p
}

func TestDragPolarIdentities(t *testing.T) {
	ac, p := illustration(t)
	k := p.K()
	// Anderson, Introduction to Flight, ch. 6: K = 1/(π·AR·e); with AR 20,
	// e 1, K = 0.0159155 ≈ 1/62.8 (REFERENCES.md §2a).
	if !relClose(k, 0.0159155, 1e-5) {
		t.Errorf("K = %v", k)
	}
	f := ac.Figures(ISADensity0, Conditions{})
	// Anderson, ch. 6: (L/D)max = 1/(2√(C_D0·K)) = 28.0250 for these inputs.
	if want := 1 / (2 * math.Sqrt(p.CD0*k)); !relClose(f.BestGlideRatio, want, 1e-9) || !relClose(want, 28.0250, 1e-5) {
		t.Errorf("best glide ratio %v, want %v (28.0250)", f.BestGlideRatio, want)
	}
	// Anderson, ch. 6: best glide at C_L = √(C_D0/K) = 1.12100; V = √(2(W/S)/(ρC_L)) = 22.5776 m/s.
	clBG := math.Sqrt(p.CD0 / k)
	if !relClose(clBG, 1.12100, 1e-5) || !relClose(f.BestGlideTAS, p.SpeedAtCL(clBG), 1e-5) || !relClose(f.BestGlideTAS, 22.5776, 1e-5) {
		t.Errorf("best glide speed %v, want %v at C_L %v", f.BestGlideTAS, p.SpeedAtCL(clBG), clBG)
	}
	// Anderson, ch. 6: least sink at C_L = √(3·C_D0/K) = 1.94163; V_ms = 17.1553 m/s, w_ms = 0.70684 m/s.
	clMS := math.Sqrt(3 * p.CD0 / k)
	if !relClose(clMS, 1.94163, 1e-5) || !relClose(f.LeastSinkTAS, p.SpeedAtCL(clMS), 1e-5) || !relClose(f.LeastSink, 0.70684, 1e-5) {
		t.Errorf("least sink %v m/s at %v m/s, want %v at C_L %v", f.LeastSink, f.LeastSinkTAS, p.SpeedAtCL(clMS), clMS)
	}
	// Parabolic polar (Anderson, ch. 6): V_ms/V_bg = 3^(−1/4) = 0.759836 and
	// L/D at least sink = (√3/2)·(L/D)max.
	if r := f.LeastSinkTAS / f.BestGlideTAS; !relClose(r, math.Pow(3, -0.25), 1e-5) {
		t.Errorf("V_ms/V_bg = %v, want 3^-1/4", r)
	}
	if r := f.LeastSinkRatio / f.BestGlideRatio; !relClose(r, math.Sqrt(3)/2, 1e-6) {
		t.Errorf("(L/D)_ms/(L/D)max = %v, want √3/2", r)
	}
	// REFERENCES.md §2a, own calculation: a = 3.5000e-5 s²/m², b = 9.09457 m²/s².
	a, b := p.Coefficients()
	if !relClose(a, 3.5e-5, 1e-6) || !relClose(b, 9.09457, 1e-5) {
		t.Errorf("a, b = %v, %v", a, b)
	}
	if f.BestGlideClamp != Free || f.LeastSinkClamp != Free {
		t.Errorf("clamps %v %v with a low stall", f.BestGlideClamp, f.LeastSinkClamp)
	}
}

func TestIllustrationLeastSinkBelowStallIsClamped(t *testing.T) {
	_, p := illustration(t)
	// Common practice, no source: a typical unflapped wing reaches C_Lmax ≈ 1.2,
	// below the least-sink C_L ≈ 1.94 of this polar, so its least-sink speed
	// lies below the stall; the model must clamp it and say so.
	stall := p.StallSpeed(1.2)
	for _, minIAS := range []float64{0, 1.05 * stall} {
		ac := &Aircraft{Name: "illustration", RefMass: p.Mass, StallIAS: stall, MinIAS: minIAS, MaxIAS: 80, Polar: p}
		if err := ac.Validate(); err != nil {
			t.Fatal(err)
		}
		f := ac.Figures(ISADensity0, Conditions{})
		if f.LeastSinkClamp != ClampMin {
			t.Errorf("min_speed %v: least sink at %v m/s not reported clamped (stall %v)", minIAS, f.LeastSinkIAS, stall)
		}
		if f.LeastSinkIAS < ac.UsableMinIAS(Conditions{})-1e-9 || f.LeastSinkIAS <= stall {
			t.Errorf("least sink speed %v below the usable minimum", f.LeastSinkIAS)
		}
		if math.Abs(f.LeastSinkIAS-f.MinIAS) > 1e-9 {
			t.Errorf("clamped least sink %v not at the usable minimum %v", f.LeastSinkIAS, f.MinIAS)
		}
	}
}

func TestBestGlidePolarReproducesItsPoint(t *testing.T) {
	// The best_glide form must give back its own figures (definition of the
	// form, DESIGN.md): ratio 9 at 65 kt.
	ac, err := Builtin("trainer")
	if err != nil {
		t.Fatal(err)
	}
	f := ac.Figures(ISADensity0, Conditions{})
	if !relClose(f.BestGlideRatio, 9, 1e-9) || !relClose(f.BestGlideIAS, 65*knot, 1e-5) {
		t.Errorf("trainer best glide %v at %v kt, want 9 at 65 kt", f.BestGlideRatio, f.BestGlideIAS/knot)
	}
	p := ac.Polar.(*BestGlidePolar)
	if w := p.Sink(p.Speed); !relClose(w, p.Speed/p.Ratio, 1e-12) {
		t.Errorf("w(V_bg) = %v, want V_bg/E", w)
	}
	// Normalised parabolic polar (REFERENCES.md §2): w/w_bg = (x³ + 1/x)/2.
	for _, x := range []float64{0.6, 0.9, 1.3, 2} {
		if got, want := p.Sink(x*p.Speed)/(p.Speed/p.Ratio), (x*x*x+1/x)/2; !relClose(got, want, 1e-12) {
			t.Errorf("normalised polar at x=%v: %v want %v", x, got, want)
		}
	}
}

func TestPointsPolarReproducesPoints(t *testing.T) {
	// Exact quadratic through the points: least squares must return it
	// (property of the least-squares fit, no source needed beyond algebra).
	q := func(v float64) float64 { return 0.0016*v*v - 0.07*v + 1.4 }
	var pts []PolarPoint
	for _, v := range []float64{20, 25, 30, 40, 55} {
		pts = append(pts, PolarPoint{v, q(v)})
	}
	p, err := NewPointsPolar(pts)
	if err != nil {
		t.Fatal(err)
	}
	for _, pt := range pts {
		if math.Abs(p.Sink(pt.Speed)-pt.Sink) > 1e-12 {
			t.Errorf("fit at %v: %v, want %v", pt.Speed, p.Sink(pt.Speed), pt.Sink)
		}
	}
	// The built-in sailplane's invented points: the fit passes within 0.03 m/s
	// of each (a quadratic is the customary fit; common practice, no source).
	ac, _ := Builtin("sailplane")
	sp := ac.Polar.(*PointsPolar)
	for _, pt := range sp.Points {
		if d := math.Abs(sp.Sink(pt.Speed) - pt.Sink); d > 0.03 {
			t.Errorf("sailplane fit misses %v km/h by %.3f m/s", pt.Speed/kmh, d)
		}
	}
	// Issue 2: glide ratio about 40 near 100 km/h.
	f := ac.Figures(ISADensity0, Conditions{})
	if f.BestGlideRatio < 38 || f.BestGlideRatio > 42 || math.Abs(f.BestGlideIAS/kmh-100) > 8 {
		t.Errorf("sailplane best glide %.1f at %.0f km/h", f.BestGlideRatio, f.BestGlideIAS/kmh)
	}
}

func TestPolarConstructorsReject(t *testing.T) {
	cases := []struct {
		name string
		err  func() error
		want string
	}{
		{"two points", func() error { _, e := NewPointsPolar([]PolarPoint{{20, 1}, {30, 1}}); return e }, "at least 3"},
		{"speeds not increasing", func() error { _, e := NewPointsPolar([]PolarPoint{{20, 1}, {30, 1}, {25, 2}}); return e }, "increase"},
		{"equal speeds", func() error { _, e := NewPointsPolar([]PolarPoint{{20, 1}, {20, 1.1}, {25, 2}}); return e }, "increase"},
		{"negative sink", func() error { _, e := NewPointsPolar([]PolarPoint{{20, 1}, {30, -1}, {40, 2}}); return e }, "not positive"},
		{"zero speed", func() error { _, e := NewPointsPolar([]PolarPoint{{0, 1}, {30, 1}, {40, 2}}); return e }, "speed"},
		{"NaN sink", func() error { _, e := NewPointsPolar([]PolarPoint{{20, math.NaN()}, {30, 1}, {40, 2}}); return e }, "sink"},
		{"bending down", func() error { _, e := NewPointsPolar([]PolarPoint{{20, 1}, {30, 2}, {40, 2.5}}); return e }, "bend"},
		{"cd0 zero", func() error { _, e := NewDragPolar(0, 20, 1, 10, 300); return e }, "cd0"},
		{"aspect ratio", func() error { _, e := NewDragPolar(0.02, 0.5, 1, 10, 300); return e }, "aspect"},
		{"oswald", func() error { _, e := NewDragPolar(0.02, 20, 1.5, 10, 300); return e }, "oswald"},
		{"area", func() error { _, e := NewDragPolar(0.02, 20, 1, -1, 300); return e }, "wing_area"},
		{"drag mass", func() error { _, e := NewDragPolar(0.02, 20, 1, 10, math.Inf(1)); return e }, "mass"},
		{"glide ratio 1", func() error { _, e := NewBestGlidePolar(30, 1); return e }, "glide_ratio"},
		{"best glide speed", func() error { _, e := NewBestGlidePolar(-3, 9); return e }, "best_glide_speed"},
	}
	for _, c := range cases {
		err := c.err()
		if err == nil || !strings.Contains(err.Error(), c.want) || !strings.HasPrefix(err.Error(), "reach: ") {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

// TestPolarContract runs every polar form through the same checks: positive
// and convex sink over a flying range, a single best-glide optimum inside it,
// and the Form name of the profile files.
func TestPolarContract(t *testing.T) {
	pts, _ := NewPointsPolar([]PolarPoint{{20, 0.7}, {25, 0.65}, {30, 0.75}, {40, 1.2}, {55, 2.6}})
	drag, _ := NewDragPolar(0.02, 20, 1, 1, 350/G0)
	bg, _ := NewBestGlidePolar(33, 9)
	for _, c := range []struct {
		p      Polar
		form   string
		lo, hi float64
	}{{pts, "points", 18, 60}, {drag, "drag", 12, 60}, {bg, "best_glide", 20, 70}} {
		if c.p.Form() != c.form {
			t.Errorf("form %q, want %q", c.p.Form(), c.form)
		}
		const n = 200
		h := (c.hi - c.lo) / n
		for i := 1; i < n; i++ {
			v := c.lo + float64(i)*h
			w0, w1, w2 := c.p.Sink(v-h), c.p.Sink(v), c.p.Sink(v+h)
			if !(w1 > 0) {
				t.Fatalf("%s: sink %v at %v", c.form, w1, v)
			}
			if w0+w2-2*w1 < -1e-12 {
				t.Fatalf("%s: not convex at %v", c.form, v)
			}
		}
		ac := &Aircraft{Name: c.form, RefMass: 400, StallIAS: c.lo / 1.3, MaxIAS: c.hi, Polar: c.p}
		if err := ac.Validate(); err != nil {
			t.Fatalf("%s: %v", c.form, err)
		}
		f := ac.Figures(ISADensity0, Conditions{})
		if f.BestGlideClamp != Free || !(f.BestGlideRatio > 1) {
			t.Errorf("%s: best glide %v clamp %v", c.form, f.BestGlideRatio, f.BestGlideClamp)
		}
	}
}
