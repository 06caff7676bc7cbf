package reach

import (
	"context"
	"math"
	"math/rand"
	"testing"

	"glidereach/terrain"
)

// TestSightShortcutsSameDecisions checks the walk's shortcuts against the
// walk without them, bit for bit: the anchored bounds (anchorLow,
// anchorHigh: the glide's altitude bounded from the last exact altitude
// worked out on the segment), whose reference is the exact altitude of the
// descent table at every square they decide (the rule the walk applied
// before them), so a shortcut that changed one decision, or the highest
// ground recorded below the clearance, fails; and sightEnd on the end
// values (the same decision, and a top above allow exactly when sightDir's
// is). Random terrain with ridges, walls, pits and voids (propTerrain),
// random aircraft, layered wind and clearance, forward and backward, lines
// of every length up to the window's, the altitude chosen so that many
// lines graze the floor. Common practice (an optimisation checked against
// the computation it replaces), no source.
//
// It also checks that a walk started below the pyramid's single-block
// levels, as sightDir's are, decides as one started at the coarsest.
func TestSightShortcutsSameDecisions(t *testing.T) {
	defer func() { sightAnchored = true }()
	rng := rand.New(rand.NewSource(13))
	cases := propCases(24)
	var ok, blocked, flagged, walks, loose int
	for k := 0; k < cases; k++ {
		n := 60 + rng.Intn(140)
		cell := []float64{30, 90, 200}[rng.Intn(3)]
		l := propLandscape(rng, n, cell, 3)
		lo, hi, _ := groundSpan(l)
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
			p := newPropagation(l, d, backward, nil)
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
				if !backward && allow != noTop {
					// sightEnd: the same decision, and on a clear line a
					// top that exceeds allow exactly when sightDir's does.
					// (A blocked line's top is not used: the solver offers
					// only along a clear one, and a loose walk that fails
					// in its last slabs, which it tries first, stops there.)
					topE, okE := p.sightEnd(float64(pc), float64(pr), pv, qc, qr, v, allow, top, fd)
					if okE != okB || okB && ((topE > allow) != (topB > allow) || topE < topB) {
						t.Fatalf("case %d: line %d,%d (%.3f m) -> %d,%d (%.3f m): sightEnd %v top %v, sightDir %v top %v (allow %v)",
							k, pc, pr, pv, qc, qr, v, okE, topE, okB, topB, allow)
					}
					if okB && topE != topB {
						loose++
					}
				}
				// From the coarsest level (sightDir starts where the
				// pyramid has more than one block): the same decision.
				topC, okC := p.walkLine(float64(pc), float64(pr), pv, float64(qc), float64(qr), qc, qr, v, allow, top, true, false, len(pyrShifts)-1, fd)
				if okC != okB || math.Float32bits(topC) != math.Float32bits(topB) {
					t.Fatalf("case %d (backward %v): line %d,%d (%.3f m) -> %d,%d (%.3f m): from the coarsest level %v top %v, from level %d %v top %v",
						k, backward, pc, pr, pv, qc, qr, v, okC, topC, p.pyr.split, okB, topB)
				}
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
	if loose == 0 {
		t.Errorf("no line where sightEnd passed a block sightDir walked square by square")
	}
	t.Logf("%d walks: %d clear, %d blocked, %d passing ground below the clearance; %d where sightEnd's top differs", walks, ok, blocked, flagged, loose)
}

// TestSightAboveAllSameRuns checks that sightFrom's test against the
// window's highest ground (aboveAll) is only a shortcut: footprints and
// backward runs on random landscapes (with and without voids, which turn
// it off) give bit for bit the values they give without it, and the
// sample holds runs where it decided most segments.
func TestSightAboveAllSameRuns(t *testing.T) {
	skipUnderRace(t)
	defer func() { sightAboveAll = true }()
	rng := rand.New(rand.NewSource(29))
	cases := propCases(12)
	shortcut := 0
	for k := 0; k < cases; k++ {
		sc := newRunScene(t, rng, 50+rng.Intn(90))
		l, hi, voids, clearance := sc.l, sc.hi, sc.voids, sc.clearance
		fp := sc.sameRuns(t, k, "the shortcut", func(on bool) { sightAboveAll = on }, hi+200+rng.Float64()*2000, sc.midGround())
		// Cells the glide reaches a clearance above the highest ground:
		// their segments were decided by the shortcut.
		high := 0
		for _, a := range fp.Arrival {
			if !voids && float64(a)-clearance >= hi {
				high++
			}
		}
		if high > len(l.Elev)/4 {
			shortcut++
		}
	}
	if shortcut < cases/4 {
		t.Errorf("only %d of %d cases had a quarter of their cells above every ground: the shortcut is hardly exercised", shortcut, cases)
	}
}

// TestSightEndFirstSameRuns: the footprints and backward runs are the same
// bit for bit with and without the walk's first look at an end value's last
// slabs (run, sightEndFirst), on random landscapes, aircraft, winds and
// clearances, from starts low enough that much of the ground is reached
// below the clearance (end values, whose walks take the first look). The
// check also requires that the cases hold such cells.
func TestSightEndFirstSameRuns(t *testing.T) {
	skipUnderRace(t)
	defer func() { sightEndFirst = true }()
	rng := rand.New(rand.NewSource(31))
	cases := propCases(12)
	low := 0
	for k := 0; k < cases; k++ {
		sc := newRunScene(t, rng, 50+rng.Intn(90))
		l, clearance := sc.l, sc.clearance
		ground := sc.midGround()
		if ground != ground {
			continue
		}
		fp := sc.sameRuns(t, k, "the end first", func(on bool) { sightEndFirst = on }, ground+50+rng.Float64()*(sc.hi-sc.lo+400), ground)
		below := 0
		for q, a := range fp.Arrival {
			if agl := float64(a) - float64(l.Elev[q]); agl >= 0 && agl < clearance {
				below++
			}
		}
		if below > len(l.Elev)/50 {
			low++
		}
	}
	if low < cases/4 {
		t.Errorf("only %d of %d cases had 2 %% of their cells reached below the clearance: the end values' walks are hardly exercised", low, cases)
	}
}

// runScene is a case of the whole-run comparisons (sameRunsEitherWay): an
// n×n landscape (propLandscape), its ground span, a table of a random
// aircraft in a random layered wind over it, a random clearance and the
// position of its middle cell.
type runScene struct {
	l         *terrain.Local
	tab       *Table
	lo, hi    float64
	voids     bool
	clearance float64
	n         int
	lat, lon  float64
}

// newRunScene draws a runScene of n cells across from rng.
func newRunScene(t *testing.T, rng *rand.Rand, n int) runScene {
	t.Helper()
	cell := []float64{30, 90, 200}[rng.Intn(3)]
	sc := runScene{l: propLandscape(rng, n, cell, 2), n: n}
	sc.lo, sc.hi, sc.voids = groundSpan(sc.l)
	tab, err := NewTable(propAircraft(rng), Atmosphere{}, propWind(t, rng, 20), Conditions{}, sc.lo-300, sc.hi+2500)
	if err != nil {
		t.Fatal(err)
	}
	sc.tab = tab
	sc.clearance = rng.Float64() * 150
	mid := n / 2
	sc.lat, sc.lon = sc.l.Frame.Inverse(sc.l.X0+float64(mid)*cell, sc.l.Y0+float64(mid)*cell)
	return sc
}

// propLandscape is propTerrain's n×n landscape of cell, its elevations
// replaced by hillyWindow's smooth hills in one case of oneIn.
func propLandscape(rng *rand.Rand, n int, cell float64, oneIn int) *terrain.Local {
	l := propTerrain(rng, n, cell)
	if rng.Intn(oneIn) == 0 {
		h := hillyWindow(n, cell, rng.Intn(100))
		copy(l.Elev, h.Elev)
	}
	return l
}

// sameRunsEitherWay runs a footprint from start and a backward run to
// target on l with a shortcut on and off (set), fails case k where any
// cell's value differs in a bit, and returns the footprint with it on.
func sameRunsEitherWay(t *testing.T, k int, what string, set func(on bool), l *terrain.Local, start Start, tab *Table, opts FootprintOptions, target Target, ropts RequiredOptions) *FootprintResult {
	t.Helper()
	var fp [2]*FootprintResult
	var rq [2]*RequiredResult
	for i, on := range []bool{true, false} {
		set(on)
		var err error
		if fp[i], err = Footprint(context.Background(), l, start, tab, opts); err != nil {
			t.Fatal(err)
		}
		if rq[i], err = Required(context.Background(), l, []Target{target}, tab, ropts); err != nil {
			t.Fatal(err)
		}
	}
	set(true)
	for q := range fp[0].Arrival {
		a, b := fp[0].Arrival[q], fp[1].Arrival[q]
		if math.Float32bits(a) != math.Float32bits(b) {
			t.Fatalf("case %d: footprint cell %d: %v with %s, %v without", k, q, a, what, b)
		}
		a, b = rq[0].Required[q], rq[1].Required[q]
		if math.Float32bits(a) != math.Float32bits(b) {
			t.Fatalf("case %d: required cell %d: %v with %s, %v without", k, q, a, what, b)
		}
	}
	return fp[0]
}

// midGround is the ground (m MSL) of the scene's middle cell, NaN on a
// void.
func (sc runScene) midGround() float64 {
	mid := sc.n / 2
	return float64(sc.l.Elev[mid*sc.n+mid])
}

// sameRuns is sameRunsEitherWay on the scene: a footprint from its middle
// at altitude alt (reserve 150 m, the scene's clearance, one level) and a
// backward run to a field of elevation elev on its middle cell (ceiling
// 2400 m above the highest ground, one worker).
func (sc runScene) sameRuns(t *testing.T, k int, what string, set func(on bool), alt, elev float64) *FootprintResult {
	t.Helper()
	start := Start{Lat: sc.lat, Lon: sc.lon, Alt: alt}
	opts := FootprintOptions{Reserve: 150, Clearance: sc.clearance, Levels: []float64{0}}
	target := Target{Lat: sc.lat, Lon: sc.lon, Elev: elev, Reserve: 150}
	ropts := RequiredOptions{Clearance: sc.clearance, Ceiling: sc.hi + 2400, Workers: 1}
	return sameRunsEitherWay(t, k, what, set, sc.l, start, sc.tab, opts, target, ropts)
}

// groundSpan returns the lowest and highest known ground of l (m MSL) and
// whether it holds a void.
func groundSpan(l *terrain.Local) (lo, hi float64, voids bool) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, e := range l.Elev {
		if e != e {
			voids = true
			continue
		}
		lo, hi = math.Min(lo, float64(e)), math.Max(hi, float64(e))
	}
	return lo, hi, voids
}
