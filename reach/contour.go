package reach

import (
	"encoding/binary"
	"math"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"glidereach/reach/geodesy"
	"glidereach/terrain"
)

// contourRings traces the boundary of the region where v ≥ level on a
// cols×rows raster by marching squares. v(c, r) is the value of cell (c, r)
// (NaN counts as far below the level); the raster is padded with "below" so
// every ring closes. Rings are in cell units (cell (c, r) at (c, r), y up),
// closed, wound with the region on their left: outer boundaries are
// counter-clockwise and holes clockwise, as RFC 7946 §3.1.6 asks of
// exteriors and holes. Saddles are resolved by the mean of the four corners.
func contourRings(v func(c, r int) float64, cols, rows int, level float64) []orb.Ring {
	return contourRingsMargin(v, cols, rows, level, 0)
}

// contourRingsMargin is contourRings with every ring point kept at least
// margin (cell units, < 0.5) from the end of its edge that is below the
// level, toward the end above it: the region shrinks by at most margin,
// and a cell below the level stays at least margin outside every ring (a
// hole around a cell just below the level is not narrower than the
// rounding of the output coordinates, which would put its centre inside).
func contourRingsMargin(v func(c, r int) float64, cols, rows int, level, margin float64) []orb.Ring {
	return contourRingsRows(func(r int, dst []float64) {
		for c := range dst {
			dst[c] = v(c, r)
		}
	}, cols, rows, level, margin)
}

// contourRingsRows is contourRingsMargin with the raster given by rows:
// row(r, dst) fills dst (cols values) with the values of row r. Each value
// is read once (two padded rows are kept), and a square whose four corners
// lie on the same side of the level, which has no segment, is passed over
// without SquareSegments, so the cost of a large raster is one read and
// one comparison per cell (a pair of rows wholly below the level is passed
// over at once, and eight squares whose corners all lie on one side are
// passed over together: sameSide8); the rings are those of the per-square
// scan.
func contourRingsRows(row func(r int, dst []float64), cols, rows int, level, margin float64) []orb.Ring {
	low := level - 1e4
	w := cols + 2
	// below and above hold rows r and r+1 of the padded raster: index c+1
	// for column c in −1..cols, NaN and the padding read as low; inB and
	// inA flag their values ≥ level (1, else 0), nB and nA count the flags.
	below, above := make([]float64, w), make([]float64, w)
	inB, inA := make([]uint8, w), make([]uint8, w)
	var nB, nA int
	var padIn uint8 // low ≥ level: only for a level of −Inf
	if low >= level {
		padIn = 1
	}
	fill := func(dst []float64, in []uint8, r int) int {
		if r < 0 || r >= rows || cols <= 0 {
			for i := range dst {
				dst[i], in[i] = low, padIn
			}
			return int(padIn) * w
		}
		dst[0], dst[w-1] = low, low
		in[0], in[w-1] = padIn, padIn
		row(r, dst[1:w-1])
		n := 2 * int(padIn)
		for i := 1; i < w-1; i++ {
			x := dst[i]
			if x != x {
				x = low
				dst[i] = low
			}
			in[i] = 0
			if x >= level {
				in[i] = 1
				n++
			}
		}
		return n
	}
	// Edge ids: horizontal edge from (c,r) to (c+1,r) and vertical edge from
	// (c,r) to (c,r+1), for c, r in −1..cols/rows.
	hid := func(c, r int) int { return ((r+1)*w + (c + 1)) * 2 }
	vid := func(c, r int) int { return ((r+1)*w+(c+1))*2 + 1 }
	next := make(map[int]int) // edge id where a segment starts -> edge id where it ends
	var starts []int          // segment starts in scan order, so rings (and their simplification) do not depend on map order
	point := make(map[int]orb.Point)
	// edgePoint places the crossing of the edge from cell (c, r), of value
	// a, to its neighbour (c+1, r) (horizontal) or (c, r+1), of value b.
	edgePoint := func(id int, c, r int, horizontal bool, a, b float64) {
		if _, ok := point[id]; ok {
			return
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
	nB = fill(below, inB, -1)
	for r := -1; r < rows; r++ {
		nA = fill(above, inA, r+1)
		if nB == 0 && nA == 0 {
			// Both rows below the level: no square between them has a
			// segment.
			below, above, inB, inA, nB = above, below, inA, inB, nA
			continue
		}
		for c := -1; c < cols; c++ {
			if (c+1)&7 == 0 && c+10 <= w && sameSide8(inB, inA, c+1) {
				c += 7 // eight squares without a segment
				continue
			}
			if k := inB[c+1] + inB[c+2] + inA[c+2] + inA[c+1]; k == 0 || k == 4 {
				continue // no segment (SquareSegments' cases 0 and 15)
			}
			bl, br, tr, tl := below[c+1], below[c+2], above[c+2], above[c+1]
			segs, n := SquareSegments(bl, br, tr, tl, level)
			ids := [4]int{hid(c, r), hid(c, r+1), vid(c, r), vid(c+1, r)}
			for k := range n {
				for _, e := range segs[k] {
					switch e {
					case SquareBottom:
						edgePoint(ids[e], c, r, true, bl, br)
					case SquareTop:
						edgePoint(ids[e], c, r+1, true, tl, tr)
					case SquareLeft:
						edgePoint(ids[e], c, r, false, bl, tl)
					case SquareRight:
						edgePoint(ids[e], c+1, r, false, br, tr)
					}
				}
				from, to := ids[segs[k][0]], ids[segs[k][1]]
				next[from] = to
				starts = append(starts, from)
			}
		}
		below, above, inB, inA, nB = above, below, inA, inB, nA
	}
	return TraceRings(next, starts, point)
}

// sameSide8 reports whether the nine flags from i of both rows are all 0
// or all 1: the eight squares between them (columns i … i+8 of the padded
// rows) have their four corners on one side of the level, and no segment.
// The flags are 0 or 1 bytes, read eight at a time.
func sameSide8(inB, inA []uint8, i int) bool {
	wb, wa := binary.LittleEndian.Uint64(inB[i:]), binary.LittleEndian.Uint64(inA[i:])
	if wb != wa || wb != 0 && wb != 0x0101010101010101 {
		return false
	}
	f := uint8(wb)
	return inB[i+8] == f && inA[i+8] == f
}

// SquareEdge names a side of one marching-squares square: the square's
// corners are cells (c, r) (bottom left) to (c+1, r+1) (top right), y up.
type SquareEdge uint8

// The sides of a marching-squares square.
const (
	SquareBottom SquareEdge = iota // from (c, r) to (c+1, r)
	SquareTop                      // from (c, r+1) to (c+1, r+1)
	SquareLeft                     // from (c, r) to (c, r+1)
	SquareRight                    // from (c+1, r) to (c+1, r+1)
)

// SquareSegments returns the contour segments of one marching-squares
// square with corner values bl, br, tr, tl (bottom left, bottom right, top
// right, top left) at level: n (0, 1 or 2) segments, each from one side to
// another, with the region where the value is ≥ level on its left, so the
// segments chain into rings wound as contourRings says. The two saddles
// (opposite corners above) are resolved by the mean of the four corners
// (W. E. Lorensen and H. E. Cline, "Marching cubes", SIGGRAPH 1987, in two
// dimensions, with the asymptotic-decider shortcut of the mean).
func SquareSegments(bl, br, tr, tl, level float64) (segs [2][2]SquareEdge, n int) {
	code := 0
	if bl >= level {
		code |= 1
	}
	if br >= level {
		code |= 2
	}
	if tr >= level {
		code |= 4
	}
	if tl >= level {
		code |= 8
	}
	const B, T, L, R = SquareBottom, SquareTop, SquareLeft, SquareRight
	mean := (bl + br + tl + tr) / 4
	switch code {
	case 0, 15:
		return segs, 0
	case 1:
		segs[0] = [2]SquareEdge{B, L}
	case 2:
		segs[0] = [2]SquareEdge{R, B}
	case 3:
		segs[0] = [2]SquareEdge{R, L}
	case 4:
		segs[0] = [2]SquareEdge{T, R}
	case 5:
		if mean >= level {
			return [2][2]SquareEdge{{B, R}, {T, L}}, 2
		}
		return [2][2]SquareEdge{{B, L}, {T, R}}, 2
	case 6:
		segs[0] = [2]SquareEdge{T, B}
	case 7:
		segs[0] = [2]SquareEdge{T, L}
	case 8:
		segs[0] = [2]SquareEdge{L, T}
	case 9:
		segs[0] = [2]SquareEdge{B, T}
	case 10:
		if mean >= level {
			return [2][2]SquareEdge{{L, B}, {R, T}}, 2
		}
		return [2][2]SquareEdge{{R, B}, {L, T}}, 2
	case 11:
		segs[0] = [2]SquareEdge{R, T}
	case 12:
		segs[0] = [2]SquareEdge{L, R}
	case 13:
		segs[0] = [2]SquareEdge{B, R}
	case 14:
		segs[0] = [2]SquareEdge{L, B}
	}
	return segs, 1
}

// TraceRings chains contour segments into closed rings: next maps the edge
// id where a segment starts to the edge id where it ends, starts lists the
// segment starts in scan order (so the rings do not depend on map order),
// point gives each edge id's crossing. next is consumed. Open chains
// (impossible on a padded raster) and rings of fewer than four points are
// dropped.
func TraceRings[K comparable](next map[K]K, starts []K, point map[K]orb.Point) []orb.Ring {
	var rings []orb.Ring
	for _, start := range starts {
		if _, ok := next[start]; !ok {
			continue // already part of a traced ring
		}
		ring := orb.Ring{point[start]}
		id := start
		for {
			to, ok := next[id]
			if !ok {
				break // cannot happen on a padded raster; drop an open chain
			}
			delete(next, id)
			ring = append(ring, point[to])
			id = to
			if id == start {
				break
			}
		}
		if id == start && len(ring) >= 4 {
			rings = append(rings, ring)
		}
	}
	return rings
}

// polygonsFromRings simplifies rings (cell units) inward only at tol cells
// (simplifyInward), drops outer rings smaller than minArea cells² (slivers of
// reachable ground; dropping them is conservative), keeps every hole however
// small (unreachable ground is never hidden; a hole that simplification would
// collapse is kept as traced), and nests holes (clockwise rings) into the
// smallest outer ring that contains them.
func polygonsFromRings(rings []orb.Ring, tol, minArea float64) []orb.Polygon {
	var outers, tracedOuters []orb.Ring
	var holes, tracedHoles []orb.Ring
	for _, r := range rings {
		hole := r.Orientation() != orb.CCW
		s := simplifyInward(r, tol)
		if len(s) < 4 || s.Orientation() != r.Orientation() {
			if !hole {
				continue // a sliver of reachable ground: dropping it is conservative
			}
			s = r // never drop or flip unreachable ground: keep the ring as traced
		}
		if !hole && math.Abs(planar.Area(s)) < minArea { // planar.Area is signed
			continue
		}
		if hole {
			holes, tracedHoles = append(holes, s), append(tracedHoles, r)
		} else {
			outers, tracedOuters = append(outers, s), append(tracedOuters, r)
		}
	}
	// Holes are nested by the traced rings: an outer ring simplified inward
	// can pass inside a hole near its edge, and the hole must not be lost
	// for its first point falling outside the simplified ring.
	return nestHoles(outers, tracedOuters, holes, tracedHoles)
}

// NestRings turns rings wound as contourRings winds them (exteriors
// counter-clockwise, holes clockwise) into polygons: each hole goes into
// the smallest exterior that holds its first point (the first of equal
// ones); a hole no exterior holds is dropped.
func NestRings(rings []orb.Ring) []orb.Polygon {
	var outers, holes []orb.Ring
	for _, r := range rings {
		if r.Orientation() == orb.CCW {
			outers = append(outers, r)
		} else {
			holes = append(holes, r)
		}
	}
	return nestHoles(outers, outers, holes, holes)
}

// nestHoles makes a polygon of each ring of outers and puts each of holes
// into the one whose traced ring (tracedOuters, same order) is the smallest
// holding the first point of the hole's traced ring (tracedHoles).
func nestHoles(outers, tracedOuters, holes, tracedHoles []orb.Ring) []orb.Polygon {
	polys := make([]orb.Polygon, len(outers))
	areas := make([]float64, len(outers))
	boxes := make([]orb.Bound, len(outers))
	for i, o := range outers {
		polys[i] = orb.Polygon{o}
		areas[i] = math.Abs(planar.Area(tracedOuters[i]))
		boxes[i] = tracedOuters[i].Bound()
	}
	for k, h := range holes {
		pt := tracedHoles[k][0]
		best := -1
		for i, o := range tracedOuters {
			if (best < 0 || areas[i] < areas[best]) && boxes[i].Contains(pt) && planar.RingContains(o, pt) {
				best = i
			}
		}
		if best >= 0 {
			polys[best] = append(polys[best], h)
		}
	}
	return polys
}

// simplifyInward is Douglas–Peucker at tol that only ever moves a ring
// toward less reach. The region of every ring lies on its left (exteriors
// counter-clockwise, holes clockwise), so a chord may replace a stretch of
// the ring only when every point of the stretch lies within tol of it and on
// its right or on it: the chord then cuts that stretch off the region, never
// adds ground beside it. Where a point lies left of the chord (a concave
// stretch, which plain Douglas–Peucker would bridge outward over unreached
// ground) the stretch is split there. The first point and the point
// farthest from it are kept. r must be closed (first point = last).
func simplifyInward(r orb.Ring, tol float64) orb.Ring {
	n := len(r)
	if n < 5 {
		return r.Clone()
	}
	keep := make([]bool, n)
	far, best := 0, -1.0
	for i := 1; i < n-1; i++ {
		dx, dy := r[i][0]-r[0][0], r[i][1]-r[0][1]
		if d := dx*dx + dy*dy; d > best {
			far, best = i, d
		}
	}
	keep[0], keep[far], keep[n-1] = true, true, true
	var span func(i, j int)
	span = func(i, j int) {
		if j-i < 2 {
			return
		}
		a, b := r[i], r[j]
		ex, ey := b[0]-a[0], b[1]-a[1]
		l := math.Hypot(ex, ey)
		split, worst := -1, 0.0
		left := false
		for k := i + 1; k < j; k++ {
			px, py := r[k][0]-a[0], r[k][1]-a[1]
			var side, d float64 // side > 0: left of a→b
			if l == 0 {
				side, d = 1, math.Hypot(px, py) // degenerate chord: keep the stretch
			} else {
				side = (ex*py - ey*px) / l
				d = math.Abs(side)
			}
			if side > 1e-9 {
				if !left || d > worst {
					split, worst, left = k, d, true
				}
				continue
			}
			if !left && d > worst {
				split, worst = k, d
			}
		}
		if split < 0 || (!left && worst <= tol) {
			return
		}
		keep[split] = true
		span(i, split)
		span(split, j)
	}
	span(0, far)
	span(far, n-1)
	out := make(orb.Ring, 0, n)
	for i, k := range keep {
		if k {
			out = append(out, r[i])
		}
	}
	return out
}

// ContourPolygons traces the region of Local g where v(c, r) ≥ level by
// marching squares (NaN counts as below), simplifies the rings inward
// only (simplifyInward) to at most half a cell of error, drops regions smaller
// than one cell but keeps every hole (see polygonsFromRings), keeps every
// ring point at least 1 m (or a tenth of a cell) away from a cell below the
// level (contourRingsMargin), nests holes
// in their outer rings, and returns the polygons
// in lon/lat degrees (RFC 7946 winding: exteriors counter-clockwise, holes
// clockwise; coordinates rounded to 6 decimals) with their total area in m²
// on the WGS84 ellipsoid, of the polygons as written (edges straight in
// lon/lat, as RFC 7946 draws them; geodesy.RingArea), so a GIS measuring a
// feature on the ellipsoid finds the same figure. It is the contouring the
// footprint rings use, for any raster laid out like g.Elev.
func ContourPolygons(g *terrain.Local, v func(c, r int) float64, level float64) (orb.MultiPolygon, float64) {
	return contourPolygonsRows(g, func(r int, dst []float64) {
		for c := range dst {
			dst[c] = v(c, r)
		}
	}, level)
}

// contourPolygonsRows is ContourPolygons with the raster given by rows, as
// contourRingsRows reads it: row(r, dst) fills dst (g.Cols values) with
// the values of row r.
func contourPolygonsRows(g *terrain.Local, row func(r int, dst []float64), level float64) (orb.MultiPolygon, float64) {
	// Ring points at least 1 m from a cell below the level: ten times the
	// 0.11 m of the 6-decimal rounding below, so a cell just below the level
	// is never inside a ring as written (issue 11: a hole 0.04 m wide
	// around a cell 0.24 m below the level vanished in the rounding).
	margin := min(0.1, 1/g.Cell)
	polys := polygonsFromRings(contourRingsRows(row, g.Cols, g.Rows, level, margin), 0.5, 1)
	mp := make(orb.MultiPolygon, 0, len(polys))
	area := 0.0
	var ll [][2]float64
	for _, p := range polys {
		gp := make(orb.Polygon, len(p))
		for i, ring := range p {
			gr := make(orb.Ring, len(ring))
			ll = ll[:0]
			for j, pt := range ring {
				x, y := g.X0+pt[0]*g.Cell, g.Y0+pt[1]*g.Cell
				lat, lon := g.Frame.Inverse(x, y)
				gr[j] = orb.Point{round6(lon), round6(lat)}
				ll = append(ll, [2]float64{gr[j][0], gr[j][1]})
			}
			area += geodesy.RingArea(ll) // signed: exteriors +, holes −
			gp[i] = gr
		}
		mp = append(mp, gp)
	}
	return mp, area
}
