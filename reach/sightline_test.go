package reach

import (
	"math"
	"math/rand"
	"testing"
)

// TestSightAnchoredBoundSameDecisions checks the walk's anchored bounds
// (anchorLow, anchorHigh: the glide's altitude bounded from the last exact
// altitude worked out on the segment) against the walk without them, bit
// for bit: the reference is the exact altitude of the descent table at
// every square the bounds decide (the rule the walk applied before them),
// so a shortcut that changed one decision, or the highest ground recorded
// below the clearance, fails. Random terrain with ridges, walls, pits and
// voids (propTerrain), random aircraft, layered wind and clearance, forward
// and backward, lines of every length up to the window's, the altitude
// chosen so that many lines graze the floor. Common practice (an
// optimisation checked against the computation it replaces), no source.
func TestSightAnchoredBoundSameDecisions(t *testing.T) {
	defer func() { sightAnchored = true }()
	rng := rand.New(rand.NewSource(13))
	cases := propCases(24)
	var ok, blocked, flagged, walks int
	for k := 0; k < cases; k++ {
		n := 60 + rng.Intn(140)
		cell := []float64{30, 90, 200}[rng.Intn(3)]
		l := propTerrain(rng, n, cell)
		if rng.Intn(3) == 0 {
			h := hillyWindow(n, cell, rng.Intn(100))
			copy(l.Elev, h.Elev)
		}
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, e := range l.Elev {
			if e == e {
				lo, hi = math.Min(lo, float64(e)), math.Max(hi, float64(e))
			}
		}
		wp := propWind(t, rng, []float64{0, 20}[min(rng.Intn(4), 1)]) // a quarter calm
		tab, err := NewTable(propAircraft(rng), Atmosphere{}, wp, Conditions{}, lo-300, hi+1500)
		if err != nil {
			t.Fatal(err)
		}
		d, err := newDescentFor(tab, lo-250, hi+1400)
		if err != nil {
			t.Fatal(err)
		}
		for _, backward := range []bool{false, true} {
			p := newPropagation(l, d, backward)
			p.clearance = float32(rng.Float64() * 150)
			for i := 0; i < 400; i++ {
				pc, pr := rng.Intn(n), rng.Intn(n)
				qc, qr := rng.Intn(n), rng.Intn(n)
				ep, eq := l.Elev[pr*n+pc], l.Elev[qr*n+qc]
				if ep != ep || eq != eq || pc == qc && pr == qr {
					continue
				}
				pv := float64(ep) + rng.Float64()*1200
				if backward {
					pv = float64(ep) + rng.Float64()*400
				}
				v, fd := p.segmentDir(float64(pc), float64(pr), pv, qc, qr)
				if math.IsInf(v, 0) || v != v {
					continue
				}
				allow, top := noTop, noTop
				switch {
				case backward:
					allow, top = ep, ep // the field's elevation (the parent's ground here)
				case rng.Intn(2) == 0:
					allow = eq // an end value: ground no higher than the cell's
					if rng.Intn(2) == 0 {
						top = eq - float32(rng.Float64()*50)
					}
				}
				sightAnchored = true
				topA, okA := p.sightDir(float64(pc), float64(pr), pv, qc, qr, v, allow, top, fd)
				sightAnchored = false
				topB, okB := p.sightDir(float64(pc), float64(pr), pv, qc, qr, v, allow, top, fd)
				walks++
				if okA != okB || math.Float32bits(topA) != math.Float32bits(topB) {
					t.Fatalf("case %d (backward %v): line %d,%d (%.3f m) -> %d,%d (%.3f m): anchored %v top %v, exact %v top %v",
						k, backward, pc, pr, pv, qc, qr, v, okA, topA, okB, topB)
				}
				switch {
				case !okB:
					blocked++
				case topB != top:
					flagged++
				default:
					ok++
				}
			}
		}
	}
	// The sample must hold lines of every outcome: clear, blocked, and
	// clear with ground passed below the clearance.
	if ok < walks/20 || blocked < walks/20 || flagged < walks/200 {
		t.Errorf("%d walks: %d clear, %d blocked, %d passing ground below the clearance: the sample does not exercise every outcome", walks, ok, blocked, flagged)
	}
	t.Logf("%d walks: %d clear, %d blocked, %d passing ground below the clearance", walks, ok, blocked, flagged)
}
