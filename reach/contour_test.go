package reach

import (
	"math"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

func TestContourCircleWithHole(t *testing.T) {
	// An annulus: v ≥ 0 where 10 ≤ r ≤ 30 cells. One outer ring, wound
	// counter-clockwise, one hole, wound clockwise (RFC 7946 §3.1.6), areas
	// within 1 % of π(30² − 10²).
	n := 81
	v := func(c, r int) float64 {
		d := math.Hypot(float64(c-40), float64(r-40))
		return math.Min(30-d, d-10)
	}
	rings := contourRings(v, n, n, 0)
	polys := polygonsFromRings(rings, 0.5, 1)
	if len(polys) != 1 || len(polys[0]) != 2 {
		t.Fatalf("got %d polygons, first with %d rings; want 1 polygon with a hole", len(polys), len(polys[0]))
	}
	p := polys[0]
	if p[0].Orientation() != orb.CCW || p[1].Orientation() != orb.CW {
		t.Errorf("winding: outer %v, hole %v; want CCW, CW", p[0].Orientation(), p[1].Orientation())
	}
	for _, r := range p {
		if !r.Closed() {
			t.Error("ring not closed")
		}
	}
	got := planar.Area(p[0]) + planar.Area(p[1]) // signed: the hole's area is negative
	want := math.Pi * (30*30 - 10*10)
	if math.Abs(got-want)/want > 0.01 {
		t.Errorf("area %.1f, want %.1f", got, want)
	}
}

func TestContourSplitRegions(t *testing.T) {
	// Two separate discs give two polygons.
	v := func(c, r int) float64 {
		a := 8 - math.Hypot(float64(c-15), float64(r-20))
		b := 8 - math.Hypot(float64(c-45), float64(r-20))
		return math.Max(a, b)
	}
	polys := polygonsFromRings(contourRings(v, 60, 40, 0), 0.5, 1)
	if len(polys) != 2 {
		t.Fatalf("got %d polygons, want 2", len(polys))
	}
}

func TestContourKeepsSmallHoles(t *testing.T) {
	// A single cell of unreachable ground inside a reachable region must
	// stay a hole (safety: never hide unreachable ground), while a single
	// reachable cell alone is dropped.
	v := func(c, r int) float64 {
		switch {
		case c == 10 && r == 10:
			return -50 // one high cell
		case c == 30 && r == 10:
			return 50 // an isolated reachable cell, far out
		case c < 20:
			return 50
		}
		return -50
	}
	polys := polygonsFromRings(contourRings(v, 40, 21, 0), 0.5, 1)
	if len(polys) != 1 {
		t.Fatalf("%d polygons, want 1 (the sliver dropped)", len(polys))
	}
	if len(polys[0]) != 2 {
		t.Fatalf("%d rings, want the outer ring and the one-cell hole", len(polys[0]))
	}
}

func TestContourDeterministic(t *testing.T) {
	// The same raster gives the same rings, vertex for vertex, every time
	// (outputs must be reproducible; the tracing must not follow map order).
	v := func(c, r int) float64 {
		return 30 - math.Hypot(float64(c-40)*1.3, float64(r-35)) + 3*math.Sin(float64(c)/3)
	}
	first := polygonsFromRings(contourRings(v, 81, 71, 0), 0.5, 1)
	for k := 0; k < 10; k++ {
		again := polygonsFromRings(contourRings(v, 81, 71, 0), 0.5, 1)
		if len(again) != len(first) {
			t.Fatal("polygon count differs between runs")
		}
		for i := range first {
			for j := range first[i] {
				if !first[i][j].Equal(again[i][j]) {
					t.Fatalf("run %d: ring %d/%d differs", k, i, j)
				}
			}
		}
	}
}
