package reach

import (
	"math"
	"math/rand/v2"
	"testing"

	"glidereach/wind"
)

// The wind package's profile is the WindField the commands pass in.
var _ WindField = (*wind.Profile)(nil)

// The table is what the solvers read.
var _ LossModel = (*Table)(nil)

func layeredWind(t testing.TB, scale float64) *wind.Profile {
	t.Helper()
	p, err := wind.NewProfile([]wind.Layer{
		{Alt: 0, Dir: 240, Speed: 5 * scale},
		{Alt: 1500, Dir: 270, Speed: 10 * scale},
		{Alt: 3000, Dir: 280, Speed: 15 * scale},
		{Alt: 6000, Dir: 290, Speed: 22 * scale},
	})
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func TestTableMatchesDirectOptimisation(t *testing.T) {
	// Issue 2 acceptance bar: interpolation error ≤ 0.1 % against a direct
	// optimisation at arbitrary altitudes and tracks (the direct value is
	// SpeedToFly itself, checked against REFERENCES.md §3 above).
	rng := rand.New(rand.NewPCG(1, 2))
	for _, name := range []string{"trainer", "sailplane", "tourer"} {
		ac, _ := Builtin(name)
		atm := Atmosphere{ISADev: 8}
		w := layeredWind(t, 1)
		c := Conditions{Bugs: 0.05, AirSink: 0.3}
		tab, err := NewTable(ac, atm, w, c, 0, 6000)
		if err != nil {
			t.Fatal(err)
		}
		worst := 0.0
		for i := 0; i < 5000; i++ {
			h := rng.Float64() * 6000
			deg := rng.Float64() * 360
			along, cross := w.Components(h, deg)
			want := ac.SpeedToFly(atm.Density(h), along, cross, c)
			got := tab.Loss(h, deg*math.Pi/180)
			if want.NoHeadway {
				continue
			}
			worst = math.Max(worst, math.Abs(got-want.Loss)/want.Loss)
			if i%50 == 0 {
				at := tab.At(h, deg*math.Pi/180)
				if math.Abs(at.IAS-want.IAS) > 0.01*want.IAS || math.Abs(at.GroundSpeed-want.GroundSpeed) > 0.01*want.GroundSpeed {
					t.Errorf("%s At(%v, %v°) = %+v, direct %+v", name, h, deg, at, want)
				}
			}
		}
		if worst > 1e-3 {
			t.Errorf("%s: worst relative loss error %.5f > 0.1 %%", name, worst)
		}
		t.Logf("%s: worst relative loss error %.2e", name, worst)
	}
}

func TestTableStillAirAndBest(t *testing.T) {
	ac, _ := Builtin("trainer")
	tab, err := NewTable(ac, Atmosphere{}, nil, Conditions{}, 0, 3000)
	if err != nil {
		t.Fatal(err)
	}
	// Still air, best_glide form: loss = 1/E in every direction and at every
	// altitude (the glide ratio is independent of density; Anderson ch. 6).
	for _, h := range []float64{-100, 0, 777, 3000, 9000} {
		for _, b := range []float64{0, 1, 3, -2, 7} {
			if got := tab.Loss(h, b); !relClose(got, 1.0/9, 1e-9) {
				t.Errorf("Loss(%v, %v) = %v, want 1/9", h, b, got)
			}
		}
	}
	if !relClose(tab.BestDownwindRatio(), 9, 1e-9) {
		t.Errorf("best ratio %v", tab.BestDownwindRatio())
	}
	if !math.IsInf(tab.Loss(math.NaN(), 0), 1) {
		t.Error("NaN altitude not +Inf")
	}
	// Uniform wind from 270: the best downwind ratio is the largest direct
	// downwind (track 090) optimum over the altitude nodes.
	w, _ := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 270, Speed: 10}})
	tab, err = NewTable(ac, Atmosphere{}, w, Conditions{}, 0, 3000)
	if err != nil {
		t.Fatal(err)
	}
	best := 0.0
	for h := 0.0; h <= 3000; h += 50 {
		best = math.Max(best, ac.SpeedToFly(Atmosphere{}.Density(h), 10, 0, Conditions{}).GroundRatio)
	}
	if !relClose(tab.BestDownwindRatio(), best, 1e-9) {
		t.Errorf("best downwind ratio %v, want %v", tab.BestDownwindRatio(), best)
	}
	// Downwind (track 090) is better than upwind (track 270).
	if !(tab.Loss(1000, math.Pi/2) < tab.Loss(1000, 3*math.Pi/2)) {
		t.Error("downwind loss not below upwind loss")
	}
}

func TestTableNoHeadway(t *testing.T) {
	ac, _ := Builtin("trainer")
	w, _ := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 360, Speed: 70}})
	tab, err := NewTable(ac, Atmosphere{}, w, Conditions{}, 0, 1000)
	if err != nil {
		t.Fatal(err)
	}
	// Into a 70 m/s wind from the north the trainer (max 120 kt) makes no
	// headway: +Inf, and At says so.
	if l := tab.Loss(500, 0); !math.IsInf(l, 1) {
		t.Errorf("loss into a 70 m/s wind %v", l)
	}
	if s := tab.At(500, 0); !s.NoHeadway || s.GroundRatio != 0 {
		t.Errorf("At into a 70 m/s wind %+v", s)
	}
	if l := tab.Loss(500, math.Pi); math.IsInf(l, 1) || l <= 0 {
		t.Errorf("downwind loss %v", l)
	}
}

func TestNewTableRejects(t *testing.T) {
	ac, _ := Builtin("trainer")
	bad := *ac
	bad.StallIAS = 0
	for _, c := range []struct {
		ac     *Aircraft
		c      Conditions
		lo, hi float64
	}{
		{nil, Conditions{}, 0, 1000},
		{&bad, Conditions{}, 0, 1000},
		{ac, Conditions{Bugs: -1}, 0, 1000},
		{ac, Conditions{}, 1000, 0},
		{ac, Conditions{}, 0, 30000},
		{ac, Conditions{}, math.NaN(), 100},
	} {
		if _, err := NewTable(c.ac, Atmosphere{}, nil, c.c, c.lo, c.hi); err == nil {
			t.Errorf("NewTable(%+v, %v..%v) accepted", c.c, c.lo, c.hi)
		}
	}
}

// BenchmarkNewTable builds the 0–6000 m × 360-direction table through a
// layered wind (issue 2 bar: ≤ 50 ms).
func BenchmarkNewTable(b *testing.B) {
	ac, _ := Builtin("sailplane")
	w := layeredWind(b, 1)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := NewTable(ac, Atmosphere{}, w, Conditions{}, 0, 6000); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkTableLoss(b *testing.B) {
	ac, _ := Builtin("trainer")
	tab, err := NewTable(ac, Atmosphere{}, layeredWind(b, 1), Conditions{}, 0, 6000)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	x := 0.0
	for i := 0; b.Loop(); i++ {
		x += tab.Loss(float64(i%6000), float64(i%628)*0.01)
	}
	_ = x
}
