package reach

import (
	"math"
	"strings"
	"testing"
)

// A descent table is bounded before it is allocated: ReachRadius down to
// -1e9 m (what --ground -1e9m asked for) allocated some 288 GB and died
// with "fatal error: out of memory"; now it is an error.
func TestDescentTableBounded(t *testing.T) {
	ac, err := Builtin("trainer")
	if err != nil {
		t.Fatal(err)
	}
	tab, err := NewTable(ac, Atmosphere{}, nil, Conditions{}, 0, 3000)
	if err != nil {
		t.Fatal(err)
	}
	for _, bottom := range []float64{-1e9, math.Inf(-1), -30000} {
		if _, err := ReachRadius(tab, 1500, bottom); err == nil || !strings.Contains(err.Error(), "descent table") {
			t.Errorf("ReachRadius(1500, %g): %v, want a descent-table error", bottom, err)
		}
	}
	if _, err := newDescent(tab, 0, 1000, 1e-6, 360); err == nil {
		t.Error("a 10⁹-row table was not refused")
	}
	if r, err := ReachRadius(tab, 1500, 0); err != nil || !(r > 10000) {
		t.Errorf("ordinary radius %v, %v", r, err)
	}
}
