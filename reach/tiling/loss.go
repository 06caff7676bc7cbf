package tiling

import (
	"fmt"
	"math"

	"glidereach/reach"
)

// LossGrid is a loss model as plain data: the height lost per metre over the
// ground (dimensionless) at Rows altitude nodes evenly spaced from HMin to
// HMax (m MSL) × Dirs track directions evenly spaced clockwise from north,
// read by bilinear interpolation like reach.Table (the nearest end row
// beyond HMin..HMax; +Inf when a surrounding node is +Inf, no headway). It
// implements reach.LossModel and is what a Plan carries instead of the
// table, so that a job can be encoded and sent to another process.
type LossGrid struct {
	HMin, HMax float64
	Rows, Dirs int
	Values     []float64 // Rows × Dirs, row = altitude node
}

// SampleLoss samples m at the nodes reach.NewTable uses for hMin..hMax
// (rows every reach.TableBand metres or closer so both ends are nodes,
// reach.TableDirections directions). Sampled from a *reach.Table over its
// own Range, the grid reproduces the table's Loss to rounding (a test
// checks 1e-12 relative at random points).
func SampleLoss(m reach.LossModel, hMin, hMax float64) (LossGrid, error) {
	if !(hMax >= hMin) || math.IsInf(hMin, 0) || math.IsInf(hMax, 0) {
		return LossGrid{}, fmt.Errorf("tiling: loss grid range %g..%g m is empty or not finite", hMin, hMax)
	}
	nh := max(2, int(math.Ceil((hMax-hMin)/reach.TableBand))+1)
	g := LossGrid{HMin: hMin, HMax: hMax, Rows: nh, Dirs: reach.TableDirections, Values: make([]float64, nh*reach.TableDirections)}
	dh := g.dh()
	for i := range nh {
		h := hMin + float64(i)*dh
		for j := range g.Dirs {
			g.Values[i*g.Dirs+j] = m.Loss(h, float64(j)*2*math.Pi/float64(g.Dirs))
		}
	}
	return g, nil
}

func (g *LossGrid) dh() float64 {
	if g.HMax == g.HMin {
		return 1
	}
	return (g.HMax - g.HMin) / float64(g.Rows-1)
}

// Check reports a grid whose shape does not match its data.
func (g *LossGrid) Check() error {
	if g.Rows < 2 || g.Dirs < 4 || len(g.Values) != g.Rows*g.Dirs || !(g.HMax >= g.HMin) {
		return fmt.Errorf("tiling: loss grid of %d×%d nodes holds %d values (range %g..%g m)", g.Rows, g.Dirs, len(g.Values), g.HMin, g.HMax)
	}
	return nil
}

// Loss returns the interpolated loss at altitude h (m MSL) on track bearing
// (radians clockwise from north), as reach.Table.Loss does.
func (g *LossGrid) Loss(h, bearing float64) float64 {
	if math.IsNaN(h) || math.IsNaN(bearing) || math.IsInf(bearing, 0) {
		return math.Inf(1)
	}
	fh := (math.Max(g.HMin, math.Min(g.HMax, h)) - g.HMin) / g.dh()
	i0 := min(int(fh), g.Rows-2)
	th := fh - float64(i0)
	fd := math.Mod(bearing/(2*math.Pi), 1)
	if fd < 0 {
		fd++
	}
	fd *= float64(g.Dirs)
	j0 := int(fd)
	if j0 >= g.Dirs {
		j0, fd = 0, 0
	}
	tb := fd - float64(j0)
	j1 := j0 + 1
	if j1 == g.Dirs {
		j1 = 0
	}
	r0, r1 := i0*g.Dirs, (i0+1)*g.Dirs
	a, b, c, d := g.Values[r0+j0], g.Values[r0+j1], g.Values[r1+j0], g.Values[r1+j1]
	if math.IsInf(a+b+c+d, 1) {
		return math.Inf(1)
	}
	return (1-th)*((1-tb)*a+tb*b) + th*((1-tb)*c+tb*d)
}
