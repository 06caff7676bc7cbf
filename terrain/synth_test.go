package terrain

import (
	"fmt"
	"math"
	"testing"
)

// The synthetic terrain is invented data for the demo and the solver tests;
// these checks are of its promised properties, not of the outside world.
func TestSyntheticDeterministic(t *testing.T) {
	a := Synthetic(7, 300, 200, 1.0/3600)
	b := Synthetic(7, 300, 200, 1.0/3600)
	c := Synthetic(8, 300, 200, 1.0/3600)
	same, diff := true, false
	for i := range a.Elev {
		if a.Elev[i] != b.Elev[i] {
			same = false
		}
		if a.Elev[i] != c.Elev[i] {
			diff = true
		}
	}
	if !same || !diff {
		t.Errorf("same seed equal: %v, other seed differs: %v", same, diff)
	}
}

func TestSyntheticShape(t *testing.T) {
	g := Synthetic(1, 600, 600, 1.0/3600)
	if g.CRS.EPSG != 4326 || g.Voids() != 0 {
		t.Fatalf("crs %v voids %d", g.CRS, g.Voids())
	}
	// Centred on the fictional open-ocean point.
	w, s, e, n := g.Extent()
	if math.Abs((w+e)/2-SyntheticLon) > 1e-9 || math.Abs((s+n)/2-SyntheticLat) > 1e-9 {
		t.Errorf("centre %v %v", (s+n)/2, (w+e)/2)
	}
	lo, hi, _ := g.ElevationRange()
	if lo < 0 || lo > 150 || hi < 600 || hi > 1600 {
		t.Errorf("range %v..%v", lo, hi)
	}
	// A plateau: at least 0.5 % of the cells exactly at 700 m.
	flat := 0
	for _, v := range g.Elev {
		if v == 700 {
			flat++
		}
	}
	if flat < len(g.Elev)/200 {
		t.Errorf("plateau cells %d", flat)
	}
	// Resolution about 31 m north-south (1 arc-second on WGS84 near the equator).
	ex, ny := g.CellSizeMetres()
	if math.Abs(ny-30.7) > 0.2 || math.Abs(ex-30.9) > 0.2 {
		t.Errorf("cell %v × %v m", ex, ny)
	}
}

func benchmarkSynthetic(b *testing.B, n int) {
	b.ReportAllocs()
	for b.Loop() {
		Synthetic(1, n, n, 1.0/3600)
	}
}

func BenchmarkSynthetic600(b *testing.B)  { benchmarkSynthetic(b, 600) }
func BenchmarkSynthetic2000(b *testing.B) { benchmarkSynthetic(b, 2000) }

func ExampleSynthetic() {
	g := Synthetic(1, 600, 600, 1.0/3600)
	fmt.Println(g.Cols, g.Rows, g.CRS.EPSG, g.Format)
	// Output: 600 600 4326 synthetic
}
