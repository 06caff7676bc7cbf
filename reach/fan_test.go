package reach

import (
	"math"
	"math/rand"
	"testing"
)

// TestSourceFanSameDecisions checks that the source fan (fan.go) only
// shortens walks: lines from a source on random landscapes (walls, pits,
// voids, hills; forward and backward; calm and layered wind) get bit for
// bit the decision and top of the walk from the source's own slab, and the
// sample holds lines whose walk the fan started part way. Where
// fanEndClear lets the rest of a line go unwalked, the whole walk must find
// the line clear and leave top as it was.
func TestSourceFanSameDecisions(t *testing.T) {
	rng := rand.New(rand.NewSource(31))
	cases := propCases(24)
	var walks, started, ends, endClear int
	for k := 0; k < cases; k++ {
		n := 60 + rng.Intn(200)
		cell := []float64{30, 90, 200}[rng.Intn(3)]
		l := propLandscape(rng, n, cell, 2)
		lo, hi, _ := groundSpan(l)
		wp := propWind(t, rng, []float64{0, 20}[min(rng.Intn(4), 1)])
		tab, err := NewTable(propAircraft(rng), Atmosphere{}, wp, Conditions{}, lo-300, hi+1500)
		if err != nil {
			t.Fatal(err)
		}
		d, err := newDescentFor(tab, lo-250, hi+1400)
		if err != nil {
			t.Fatal(err)
		}
		for _, backward := range []bool{false, true} {
			p := newPropagation(l, d, backward, nil)
			p.clearance = float32(rng.Float64() * 150)
			sx, sy := rng.Intn(n), rng.Intn(n)
			if rng.Intn(3) == 0 {
				sx, sy = n/2, n/2
			}
			e := l.Elev[sy*n+sx]
			if e != e {
				continue
			}
			pv := float64(e) + 100 + rng.Float64()*1200
			if backward {
				pv = float64(e) + rng.Float64()*300
			}
			p.srcs = []source{{X: float64(sx), Y: float64(sy), Alt: pv}}
			p.fieldElev = []float32{e}
			for i := 0; i < 600; i++ {
				qc, qr := rng.Intn(n), rng.Intn(n)
				if l.Elev[qr*n+qc] != l.Elev[qr*n+qc] || qc == sx && qr == sy {
					continue
				}
				v, fd := p.segmentDir(float64(sx), float64(sy), pv, qc, qr)
				if math.IsInf(v, 0) || v != v {
					continue
				}
				allow, top := noTop, noTop
				if backward {
					allow, top = e, e
				} else if rng.Intn(2) == 0 {
					allow = l.Elev[qr*n+qc]
				}
				ks := p.fanStart(0, float64(sx), float64(sy), qc, qr)
				k0 := sx
				if math.Abs(float64(qc-sx)) < math.Abs(float64(qr-sy)) {
					k0 = sy
				}
				if ks != k0 {
					started++
				}
				topA, okA := p.sightDirFrom(float64(sx), float64(sy), pv, qc, qr, v, allow, top, fd, ks)
				topB, okB := p.sightDir(float64(sx), float64(sy), pv, qc, qr, v, allow, top, fd)
				walks++
				if p.fanEndClear(ks, float64(sx), float64(sy), pv, qc, qr, v, allow) {
					// The rest of the line was not walked: the whole walk
					// must find it clear and leave top as it was.
					if !okB || math.Float32bits(topB) != math.Float32bits(top) {
						t.Fatalf("case %d (backward %v): line %d,%d (%.3f m) -> %d,%d (%.3f m): fanEndClear from slab %d, but the walk gives %v top %v (top before %v)",
							k, backward, sx, sy, pv, qc, qr, v, ks, okB, topB, top)
					}
					endClear++
				}
				if !backward && allow != noTop {
					topE, okE := p.sightEndFrom(float64(sx), float64(sy), pv, qc, qr, v, allow, top, fd, ks)
					if okE != okB || (topE > allow) != (topB > allow) {
						t.Fatalf("case %d: line %d,%d (%.3f m) -> %d,%d (%.3f m): sightEndFrom slab %d %v top %v, sightDir %v top %v (allow %v)",
							k, sx, sy, pv, qc, qr, v, ks, okE, topE, okB, topB, allow)
					}
					ends++
				}
				if okA != okB || math.Float32bits(topA) != math.Float32bits(topB) {
					t.Fatalf("case %d (backward %v): line %d,%d (%.3f m) -> %d,%d (%.3f m): from slab %d %v top %v, from the source's %d %v top %v",
						k, backward, sx, sy, pv, qc, qr, v, ks, okA, topA, k0, okB, topB)
				}
			}
		}
	}
	if started < walks/10 {
		t.Errorf("%d walks, %d started part way: the fan was not exercised", walks, started)
	}
	if endClear < walks/100 {
		t.Errorf("%d walks, %d with a rest fanEndClear passes: it was not exercised", walks, endClear)
	}
	t.Logf("%d walks, %d started part way by the fan, %d whose rest fanEndClear passes; %d end values' walks (sightEndFrom)", walks, started, endClear, ends)
}

// TestSourceFanSameRuns: footprints and backward runs give bit for bit the
// values they give without the fan.
func TestSourceFanSameRuns(t *testing.T) {
	skipUnderRace(t)
	defer func() { sightFan = true }()
	rng := rand.New(rand.NewSource(37))
	cases := propCases(8)
	for k := 0; k < cases; k++ {
		sc := newRunScene(t, rng, 80+rng.Intn(120))
		alt, elev := sc.midGround()+300+rng.Float64()*1500, sc.midGround()
		if elev != elev { // a void in the middle
			alt, elev = sc.hi+300, sc.lo
		}
		sc.sameRuns(t, k, "the fan", func(on bool) { sightFan = on }, alt, elev)
	}
}
