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
