package reach

import (
	"math"
	"math/rand"
	"testing"
)

func TestBearingOfMatchesAtan2(t *testing.T) {
	// bearingOf is a fast atan2(dx, dy); compare with the standard library.
	rng := rand.New(rand.NewSource(1))
	worst := 0.0
	for i := 0; i < 200000; i++ {
		dx, dy := rng.NormFloat64()*100, rng.NormFloat64()*100
		if i%7 == 0 {
			dx = math.Round(dx)
		}
		if i%11 == 0 {
			dy = 0
		}
		want := math.Atan2(dx, dy)
		got := bearingOf(dx, dy)
		d := math.Abs(math.Remainder(got-want, 2*math.Pi))
		worst = math.Max(worst, d)
	}
	if worst > 2e-5 {
		t.Errorf("worst error %g rad", worst)
	}
}

// splitDirBranchy is splitDir as it was written before session 12 (the
// whole range reduced by Floor): the definition the shortcut for the west
// half must reproduce bit for bit.
func splitDirBranchy(nDir int, f float64) (d0, d1 int, w float64) {
	n := float64(nDir)
	if !(f >= 0 && f < n) {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return 0, 1, 0
		}
		f -= math.Floor(f/n) * n
		if f < 0 {
			f += n
		}
	}
	d0 = int(f)
	if d0 >= nDir {
		d0, f = 0, 0
	}
	w = f - float64(d0)
	d1 = d0 + 1
	if d1 == nDir {
		d1 = 0
	}
	return d0, d1, w
}

// TestSplitDirWestHalf: splitDir, which reduces a negative direction of
// at least −nDir by one addition, gives the values of the reduction by
// Floor bit for bit (signed zeros and NaN included), on every bearing
// bearingOf gives for cell offsets and random vectors, and on the ends
// of the range and beyond it. No outside source: the old form is the
// definition.
func TestSplitDirWestHalf(t *testing.T) {
	same := func(a, b float64) bool {
		return math.Float64bits(a) == math.Float64bits(b) || a != a && b != b
	}
	d := &descent{nDir: 360, invStep: 360 / (2 * math.Pi)}
	n := 360.0
	fs := []float64{-n, math.Nextafter(-n, 0), math.Nextafter(-n, math.Inf(-1)), -n / 2, -1e-15, -5e-324, math.Copysign(0, -1), 0,
		5e-324, 1e-15, n / 2, math.Nextafter(n, 0), n, math.Nextafter(n, math.Inf(1)), 2 * n, -2 * n, -7.5 * n, 1e20, -1e20,
		math.Inf(1), math.Inf(-1), math.NaN()}
	for dx := -40; dx <= 40; dx++ {
		for dy := -40; dy <= 40; dy++ {
			fs = append(fs, bearingOf(float64(dx), float64(dy))*d.invStep, bearingOf(float64(dx)-0.37, float64(dy)+0.81)*d.invStep)
		}
	}
	rng := rand.New(rand.NewSource(12))
	for range 200000 {
		fs = append(fs, bearingOf(rng.NormFloat64(), rng.NormFloat64())*d.invStep, (rng.Float64()-0.5)*4*n)
	}
	for _, f := range fs {
		g0, g1, gw := d.splitDir(f)
		w0, w1, ww := splitDirBranchy(360, f)
		if g0 != w0 || g1 != w1 || !same(gw, ww) {
			t.Fatalf("splitDir(%v) = %d %d %v, by Floor %d %d %v", f, g0, g1, gw, w0, w1, ww)
		}
	}
}
