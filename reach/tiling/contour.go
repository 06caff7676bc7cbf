package tiling

import (
	"math"

	"github.com/paulmach/orb"

	"glidereach/reach"
	"glidereach/reach/geodesy"
)

// Contour traces the covered and the uncovered parts of the zone as lon/lat
// polygons (RFC 7946 winding: exteriors counter-clockwise, holes clockwise;
// coordinates rounded to 7 decimals, about a centimetre) with their areas
// on the WGS84 ellipsoid (m², geodesy.RingArea of the polygons as written).
// Covered is where Margin ≥ 0; uncovered where a zone cell's Margin < 0.
//
// The merged raster is contoured by marching squares between cell centres
// (saddles resolved by the mean of the four corners, the raster padded
// with "outside" so every ring closes) one row of squares at a time, tile
// row by tile row: a square's corners take the next tile row's first row
// (one cell of overlap), and the crossing points of an edge are computed
// once from the two cells on it, so pieces traced in neighbouring tiles
// join exactly; the rings are chained across tiles by their edges. There
// is no seam at tile edges (a test compares one tile with many) and no
// polygon union is needed. Rings are not simplified: a vertex per crossed
// cell edge. Memory: two tile rows of cells plus the crossings.
func Contour(p *Plan, tiles TileReader) (covered, uncovered orb.MultiPolygon, coveredArea, uncoveredArea float64, err error) {
	covered, coveredArea, err = contourLevel(p, tiles, func(m float64) float64 { return m }, 0)
	if err != nil {
		return
	}
	uncovered, uncoveredArea, err = contourLevel(p, tiles, func(m float64) float64 {
		if m != m {
			return m
		}
		if m >= 0 {
			return -m - 1e-3 // strictly below the level where covered
		}
		return -m
	}, 1e-3)
	return
}

// rowReader serves the margin values of lattice rows, reading a tile row
// at a time and keeping two.
type rowReader struct {
	p     *Plan
	tiles TileReader
	f     func(float64) float64
	cache map[int][]float64 // tile row → values of its lattice rows × Cols
}

func (rr *rowReader) row(r int) ([]float64, error) {
	ts := rr.p.TileSide()
	tr := r / ts
	if v, ok := rr.cache[tr]; ok {
		return v[(r-tr*ts)*rr.p.Lattice.Cols:][:rr.p.Lattice.Cols], nil
	}
	for k := range rr.cache {
		if k < tr-1 || k > tr+1 {
			delete(rr.cache, k)
		}
	}
	cols := rr.p.Lattice.Cols
	rows := min(ts, rr.p.Lattice.Rows-tr*ts)
	v := make([]float64, rows*cols)
	across, _ := rr.p.TilesAcross()
	for tc := range across {
		t, err := rr.tiles.Tile(TileID{tc, tr})
		if err != nil {
			return nil, err
		}
		for y := range t.Rows {
			for x := range t.Cols {
				v[y*cols+t.C0+x] = rr.f(Margin(rr.p, t, y*t.Cols+x))
			}
		}
	}
	rr.cache[tr] = v
	return v[(r-tr*ts)*cols:][:cols], nil
}

// contourLevel traces where f(Margin) ≥ level. Node (c, y) is lattice cell
// (c, Rows−1−y): y grows north, so rings with the region on their left are
// counter-clockwise on the map.
func contourLevel(p *Plan, tiles TileReader, f func(float64) float64, level float64) (orb.MultiPolygon, float64, error) {
	cols, rows := p.Lattice.Cols, p.Lattice.Rows
	low := level - 1e4
	rr := &rowReader{p: p, tiles: tiles, f: f, cache: map[int][]float64{}}
	lowRow := make([]float64, cols)
	for i := range lowRow {
		lowRow[i] = low
	}
	// nodeRow returns the values of node row y (−1 and rows are padding).
	nodeRow := func(y int) ([]float64, error) {
		if y < 0 || y >= rows {
			return lowRow, nil
		}
		return rr.row(rows - 1 - y)
	}
	w := int64(cols + 2)
	hid := func(c, y int) int64 { return ((int64(y)+1)*w + int64(c) + 1) * 2 }
	vid := func(c, y int) int64 { return ((int64(y)+1)*w+int64(c)+1)*2 + 1 }
	next := map[int64]int64{}
	point := map[int64]orb.Point{}
	var starts []int64
	val := func(row []float64, c int) float64 {
		if c < 0 || c >= cols {
			return low
		}
		if v := row[c]; v == v {
			return v
		}
		return low
	}
	edgePoint := func(id int64, c, yy int, horizontal bool, a, b float64) {
		if _, ok := point[id]; ok {
			return
		}
		t := 0.5
		if b != a {
			t = (level - a) / (b - a)
		}
		t = math.Max(0, math.Min(1, t))
		if horizontal {
			point[id] = orb.Point{float64(c) + t, float64(yy)}
		} else {
			point[id] = orb.Point{float64(c), float64(yy) + t}
		}
	}
	for y := -1; y < rows; y++ {
		below, err := nodeRow(y)
		if err != nil {
			return nil, 0, err
		}
		above, err := nodeRow(y + 1)
		if err != nil {
			return nil, 0, err
		}
		for c := -1; c < cols; c++ {
			bl, br := val(below, c), val(below, c+1)
			tl, tr := val(above, c), val(above, c+1)
			segs, n := reach.SquareSegments(bl, br, tr, tl, level)
			ids := [4]int64{hid(c, y), hid(c, y+1), vid(c, y), vid(c+1, y)}
			for k := range n {
				for _, e := range segs[k] {
					switch e {
					case reach.SquareBottom:
						edgePoint(ids[e], c, y, true, bl, br)
					case reach.SquareTop:
						edgePoint(ids[e], c, y+1, true, tl, tr)
					case reach.SquareLeft:
						edgePoint(ids[e], c, y, false, bl, tl)
					case reach.SquareRight:
						edgePoint(ids[e], c+1, y, false, br, tr)
					}
				}
				from, to := ids[segs[k][0]], ids[segs[k][1]]
				next[from] = to
				starts = append(starts, from)
			}
		}
	}
	polys := reach.NestRings(reach.TraceRings(next, starts, point))
	// Node (c, y) → lattice cell (c, rows−1−y) → CRS → lon/lat.
	g := p.Lattice.Grid()
	mp := make(orb.MultiPolygon, 0, len(polys))
	area := 0.0
	var ll [][2]float64
	for _, poly := range polys {
		gp := make(orb.Polygon, 0, len(poly))
		for _, ring := range poly {
			gr := make(orb.Ring, len(ring))
			ll = ll[:0]
			for j, pt := range ring {
				X := g.X0 + pt[0]*g.DX
				Y := g.Y0 - (float64(rows-1)-pt[1])*g.DY
				lat, lon, err := g.FromCRS(X, Y)
				if err != nil {
					return nil, 0, err
				}
				gr[j] = orb.Point{round7(lon), round7(lat)}
				ll = append(ll, [2]float64{gr[j][0], gr[j][1]})
			}
			area += geodesy.RingArea(ll)
			gp = append(gp, gr)
		}
		mp = append(mp, gp)
	}
	return mp, area, nil
}

func round7(v float64) float64 { return math.Round(v*1e7) / 1e7 }
