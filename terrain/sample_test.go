package terrain

import (
	"math"
	"testing"
)

func TestFillVoids(t *testing.T) {
	// A plane z = 10·c + 100·r with voids: IDW of a plane along opposite
	// directions at equal distances gives the plane back exactly for a
	// single-cell void (common practice, no source).
	g := &Grid{CRS: CRS{EPSG: 4326}, Cols: 20, Rows: 20, X0: 0, Y0: 1, DX: 0.01, DY: 0.01}
	g.Elev = make([]float32, 400)
	for i := range g.Elev {
		g.Elev[i] = float32(10*(i%20) + 100*(i/20))
	}
	nan := float32(math.NaN())
	g.Elev[5*20+5] = nan // single cell
	g.Elev[10*20+10], g.Elev[10*20+11], g.Elev[11*20+10] = nan, nan, nan
	for r := 14; r < 19; r++ { // 5×5 = 25 cells: too large for maxSize 10
		for c := 2; c < 7; c++ {
			g.Elev[r*20+c] = nan
		}
	}
	if n := FillVoids(g, 10); n != 4 {
		t.Errorf("filled %d cells, want 4", n)
	}
	if v := g.Elev[5*20+5]; v != 150+400 {
		t.Errorf("single void filled with %v, want 550", v)
	}
	for _, i := range []int{10*20 + 10, 10*20 + 11, 11*20 + 10} {
		want := float64(10*(i%20) + 100*(i/20))
		if v := float64(g.Elev[i]); math.Abs(v-want) > 60 {
			t.Errorf("cell %d filled with %v, plane %v", i, v, want)
		}
	}
	if g.Voids() != 25 {
		t.Errorf("large void should stay: %d voids left", g.Voids())
	}
	if n := FillVoids(g, 0); n != 0 {
		t.Errorf("maxSize 0 filled %d", n)
	}
	if n := FillVoids(g, 25); n != 25 || g.Voids() != 0 {
		t.Errorf("maxSize 25 filled %d, %d left", n, g.Voids())
	}
	all := &Grid{CRS: CRS{EPSG: 4326}, Cols: 3, Rows: 3, DX: 1, DY: 1, Elev: []float32{nan, nan, nan, nan, nan, nan, nan, nan, nan}}
	if n := FillVoids(all, 100); n != 0 {
		t.Errorf("all-void grid: filled %d", n)
	}
}

func TestCellWindowEdges(t *testing.T) {
	g := &Grid{CRS: CRS{EPSG: 4326}, Cols: 11, Rows: 11, X0: 0, Y0: 1, DX: 0.1, DY: 0.1}
	cases := []struct {
		box            [4]float64
		c0, r0, c1, r1 int
		ok             bool
	}{
		{[4]float64{0.25, 0.25, 0.35, 0.45}, 1, 4, 5, 9, true},
		{[4]float64{-5, -5, 5, 5}, 0, 0, 10, 10, true},
		{[4]float64{2, 2, 3, 3}, 0, 0, 0, 0, false},
		{[4]float64{0.5, 0.5, 0.4, 0.6}, 0, 0, 0, 0, false}, // west > east
		{[4]float64{math.NaN(), 0, 1, 1}, 0, 0, 0, 0, false},
		{[4]float64{math.Inf(-1), 0, 1, 1}, 0, 0, 0, 0, false},
		{[4]float64{-1e300, -1e300, 1e300, 1e300}, 0, 0, 10, 10, true},
	}
	for _, c := range cases {
		c0, r0, c1, r1, ok := g.cellWindow(c.box[0], c.box[1], c.box[2], c.box[3])
		if ok != c.ok || (ok && (c0 != c.c0 || r0 != c.r0 || c1 != c.c1 || r1 != c.r1)) {
			t.Errorf("cellWindow(%v) = %d %d %d %d %v", c.box, c0, r0, c1, r1, ok)
		}
	}
}

func TestElevationUTMGrid(t *testing.T) {
	// A tilted plane on a UTM 27S grid: elevation = easting offset / 10.
	// The point is projected with our transverse Mercator (checked against
	// cs2cs in utm_test.go), so sampling at the projected position of a
	// cell centre returns that cell's value.
	g := &Grid{CRS: CRS{EPSG: 32727}, Cols: 50, Rows: 40, X0: 110000, Y0: 9945000, DX: 30, DY: 30}
	g.Elev = make([]float32, g.Cols*g.Rows)
	for i := range g.Elev {
		g.Elev[i] = float32(3 * (i % g.Cols))
	}
	// cs2cs printed 110308.3261 9944630.9971 for -0.5, -24.5 in EPSG:32727
	// (utm_test.go): column (110308.3261-110000)/30 = 10.2775.
	v, ok := g.Elevation(-0.5, -24.5)
	if !ok || math.Abs(v-3*10.27754) > 1e-3 {
		t.Errorf("Elevation = %v, %v; want %v", v, ok, 3*10.27754)
	}
	ex, ny := g.CellSizeMetres()
	if ex != 30 || ny != 30 {
		t.Errorf("cell %v %v", ex, ny)
	}
	if _, ok := g.Elevation(10, 10); ok {
		t.Error("far point reported on the grid")
	}
}
