package reach

import (
	"context"
	"math"
	"testing"
)

// A get takes the smallest kept buffer that holds the request, so a small
// run does not take the buffer a large one needs; a full list drops its
// smallest buffer for a larger one.
func TestScratchPoolBestFit(t *testing.T) {
	var sp scratchPool[float32]
	for _, n := range []int{100, 400, 200, 800} {
		sp.put(make([]float32, n))
	}
	if b := sp.get(150); cap(b) != 200 || len(b) != 150 {
		t.Fatalf("get(150): len %d cap %d, want the 200 buffer cut to 150", len(b), cap(b))
	}
	if b := sp.get(900); cap(b) != 900 {
		t.Fatalf("get(900): cap %d, want a new buffer of 900 (none kept holds it)", cap(b))
	}
	sp.put(make([]float32, 300)) // list now 100, 400, 800, 300: full
	sp.put(make([]float32, 50))  // smaller than every kept one: dropped
	sp.put(make([]float32, 500)) // replaces the 100
	// The sync.Pool may drop the list at a collection; only check what
	// is there when it is kept.
	if fl, _ := sp.lists.Get().(*scratchList[float32]); fl != nil {
		got := map[int]bool{}
		for _, b := range fl.bufs {
			got[cap(b)] = true
		}
		want := map[int]bool{300: true, 400: true, 500: true, 800: true}
		if len(got) != len(want) || len(fl.bufs) != scratchKeep {
			t.Fatalf("kept %v, want %v", got, want)
		}
		for c := range want {
			if !got[c] {
				t.Fatalf("kept %v, want %v", got, want)
			}
		}
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
	run := func() *RequiredResult {
		res, err := Required(context.Background(), l, ts, tab, opts)
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
	scratchRecs, scratchFloat32 = scratchPool[cellRec]{}, scratchPool[float32]{}
	ref := run()
	// Stale buffers, larger than any run's window, in every slot.
	n := l.Cols * l.Rows
	for k := 0; k < scratchKeep; k++ {
		recs, vals := make([]cellRec, n+k), make([]float32, n+k)
		for i := range recs {
			recs[i] = cellRec{par: int32(i % 7), top: 1e4, src: 2, st: cellClosed}
			vals[i] = -1
		}
		scratchRecs.put(recs)
		scratchFloat32.put(vals)
	}
	for rep := 0; rep < 3; rep++ {
		res := run()
		for i := range res.Required {
			a, b := ref.Required[i], res.Required[i]
			if math.Float32bits(a) != math.Float32bits(b) || ref.Best[i] != res.Best[i] {
				t.Fatalf("run %d on reused buffers: cell %d: %v (field %d), fresh %v (field %d)", rep, i, b, res.Best[i], a, ref.Best[i])
			}
		}
	}
}
