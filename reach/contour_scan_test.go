package reach

import (
	"math"
	"math/rand"
	"testing"

	"github.com/paulmach/orb"
)

// contourRingsPerSquare is the marching-squares scan contourRingsRows
// replaced, kept as the reference it must match: every square of the
// padded raster read through val (four reads per cell) and passed to
// SquareSegments.
func contourRingsPerSquare(v func(c, r int) float64, cols, rows int, level, margin float64) []orb.Ring {
	low := level - 1e4
	val := func(c, r int) float64 {
		if c < 0 || r < 0 || c >= cols || r >= rows {
			return low
		}
		x := v(c, r)
		if x != x {
			return low
		}
		return x
	}
	w := cols + 2
	hid := func(c, r int) int { return ((r+1)*w + (c + 1)) * 2 }
	vid := func(c, r int) int { return ((r+1)*w+(c+1))*2 + 1 }
	next := make(map[int]int)
	var starts []int
	point := make(map[int]orb.Point)
	edgePoint := func(id int, c, r int, horizontal bool) {
		if _, ok := point[id]; ok {
			return
		}
		a := val(c, r)
		var b float64
		if horizontal {
			b = val(c+1, r)
		} else {
			b = val(c, r+1)
		}
		t := 0.5
		if b != a {
			t = (level - a) / (b - a)
		}
		t = max(0, min(1, t))
		switch {
		case a < level && b >= level:
			t = max(t, margin)
		case a >= level && b < level:
			t = min(t, 1-margin)
		}
		if horizontal {
			point[id] = orb.Point{float64(c) + t, float64(r)}
		} else {
			point[id] = orb.Point{float64(c), float64(r) + t}
		}
	}
	for r := -1; r < rows; r++ {
		for c := -1; c < cols; c++ {
			segs, n := SquareSegments(val(c, r), val(c+1, r), val(c+1, r+1), val(c, r+1), level)
			ids := [4]int{hid(c, r), hid(c, r+1), vid(c, r), vid(c+1, r)}
			for k := range n {
				for _, e := range segs[k] {
					switch e {
					case SquareBottom:
						edgePoint(ids[e], c, r, true)
					case SquareTop:
						edgePoint(ids[e], c, r+1, true)
					case SquareLeft:
						edgePoint(ids[e], c, r, false)
					case SquareRight:
						edgePoint(ids[e], c+1, r, false)
					}
				}
				from, to := ids[segs[k][0]], ids[segs[k][1]]
				next[from] = to
				starts = append(starts, from)
			}
		}
	}
	return TraceRings(next, starts, point)
}

// TestContourRowScanMatchesPerSquare: the row scan (each value read once,
// squares without a crossing passed over) gives exactly the rings of the
// per-square scan, point for point and in the same order, on rasters with
// voids, saddles (checkerboards), values on the level, ±Inf, one-row and
// one-column shapes, and long runs on one side broken by single cells
// (common practice, no source: a rewrite checked against the code it
// replaced).
func TestContourRowScanMatchesPerSquare(t *testing.T) {
	rng := rand.New(rand.NewSource(7))
	type raster struct {
		name       string
		cols, rows int
		v          func(c, r int) float64
	}
	noise := func(cols, rows int, voids float64) raster {
		vals := make([]float64, cols*rows)
		for i := range vals {
			switch x := rng.Float64(); {
			case x < voids:
				vals[i] = math.NaN()
			case x < voids+0.02:
				vals[i] = 0 // on the level
			case x < voids+0.03:
				vals[i] = math.Inf(1)
			case x < voids+0.04:
				vals[i] = math.Inf(-1)
			default:
				vals[i] = rng.NormFloat64() * 50
			}
		}
		return raster{"noise", cols, rows, func(c, r int) float64 { return vals[r*cols+c] }}
	}
	// Long runs of squares on one side of the level, broken by single
	// cells on the other at every offset within the row scan's runs of
	// eight squares (sameSide8).
	sparse := func(cols, rows int, bulk, odd float64) raster {
		vals := make([]float64, cols*rows)
		for i := range vals {
			vals[i] = bulk + rng.Float64()
			if rng.Intn(23) == 0 {
				vals[i] = odd
			}
		}
		return raster{"sparse", cols, rows, func(c, r int) float64 { return vals[r*cols+c] }}
	}
	cases := []raster{
		noise(40, 30, 0.05), noise(1, 25, 0.1), noise(25, 1, 0.1), noise(1, 1, 0), noise(3, 2, 0.3),
		{"checkerboard", 20, 20, func(c, r int) float64 { return float64((c+r)%2)*20 - 10 + float64(c-r)*0.5 }},
		{"annulus", 61, 61, func(c, r int) float64 {
			d := math.Hypot(float64(c-30), float64(r-30))
			return math.Min(25-d, d-8) * 13
		}},
		{"empty", 0, 5, func(c, r int) float64 { return 0 }},
		sparse(73, 41, -20, 30), sparse(73, 41, 30, -20), sparse(9, 9, 30, -20), sparse(17, 3, -20, 30),
	}
	for _, rs := range cases {
		for _, level := range []float64{0, 12.5, -30, math.Inf(-1), math.Inf(1), math.NaN()} {
			for _, margin := range []float64{0, 0.1} {
				want := contourRingsPerSquare(rs.v, rs.cols, rs.rows, level, margin)
				got := contourRingsMargin(rs.v, rs.cols, rs.rows, level, margin)
				if !sameRings(got, want) {
					t.Errorf("%s %dx%d level %g margin %g: %d rings, want %d (or points differ)", rs.name, rs.cols, rs.rows, level, margin, len(got), len(want))
				}
			}
		}
	}
}

// sameRings reports whether two ring lists are the same point for point,
// bit for bit (a NaN crossing, from a ±Inf value, equals itself).
func sameRings(a, b []orb.Ring) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if len(a[i]) != len(b[i]) {
			return false
		}
		for j := range a[i] {
			for k := 0; k < 2; k++ {
				if math.Float64bits(a[i][j][k]) != math.Float64bits(b[i][j][k]) {
					return false
				}
			}
		}
	}
	return true
}

// BenchmarkContourRings2000: the rings of three levels of a 2000 × 2000
// raster of jagged values (the footprint's rings over terrain).
func BenchmarkContourRings2000(b *testing.B) {
	const n = 2000
	vals := make([]float64, n*n)
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			d := math.Hypot(float64(c-n/2), float64(r-n/2))
			vals[r*n+c] = 900 - d + 40*math.Sin(float64(c)*0.37)*math.Cos(float64(r)*0.29)
		}
	}
	row := func(r int, dst []float64) { copy(dst, vals[r*n:(r+1)*n]) }
	b.ReportAllocs()
	for b.Loop() {
		for _, lv := range []float64{300, 150, 0} {
			contourRingsRows(row, n, n, lv, 0.1)
		}
	}
}
