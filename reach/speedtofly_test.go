package reach

import (
	"math"
	"testing"
)

func TestSpeedToFlyInWind(t *testing.T) {
	// REFERENCES.md §3 (own calculation with the example polar of §2a;
	// relation GS = √(V² − W_c²) + W_t from the wind triangle, memory; best
	// speed in wind = tangent from (−W_t, 0) to the polar, St Olaf and AOPA
	// pages cited there). Negative along = headwind.
	ac, _ := illustration(t)
	cases := []struct {
		name                  string
		along, cross          float64
		v, sink, gs, ratio    float64
		checkSink, checkSpeed bool
	}{
		{"headwind 10", -10, 0, 26.4216, 0.9898, 16.4216, 16.5911, true, true},
		{"headwind 5", -5, 0, 24.1127, 0.8679, 19.1127, 22.0229, true, true},
		{"calm", 0, 0, 22.5776, 0.8056, 22.5776, 28.0250, true, true},
		{"tailwind 5", 5, 0, 21.5357, 0.7719, 26.5357, 34.3780, true, true},
		{"tailwind 10", 10, 0, 20.8025, 0.7523, 30.8025, 40.9465, true, true},
		{"crosswind 5", 0, 5, 22.8630, 0, 22.3096, 27.3379, false, true},
		{"crosswind 10", 0, 10, 23.8227, 0, 21.6222, 25.2904, false, true},
		{"crosswind 10 from the right", 0, -10, 23.8227, 0, 21.6222, 25.2904, false, true},
		{"head 5 + cross 5", -5, 5, 24.4681, 0, 18.9518, 21.4290, false, true},
	}
	for _, c := range cases {
		s := ac.SpeedToFly(ISADensity0, c.along, c.cross, Conditions{})
		if s.NoHeadway || s.Clamped() {
			t.Errorf("%s: no headway %v, clamp %v", c.name, s.NoHeadway, s.Clamp)
			continue
		}
		if math.Abs(s.TAS-c.v) > 2e-3 || math.Abs(s.GroundSpeed-c.gs) > 2e-3 || !relClose(s.GroundRatio, c.ratio, 1e-5) {
			t.Errorf("%s: V %.4f GS %.4f ratio %.4f; want %.4f %.4f %.4f", c.name, s.TAS, s.GroundSpeed, s.GroundRatio, c.v, c.gs, c.ratio)
		}
		if c.checkSink && math.Abs(s.Sink-c.sink) > 1e-4 {
			t.Errorf("%s: sink %.5f, want %.4f", c.name, s.Sink, c.sink)
		}
		if !relClose(s.Loss*s.GroundRatio, 1, 1e-12) {
			t.Errorf("%s: loss %v is not 1/ratio", c.name, s.Loss)
		}
	}
}

func TestSpeedToFlyMacCready(t *testing.T) {
	// REFERENCES.md §3 (own derivation, MacCready optimum where
	// w + m = V·dw/dV, normalised m/w_bg = x³ − 1/x): MC 1, 2, 3 m/s →
	// V 28.5919, 33.1445, 36.8193 m/s; sink 1.1362, 1.5488, 1.9940 m/s.
	ac, _ := illustration(t)
	prev := 0.0
	for _, c := range []struct{ mc, v, w float64 }{{0, 22.5776, 0.8056}, {1, 28.5919, 1.1362}, {2, 33.1445, 1.5488}, {3, 36.8193, 1.9940}} {
		s := ac.SpeedToFly(ISADensity0, 0, 0, Conditions{MacCready: c.mc})
		if math.Abs(s.TAS-c.v) > 2e-3 || math.Abs(s.Sink-c.w) > 1e-4 {
			t.Errorf("MC %v: V %.4f sink %.4f; want %.4f %.4f", c.mc, s.TAS, s.Sink, c.v, c.w)
		}
		// Issue 2: MacCready > 0 → faster.
		if s.TAS <= prev {
			t.Errorf("MC %v not faster than the last setting", c.mc)
		}
		prev = s.TAS
		// The loss stays the glide's own (w + s)/G, whatever the setting.
		if !relClose(s.Loss, s.Sink/s.GroundSpeed, 1e-12) {
			t.Errorf("MC %v: loss %v", c.mc, s.Loss)
		}
	}
}

func TestSpeedToFlyProperties(t *testing.T) {
	tr, _ := Builtin("trainer")
	rho := Atmosphere{}.Density(1524)
	calm := tr.SpeedToFly(rho, 0, 0, Conditions{})
	fig := tr.Figures(rho, Conditions{})
	// Issue 2 (definition): no wind → ground ratio equals air ratio.
	if !relClose(calm.GroundRatio, fig.BestGlideRatio, 1e-9) || !relClose(calm.GroundRatio, 9, 1e-9) {
		t.Errorf("calm ground ratio %v, air ratio %v", calm.GroundRatio, fig.BestGlideRatio)
	}
	// Tailwind → larger ratio and slower best speed; headwind the opposite
	// (REFERENCES.md §3; AOPA and St Olaf pages).
	tail := tr.SpeedToFly(rho, 8, 0, Conditions{})
	head := tr.SpeedToFly(rho, -8, 0, Conditions{})
	if !(tail.GroundRatio > calm.GroundRatio && tail.IAS < calm.IAS) {
		t.Errorf("tailwind: ratio %v IAS %v vs calm %v %v", tail.GroundRatio, tail.IAS, calm.GroundRatio, calm.IAS)
	}
	if !(head.GroundRatio < calm.GroundRatio && head.IAS > calm.IAS) {
		t.Errorf("headwind: ratio %v IAS %v vs calm %v %v", head.GroundRatio, head.IAS, calm.GroundRatio, calm.IAS)
	}
	// Sinking air → faster, lower ratio (tangent from (0, −s); REFERENCES.md §3).
	sink := tr.SpeedToFly(rho, 0, 0, Conditions{AirSink: 1})
	if !(sink.IAS > calm.IAS && sink.GroundRatio < calm.GroundRatio) || !relClose(sink.Loss, (sink.Sink+1)/sink.GroundSpeed, 1e-12) {
		t.Errorf("sinking air: %+v", sink)
	}
	// Issue 2: a headwind equal to the airspeed → no headway. At the maximum
	// speed the ground speed is then zero.
	vmax := TAS(tr.UsableMaxIAS(Conditions{}), rho/ISADensity0)
	for _, hw := range []float64{vmax, vmax + 5} {
		s := tr.SpeedToFly(rho, -hw, 0, Conditions{})
		if !s.NoHeadway || !math.IsInf(s.Loss, 1) || s.GroundRatio != 0 {
			t.Errorf("headwind %v: %+v", hw, s)
		}
	}
	// A crosswind stronger than any usable speed: the track cannot be held.
	if s := tr.SpeedToFly(rho, 0, vmax+1, Conditions{}); !s.NoHeadway {
		t.Errorf("crosswind above max speed: %+v", s)
	}
	// A strong tailwind wants a speed below the stall margin: clamped at the
	// usable minimum and reported (DESIGN.md: never near the stall).
	s := tr.SpeedToFly(rho, 30, 0, Conditions{})
	if s.Clamp != ClampMin || !relClose(s.IAS, tr.UsableMinIAS(Conditions{}), 1e-12) {
		t.Errorf("strong tailwind: %+v", s)
	}
	// A headwind close to the maximum speed wants more than the maximum speed.
	if s := tr.SpeedToFly(rho, -45, 0, Conditions{MacCready: 2}); s.Clamp != ClampMax || s.NoHeadway || s.Clamp.String() != "max" {
		t.Errorf("headwind 45 m/s: %+v", s)
	}
}

func TestSpeedToFlyAt(t *testing.T) {
	tr, _ := Builtin("trainer")
	atm := Atmosphere{ISADev: 10}
	a := tr.SpeedToFlyAt(2000, atm, -5, 3, Conditions{})
	b := tr.SpeedToFly(atm.Density(2000), -5, 3, Conditions{})
	if a != b {
		t.Errorf("SpeedToFlyAt %+v != %+v", a, b)
	}
}

func TestBrentMax(t *testing.T) {
	// Brent (1973), ch. 5: the method finds the maximum of a unimodal
	// function to the requested tolerance.
	for _, c := range []struct {
		f         func(float64) float64
		lo, hi, x float64
	}{
		{func(x float64) float64 { return -(x - 2) * (x - 2) }, 0, 5, 2},
		{func(x float64) float64 { return math.Sin(x) }, 0, 3, math.Pi / 2},
		{func(x float64) float64 { return -math.Abs(x - 0.3) }, -1, 1, 0.3},
	} {
		x, _ := brentMax(c.f, c.lo, c.hi, 1e-7)
		if math.Abs(x-c.x) > 1e-6 {
			t.Errorf("brentMax: %v, want %v", x, c.x)
		}
	}
}

func BenchmarkSpeedToFly(b *testing.B) {
	tr, _ := Builtin("sailplane")
	rho := Atmosphere{}.Density(1500)
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		tr.SpeedToFly(rho, float64(i%20)-10, 4, Conditions{})
	}
}
