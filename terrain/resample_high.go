package terrain

import (
	"math"
	"sync"
)

// ResampleHigh is Resample for obstacles: each cell of the Local gets the
// highest DEM sample within its footprint — at least the four samples around
// its centre, and every sample within half a Local cell of the centre when
// the Local is coarser than the DEM — instead of the bilinear value. A ridge
// or a cliff between DEM samples or between Local cell centres therefore
// never comes out lower than the DEM has it, so the clearance the solvers
// keep over the resampled ground is kept over the DEM too (at the price of
// valley floors up to one DEM cell's rise too high: conservative). Cells
// whose footprint touches a void or leaves g are NaN.
//
// Positions are computed as in Resample (exact on a lattice every 16 cells,
// interpolated in between).
func ResampleHigh(g *Grid, f Frame, x0, y0, cell float64, cols, rows int) *Local {
	l := &Local{Frame: f, X0: x0, Y0: y0, Cell: cell, Cols: cols, Rows: rows, Source: g.Name}
	if l.Source == "" {
		l.Source = g.Format
	}
	l.Elev = make([]float32, cols*rows)
	if cols <= 0 || rows <= 0 || len(g.Elev) == 0 {
		return l
	}
	const B = resampleBlock
	nbx, nby := (cols-1)/B+1, (rows-1)/B+1
	nodes := make([][2]float64, (nbx+1)*(nby+1))
	for j := 0; j <= nby; j++ {
		for i := 0; i <= nbx; i++ {
			fc, fr := g.frameToCell(f, x0+float64(i*B)*cell, y0+float64(j*B)*cell)
			nodes[j*(nbx+1)+i] = [2]float64{fc, fr}
		}
	}
	nan := float32(math.NaN())
	// Rows are independent: a large window is done in two bands side by
	// side (every cell is computed the same way whichever band it is in).
	if cols*rows >= parallelCells && rows >= 2 {
		var wg sync.WaitGroup
		wg.Add(1)
		go func() {
			defer wg.Done()
			highRows(g, l, nodes, nbx, rows/2, rows, nan)
		}()
		highRows(g, l, nodes, nbx, 0, rows/2, nan)
		wg.Wait()
		return l
	}
	highRows(g, l, nodes, nbx, 0, rows, nan)
	return l
}

// parallelCells is the size (cells) from which ResampleHigh splits its rows
// between two goroutines.
var parallelCells = 1 << 18

// highRows fills rows r0..r1−1 of l for ResampleHigh from the projected
// lattice nodes (nbx blocks a row).
func highRows(g *Grid, l *Local, nodes [][2]float64, nbx, r0, r1 int, nan float32) {
	const B = resampleBlock
	cols := l.Cols
	for r := r0; r < r1; r++ {
		j, ty := r/B, float64(r%B)/B
		for bi := 0; bi < nbx; bi++ {
			n00, n10 := nodes[j*(nbx+1)+bi], nodes[j*(nbx+1)+bi+1]
			n01, n11 := nodes[(j+1)*(nbx+1)+bi], nodes[(j+1)*(nbx+1)+bi+1]
			wc, wr := n00[0]+(n01[0]-n00[0])*ty, n00[1]+(n01[1]-n00[1])*ty
			ec, er := n10[0]+(n11[0]-n10[0])*ty, n10[1]+(n11[1]-n10[1])*ty
			dc, dr := (ec-wc)/B, (er-wr)/B
			// Half a Local cell, in DEM cells (the Local is square; its
			// column step spans sqrt(dc² + dr²) DEM cells).
			h := 0.5 * math.Hypot(dc, dr)
			c0 := bi * B
			out := l.Elev[r*cols+c0 : r*cols+min(c0+B, cols)]
			for k := range out {
				fc, fr := wc+dc*float64(k), wr+dr*float64(k)
				out[k] = nan
				if math.IsNaN(fc) || math.IsNaN(fr) {
					continue
				}
				ca, cb := int(math.Floor(fc-h)), int(math.Ceil(fc+h))
				ra, rb := int(math.Floor(fr-h)), int(math.Ceil(fr+h))
				if ca == cb {
					cb++
				}
				if ra == rb {
					rb++
				}
				// Points in the half cell beyond the outer samples use the
				// edge samples, as Grid.Elevation does.
				if fc < -0.5 || fr < -0.5 || fc > float64(g.Cols)-0.5 || fr > float64(g.Rows)-0.5 {
					continue
				}
				ca, cb = max(ca, 0), min(cb, g.Cols-1)
				ra, rb = max(ra, 0), min(rb, g.Rows-1)
				hi := float32(math.Inf(-1))
				void := false
				for rr := ra; rr <= rb && !void; rr++ {
					row := g.Elev[rr*g.Cols+ca : rr*g.Cols+cb+1]
					for _, v := range row {
						if v != v {
							void = true
							break
						}
						if v > hi {
							hi = v
						}
					}
				}
				if !void && !math.IsInf(float64(hi), -1) {
					out[k] = hi
				}
			}
		}
	}
}

// HighAround returns the highest of the grid samples around lat, lon (the
// two to four whose cells the point lies between): the obstacle height there,
// never below the ground between samples the way a bilinear value can be.
// ok is false off the grid or when one of them is a void.
func (g *Grid) HighAround(lat, lon float64) (float64, bool) {
	x, y, err := g.toCRS(lat, lon)
	if err != nil || len(g.Elev) == 0 {
		return math.NaN(), false
	}
	fc, fr := (x-g.X0)/g.DX, (g.Y0-y)/g.DY
	if !(fc >= -0.5 && fr >= -0.5 && fc <= float64(g.Cols)-0.5 && fr <= float64(g.Rows)-0.5) {
		return math.NaN(), false
	}
	c0, r0 := max(int(math.Floor(fc)), 0), max(int(math.Floor(fr)), 0)
	c1, r1 := min(int(math.Ceil(fc)), g.Cols-1), min(int(math.Ceil(fr)), g.Rows-1)
	c0, r0 = min(c0, g.Cols-1), min(r0, g.Rows-1)
	hi := math.Inf(-1)
	for r := r0; r <= r1; r++ {
		for c := c0; c <= c1; c++ {
			v := float64(g.Elev[r*g.Cols+c])
			if v != v {
				return math.NaN(), false
			}
			hi = math.Max(hi, v)
		}
	}
	return hi, true
}
