package terrain

import (
	"fmt"
	"math"
	"strings"
)

// OntoGrid samples a raster of values on Local l (one float32 per cell of l,
// NaN for none) onto the lattice of like (same size, CRS and georeference;
// its elevations are not used) by bilinear interpolation, so that a solver's
// result can be written in the DEM's own coordinate reference system. Cells
// of like outside l get NaN.
func OntoGrid(l *Local, values []float32, like *Grid) *Grid {
	out := &Grid{CRS: like.CRS, Cols: like.Cols, Rows: like.Rows, X0: like.X0, Y0: like.Y0, DX: like.DX, DY: like.DY, Format: "GeoTIFF", Name: like.Name}
	out.Elev = make([]float32, like.Cols*like.Rows)
	if like.CRS.EPSG == 4326 {
		ontoGeographic(l, values, like, out.Elev)
		return out
	}
	for r := 0; r < like.Rows; r++ {
		for c := 0; c < like.Cols; c++ {
			lat, lon, err := like.fromCRS(like.X0+float64(c)*like.DX, like.Y0-float64(r)*like.DY)
			v := math.NaN()
			if err == nil {
				x, y := l.Frame.Forward(lat, lon)
				v = sampleValues(l, values, x, y)
			}
			out.Elev[r*like.Cols+c] = float32(v)
		}
	}
	return out
}

// ontoGeographic is OntoGrid's loop for a geographic (EPSG:4326) lattice,
// where a row shares its latitude and a column its longitude: the factors
// of the earth-centred position (ecef) that depend on the latitude alone
// are found once a row, those of the longitude once a column, and each
// cell multiplies them as ecef does, so every position, and so every value,
// is the one Frame.Forward gives.
func ontoGeographic(l *Local, values []float32, like *Grid, dst []float32) {
	sl, cl := make([]float64, like.Cols), make([]float64, like.Cols)
	for c := range sl {
		lon := like.X0 + float64(c)*like.DX
		sl[c], cl[c] = math.Sincos(lon * math.Pi / 180)
	}
	for r := 0; r < like.Rows; r++ {
		lat := like.Y0 - float64(r)*like.DY
		sp, cp := math.Sincos(lat * math.Pi / 180)
		n := WGS84A / math.Sqrt(1-wgs84E2*sp*sp)
		ncp, pz := n*cp, n*(1-wgs84E2)*sp
		row := dst[r*like.Cols : (r+1)*like.Cols]
		for c := range row {
			x, y := l.Frame.project(ncp*cl[c], ncp*sl[c], pz)
			row[c] = float32(sampleValues(l, values, x, y))
		}
	}
}

// LatLonGrid samples values of Local l onto a geographic (EPSG:4326) lattice
// of square cells in degrees covering l's extent, about l's cell size
// north–south, for rasters computed on flat ground where no DEM lattice
// exists.
func LatLonGrid(l *Local, values []float32) *Grid {
	w, s, e, n := LocalExtent(l.Frame, l.X0, l.Y0, l.Cell, l.Cols, l.Rows)
	// Square cells in degrees (ESRI ASCII grids allow no other), about the
	// Local's cell size north–south and finer east–west.
	dlat := l.Cell / 111320.0
	dlon := dlat
	cols := int(math.Ceil((e-w)/dlon)) + 1
	rows := int(math.Ceil((n-s)/dlat)) + 1
	like := &Grid{CRS: CRS{EPSG: 4326}, Cols: cols, Rows: rows, X0: w, Y0: n, DX: dlon, DY: dlat, Name: l.Source}
	return OntoGrid(l, values, like)
}

// sampleValues interpolates values (laid out like l.Elev) bilinearly at frame
// point (x, y); NaN off the raster or next to a NaN.
func sampleValues(l *Local, values []float32, x, y float64) float64 {
	fx := (x - l.X0) / l.Cell
	fy := (y - l.Y0) / l.Cell
	if fx < 0 || fy < 0 || fx > float64(l.Cols-1) || fy > float64(l.Rows-1) {
		return math.NaN()
	}
	if l.Cols < 2 || l.Rows < 2 {
		// One row or column: nearest cell.
		return float64(values[int(math.Round(fy))*l.Cols+int(math.Round(fx))])
	}
	c, r := int(fx), int(fy)
	if c >= l.Cols-1 {
		c = l.Cols - 2
	}
	if r >= l.Rows-1 {
		r = l.Rows - 2
	}
	tx, ty := fx-float64(c), fy-float64(r)
	i := r*l.Cols + c
	a, b := float64(values[i]), float64(values[i+1])
	d, e := float64(values[i+l.Cols]), float64(values[i+l.Cols+1])
	return (a*(1-tx)+b*tx)*(1-ty) + (d*(1-tx)+e*tx)*ty
}

// GridSource serves a Grid held in memory as a Source (the demo's synthetic
// terrain, tests).
type GridSource struct {
	Grid *Grid
	Desc string // for Describe; empty means the grid's Format and Name
}

// Extent is the grid's lon/lat extent.
func (s *GridSource) Extent() (west, south, east, north float64) { return s.Grid.Extent() }

// Resolution is the finer of the grid's cell sizes in metres.
func (s *GridSource) Resolution() float64 {
	e, n := s.Grid.CellSizeMetres()
	return math.Min(e, n)
}

// Window copies the part of the grid covering the box (plus a cell).
func (s *GridSource) Window(west, south, east, north float64) (*Grid, error) {
	c0, r0, c1, r1, ok := s.Grid.cellWindow(west, south, east, north)
	if !ok {
		return nil, fmt.Errorf("%w: the grid does not cover %.6g..%.6g E, %.6g..%.6g N", ErrOutside, west, east, south, north)
	}
	return s.Grid.subGrid(c0, r0, c1, r1), nil
}

// Describe names the grid.
func (s *GridSource) Describe() string {
	if s.Desc != "" {
		return s.Desc
	}
	return strings.TrimSpace(s.Grid.Format + " " + s.Grid.Name)
}
