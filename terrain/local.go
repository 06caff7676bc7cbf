package terrain

import "math"

// Local is a square-celled elevation raster in a local Frame: the form in
// which the solvers read terrain. Cell (c, r) has its centre at
//
//	x = X0 + c·Cell,  y = Y0 + r·Cell   (metres in Frame; row 0 is the south row)
//
// Elev holds metres MSL, row-major (index r·Cols + c); NaN marks a void
// (unknown ground), which the solvers treat as an obstacle.
type Local struct {
	Frame      Frame
	X0, Y0     float64 // centre of cell (0, 0), the south-west cell, metres
	Cell       float64 // cell size, metres
	Cols, Rows int
	Elev       []float32
	Flat       bool   // true when the ground is a flat plane, not a DEM
	Source     string // where the elevations came from, for output ("flat ground at 0 m", a file name)
}

// NewFlat returns a flat Local at elevation elev (metres MSL).
func NewFlat(frame Frame, x0, y0, cell float64, cols, rows int, elev float64) *Local {
	l := &Local{Frame: frame, X0: x0, Y0: y0, Cell: cell, Cols: cols, Rows: rows, Flat: true}
	l.Elev = make([]float32, cols*rows)
	e := float32(elev)
	for i := range l.Elev {
		l.Elev[i] = e
	}
	return l
}

// At returns the elevation of cell (c, r); NaN for a void.
func (l *Local) At(c, r int) float64 { return float64(l.Elev[r*l.Cols+c]) }

// XY returns the frame coordinates of the centre of cell (c, r).
func (l *Local) XY(c, r int) (x, y float64) {
	return l.X0 + float64(c)*l.Cell, l.Y0 + float64(r)*l.Cell
}

// CellOf returns the cell nearest to frame point (x, y) and whether it lies on the raster.
func (l *Local) CellOf(x, y float64) (c, r int, ok bool) {
	c = int(math.Round((x - l.X0) / l.Cell))
	r = int(math.Round((y - l.Y0) / l.Cell))
	return c, r, c >= 0 && r >= 0 && c < l.Cols && r < l.Rows
}

// Sample returns the bilinear elevation at frame point (x, y) and false when
// the point is off the raster or touches a void.
func (l *Local) Sample(x, y float64) (float64, bool) {
	fx := (x - l.X0) / l.Cell
	fy := (y - l.Y0) / l.Cell
	if fx < 0 || fy < 0 || fx > float64(l.Cols-1) || fy > float64(l.Rows-1) {
		return math.NaN(), false
	}
	c, r := int(fx), int(fy)
	if c >= l.Cols-1 {
		c = l.Cols - 2
	}
	if r >= l.Rows-1 {
		r = l.Rows - 2
	}
	if c < 0 || r < 0 { // a raster one cell wide
		v := l.At(max(c, 0), max(r, 0))
		return v, !math.IsNaN(v)
	}
	tx, ty := fx-float64(c), fy-float64(r)
	i := r*l.Cols + c
	a, b := float64(l.Elev[i]), float64(l.Elev[i+1])
	d, e := float64(l.Elev[i+l.Cols]), float64(l.Elev[i+l.Cols+1])
	v := (a*(1-tx)+b*tx)*(1-ty) + (d*(1-tx)+e*tx)*ty
	return v, !math.IsNaN(v)
}

// Crop returns the part of l covering frame box [x0, x1] × [y0, y1]
// (metres), clipped to l, as a new Local sharing no memory with l; nil when
// the box misses l.
func (l *Local) Crop(x0, y0, x1, y1 float64) *Local {
	c0 := max(int(math.Floor((x0-l.X0)/l.Cell)), 0)
	r0 := max(int(math.Floor((y0-l.Y0)/l.Cell)), 0)
	c1 := min(int(math.Ceil((x1-l.X0)/l.Cell)), l.Cols-1)
	r1 := min(int(math.Ceil((y1-l.Y0)/l.Cell)), l.Rows-1)
	if c1 < c0 || r1 < r0 {
		return nil
	}
	return l.CropCells(c0, r0, c1, r1)
}

// CropCells returns cells c0..c1 × r0..r1 (inclusive, within l) as a Local
// on the same frame and lattice — cell (c, r) of the crop is cell
// (c0+c, r0+r) of l — with the elevations copied.
func (l *Local) CropCells(c0, r0, c1, r1 int) *Local {
	return l.CropCellsInto(c0, r0, c1, r1, nil)
}

// CropCellsInto is CropCells with the copy's elevations written into buf
// when its capacity holds them (a new slice otherwise), for a caller that
// reuses its buffers; the crop's Elev then shares buf's array.
func (l *Local) CropCellsInto(c0, r0, c1, r1 int, buf []float32) *Local {
	out := &Local{Frame: l.Frame, X0: l.X0 + float64(c0)*l.Cell, Y0: l.Y0 + float64(r0)*l.Cell, Cell: l.Cell,
		Cols: c1 - c0 + 1, Rows: r1 - r0 + 1, Flat: l.Flat, Source: l.Source}
	if n := out.Cols * out.Rows; cap(buf) >= n {
		out.Elev = buf[:n]
	} else {
		out.Elev = make([]float32, n)
	}
	for r := 0; r < out.Rows; r++ {
		copy(out.Elev[r*out.Cols:(r+1)*out.Cols], l.Elev[(r0+r)*l.Cols+c0:])
	}
	return out
}
