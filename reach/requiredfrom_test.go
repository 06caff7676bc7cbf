package reach

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"glidereach/terrain"
	"glidereach/wind"
)

// RequiredFrom's pruned first run (a cut by distance to the point, the
// bound of an A* search) must give the figures of the unpruned run, bit for
// bit, or hand over to it: random fields and starts over hills, in calm air
// and in layered winds, for the trainer and the sailplane, with ridges
// forcing detours. The check is against the unpruned search itself (the
// figure the rest of the project and its other tests rest on); it also
// asks that the pruned run decides most cases and that it costs less.
func TestInvariantRequiredFromPrunedEqualsFull(t *testing.T) {
	n := propCases(60) // 1000 with -full (invariants_test.go)
	if testing.Short() {
		n = 20
	}
	rng := rand.New(rand.NewPCG(11, 3))
	calm, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 0, Speed: 0}})
	if err != nil {
		t.Fatal(err)
	}
	layered, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 240, Speed: 5}, {Alt: 1500, Dir: 270, Speed: 10}, {Alt: 3000, Dir: 290, Speed: 18}})
	if err != nil {
		t.Fatal(err)
	}
	var tabs []*Table
	for _, name := range []string{"trainer", "sailplane"} {
		ac, err := Builtin(name)
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range []*wind.Profile{calm, layered} {
			tab, err := NewTable(ac, Atmosphere{}, w, Conditions{}, -200, 6000)
			if err != nil {
				t.Fatal(err)
			}
			tabs = append(tabs, tab)
		}
	}
	grounds := []*terrain.Local{hillyWindow(241, 60, 1), hillyWindow(241, 60, 5)}
	// A ridge 700 m high across the second window, with one gap.
	g := grounds[1]
	for r := 0; r < g.Rows; r++ {
		if r > 150 && r < 160 {
			continue
		}
		for c := 118; c < 123; c++ {
			g.Elev[r*g.Cols+c] = 900
		}
	}
	// A patch of unknown ground (voids) in the first.
	g = grounds[0]
	for r := 60; r < 75; r++ {
		for c := 90; c < 100; c++ {
			g.Elev[r*g.Cols+c] = float32(math.NaN())
		}
	}
	decidedByCut, decidedByFound := 0, 0
	var tPruned, tFull time.Duration
	for k := 0; k < n; k++ {
		l := grounds[k%len(grounds)]
		tab := tabs[rng.IntN(len(tabs))]
		fc, fr := 20+rng.IntN(l.Cols-40), 20+rng.IntN(l.Rows-40)
		sc, sr := 20+rng.IntN(l.Cols-40), 20+rng.IntN(l.Rows-40)
		fx, fy := l.XY(fc, fr)
		flat, flon := l.Frame.Inverse(fx+rng.Float64()*30, fy+rng.Float64()*30)
		sx, sy := l.XY(sc, sr)
		slat, slon := l.Frame.Inverse(sx+rng.Float64()*50, sy+rng.Float64()*50)
		elev, ok := l.Sample(l.Frame.Forward(flat, flon))
		if !ok {
			continue // a field on unknown ground is refused before RequiredFrom
		}
		target := Target{Lat: flat, Lon: flon, Elev: elev, Reserve: 100 + 200*rng.Float64()}
		opts := RequiredOptions{Clearance: 100, Ceiling: elev + 3500}
		t0 := time.Now()
		requiredFromPruned = true
		a, aok, err := RequiredFrom(context.Background(), l, target, tab, opts, slat, slon)
		t1 := time.Now()
		requiredFromPruned = false
		b, bok, err2 := RequiredFrom(context.Background(), l, target, tab, opts, slat, slon)
		t2 := time.Now()
		requiredFromPruned = true
		if err != nil || err2 != nil {
			t.Fatalf("case %d: %v / %v", k, err, err2)
		}
		tPruned += t1.Sub(t0)
		tFull += t2.Sub(t1)
		if aok != bok || aok && math.Float64bits(a) != math.Float64bits(b) {
			t.Errorf("case %d: pruned %.4f m (%v), unpruned %.4f m (%v)", k, a, aok, b, bok)
		}
		x, y := l.Frame.Forward(slat, slon)
		var pre *descent
		var bound *displacementBound
		ropts := RequiredOptions{Clearance: 100, Ceiling: elev + 3500, Workers: 1}
		px, py := (x-l.X0)/l.Cell, (y-l.Y0)/l.Cell
		for i, m := range pruneMargins {
			r, err := requiredFromRun(context.Background(), l, target, tab, ropts, px, py, m, &pre, &bound)
			if err == nil && r.decided {
				decidedByCut++
				break
			}
			if i == 0 && !math.IsNaN(r.found) {
				fm := &pruneMargin{Abs: pruneMargins[len(pruneMargins)-1].Abs, Rel: pruneMargins[len(pruneMargins)-1].Rel, Found: r.found}
				if r, err := requiredFromRun(context.Background(), l, target, tab, ropts, px, py, fm, &pre, &bound); err == nil && r.decided {
					decidedByCut++
					decidedByFound++
					break
				}
			}
		}
	}
	t.Logf("%d of %d cases decided by the pruned run (%d by the cut at the figure the tight cut found); time pruned-first %v, unpruned %v", decidedByCut, n, decidedByFound, tPruned, tFull)
	if n >= 60 && decidedByFound == 0 {
		t.Errorf("no case was decided by the cut at the figure the tight cut found: that path is not exercised")
	}
	if decidedByCut < n/2 {
		t.Errorf("the pruned run decided only %d of %d cases", decidedByCut, n)
	}
}
