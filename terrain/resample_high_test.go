package terrain

import (
	"math"
	"testing"
)

func TestResampleHighNeverBelowTheDEM(t *testing.T) {
	// A cliff between samples: bilinear resampling cuts it down, the
	// obstacle resampling never does. Checked against the DEM itself: every
	// DEM sample within a Local cell's footprint is ≤ that cell's value.
	g := Synthetic(3, 200, 200, 1.0/3600)
	// Add a one-sample spike.
	g.Elev[100*200+100] += 800
	f := NewFrame(SyntheticLat, SyntheticLon)
	for _, cell := range []float64{20, 31, 75} {
		n := int(5000 / cell)
		half := float64(n-1) / 2 * cell
		hi := ResampleHigh(g, f, -half, -half, cell, n, n)
		bl := Resample(g, f, -half, -half, cell, n, n)
		spikeLat := g.Y0 - 100*g.DY
		spikeLon := g.X0 + 100*g.DX
		x, y := f.Forward(spikeLat, spikeLon)
		c, r, ok := hi.CellOf(x, y)
		if !ok {
			t.Fatal("spike off the window")
		}
		want := float64(g.Elev[100*200+100])
		if got := hi.At(c, r); got < want-1e-3 {
			t.Errorf("cell %.0f m: obstacle surface %.1f m at the spike, below the DEM's %.1f m", cell, got, want)
		}
		if got := bl.At(c, r); cell > 31 && got >= want-1 {
			t.Logf("cell %.0f m: bilinear happened to hit the spike", cell)
		}
		// Everywhere: not below the bilinear surface.
		for i := range hi.Elev {
			if hi.Elev[i] == hi.Elev[i] && bl.Elev[i] == bl.Elev[i] && hi.Elev[i] < bl.Elev[i]-1e-3 {
				t.Fatalf("cell %.0f m: obstacle surface %.2f below bilinear %.2f at %d", cell, hi.Elev[i], bl.Elev[i], i)
			}
		}
	}
}

func TestHighAround(t *testing.T) {
	// Between four samples the obstacle height is their highest; on a
	// sample, that sample (checked by hand on a 2×2 grid).
	g := &Grid{CRS: CRS{EPSG: 4326}, Cols: 2, Rows: 2, X0: 0, Y0: 1, DX: 1, DY: 1, Elev: []float32{10, 40, 20, 30}}
	if v, ok := g.HighAround(0.5, 0.5); !ok || v != 40 {
		t.Errorf("middle: %v %v, want 40", v, ok)
	}
	if v, ok := g.HighAround(0, 0); !ok || v != 20 {
		t.Errorf("on the south-west sample: %v %v, want 20", v, ok)
	}
	if b, _ := g.Elevation(0.5, 0.5); b >= 40 {
		t.Errorf("bilinear %v should be below the highest sample", b)
	}
	if _, ok := g.HighAround(5, 5); ok {
		t.Error("off the grid: want ok false")
	}
}

// TestResampleHighBandsMatchOneLoop: a window large enough to be done in
// two bands of rows gives every cell the value of the one loop (common
// practice, no source: the split checked against the code unsplit), for an
// odd and an even number of rows and with voids.
func TestResampleHighBandsMatchOneLoop(t *testing.T) {
	g := Synthetic(5, 700, 700, 1.0/3600)
	for i := 0; i < len(g.Elev); i += 1013 {
		g.Elev[i] = float32(math.NaN())
	}
	f := NewFrame(SyntheticLat, SyntheticLon)
	for _, n := range []int{601, 600} {
		cell := 25.0
		half := float64(n-1) / 2 * cell
		if n*n < parallelCells {
			t.Fatalf("%d cells: below the split size %d; the case tests nothing", n*n, parallelCells)
		}
		split := ResampleHigh(g, f, -half, -half, cell, n, n)
		saved := parallelCells
		parallelCells = math.MaxInt
		one := ResampleHigh(g, f, -half, -half, cell, n, n)
		parallelCells = saved
		for i := range one.Elev {
			if math.Float32bits(split.Elev[i]) != math.Float32bits(one.Elev[i]) {
				t.Fatalf("%d rows: cell %d: %v in bands, %v in one loop", n, i, split.Elev[i], one.Elev[i])
			}
		}
	}
}
