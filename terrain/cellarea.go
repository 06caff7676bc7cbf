package terrain

import "math"

// areaBlock is the side, in cells, of the blocks over which CellAreas holds
// one value. The ratio of a cell's ellipsoidal to planar area changes by
// about d/R² per metre (d the distance from the frame's origin, R the earth
// radius): across a block of 16 cells of 1 km at 500 km from the origin,
// by 2e-4 of a part in a thousand, far below anything reported.
const areaBlock = 16

// CellAreas holds the area on the WGS84 ellipsoid of the cells of a Local:
// the surface a cell stands for, not its Cell² in the tangent plane.
//
// The Frame projects the ellipsoid orthogonally onto the plane tangent at
// its origin, so a surface element dS appears in the plane as
//
//	dA = dS · (n̂ · û)
//
// with n̂ the ellipsoid's normal at the point (geodetic latitude φ,
// longitude λ) and û the frame's up direction (φ₀, λ₀):
//
//	n̂ · û = cos φ cos φ₀ cos(λ − λ₀) + sin φ sin φ₀.
//
// A cell's area on the ellipsoid is therefore Cell² / (n̂ · û), which is at
// least Cell² (0.3 % more at 350 km from the origin). It is evaluated at the
// centre of each block of areaBlock × areaBlock cells.
type CellAreas struct {
	cols, bcols int
	w           []float64 // m² per cell, one value per block
}

// CellAreas returns the ellipsoidal cell areas of l.
func (l *Local) CellAreas() *CellAreas {
	bc := (l.Cols + areaBlock - 1) / areaBlock
	br := (l.Rows + areaBlock - 1) / areaBlock
	a := &CellAreas{cols: l.Cols, bcols: bc, w: make([]float64, bc*br)}
	f := l.Frame
	cell2 := l.Cell * l.Cell
	for j := 0; j < br; j++ {
		r0, r1 := j*areaBlock, min(l.Rows, (j+1)*areaBlock)
		for i := 0; i < bc; i++ {
			c0, c1 := i*areaBlock, min(l.Cols, (i+1)*areaBlock)
			x := l.X0 + (float64(c0+c1-1)/2)*l.Cell
			y := l.Y0 + (float64(r0+r1-1)/2)*l.Cell
			a.w[j*bc+i] = cell2 / f.upCos(x, y)
		}
	}
	return a
}

// At returns the area (m²) of cell i (index r·Cols + c).
func (a *CellAreas) At(i int) float64 { return a.AtCell(i%a.cols, i/a.cols) }

// AtCell returns the area (m²) of cell (c, r), for loops that already walk
// columns and rows.
func (a *CellAreas) AtCell(c, r int) float64 { return a.w[(r/areaBlock)*a.bcols+c/areaBlock] }

// upCos is n̂ · û at frame point (x, y): the cosine of the angle between
// the ellipsoid's normal there and the frame's up direction. It is clamped
// to at least 1e-3 (the plane's horizon, where cells stand on edge).
func (f Frame) upCos(x, y float64) float64 {
	lat, lon := f.Inverse(x, y)
	p := lat * math.Pi / 180
	dl := (lon - f.Lon0) * math.Pi / 180
	sp, cp := math.Sincos(p)
	v := cp*f.cosLat*math.Cos(dl) + sp*f.sinLat
	return math.Max(v, 1e-3)
}
