package reach

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// polarFunc lets a test give any sink curve as a Polar.
type polarFunc func(v float64) float64

func (f polarFunc) Sink(v float64) float64 { return f(v) }
func (f polarFunc) Form() string           { return "test" }

func TestAircraftValidateRejects(t *testing.T) {
	good := func() *Aircraft {
		return &Aircraft{Name: "x", RefMass: 700, StallIAS: 25, MaxIAS: 60, Polar: &BestGlidePolar{Speed: 34, Ratio: 9}}
	}
	cases := []struct {
		name string
		mod  func(a *Aircraft)
		want string
	}{
		{"no reference mass", func(a *Aircraft) { a.RefMass = 0 }, "reference mass"},
		{"negative mass", func(a *Aircraft) { a.Mass = -1 }, "mass"},
		{"mass far off", func(a *Aircraft) { a.Mass = 5000 }, "far from"},
		{"no stall speed", func(a *Aircraft) { a.StallIAS = 0 }, "stall speed"},
		{"stall above max", func(a *Aircraft) { a.StallIAS = 70 }, "not below the maximum"},
		{"min speed below stall", func(a *Aircraft) { a.MinIAS = 20 }, "not above the stall"},
		{"margin above max", func(a *Aircraft) { a.StallIAS = 50 }, "lowest usable speed"},
		{"no polar", func(a *Aircraft) { a.Polar = nil }, "no polar"},
		{"negative reserve", func(a *Aircraft) { a.Reserve = -10 }, "reserve"},
		{"negative clearance", func(a *Aircraft) { a.Clearance = math.NaN() }, "clearance"},
		{"sink not positive in range", func(a *Aircraft) {
			a.Polar = polarFunc(func(v float64) float64 { return 2 - v/25 })
		}, "sink must be positive"},
		// MaxGlideRatio: beyond the best sailplanes (common practice, from memory).
		{"glide ratio 150", func(a *Aircraft) {
			a.Polar = polarFunc(func(v float64) float64 { return v / 150 })
		}, "no aircraft glides that well"},
	}
	for _, c := range cases {
		a := good()
		if err := a.Validate(); err != nil {
			t.Fatal(err)
		}
		c.mod(a)
		err := a.Validate()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want error containing %q", c.name, err, c.want)
		}
	}
}

func TestUsableMinimum(t *testing.T) {
	// DESIGN.md: lowest usable speed 1.3 × V_S unless the profile sets
	// min_speed (1.3 V_S: common practice, no source); at a fixed C_Lmax the
	// stall speed scales with √W (Anderson, Introduction to Flight, ch. 5).
	ac := &Aircraft{RefMass: 700, StallIAS: 25, MaxIAS: 60, Polar: &BestGlidePolar{Speed: 34, Ratio: 9}}
	if got := ac.UsableMinIAS(Conditions{}); math.Abs(got-32.5) > 1e-12 {
		t.Errorf("usable min %v, want 32.5", got)
	}
	ac.MinIAS = 28
	if got := ac.UsableMinIAS(Conditions{}); got != 28 {
		t.Errorf("usable min with min_speed %v, want 28", got)
	}
	if got := ac.UsableMinIAS(Conditions{Mass: 2800}); math.Abs(got-56) > 1e-12 {
		t.Errorf("usable min at 4× mass %v, want 56", got)
	}
}

func TestMassScaling(t *testing.T) {
	// REFERENCES.md §2b (own calculation; rule: CUGC wiki and FAA Glider
	// Flying Handbook ch. 5 on ballast): W/S 350 → 450 N/m² scales speeds and
	// sinks by √(450/350) = 1.133893 and keeps L/D 28.0250:
	// V_bg 25.6006 m/s, w_bg 0.91349 m/s.
	ac, _ := illustration(t)
	f := ac.Figures(ISADensity0, Conditions{Mass: 450 / G0})
	if !relClose(f.BestGlideRatio, 28.0250, 1e-5) || !relClose(f.BestGlideTAS, 25.6006, 1e-5) || !relClose(f.BestGlideSink, 0.91349, 1e-4) {
		t.Errorf("heavy: ratio %v at %v m/s sink %v", f.BestGlideRatio, f.BestGlideTAS, f.BestGlideSink)
	}
	// Same with the trainer: mass up by 20 % → same best ratio at √1.2 higher speed.
	tr, _ := Builtin("trainer")
	f0 := tr.Figures(ISADensity0, Conditions{})
	f1 := tr.Figures(ISADensity0, Conditions{Mass: 1.2 * tr.RefMass})
	if !relClose(f1.BestGlideRatio, f0.BestGlideRatio, 1e-9) || !relClose(f1.BestGlideIAS/f0.BestGlideIAS, math.Sqrt(1.2), 1e-5) {
		t.Errorf("trainer heavy: %v at %v vs %v at %v", f1.BestGlideRatio, f1.BestGlideIAS, f0.BestGlideRatio, f0.BestGlideIAS)
	}
}

func TestAltitudeScaling(t *testing.T) {
	// REFERENCES.md §2b (own calculation with the ICAO σ at 3000 m = 0.742140):
	// V_bg 26.2080, w_bg 0.93517, V_ms 19.9138, w_ms 0.82050 m/s TAS; L/D unchanged.
	ac, _ := illustration(t)
	f := ac.Figures(Atmosphere{}.Density(3000), Conditions{})
	if !relClose(f.BestGlideTAS, 26.2080, 1e-4) || !relClose(f.BestGlideSink, 0.93517, 1e-4) ||
		!relClose(f.LeastSinkTAS, 19.9138, 1e-4) || !relClose(f.LeastSink, 0.82050, 1e-4) || !relClose(f.BestGlideRatio, 28.0250, 1e-5) {
		t.Errorf("3000 m: %+v", f)
	}
	// Indicated speeds do not change with altitude (IAS = EAS assumed).
	f0 := ac.Figures(ISADensity0, Conditions{})
	if !relClose(f.BestGlideIAS, f0.BestGlideIAS, 1e-5) {
		t.Errorf("IAS moved with altitude: %v vs %v", f.BestGlideIAS, f0.BestGlideIAS)
	}
}

func TestBugs(t *testing.T) {
	// DESIGN.md: contamination multiplies the sink by 1 + f, so the best glide
	// ratio falls by 1/(1 + f) at the same speed (definition of the model).
	tr, _ := Builtin("trainer")
	f0 := tr.Figures(ISADensity0, Conditions{})
	f1 := tr.Figures(ISADensity0, Conditions{Bugs: 0.1})
	if !relClose(f1.BestGlideRatio, f0.BestGlideRatio/1.1, 1e-9) || !relClose(f1.BestGlideIAS, f0.BestGlideIAS, 1e-5) {
		t.Errorf("bugs: %v at %v", f1.BestGlideRatio, f1.BestGlideIAS)
	}
}

func TestCheckConditions(t *testing.T) {
	tr, _ := Builtin("trainer")
	for _, c := range []Conditions{{Mass: -1}, {Bugs: -0.1}, {Bugs: 3}, {AirSink: -1}, {MacCready: math.NaN()}, {Mass: 10 * tr.RefMass}} {
		if err := tr.Check(c); err == nil {
			t.Errorf("Check(%+v) accepted", c)
		}
	}
	if err := tr.Check(Conditions{Mass: 800, Bugs: 0.1, AirSink: 0.5, MacCready: 1}); err != nil {
		t.Error(err)
	}
}

func TestBuiltins(t *testing.T) {
	names := BuiltinNames()
	if strings.Join(names, ",") != "motorglider,sailplane,tourer,trainer" {
		t.Errorf("names %v", names)
	}
	for _, n := range names {
		ac, err := Builtin(n)
		if err != nil {
			t.Fatal(err)
		}
		if err := ac.Validate(); err != nil {
			t.Errorf("%s: %v", n, err)
		}
	}
	// Issue 2: trainer best glide about 65 kt IAS at a glide ratio of about 9,
	// stall about 48 kt.
	tr, _ := Builtin("TRAINER")
	if math.Abs(tr.StallIAS/knot-48) > 1e-9 {
		t.Errorf("trainer stall %v kt", tr.StallIAS/knot)
	}
	a, _ := Builtin("trainer")
	a.Name = "changed"
	b, _ := Builtin("trainer")
	if b.Name == "changed" {
		t.Error("Builtin returns shared values")
	}
	if _, err := Builtin("jumbo"); err == nil || !strings.Contains(err.Error(), "trainer") {
		t.Errorf("unknown builtin: %v", err)
	}
}

func TestValidateNamesTheField(t *testing.T) {
	// The loader points at the line of ProfileError.Field.
	for _, c := range []struct {
		mod   func(a *Aircraft)
		field string
	}{
		{func(a *Aircraft) { a.StallIAS = 70 }, "stall_speed"},
		{func(a *Aircraft) { a.MinIAS = 20 }, "min_speed"},
		{func(a *Aircraft) { a.Mass = 5000 }, "mass"},
		{func(a *Aircraft) { a.Polar = polarFunc(func(v float64) float64 { return v / 150 }) }, "polar"},
	} {
		a := &Aircraft{Name: "x", RefMass: 700, StallIAS: 25, MaxIAS: 60, Polar: &BestGlidePolar{Speed: 34, Ratio: 9}}
		c.mod(a)
		var pe *ProfileError
		if err := a.Validate(); !errors.As(err, &pe) || pe.Field != c.field {
			t.Errorf("%v: want a *ProfileError for %q", err, c.field)
		}
	}
}
