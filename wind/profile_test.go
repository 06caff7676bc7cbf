package wind

import (
	"errors"
	"math"
	"strings"
	"testing"
)

const kt = 1852.0 / 3600 // m/s per knot, exact by definition

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

func mustProfile(t testing.TB, ls ...Layer) *Profile {
	t.Helper()
	p, err := NewProfile(ls)
	if err != nil {
		t.Fatalf("NewProfile(%v): %v", ls, err)
	}
	return p
}

func TestVeeringPairInterpolatesThroughVectorMean(t *testing.T) {
	// Vector arithmetic (common practice, no source): the mean of two equal
	// and opposite winds is calm, so half-way between 090/20 and 270/20 the
	// interpolated wind is calm, not 180/20.
	p := mustProfile(t, Layer{Alt: 0, Dir: 90, Speed: 20}, Layer{Alt: 1000, Dir: 270, Speed: 20})
	e, n := p.At(500)
	if !near(e, 0, 1e-12) || !near(n, 0, 1e-12) {
		t.Errorf("At(500) = (%g, %g), want calm", e, n)
	}
	// A quarter of the way: (3/4)·(−20, 0) + (1/4)·(+20, 0) = (−10, 0): from 090
	// at 10 m/s (the air moves west).
	e, n = p.At(250)
	if !near(e, -10, 1e-12) || !near(n, 0, 1e-12) {
		t.Errorf("At(250) = (%g, %g), want (-10, 0)", e, n)
	}
	// Veering 90° (360/10 to 090/10): the mean vector (−5, −5) has speed
	// 10/√2 ≈ 7.07, not 10 — interpolating speed and direction separately would
	// give 10 from 045.
	q := mustProfile(t, Layer{Alt: 0, Dir: 360, Speed: 10}, Layer{Alt: 2000, Dir: 90, Speed: 10})
	e, n = q.At(1000)
	if !near(e, -5, 1e-12) || !near(n, -5, 1e-12) || !near(math.Hypot(e, n), 10/math.Sqrt2, 1e-12) {
		t.Errorf("At(1000) = (%g, %g), want (-5, -5)", e, n)
	}
}

func TestAtConstantBeyondEnds(t *testing.T) {
	// Design rule of this project (DESIGN.md "Wind"): constant beyond the ends.
	p := mustProfile(t, Layer{Alt: 500, Dir: 180, Speed: 5}, Layer{Alt: 3000, Dir: 270, Speed: 15})
	for _, h := range []float64{-1000, 0, 499.9, 500} {
		if e, n := p.At(h); !near(e, 0, 1e-12) || !near(n, 5, 1e-12) {
			t.Errorf("At(%g) = (%g, %g), want the 500 m layer (0, 5)", h, e, n)
		}
	}
	for _, h := range []float64{3000, 3000.1, 9000} {
		if e, n := p.At(h); !near(e, 15, 1e-12) || !near(n, 0, 1e-12) {
			t.Errorf("At(%g) = (%g, %g), want the 3000 m layer (15, 0)", h, e, n)
		}
	}
	if e, n := p.At(math.NaN()); !math.IsNaN(e) || !math.IsNaN(n) {
		t.Errorf("At(NaN) = (%g, %g), want NaN", e, n)
	}
}

func TestComponents(t *testing.T) {
	// Wind-triangle sign conventions (common practice, no source; the
	// convention of this package is documented in doc.go): a wind from
	// behind is a tailwind (along > 0); a wind from the left of the track
	// pushes the aircraft right (cross > 0).
	tests := []struct {
		name              string
		dir, track        float64
		wantAlong, wantXw float64
	}{
		{"from 270 on track 090: pure tailwind", 270, 90, 20, 0},
		{"from 360 on track 090: pure crosswind from the left", 360, 90, 0, 20},
		{"from 000 on track 090: same as 360", 0, 90, 0, 20},
		{"from 090 on track 090: pure headwind", 90, 90, -20, 0},
		{"from 180 on track 090: crosswind from the right", 180, 90, 0, -20},
		{"from 180 on track 360: tailwind", 180, 0, 20, 0},
		{"from 270 on track 360: from the left", 270, 360, 0, 20},
		// 45° off the nose from the left: head and cross each 20·cos 45°.
		{"from 045 on track 090: head and from the left", 45, 90, -20 / math.Sqrt2, 20 / math.Sqrt2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := mustProfile(t, Layer{Alt: 0, Dir: tc.dir, Speed: 20})
			along, cross := p.Components(1234, tc.track)
			if !near(along, tc.wantAlong, 1e-9) || !near(cross, tc.wantXw, 1e-9) {
				t.Errorf("Components = (%g, %g), want (%g, %g)", along, cross, tc.wantAlong, tc.wantXw)
			}
		})
	}
}

func TestComponentsPreserveSpeed(t *testing.T) {
	// Vector identity (common practice, no source): along² + cross² = |w|².
	p := mustProfile(t, Layer{Alt: 0, Dir: 240, Speed: 10 * kt}, Layer{Alt: 3000, Dir: 280, Speed: 35 * kt})
	for h := -100.0; h <= 3500; h += 250 {
		e, n := p.At(h)
		for tr := 0.0; tr < 360; tr += 15 {
			a, c := p.Components(h, tr)
			if !near(a*a+c*c, e*e+n*n, 1e-9) {
				t.Fatalf("h=%g track=%g: along²+cross² = %g, |w|² = %g", h, tr, a*a+c*c, e*e+n*n)
			}
		}
	}
}

func TestTemperature(t *testing.T) {
	// ICAO standard atmosphere table (ICAO Doc 7488/3; U.S. Standard
	// Atmosphere 1976): T = 288.15 K at 0 m, 281.65 K at 1000 m, 268.65 K at
	// 3000 m, 216.65 K at 11 000 m and above; 5000 ft (1524 m) 278.244 K.
	isa := []struct{ h, T float64 }{{0, 288.15}, {1000, 281.65}, {3000, 268.65}, {1524, 278.244}, {11000, 216.65}, {15000, 216.65}}
	calm := Calm()
	for _, c := range isa {
		got, from := calm.Temperature(c.h, 0)
		if from || !near(got, c.T, 0.01) {
			t.Errorf("ISA T(%g) = %g (fromLayers %v), want %g", c.h, got, from, c.T)
		}
		// The deviation is added (ICAO convention "ISA+10").
		if got, _ := calm.Temperature(c.h, 10); !near(got, c.T+10, 0.01) {
			t.Errorf("ISA+10 T(%g) = %g, want %g", c.h, got, c.T+10)
		}
	}

	// Layer temperatures override: interpolated between the layers that
	// carry one, extended with the ISA lapse (−6.5 K/km) beyond them.
	// Expected values are the arithmetic of the doc comment (no outside
	// source).
	p := mustProfile(t,
		Layer{Alt: 0, Dir: 240, Speed: 5},                                 // no temperature
		Layer{Alt: 1000, Dir: 250, Speed: 8, Temp: 283.15, HasTemp: true}, // ISA+1.5
		Layer{Alt: 2000, Dir: 260, Speed: 10},
		Layer{Alt: 3000, Dir: 270, Speed: 12, Temp: 263.15, HasTemp: true}, // ISA−5.5
	)
	cases := []struct{ h, T float64 }{
		{1000, 283.15},
		{2000, 273.15},                // half-way between the two
		{3000, 263.15},                // top layer
		{0, 288.15 + 1.5},             // below: ISA + deviation of the 1000 m layer
		{5000, 255.65 - 5.5},          // above: ISA(5000) + deviation of the 3000 m layer
		{12000, 216.65 - 5.5},         // above the tropopause: isothermal + deviation
		{1500, 283.15 + 0.25*(-20.0)}, // a quarter of the way
	}
	for _, c := range cases {
		got, from := p.Temperature(c.h, 99) // isaDev ignored where layers give temperatures
		if !from || !near(got, c.T, 1e-9) {
			t.Errorf("T(%g) = %g (fromLayers %v), want %g", c.h, got, from, c.T)
		}
	}
	if !p.HasTemperatures() || calm.HasTemperatures() {
		t.Error("HasTemperatures wrong")
	}
}

func TestNewProfileValidation(t *testing.T) {
	ok := Layer{Alt: 0, Dir: 270, Speed: 10}
	tests := []struct {
		name   string
		layers []Layer
		want   error
		index  int
	}{
		{"empty", nil, ErrEmpty, -1},
		{"duplicate altitude", []Layer{ok, {Alt: 1000, Dir: 1, Speed: 1}, {Alt: 1000, Dir: 2, Speed: 2}}, ErrDuplicate, 2},
		{"unsorted", []Layer{{Alt: 1500, Dir: 1, Speed: 1}, {Alt: 150, Dir: 2, Speed: 2}}, ErrUnsorted, 1},
		{"negative speed", []Layer{{Alt: 0, Dir: 10, Speed: -1}}, ErrSpeed, 0},
		{"speed above limit", []Layer{ok, {Alt: 9000, Dir: 10, Speed: 120.5}}, ErrSpeed, 1},
		{"direction below 0", []Layer{{Alt: 0, Dir: -10, Speed: 1}}, ErrDirection, 0},
		{"direction above 360", []Layer{{Alt: 0, Dir: 361, Speed: 1}}, ErrDirection, 0},
		{"NaN speed", []Layer{{Alt: 0, Dir: 1, Speed: math.NaN()}}, ErrNotFinite, 0},
		{"infinite altitude", []Layer{{Alt: math.Inf(1), Dir: 1, Speed: 1}}, ErrNotFinite, 0},
		{"altitude too high", []Layer{{Alt: 40000, Dir: 1, Speed: 1}}, ErrAltitude, 0},
		{"temperature absurd", []Layer{{Alt: 0, Dir: 1, Speed: 1, Temp: -5, HasTemp: true}}, ErrTemperature, 0},
		{"temperature NaN", []Layer{{Alt: 0, Dir: 1, Speed: 1, Temp: math.NaN(), HasTemp: true}}, ErrNotFinite, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p, err := NewProfile(tc.layers)
			if err == nil || p != nil {
				t.Fatalf("NewProfile = %v, %v; want error %v", p, err, tc.want)
			}
			if !errors.Is(err, tc.want) {
				t.Errorf("error %q is not %v", err, tc.want)
			}
			var le *LayerError
			if tc.index >= 0 && (!errors.As(err, &le) || le.Index != tc.index) {
				t.Errorf("error %q: want *LayerError with index %d", err, tc.index)
			}
		})
	}
	// Edge values that are allowed.
	for _, ls := range [][]Layer{
		{{Alt: 0, Dir: 0, Speed: 0}},
		{{Alt: 0, Dir: 360, Speed: MaxSpeed}},
		{{Alt: MinAlt, Dir: 1, Speed: 1}, {Alt: MaxAlt, Dir: 2, Speed: 2}},
	} {
		if _, err := NewProfile(ls); err != nil {
			t.Errorf("NewProfile(%v): %v", ls, err)
		}
	}
}

func TestNewProfileCopiesInput(t *testing.T) {
	ls := []Layer{{Alt: 0, Dir: 270, Speed: 10}}
	p := mustProfile(t, ls...)
	ls[0].Speed = 99
	if p.Layers()[0].Speed != 10 {
		t.Error("profile shares the caller's slice")
	}
	got := p.Layers()
	got[0].Speed = 50
	if p.Layers()[0].Speed != 10 {
		t.Error("Layers returns the internal slice")
	}
}

func TestString(t *testing.T) {
	tests := []struct {
		p    *Profile
		want string
	}{
		{Calm(), "calm"},
		{mustProfile(t, Layer{Alt: 0, Dir: 270, Speed: 10.29}), "from 270° at 10.3 m/s"},
		{mustProfile(t, Layer{Alt: 0, Dir: 240, Speed: 5.14}, Layer{Alt: 3000, Dir: 280, Speed: 18, Temp: 263, HasTemp: true}),
			"2 layers 0–3000 m MSL: 240°/5.1 m/s … 280°/18.0 m/s, temperatures at 1 of 2 layers"},
	}
	for _, tc := range tests {
		if got := tc.p.String(); got != tc.want {
			t.Errorf("String() = %q, want %q", got, tc.want)
		}
	}
	if !strings.Contains(Calm().String(), "calm") || !Calm().IsCalm() {
		t.Error("Calm is not calm")
	}
}

func TestPerturb(t *testing.T) {
	p := mustProfile(t, Layer{Alt: 0, Dir: 350, Speed: 3}, Layer{Alt: 3000, Dir: 90, Speed: 20, Temp: 260, HasTemp: true})
	if got := Perturb(p, 0, 0); len(got) != 1 || got[0] != p {
		t.Fatalf("Perturb(0,0) = %d profiles, want [p]", len(got))
	}
	if got := Perturb(p, 20, 0); len(got) != 3 {
		t.Fatalf("Perturb(20,0) = %d profiles, want 3", len(got))
	}
	set := Perturb(p, 20, 5)
	if len(set) != 9 || set[0] != p {
		t.Fatalf("Perturb(20,5) = %d profiles (first nominal %v), want 9 with the nominal first", len(set), set[0] == p)
	}
	// Documented order: (0,−s) (0,+s) (−d,0) (−d,−s) (−d,+s) (+d,0) (+d,−s) (+d,+s).
	want := []struct{ dir0, spd0, dir1, spd1 float64 }{
		{350, 3, 90, 20},
		{350, 0, 90, 15}, // 3−5 clamped at 0
		{350, 8, 90, 25},
		{330, 3, 70, 20},
		{330, 0, 70, 15},
		{330, 8, 70, 25},
		{10, 3, 110, 20}, // 350+20 wrapped to 10
		{10, 0, 110, 15},
		{10, 8, 110, 25},
	}
	for i, w := range want {
		ls := set[i].Layers()
		if !near(ls[0].Dir, w.dir0, 1e-9) || !near(ls[0].Speed, w.spd0, 1e-9) || !near(ls[1].Dir, w.dir1, 1e-9) || !near(ls[1].Speed, w.spd1, 1e-9) {
			t.Errorf("scenario %d = %+v, want %+v", i, ls, w)
		}
		if !ls[1].HasTemp || ls[1].Temp != 260 {
			t.Errorf("scenario %d lost the temperature", i)
		}
	}
	// Conservative envelope (vector arithmetic, no source): on track 090 the
	// worst headwind of the set at 3000 m is the full 25 m/s, met by the
	// nominal direction with +speed, which the corners alone would not give
	// (25·cos 20° = 23.5).
	worst := math.Inf(1)
	for _, q := range set {
		a, _ := q.Components(3000, 90)
		worst = math.Min(worst, a)
	}
	if !near(worst, -25, 1e-9) {
		t.Errorf("worst along-track component = %g, want -25", worst)
	}
	defer func() {
		if recover() == nil {
			t.Error("Perturb with a negative error did not panic")
		}
	}()
	Perturb(p, -1, 0)
}

func BenchmarkAt(b *testing.B) {
	p := benchProfile(b)
	b.ReportAllocs()
	var s float64
	for i := 0; b.Loop(); i++ {
		e, n := p.At(float64(i%6000) + 0.5)
		s += e + n
	}
	_ = s
}

func BenchmarkComponents(b *testing.B) {
	p := benchProfile(b)
	b.ReportAllocs()
	var s float64
	for i := 0; b.Loop(); i++ {
		a, c := p.Components(float64(i%6000)+0.5, float64(i%360))
		s += a + c
	}
	_ = s
}

func benchProfile(b *testing.B) *Profile {
	var ls []Layer
	for h := 0.0; h <= 6000; h += 500 {
		ls = append(ls, Layer{Alt: h, Dir: 240 + h/100, Speed: 5 + h/300})
	}
	return mustProfile(b, ls...)
}

// windField has the signature of reach.WindField (wind must not import
// reach, so the contract is restated here).
type windField interface {
	Components(alt, trackDeg float64) (along, cross float64)
}

var _ windField = (*Profile)(nil)
