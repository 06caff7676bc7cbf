package reach

import (
	"fmt"
	"math"
	"runtime"
	"sync"
)

// Table grid of NewTable.
const (
	TableBand       = 50.0 // m, altitude spacing of the table nodes
	TableDirections = 360  // track directions, evenly spaced from north
)

// Table is a precomputed speed-to-fly table over altitude bands × track
// directions, read with bilinear interpolation. It implements LossModel and
// is safe for concurrent reads.
//
// Interpolation error: density changes by about 0.5 % per 50 m and the wind
// components vary with the cosine of the track, so the interpolated loss is
// within 0.1 % of a direct optimisation (tested) except close to no headway,
// where the loss grows without bound; there any corner without headway makes
// the interpolated loss +Inf (conservative).
type Table struct {
	tableGrid
	loss []float64    // nh × nd, row = altitude node
	stf  []SpeedToFly // same layout
	best float64
}

// NewTable computes the speed-to-fly table for ac in the atmosphere atm and
// wind field wind (nil = still air) under conditions c, for altitudes
// hMin..hMax (m MSL, nodes every TableBand metres or closer so both ends are
// nodes) and TableDirections track directions. Queries outside hMin..hMax
// use the nearest end. The rows are computed on all cores (GOMAXPROCS); the
// result does not depend on it. It fails when the aircraft or the conditions are
// invalid or the altitude range is empty or outside −5000..20000 m.
func NewTable(ac *Aircraft, atm Atmosphere, wind WindField, c Conditions, hMin, hMax float64) (*Table, error) {
	if ac == nil {
		return nil, fmt.Errorf("reach: NewTable: no aircraft")
	}
	if err := ac.Validate(); err != nil {
		return nil, err
	}
	if err := ac.Check(c); err != nil {
		return nil, err
	}
	if !(hMin >= -5000 && hMax <= 20000 && hMax >= hMin) {
		return nil, fmt.Errorf("reach: table altitude range %v..%v m is empty or outside -5000..20000 m", hMin, hMax)
	}
	nh := int(math.Ceil((hMax-hMin)/TableBand)) + 1
	if nh < 2 {
		nh = 2
	}
	t := &Table{tableGrid: tableGrid{hMin: hMin, hMax: hMax, dh: (hMax - hMin) / float64(nh-1), nh: nh, nd: TableDirections}}
	if t.dh == 0 {
		t.dh = 1 // a single altitude: both rows are equal
	}
	t.loss = make([]float64, nh*t.nd)
	t.stf = make([]SpeedToFly, nh*t.nd)
	// Rows are independent: build them on all cores (results do not depend
	// on the split).
	row := func(i int) {
		h := hMin + float64(i)*t.dh
		rho := atm.Density(h)
		r := t.stf[i*t.nd : (i+1)*t.nd]
		if wind == nil {
			s := ac.SpeedToFly(rho, 0, 0, c)
			for j := range r {
				r[j] = s
			}
		} else {
			for j := range r {
				along, cross := wind.Components(h, float64(j)*360/float64(t.nd))
				r[j] = ac.SpeedToFly(rho, along, cross, c)
			}
		}
	}
	workers := min(runtime.GOMAXPROCS(0), (nh+7)/8)
	if workers <= 1 {
		for i := 0; i < nh; i++ {
			row(i)
		}
	} else {
		var wg sync.WaitGroup
		for w := 0; w < workers; w++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for i := w; i < nh; i += workers {
					row(i)
				}
			}()
		}
		wg.Wait()
	}
	for k, s := range t.stf {
		t.loss[k] = s.Loss
		if s.GroundRatio > t.best {
			t.best = s.GroundRatio
		}
	}
	return t, nil
}

// tableGrid is the altitude × track lattice of a speed-to-fly table: nh
// altitude rows every dh metres from hMin to hMax, nd track columns evenly
// spaced from north. Table and the final glide's lazily filled trackTable
// share it.
type tableGrid struct {
	hMin, hMax, dh float64
	nh, nd         int
}

// cell locates (h, bearing) in the grid: row i0 and i0+1 with weight th on
// the upper one, columns j0 and j1 with weight tb on j1.
func (t *tableGrid) cell(h, bearing float64) (i0 int, th float64, j0, j1 int, tb float64, ok bool) {
	if math.IsNaN(h) || math.IsNaN(bearing) || math.IsInf(bearing, 0) {
		return 0, 0, 0, 0, 0, false
	}
	fh := (math.Max(t.hMin, math.Min(t.hMax, h)) - t.hMin) / t.dh
	i0 = int(fh)
	if i0 > t.nh-2 {
		i0 = t.nh - 2
	}
	th = fh - float64(i0)
	fd := math.Mod(bearing/(2*math.Pi), 1)
	if fd < 0 {
		fd++
	}
	fd *= float64(t.nd)
	j0 = int(fd)
	if j0 >= t.nd {
		j0 = 0
		fd = 0
	}
	tb = fd - float64(j0)
	j1 = j0 + 1
	if j1 == t.nd {
		j1 = 0
	}
	return i0, th, j0, j1, tb, true
}

// Loss returns the interpolated height lost per metre over the ground at
// altitude h (m MSL) on track bearing (radians clockwise from north); +Inf
// when a surrounding node has no headway or an argument is NaN.
func (t *Table) Loss(h, bearing float64) float64 {
	i0, th, j0, j1, tb, ok := t.cell(h, bearing)
	if !ok {
		return math.Inf(1)
	}
	r0, r1 := i0*t.nd, (i0+1)*t.nd
	a, b, c, d := t.loss[r0+j0], t.loss[r0+j1], t.loss[r1+j0], t.loss[r1+j1]
	if math.IsInf(a+b+c+d, 1) {
		return math.Inf(1)
	}
	return (1-th)*((1-tb)*a+tb*b) + th*((1-tb)*c+tb*d)
}

// At returns the interpolated speed-to-fly at altitude h (m MSL) on track
// bearing (radians clockwise from north), for reports: IAS, TAS, ground
// speed, sink and loss interpolated bilinearly, GroundRatio = 1/Loss, Clamp
// from the nearest node, NoHeadway when any surrounding node has none.
func (t *Table) At(h, bearing float64) SpeedToFly {
	i0, th, j0, j1, tb, ok := t.cell(h, bearing)
	if !ok {
		return SpeedToFly{Loss: math.Inf(1), NoHeadway: true}
	}
	r0, r1 := i0*t.nd, (i0+1)*t.nd
	n := [4]*SpeedToFly{&t.stf[r0+j0], &t.stf[r0+j1], &t.stf[r1+j0], &t.stf[r1+j1]}
	wt := [4]float64{(1 - th) * (1 - tb), (1 - th) * tb, th * (1 - tb), th * tb}
	var s SpeedToFly
	best := 0
	for k, p := range n {
		s.IAS += wt[k] * p.IAS
		s.TAS += wt[k] * p.TAS
		s.GroundSpeed += wt[k] * p.GroundSpeed
		s.Sink += wt[k] * p.Sink
		s.NoHeadway = s.NoHeadway || p.NoHeadway
		if wt[k] > wt[best] {
			best = k
		}
	}
	s.Clamp = n[best].Clamp
	s.Loss = t.Loss(h, bearing)
	if s.NoHeadway || math.IsInf(s.Loss, 1) {
		s.NoHeadway, s.Loss, s.GroundRatio = true, math.Inf(1), 0
		return s
	}
	s.GroundRatio = 1 / s.Loss
	return s
}

// BestDownwindRatio returns the largest ground glide ratio G/(w + s) over
// all nodes of the table (all altitudes and directions); a solver sizes its
// search window with it (range ≤ height × ratio).
func (t *Table) BestDownwindRatio() float64 { return t.best }

// Range returns the altitude range (m MSL) of the table.
func (t *Table) Range() (hMin, hMax float64) { return t.hMin, t.hMax }
