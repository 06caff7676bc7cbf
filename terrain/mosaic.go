package terrain

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strings"
)

// mosaic is several elevation files read as one Source.
type mosaic struct {
	tiles []*fileSource
	fill  int
}

func newMosaic(tiles []*fileSource, opts OpenOptions) *mosaic {
	return &mosaic{tiles: tiles, fill: opts.FillVoids}
}

func (m *mosaic) Extent() (west, south, east, north float64) {
	west, south, east, north = math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, t := range m.tiles {
		w, s, e, n := t.Extent()
		west, south = math.Min(west, w), math.Min(south, s)
		east, north = math.Max(east, e), math.Max(north, n)
	}
	return west, south, east, north
}

func (m *mosaic) Resolution() float64 {
	r := math.Inf(1)
	for _, t := range m.tiles {
		r = math.Min(r, t.Resolution())
	}
	return r
}

func (m *mosaic) Describe() string {
	formats := map[string]bool{}
	var names []string
	for _, t := range m.tiles {
		formats[t.hdr.Format] = true
		names = append(names, filepath.Base(t.path))
	}
	kind := "mixed formats"
	if len(formats) == 1 {
		kind = m.tiles[0].hdr.Format
	}
	if len(names) > 6 {
		names = append(names[:5], fmt.Sprintf("… %d more", len(names)-5))
	}
	return fmt.Sprintf("mosaic of %d %s files (%s)", len(m.tiles), kind, strings.Join(names, ", "))
}

// Window reads the window from every tile that overlaps it and joins the
// pieces into one Grid. When all pieces share the CRS, cell size and cell
// alignment (SRTM tiles, a tiled national DEM) the samples are copied onto
// the common lattice, the first non-void value winning where tiles overlap
// (SRTM edge rows are duplicated). Otherwise the pieces are resampled
// bilinearly onto one lattice: the CRS of the pieces if they share one,
// else EPSG:4326, with the finest cell size among them; a cell takes the
// first piece (finest first) that has a non-void value there.
func (m *mosaic) Window(west, south, east, north float64) (*Grid, error) {
	var parts []*Grid
	for _, t := range m.tiles {
		w, s, e, n := t.Extent()
		if w > east || e < west || s > north || n < south {
			continue
		}
		g, err := t.window(west, south, east, north)
		if err != nil {
			if errors.Is(err, ErrOutside) {
				continue
			}
			return nil, &FileError{Path: t.path, Err: err}
		}
		parts = append(parts, g)
	}
	if len(parts) == 0 {
		return nil, fmt.Errorf("%w: no file covers %.6g..%.6g E, %.6g..%.6g N", ErrOutside, west, east, south, north)
	}
	var g *Grid
	var err error
	if len(parts) == 1 {
		g = parts[0]
	} else if sameLattice(parts) {
		g, err = paste(parts)
	} else {
		g, err = resampleParts(parts, west, south, east, north)
	}
	if err != nil {
		return nil, err
	}
	if len(parts) > 1 {
		g.Format = "mosaic"
		var names []string
		for _, p := range parts {
			names = append(names, p.Name)
		}
		g.Name = strings.Join(names, ",")
	}
	if m.fill > 0 {
		FillVoids(g, m.fill)
	}
	return g, nil
}

// sameLattice reports whether the grids share CRS, cell size and alignment
// (origins a whole number of cells apart, to 1e-6 cell).
func sameLattice(gs []*Grid) bool {
	a := gs[0]
	for _, g := range gs[1:] {
		if g.CRS != a.CRS || math.Abs(g.DX-a.DX) > 1e-9*a.DX || math.Abs(g.DY-a.DY) > 1e-9*a.DY {
			return false
		}
		fx := (g.X0 - a.X0) / a.DX
		fy := (a.Y0 - g.Y0) / a.DY
		if math.Abs(fx-math.Round(fx)) > 1e-6 || math.Abs(fy-math.Round(fy)) > 1e-6 {
			return false
		}
	}
	return true
}

// paste copies grids on one lattice into a single grid covering them all.
func paste(gs []*Grid) (*Grid, error) {
	a := gs[0]
	cmin, rmin, cmax, rmax := math.MaxInt, math.MaxInt, math.MinInt, math.MinInt
	offs := make([][2]int, len(gs))
	for i, g := range gs {
		c := int(math.Round((g.X0 - a.X0) / a.DX))
		r := int(math.Round((a.Y0 - g.Y0) / a.DY))
		offs[i] = [2]int{c, r}
		cmin, rmin = min(cmin, c), min(rmin, r)
		cmax, rmax = max(cmax, c+g.Cols-1), max(rmax, r+g.Rows-1)
	}
	out := &Grid{CRS: a.CRS, DX: a.DX, DY: a.DY, Cols: cmax - cmin + 1, Rows: rmax - rmin + 1}
	if err := checkWindow(out.Cols, out.Rows); err != nil {
		return nil, err
	}
	out.X0 = a.X0 + float64(cmin)*a.DX
	out.Y0 = a.Y0 - float64(rmin)*a.DY
	out.Elev = make([]float32, out.Cols*out.Rows)
	nan := float32(math.NaN())
	for i := range out.Elev {
		out.Elev[i] = nan
	}
	for i, g := range gs {
		c0, r0 := offs[i][0]-cmin, offs[i][1]-rmin
		for r := 0; r < g.Rows; r++ {
			dst := out.Elev[(r0+r)*out.Cols+c0 : (r0+r)*out.Cols+c0+g.Cols]
			for c, v := range g.Elev[r*g.Cols : (r+1)*g.Cols] {
				if dst[c] != dst[c] {
					dst[c] = v
				}
			}
		}
	}
	return out, nil
}

// A resampled mosaic window may hold at most mosaicMaxRatio times the cells
// of the pieces it is made of, once it exceeds mosaicSlackCells (4 Mi cells,
// 16 MiB, well under a second): pieces of resolutions up to 16 times apart
// fit, pieces far apart do not.
const (
	mosaicMaxRatio   = 256
	mosaicSlackCells = 1 << 22
)

// resampleParts samples grids on different lattices onto one lattice
// covering the window (clipped to the parts' union).
func resampleParts(gs []*Grid, west, south, east, north float64) (*Grid, error) {
	crs := gs[0].CRS
	for _, g := range gs {
		if g.CRS != crs {
			crs = CRS{EPSG: 4326}
			break
		}
	}
	// Finest spacing in metres, then in the lattice CRS.
	res := math.Inf(1)
	for _, g := range gs {
		e, n := g.CellSizeMetres()
		res = math.Min(res, math.Min(e, n))
	}
	// Clip the window to the union of the parts' extents.
	uw, us, ue, un := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, g := range gs {
		w, s, e, n := g.Extent()
		uw, us, ue, un = math.Min(uw, w), math.Min(us, s), math.Max(ue, e), math.Max(un, n)
	}
	west, south, east, north = math.Max(west, uw), math.Max(south, us), math.Min(east, ue), math.Min(north, un)
	out := &Grid{CRS: crs}
	var xmin, ymin, xmax, ymax float64
	if crs.EPSG == 4326 {
		lat := (south + north) / 2
		e, n := (&Grid{CRS: crs, DX: 1, DY: 1, Y0: lat, Rows: 1}).CellSizeMetres()
		out.DX, out.DY = res/e, res/n
		xmin, ymin, xmax, ymax = west, south, east, north
	} else {
		out.DX, out.DY = res, res
		var ok bool
		xmin, ymin, xmax, ymax, ok = out.crsBox(west, south, east, north)
		if !ok {
			return nil, fmt.Errorf("%w: window %.6g..%.6g E, %.6g..%.6g N", ErrOutside, west, east, south, north)
		}
	}
	// Lattice aligned on whole multiples of the cell size.
	c0 := math.Floor(xmin/out.DX) - 1
	c1 := math.Ceil(xmax/out.DX) + 1
	r0 := math.Floor(ymin/out.DY) - 1
	r1 := math.Ceil(ymax/out.DY) + 1
	if (c1-c0+1)*(r1-r0+1) > MaxCells {
		return nil, checkWindow(int(math.Min(c1-c0+1, 1e9)), int(math.Min(r1-r0+1, 1e9)))
	}
	// Files far apart for their size (two small tiles in different CRSs
	// hundreds of km apart took 90 s and 600 MB for 21 600 cells of data):
	// refuse a lattice much larger than the data it holds.
	data := 0.0
	for _, g := range gs {
		data += float64(g.Cols) * float64(g.Rows)
	}
	if cells := (c1 - c0 + 1) * (r1 - r0 + 1); cells > mosaicSlackCells && cells > mosaicMaxRatio*data {
		return nil, fmt.Errorf("terrain: the files lie far apart for their size: this window of the mosaic would need %.0f cells for %.0f cells of data (more than %d times); give only the files that cover the area, or read them one by one", cells, data, mosaicMaxRatio)
	}
	out.Cols, out.Rows = int(c1-c0+1), int(r1-r0+1)
	out.X0, out.Y0 = c0*out.DX, r1*out.DY
	out.Elev = make([]float32, out.Cols*out.Rows)
	// Finest parts first.
	order := make([]*Grid, len(gs))
	copy(order, gs)
	for i := 1; i < len(order); i++ {
		for j := i; j > 0; j-- {
			a, _ := order[j].CellSizeMetres()
			b, _ := order[j-1].CellSizeMetres()
			if a >= b {
				break
			}
			order[j], order[j-1] = order[j-1], order[j]
		}
	}
	nan := float32(math.NaN())
	for r := 0; r < out.Rows; r++ {
		y := out.Y0 - float64(r)*out.DY
		for c := 0; c < out.Cols; c++ {
			x := out.X0 + float64(c)*out.DX
			lat, lon, err := out.fromCRS(x, y)
			v := nan
			if err == nil {
				for _, g := range order {
					if z, ok := g.Elevation(lat, lon); ok {
						v = float32(z)
						break
					}
				}
			}
			out.Elev[r*out.Cols+c] = v
		}
	}
	return out, nil
}
