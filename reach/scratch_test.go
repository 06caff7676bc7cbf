package reach

import (
	"context"
	"math"
	"math/rand"
	"sync"
	"testing"

	"glidereach/terrain"
)

// A take gives the smallest kept buffer that holds the request, so a small
// run does not take the buffer a large one needs; a full list drops its
// smallest buffer for a larger one; a nil pool (no scope) allocates.
func TestScratchListBestFit(t *testing.T) {
	if scratchKeep < 2 {
		t.Skip("a list of one buffer has no choice to make")
	}
	var fl scratchList[float32]
	for i := scratchKeep - 1; i >= 0; i-- { // 100, 200, …: full
		fl.keep(make([]float32, 100*(i+1)))
	}
	if b := fl.take(150); cap(b) != 200 || len(b) != 150 {
		t.Fatalf("take(150): len %d cap %d, want the 200 buffer cut to 150", len(b), cap(b))
	}
	if b := fl.take(100*scratchKeep + 1); b != nil {
		t.Fatalf("take(%d): cap %d, want nil (none kept holds it)", 100*scratchKeep+1, cap(b))
	}
	fl.keep(make([]float32, 200))  // full again
	fl.keep(make([]float32, 50))   // smaller than every kept one: dropped
	fl.keep(make([]float32, 5000)) // replaces the 100
	got := map[int]bool{}
	for _, b := range fl.bufs {
		got[cap(b)] = true
	}
	if len(fl.bufs) != scratchKeep || got[50] || got[100] || !got[5000] || !got[200] {
		t.Fatalf("kept %v: want %d buffers, 5000 and 200 among them, not 50 or 100", got, scratchKeep)
	}
	var sp scratchPool[float32]
	sp.put(make([]float32, 10))
	sp.put(make([]float32, 30))
	if b := sp.get(20); len(b) != 20 || cap(b) != 30 {
		t.Fatalf("pool get(20): len %d cap %d, want the 30 buffer", len(b), cap(b))
	}
	var none *scratchPool[float32] // outside a scope: allocate, keep nothing
	none.put(make([]float32, 10))
	if b := none.get(5); len(b) != 5 {
		t.Fatalf("nil pool get(5): len %d", len(b))
	}
	if scratchOf(context.Background()) != nil {
		t.Fatal("a context without WithScratch has a scratch scope")
	}
}

// A backward run that reuses the buffers a finished run left, filled with
// stale records and values, gives the same result bit for bit as one on
// fresh memory: every cell is initialised before it is read.
func TestRequiredSameOnReusedBuffers(t *testing.T) {
	l := hillyWindow(240, 60, 3)
	tab := layeredTable(t)
	var ts []Target
	for i, cr := range [][2]int{{30, 40}, {200, 60}, {120, 200}} {
		x, y := l.XY(cr[0], cr[1])
		lat, lon := l.Frame.Inverse(x, y)
		ts = append(ts, Target{Name: string(rune('A' + i)), Lat: lat, Lon: lon, Elev: l.At(cr[0], cr[1]), Reserve: 150})
	}
	opts := RequiredOptions{Clearance: 100, Ceiling: 2500, Workers: 1}
	run := func(ctx context.Context) *RequiredResult {
		res, err := Required(ctx, l, ts, tab, opts)
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
	ref := run(context.Background()) // no scope: fresh buffers
	ctx := WithScratch(context.Background())
	if WithScratch(ctx) != ctx {
		t.Fatal("a nested WithScratch opened a second scope")
	}
	sc := scratchOf(ctx)
	// Stale buffers, larger than any run's window, in every slot.
	n := l.Cols * l.Rows
	for k := 0; k < scratchKeep; k++ {
		recs, vals := make([]cellRec, n+k), make([]float32, n+k)
		for i := range recs {
			recs[i].set(int32(i%7), cellClosed)
			recs[i].setSrc(2)
			vals[i] = -1
		}
		sc.recs.put(recs)
		sc.f32.put(vals)
	}
	for rep := 0; rep < 3; rep++ {
		res := run(ctx)
		for i := range res.Required {
			a, b := ref.Required[i], res.Required[i]
			if math.Float32bits(a) != math.Float32bits(b) || ref.Best[i] != res.Best[i] {
				t.Fatalf("run %d on reused buffers: cell %d: %v (field %d), fresh %v (field %d)", rep, i, b, res.Best[i], a, ref.Best[i])
			}
		}
	}
}

// The descent cache hands out one build per exact (table, range), to every
// caller at once, and a different range or table gets its own table.
func TestDescentCacheSharesExactRequests(t *testing.T) {
	tab := layeredTable(t)
	other := layeredTable(t)
	descentCache = descentTables{}
	builds := 0
	var mu sync.Mutex
	get := func(tb *Table, lo, hi float64) *descent {
		d, err := descentCache.get(tb, lo, hi, func() (*descent, error) {
			mu.Lock()
			builds++
			mu.Unlock()
			return newDescent(tb, lo, hi, 10, 360)
		})
		if err != nil {
			t.Fatal(err)
		}
		return d
	}
	var wg sync.WaitGroup
	got := make([]*descent, 8)
	for i := range got {
		wg.Add(1)
		go func() { defer wg.Done(); got[i] = get(tab, 0, 2000) }()
	}
	wg.Wait()
	for _, d := range got[1:] {
		if d != got[0] {
			t.Fatal("concurrent requests for one table got different builds")
		}
	}
	if builds != 1 {
		t.Fatalf("%d builds for one table, want 1", builds)
	}
	if get(tab, 0, 2001) == got[0] || get(other, 0, 2000) == got[0] {
		t.Fatal("a different range or table was given the cached build")
	}
	// The shared table is the one a fresh build makes, value for value.
	fresh, err := newDescent(tab, 0, 2000, 10, 360)
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range fresh.dist {
		if math.Float64bits(v) != math.Float64bits(got[0].dist[i]) {
			t.Fatalf("dist[%d]: cached %v, fresh %v", i, got[0].dist[i], v)
		}
	}
}

// TestCellRecPacking: the parent and the state share one word of the
// record; every parent a run can hold, sources included, and every state
// come back as they were set, and setSt keeps the parent.
func TestCellRecPacking(t *testing.T) {
	pars := []int32{0, 1, 7, 8, 123456, maxPropagationCells - 1, -1, -2, -1 - math.MaxInt16, -1 - (1<<28 - 1)}
	for _, par := range pars {
		for st := cellUntouched; st <= cellVoid; st++ {
			var r cellRec
			r.setTop(float32(math.Inf(-1)))
			r.set(par, st)
			if r.par() != par || r.st() != st {
				t.Fatalf("set(%d, %d): got parent %d, state %d", par, st, r.par(), r.st())
			}
			r.setSt(cellEndDone)
			if r.par() != par || r.st() != cellEndDone {
				t.Fatalf("setSt after set(%d, %d): got parent %d, state %d", par, st, r.par(), r.st())
			}
			if !math.IsInf(float64(r.top()), -1) {
				t.Fatalf("set(%d, %d) changed top to %v", par, st, r.top())
			}
		}
	}
}

// TestWindowTooLargeIsRefused: a window whose cells a record cannot index
// is an error, not a wrong parent (checked before anything is allocated).
func TestWindowTooLargeIsRefused(t *testing.T) {
	big := &terrain.Local{Cell: 30, Cols: 1 << 14, Rows: 1<<14 + 1}
	if _, err := footprintOn(context.Background(), big, Start{Alt: 1000}, 1, 1, nil, FootprintOptions{}, 0); err != errWindowTooLarge {
		t.Fatalf("footprint on %d × %d cells: err %v, want errWindowTooLarge", big.Cols, big.Rows, err)
	}
	if _, err := requiredWith(context.Background(), big, []Target{{}}, nil, RequiredOptions{}, nil, nil, nil, true); err != errWindowTooLarge {
		t.Fatalf("required on %d × %d cells: err %v, want errWindowTooLarge", big.Cols, big.Rows, err)
	}
}

// TestNotFromIsTheLoopTest: the branch-free test of notFrom is the
// expansion loop's "holds a value from s's parent" test, negated, for every
// state and for parents at the ends of their range (cells 0 and the
// largest, sources −1 and the most negative) and random ones, against
// records of the same parent, the parents beside it and random ones
// (common practice, no source: a rewrite checked against the test it
// replaces).
func TestNotFromIsTheLoopTest(t *testing.T) {
	rng := rand.New(rand.NewSource(3))
	pars := []int32{0, 1, 2, maxPropagationCells - 1, -1, -2, -1 << 28, -1<<28 + 1}
	for i := 0; i < 200; i++ {
		pars = append(pars, int32(rng.Intn(maxPropagationCells))-int32(rng.Intn(2))*(1<<28))
	}
	for _, pi := range pars {
		piBits := uint32(pi) << 3
		for _, other := range []int32{pi, pi - 1, pi + 1, 0, -1, int32(rng.Uint32()) >> 3} {
			for st := uint8(0); st < 8; st++ {
				var r cellRec
				r.set(other, st)
				want := uint8(1)
				if r.ps&^7 == piBits && r.ps&7 != uint32(cellUntouched) {
					want = 0
				}
				if got := notFrom(r.ps, piBits); got != want {
					t.Fatalf("parent %d, record of parent %d state %d: notFrom %d, want %d", pi, other, st, got, want)
				}
			}
		}
	}
}
