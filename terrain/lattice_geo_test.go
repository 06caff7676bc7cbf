package terrain

import (
	"math"
	"testing"
)

// TestOntoGridGeographicMatchesForward: on an EPSG:4326 lattice OntoGrid
// factors the earth-centred position by row and column; every value must
// be bit for bit the one of sampling at Frame.Forward of each cell, as on
// any other lattice (common practice, no source: the shortcut checked
// against the plain loop), at the equator, at 60° S and beside the
// antimeridian.
func TestOntoGridGeographicMatchesForward(t *testing.T) {
	for _, tc := range []struct{ lat, lon float64 }{{-0.5, -24.5}, {-60, 15}, {12, 179.95}} {
		f := NewFrame(tc.lat, tc.lon)
		n, cell := 120, 40.0
		half := float64(n-1) / 2 * cell
		l := &Local{Frame: f, X0: -half, Y0: -half, Cell: cell, Cols: n, Rows: n}
		vals := make([]float32, n*n)
		for i := range vals {
			vals[i] = float32(math.Sin(float64(i)*0.37)*300 + float64(i%n))
			if i%97 == 0 {
				vals[i] = float32(math.NaN())
			}
		}
		w, s, e, nn := LocalExtent(f, l.X0, l.Y0, cell, n, n)
		d := 1.1 / 3600
		like := &Grid{CRS: CRS{EPSG: 4326}, X0: w - 3*d, Y0: nn + 3*d, DX: d, DY: d * 0.9,
			Cols: int((e-w)/d) + 7, Rows: int((nn-s)/(d*0.9)) + 7}
		got := OntoGrid(l, vals, like)
		inside := 0
		for r := 0; r < like.Rows; r++ {
			for c := 0; c < like.Cols; c++ {
				x, y := f.Forward(like.Y0-float64(r)*like.DY, like.X0+float64(c)*like.DX)
				want := float32(sampleValues(l, vals, x, y))
				g := got.Elev[r*like.Cols+c]
				if math.Float32bits(g) != math.Float32bits(want) && !(g != g && want != want) {
					t.Fatalf("%v: cell %d,%d: %v, want %v", tc, c, r, g, want)
				}
				if want == want {
					inside++
				}
			}
		}
		if inside < like.Cols*like.Rows/2 {
			t.Errorf("%v: only %d of %d cells on the Local; the case tests little", tc, inside, like.Cols*like.Rows)
		}
	}
}
