package reach

import (
	"context"
	"math"
	"testing"

	"glidereach/wind"
)

// layeredTable is the built-in trainer's speed-to-fly table in a three-layer
// wind, for the tests of this file.
func layeredTable(t *testing.T) *Table {
	t.Helper()
	wp, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 240, Speed: 5}, {Alt: 1500, Dir: 270, Speed: 10}, {Alt: 3000, Dir: 290, Speed: 18}})
	if err != nil {
		t.Fatal(err)
	}
	ac, err := Builtin("trainer")
	if err != nil {
		t.Fatal(err)
	}
	tab, err := NewTable(ac, Atmosphere{}, wp, Conditions{}, -200, 4000)
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

// The result of Required must not depend on how many workers share the
// work: the fields are grouped by overlapping reach, and no two workers
// sweep the same cells (it used to split the fields between workers that
// each swept the whole window, and the merged figures differed from one
// worker's in the last metres).
func TestRequiredSameForAnyWorkers(t *testing.T) {
	l := hillyWindow(240, 60, 3)
	tab := layeredTable(t)
	var ts []Target
	for i, cr := range [][2]int{{30, 40}, {200, 60}, {120, 200}, {60, 180}, {210, 210}} {
		x, y := l.XY(cr[0], cr[1])
		lat, lon := l.Frame.Inverse(x, y)
		ts = append(ts, Target{Name: string(rune('A' + i)), Lat: lat, Lon: lon, Elev: l.At(cr[0], cr[1]), Reserve: 150})
	}
	var ref *RequiredResult
	for _, w := range []int{1, 2, 3, 8} {
		res, err := Required(context.Background(), l, ts, tab, RequiredOptions{Clearance: 100, Ceiling: 2500, Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		if ref == nil {
			ref = res
			continue
		}
		for i := range res.Required {
			a, b := ref.Required[i], res.Required[i]
			if (a == a || b == b) && (a != b || ref.Best[i] != res.Best[i]) {
				t.Fatalf("workers %d: cell %d: %v (field %d), 1 worker %v (field %d)", w, i, b, res.Best[i], a, ref.Best[i])
			}
		}
	}
}

// Fields whose glide ranges from the ceiling are apart are independent
// runs on their own parts of the window; the result per cell is exactly the
// lower of the fields' separate results (the same cells, the same figures).
func TestRequiredApartFieldsAreSeparateRuns(t *testing.T) {
	l := hillyWindow(400, 60, 5)
	tab := layeredTable(t)
	mk := func(c, r int) Target {
		x, y := l.XY(c, r)
		lat, lon := l.Frame.Inverse(x, y)
		return Target{Lat: lat, Lon: lon, Elev: l.At(c, r), Reserve: 150}
	}
	a, b := mk(40, 40), mk(360, 360)
	opts := RequiredOptions{Clearance: 100, Ceiling: 900}
	d, err := newDescentFor(tab, lowest32(l.Elev)-10, opts.Ceiling+10)
	if err != nil {
		t.Fatal(err)
	}
	srcs := []source{{X: 40, Y: 40, Alt: a.Elev + 150}, {X: 360, Y: 360, Alt: b.Elev + 150, Index: 1}}
	if sets := sourceSets(l, d, srcs, opts.Ceiling); len(sets) != 2 || sets[0].cells() >= l.Cols*l.Rows/2 {
		t.Fatalf("want two sets on small boxes, got %d (first %d cells)", len(sets), sets[0].cells())
	}
	both, err := Required(context.Background(), l, []Target{a, b}, tab, opts)
	if err != nil {
		t.Fatal(err)
	}
	ra, err := Required(context.Background(), l, []Target{a}, tab, opts)
	if err != nil {
		t.Fatal(err)
	}
	rb, err := Required(context.Background(), l, []Target{b}, tab, opts)
	if err != nil {
		t.Fatal(err)
	}
	reached := 0
	for i := range both.Required {
		va, vb, v := ra.Required[i], rb.Required[i], both.Required[i]
		if va == va && vb == vb {
			t.Fatalf("cell %d reached from both fields below %v m: the sets were not apart", i, opts.Ceiling)
		}
		want, wb := va, int16(0)
		if vb == vb {
			want, wb = vb, 1
		}
		if want != want {
			wb = -1
		}
		if (v == v || want == want) && (v != want || both.Best[i] != wb) {
			t.Fatalf("cell %d: together %v (field %d), apart %v (field %d)", i, v, both.Best[i], want, wb)
		}
		if v == v {
			reached++
		}
	}
	if reached == 0 {
		t.Fatal("nothing reached")
	}
}

func lowest32(e []float32) float64 {
	lo := math.Inf(1)
	for _, v := range e {
		if v == v {
			lo = math.Min(lo, float64(v))
		}
	}
	return lo
}

// GlideRangeBound is an upper bound on how far a glide gets: no cell a
// forward footprint reaches (above the ground, in a layered wind over
// hills, with bends) lies farther from the start than the bound from the
// start altitude to the cell's arrival altitude.
func TestGlideRangeBoundHoldsForFootprint(t *testing.T) {
	l := hillyWindow(300, 60, 2)
	tab := layeredTable(t)
	x, y := l.XY(150, 150)
	lat, lon := l.Frame.Inverse(x, y)
	start := Start{Lat: lat, Lon: lon, Alt: 1400}
	f, err := Footprint(context.Background(), l, start, tab, FootprintOptions{Clearance: 50})
	if err != nil {
		t.Fatal(err)
	}
	d, err := newDescentFor(tab, lowest32(l.Elev)-10, start.Alt)
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for r := 0; r < l.Rows; r++ {
		for c := 0; c < l.Cols; c++ {
			a := f.Arrival[r*l.Cols+c]
			if a != a || float64(a) < float64(l.At(c, r)) {
				continue
			}
			bound := d.rangeBound(start.Alt, float64(a))
			dist := math.Hypot(float64(c)-f.StartX, float64(r)-f.StartY) * l.Cell
			// One cell of slack: the cell's value is a segment's end at the
			// cell centre (common practice, no source).
			if dist > bound+l.Cell {
				t.Fatalf("cell (%d,%d) reached at %.1f m, %.0f m from the start; bound %.0f m", c, r, a, dist, bound)
			}
			checked++
		}
	}
	if checked < 1000 {
		t.Fatalf("only %d cells checked", checked)
	}
	// And the bound is not loose: within 5 % of the longest straight glide
	// (the descent's own longest direction) down to the lowest ground.
	lo := lowest32(l.Elev)
	bound, _ := GlideRangeBound(tab, start.Alt, lo)
	r, _ := ReachRadius(tab, start.Alt, lo)
	if bound < r || bound > 1.05*r {
		t.Fatalf("bound %.0f m against the longest straight glide %.0f m", bound, r)
	}
}
