package terrain

import (
	"fmt"
	"math"
)

// toCRS maps latitude and longitude (degrees) to the grid's own CRS
// coordinates: (lon, lat) for EPSG:4326, (easting, northing) in metres for UTM.
func (g *Grid) toCRS(lat, lon float64) (x, y float64, err error) {
	if g.CRS.EPSG == 4326 {
		return lon, lat, nil
	}
	p, err := utmFor(g.CRS.EPSG)
	if err != nil {
		return 0, 0, err
	}
	x, y = p.Forward(lat, lon)
	return x, y, nil
}

// fromCRS maps grid CRS coordinates back to latitude and longitude (degrees).
func (g *Grid) fromCRS(x, y float64) (lat, lon float64, err error) {
	if g.CRS.EPSG == 4326 {
		return y, x, nil
	}
	p, err := utmFor(g.CRS.EPSG)
	if err != nil {
		return 0, 0, err
	}
	lat, lon = p.Inverse(x, y)
	return lat, lon, nil
}

// Elevation returns the bilinear elevation (metres MSL) at lat, lon
// (degrees, WGS84) and true, or NaN and false when the point is off the grid
// or any of the four surrounding samples is a void. For a UTM grid the point
// is projected with the zone's transverse Mercator first.
//
// Samples are taken as cell centres. Between the outermost centres and the
// outer cell edges (half a cell) the edge samples are extended, so the value
// is defined over the whole Extent; beyond it the point is off the grid.
func (g *Grid) Elevation(lat, lon float64) (float64, bool) {
	x, y, err := g.toCRS(lat, lon)
	if err != nil || g.Elev == nil {
		return math.NaN(), false
	}
	return g.sampleCell((x-g.X0)/g.DX, (g.Y0-y)/g.DY)
}

// sampleCell interpolates bilinearly at fractional cell coordinates (fc, fr)
// (column east, row south, cell centres at integers).
func (g *Grid) sampleCell(fc, fr float64) (float64, bool) {
	if !(fc >= -0.5 && fr >= -0.5 && fc <= float64(g.Cols)-0.5 && fr <= float64(g.Rows)-0.5) {
		return math.NaN(), false
	}
	// Snap to a sample within 1e-9 cell (well under a millimetre), so that
	// rounding in the georeference does not mix in a neighbour.
	if d := math.Round(fc); math.Abs(fc-d) < 1e-9 {
		fc = d
	}
	if d := math.Round(fr); math.Abs(fr-d) < 1e-9 {
		fr = d
	}
	fc = math.Min(math.Max(fc, 0), float64(g.Cols-1))
	fr = math.Min(math.Max(fr, 0), float64(g.Rows-1))
	c, r := int(fc), int(fr)
	if c >= g.Cols-1 {
		c = max(g.Cols-2, 0)
	}
	if r >= g.Rows-1 {
		r = max(g.Rows-2, 0)
	}
	tx, ty := fc-float64(c), fr-float64(r)
	c1, r1 := min(c+1, g.Cols-1), min(r+1, g.Rows-1)
	// Corners with zero weight are left out, so a point exactly on a valid
	// sample (or edge) is valid even when a neighbour beyond it is a void.
	v := 0.0
	for _, k := range [4]struct {
		w float64
		i int
	}{{(1 - tx) * (1 - ty), r*g.Cols + c}, {tx * (1 - ty), r*g.Cols + c1}, {(1 - tx) * ty, r1*g.Cols + c}, {tx * ty, r1*g.Cols + c1}} {
		if k.w != 0 {
			v += k.w * float64(g.Elev[k.i])
		}
	}
	if math.IsNaN(v) {
		return math.NaN(), false
	}
	return v, true
}

// Extent returns the area the grid covers as a longitude/latitude box
// (degrees, WGS84): the outer edges of the edge cells. For a UTM grid it is
// the bounding box of the projected outline (sampled 32 points per side).
func (g *Grid) Extent() (west, south, east, north float64) {
	x0, x1 := g.X0-g.DX/2, g.X0+(float64(g.Cols)-0.5)*g.DX
	y1, y0 := g.Y0+g.DY/2, g.Y0-(float64(g.Rows)-0.5)*g.DY
	if g.CRS.EPSG == 4326 {
		return x0, y0, x1, y1
	}
	west, south, east, north = math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	const n = 32
	for i := 0; i <= n; i++ {
		t := float64(i) / n
		for _, p := range [][2]float64{{x0 + t*(x1-x0), y0}, {x0 + t*(x1-x0), y1}, {x0, y0 + t*(y1-y0)}, {x1, y0 + t*(y1-y0)}} {
			lat, lon, err := g.fromCRS(p[0], p[1])
			if err != nil {
				return math.NaN(), math.NaN(), math.NaN(), math.NaN()
			}
			west, east = math.Min(west, lon), math.Max(east, lon)
			south, north = math.Min(south, lat), math.Max(north, lat)
		}
	}
	return west, south, east, north
}

// CellSizeMetres returns the cell spacing east–west and north–south in
// metres. For a geographic grid it is taken on the WGS84 ellipsoid at the
// grid's middle latitude φ:
//
//	east = DX·(π/180)·N(φ)·cos φ,   north = DY·(π/180)·M(φ)
//
// with N = a/√(1−e²sin²φ) and M = a(1−e²)/(1−e²sin²φ)^(3/2) the
// prime-vertical and meridian radii of curvature (NIMA TR8350.2). For a UTM
// grid it is DX, DY: grid metres, which differ from ground metres by the
// point scale factor (0.9996 to about 1.001 inside a zone).
func (g *Grid) CellSizeMetres() (east, north float64) {
	if g.CRS.EPSG != 4326 {
		return g.DX, g.DY
	}
	lat := g.Y0 - float64(g.Rows-1)/2*g.DY
	sp, cp := math.Sincos(lat * math.Pi / 180)
	w := 1 - wgs84E2*sp*sp
	n := WGS84A / math.Sqrt(w)
	m := WGS84A * (1 - wgs84E2) / (w * math.Sqrt(w))
	return g.DX * math.Pi / 180 * n * cp, g.DY * math.Pi / 180 * m
}

// Voids returns the number of void (NaN) samples.
func (g *Grid) Voids() int {
	n := 0
	for _, v := range g.Elev {
		if v != v {
			n++
		}
	}
	return n
}

// ElevationRange returns the lowest and highest non-void elevation (metres)
// and false when every sample is a void.
func (g *Grid) ElevationRange() (lo, hi float64, ok bool) {
	l, h := float32(math.Inf(1)), float32(math.Inf(-1))
	for _, v := range g.Elev {
		if v < l {
			l = v
		}
		if v > h {
			h = v
		}
	}
	if l > h {
		return math.NaN(), math.NaN(), false
	}
	return float64(l), float64(h), true
}

// cellWindow returns the inclusive cell range (c0..c1, r0..r1) of the header
// g that covers the longitude/latitude box, with one extra cell on every side
// so that bilinear sampling anywhere in the box has its neighbours, clipped
// to the grid. ok is false when the box misses the grid. g.Elev may be nil.
func (g *Grid) cellWindow(west, south, east, north float64) (c0, r0, c1, r1 int, ok bool) {
	xmin, ymin, xmax, ymax, ok := g.crsBox(west, south, east, north)
	if !ok {
		return 0, 0, 0, 0, false
	}
	clamp := func(v float64, hi int) int {
		if !(v > -1) { // also NaN
			return -1
		}
		if v > float64(hi)+1 {
			return hi + 1
		}
		return int(v)
	}
	c0 = clamp(math.Floor((xmin-g.X0)/g.DX)-1, g.Cols)
	c1 = clamp(math.Ceil((xmax-g.X0)/g.DX)+1, g.Cols)
	r0 = clamp(math.Floor((g.Y0-ymax)/g.DY)-1, g.Rows)
	r1 = clamp(math.Ceil((g.Y0-ymin)/g.DY)+1, g.Rows)
	if c1 < 0 || r1 < 0 || c0 > g.Cols-1 || r0 > g.Rows-1 {
		return 0, 0, 0, 0, false
	}
	c0, r0 = max(c0, 0), max(r0, 0)
	c1, r1 = min(c1, g.Cols-1), min(r1, g.Rows-1)
	return c0, r0, c1, r1, c0 <= c1 && r0 <= r1
}

// crsBox returns the box in the grid's CRS that holds the
// longitude/latitude box (for UTM, the bounding box of its outline sampled
// 16 points per side). ok is false for an empty or non-finite box.
func (g *Grid) crsBox(west, south, east, north float64) (xmin, ymin, xmax, ymax float64, ok bool) {
	if !(west <= east && south <= north) || math.IsInf(west, 0) || math.IsInf(east, 0) || math.IsInf(south, 0) || math.IsInf(north, 0) {
		return 0, 0, 0, 0, false
	}
	if g.CRS.EPSG == 4326 {
		return west, south, east, north, true
	}
	xmin, ymin, xmax, ymax = math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	const n = 16
	for i := 0; i <= n; i++ {
		t := float64(i) / n
		lon, lat := west+t*(east-west), south+t*(north-south)
		for _, p := range [][2]float64{{south, lon}, {north, lon}, {lat, west}, {lat, east}} {
			x, y, err := g.toCRS(p[0], p[1])
			if err != nil {
				return 0, 0, 0, 0, false
			}
			xmin, xmax = math.Min(xmin, x), math.Max(xmax, x)
			ymin, ymax = math.Min(ymin, y), math.Max(ymax, y)
		}
	}
	return xmin, ymin, xmax, ymax, true
}

// subGrid returns a copy of the cells c0..c1 × r0..r1 (inclusive) of g.
func (g *Grid) subGrid(c0, r0, c1, r1 int) *Grid {
	s := *g
	s.Cols, s.Rows = c1-c0+1, r1-r0+1
	s.X0 = g.X0 + float64(c0)*g.DX
	s.Y0 = g.Y0 - float64(r0)*g.DY
	s.Elev = make([]float32, s.Cols*s.Rows)
	for r := 0; r < s.Rows; r++ {
		copy(s.Elev[r*s.Cols:(r+1)*s.Cols], g.Elev[(r0+r)*g.Cols+c0:])
	}
	return &s
}

// FillVoids replaces every void region (4-connected NaN cells) of at most
// maxSize cells by inverse-distance-weighted interpolation and returns the
// number of cells it filled. Each void cell looks along the 8 grid
// directions for the nearest valid sample (no farther than the region's size
// plus one cell) and takes
//
//	z = Σ zᵢ/dᵢ² / Σ 1/dᵢ²   (dᵢ in cells)
//
// over the samples found; only original samples are used, so the result does
// not depend on the order of filling. Larger voids stay NaN (obstacles).
// maxSize ≤ 0 fills nothing. This is the common practice for small SRTM
// voids (no single source); large voids need another data set.
func FillVoids(g *Grid, maxSize int) int {
	if maxSize <= 0 || len(g.Elev) == 0 {
		return 0
	}
	seen := make([]bool, len(g.Elev))
	var region, queue []int
	type fill struct {
		i int
		v float32
	}
	var fills []fill
	for start, v := range g.Elev {
		if v == v || seen[start] {
			continue
		}
		region, queue = region[:0], append(queue[:0], start)
		seen[start] = true
		cmin, cmax, rmin, rmax := g.Cols, -1, g.Rows, -1
		for len(queue) > 0 {
			i := queue[len(queue)-1]
			queue = queue[:len(queue)-1]
			region = append(region, i)
			c, r := i%g.Cols, i/g.Cols
			cmin, cmax, rmin, rmax = min(cmin, c), max(cmax, c), min(rmin, r), max(rmax, r)
			for _, d := range [4][2]int{{1, 0}, {-1, 0}, {0, 1}, {0, -1}} {
				cc, rr := c+d[0], r+d[1]
				if cc < 0 || rr < 0 || cc >= g.Cols || rr >= g.Rows {
					continue
				}
				j := rr*g.Cols + cc
				if !seen[j] && g.Elev[j] != g.Elev[j] {
					seen[j] = true
					queue = append(queue, j)
				}
			}
		}
		if len(region) > maxSize {
			continue
		}
		reach := max(cmax-cmin, rmax-rmin) + 2
		for _, i := range region {
			c, r := i%g.Cols, i/g.Cols
			var sw, sz float64
			for _, d := range [8][2]int{{1, 0}, {-1, 0}, {0, 1}, {0, -1}, {1, 1}, {1, -1}, {-1, 1}, {-1, -1}} {
				for k := 1; k <= reach; k++ {
					cc, rr := c+k*d[0], r+k*d[1]
					if cc < 0 || rr < 0 || cc >= g.Cols || rr >= g.Rows {
						break
					}
					if z := g.Elev[rr*g.Cols+cc]; z == z {
						d2 := float64(k * k * (d[0]*d[0] + d[1]*d[1]))
						sw += 1 / d2
						sz += float64(z) / d2
						break
					}
				}
			}
			if sw > 0 {
				fills = append(fills, fill{i, float32(sz / sw)})
			}
		}
	}
	for _, f := range fills {
		g.Elev[f.i] = f.v
	}
	return len(fills)
}

// checkHeader validates the georeference of a grid header before any
// sample is allocated: positive finite cell sizes, positive dimensions under
// MaxCells, and a supported CRS.
func checkHeader(g *Grid) error {
	if g.Cols <= 0 || g.Rows <= 0 {
		return fmt.Errorf("terrain: grid of %d×%d cells is empty", g.Cols, g.Rows)
	}
	if int64(g.Cols)*int64(g.Rows) > maxFileCells {
		return fmt.Errorf("terrain: grid of %d×%d cells exceeds the limit of %d cells", g.Cols, g.Rows, int64(maxFileCells))
	}
	if !(g.DX > 0 && g.DY > 0) || math.IsInf(g.DX, 0) || math.IsInf(g.DY, 0) {
		return fmt.Errorf("terrain: cell size %g×%g is not positive", g.DX, g.DY)
	}
	if math.IsNaN(g.X0) || math.IsNaN(g.Y0) || math.IsInf(g.X0, 0) || math.IsInf(g.Y0, 0) {
		return fmt.Errorf("terrain: origin %g, %g is not finite", g.X0, g.Y0)
	}
	if err := CheckCRS(g.CRS); err != nil {
		return err
	}
	if g.CRS.EPSG == 4326 {
		// Cell edges may overhang ±180° and ±90° by half a cell (grids whose
		// edge cells are centred on the meridian, as SRTM tiles are), not
		// more: a grid reaching 180.1° E is a wrong header.
		w, s, e, n := g.Extent()
		tx, ty := g.DX/2+1e-9, g.DY/2+1e-9
		if w < -180-tx || e > 180+tx || s < -90-ty || n > 90+ty {
			return fmt.Errorf("terrain: geographic extent %.6f..%.6f E, %.6f..%.6f N is outside the globe (-180..180 E, -90..90 N, half a cell of overhang allowed)", w, e, s, n)
		}
	}
	return nil
}

// MaxCells is the largest grid (or window) this package allocates: 2²⁸
// cells, 1 GiB of float32 samples. Larger requests are refused before any
// allocation. A file may be larger (up to 2³² cells) when only windows of it
// are read.
const MaxCells = 1 << 28

const maxFileCells = 1 << 32

// checkWindow refuses a window of more than MaxCells cells.
func checkWindow(cols, rows int) error {
	if int64(cols)*int64(rows) > MaxCells {
		return fmt.Errorf("terrain: window of %d×%d cells exceeds the limit of %d cells; ask for a smaller area", cols, rows, int64(MaxCells))
	}
	return nil
}
