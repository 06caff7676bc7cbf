package reach

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"sync"

	"github.com/paulmach/orb"

	"glidereach/terrain"
)

// CoverageOptions tune Coverage. Alt is required; the zero value of the
// others is the default stated on each.
type CoverageOptions struct {
	// Alt is the altitude flown over the area, m MSL; or, when AGL is
	// true, the height above the terrain at each cell, m.
	Alt float64
	AGL bool
	// AGLGround, with AGL, is the ground the height flown is measured from,
	// laid out like Ground.Elev (a DEM's bilinear surface, where Ground
	// holds the higher obstacle surface the glides keep their clearance
	// over); nil means Ground.Elev.
	AGLGround []float32
	// Also are further loss models the result must hold in too (the other
	// winds of a wind-uncertainty set): per target and cell the least
	// altitude is the highest over model and Also, so a cell counts as
	// covered only when the target is in reach in every one of them.
	Also []LossModel
	// Clearance is the least height above the terrain (m) the glide keeps
	// on the way (as in RequiredOptions).
	Clearance float64
	// Mask marks the cells of the window that belong to the area analysed
	// (laid out like Ground.Elev); nil means every cell. Cells outside it
	// are still flown over; they are only not counted.
	Mask []bool
	// Margin is how far above the highest altitude flown (m) the least
	// altitudes are computed, so the covered boundary is interpolated
	// between cells that both have a value. 0 means 300 m.
	Margin float64
	// Workers is the number of goroutines the fields are shared among; 0
	// means 2.
	Workers int
	// Progress, if not nil, is called now and then with the share done.
	Progress func(done float64)
}

// CoverageResult is the outcome of Coverage: which cells of the area have a
// field in reach, with its reserve, from the altitude flown.
type CoverageResult struct {
	Ground  *terrain.Local
	Targets []Target
	Opts    CoverageOptions
	// Least is the least altitude (m MSL) from which some target is
	// reached with its reserve, per cell (min over the targets); NaN where
	// none is reachable from below Ceiling.
	Least []float32
	// Best is the target Least leads to; −1 where none.
	Best []int16
	// Count is the number of targets that cover each cell (reached from the
	// altitude flown), saturating at 255.
	Count []uint8
	// Ceiling is the highest altitude searched, m MSL: the highest altitude
	// flown plus the margin.
	Ceiling float64
	// ZoneCells and CoveredCells count the cells of the area and those of
	// them covered by at least one target; CellArea is one cell's area in
	// the solver's tangent plane (Cell², m²).
	ZoneCells, CoveredCells int
	CellArea                float64
	// Areas gives each cell's area on the WGS84 ellipsoid (m²;
	// terrain.CellAreas); ZoneArea and CoveredArea are the sums over the
	// zone's cells and its covered cells. Every area and share below is
	// counted with these ellipsoidal cell areas, not with CellArea.
	Areas                 *terrain.CellAreas
	ZoneArea, CoveredArea float64
	// CoveredFraction is CoveredArea / ZoneArea (0 for an empty area).
	CoveredFraction float64
	// Covers[i] is the area (m²) of the zone target i covers, alone or with
	// others; Exclusive[i] the part no other target covers. A target off
	// the window or on a void covers nothing (Skipped[i] is true).
	Covers, Exclusive []float64
	Skipped           []bool
}

// altAt returns the altitude flown over cell i, m MSL (NaN on a void with AGL).
func (c *CoverageResult) altAt(i int) float64 {
	if c.Opts.AGL {
		if c.Opts.AGLGround != nil {
			return float64(c.Opts.AGLGround[i]) + c.Opts.Alt
		}
		return float64(c.Ground.Elev[i]) + c.Opts.Alt
	}
	return c.Opts.Alt
}

// inZone reports whether cell i counts.
func (c *CoverageResult) inZone(i int) bool { return c.Opts.Mask == nil || c.Opts.Mask[i] }

// Covered reports whether cell i has a target in reach from the altitude flown.
func (c *CoverageResult) Covered(i int) bool { return c.Count[i] > 0 }

// Coverage computes which cells of ground have a landing field in reach,
// with its reserve, from the altitude flown (opts.Alt MSL, or opts.Alt above
// the terrain at each cell when opts.AGL): cell i is covered by target t when
// the least altitude to reach t from i (the backward solver, Required, run
// for t alone on a sub-window around it of the reach radius from the
// ceiling) is at most the altitude flown there. Per cell it keeps the least
// altitude over all targets and the best target, and counts the targets
// that cover it, from which come the covered share of the zone and, per
// target, the area it covers and the area only it covers.
//
// Targets are shared among opts.Workers goroutines. ErrNoTargets when no
// target lies on the window.
func Coverage(ctx context.Context, ground *terrain.Local, targets []Target, model LossModel, opts CoverageOptions) (*CoverageResult, error) {
	if ground == nil || ground.Cols < 2 || ground.Rows < 2 {
		return nil, errors.New("reach: coverage needs a terrain window of at least 2×2 cells")
	}
	n := ground.Cols * ground.Rows
	if opts.AGLGround != nil && len(opts.AGLGround) != n {
		return nil, fmt.Errorf("reach: coverage AGL ground has %d cells, the window %d", len(opts.AGLGround), n)
	}
	if opts.Mask != nil && len(opts.Mask) != n {
		return nil, fmt.Errorf("reach: coverage mask has %d cells, the window %d", len(opts.Mask), n)
	}
	if len(targets) > math.MaxInt16 {
		return nil, fmt.Errorf("reach: too many landing fields (%d, at most %d)", len(targets), math.MaxInt16)
	}
	if opts.Margin <= 0 {
		opts.Margin = 300
	}
	if opts.Workers <= 0 {
		opts.Workers = 2
	}
	top := opts.Alt
	if opts.AGL {
		top = math.Inf(-1)
		for _, e := range ground.Elev {
			if e == e {
				top = math.Max(top, float64(e))
			}
		}
		top += opts.Alt
	}
	if math.IsNaN(top) || math.IsInf(top, 0) {
		return nil, errors.New("reach: coverage: no altitude flown (all voids?)")
	}
	c := &CoverageResult{Ground: ground, Targets: targets, Opts: opts, Ceiling: top + opts.Margin}
	c.Least = make([]float32, n)
	c.Best = make([]int16, n)
	c.Count = make([]uint8, n)
	nan := float32(math.NaN())
	for i := range c.Least {
		c.Least[i], c.Best[i] = nan, -1
	}
	c.Covers = make([]float64, len(targets))
	c.Exclusive = make([]float64, len(targets))
	c.Skipped = make([]bool, len(targets))
	c.CellArea = ground.Cell * ground.Cell
	c.Areas = ground.CellAreas()

	var mu sync.Mutex
	var firstErr error
	done := 0
	found := false
	err := forTargets(ctx, len(targets), opts.Workers, func(k int) error {
		fr, covers, err := c.fieldCover(ctx, targets[k], append([]LossModel{model}, opts.Also...))
		mu.Lock()
		defer mu.Unlock()
		done++
		if opts.Progress != nil {
			opts.Progress(float64(done) / float64(len(targets)))
		}
		if errors.Is(err, ErrNoTargets) {
			c.Skipped[k] = true
			return nil
		}
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			return err
		}
		found = true
		c.Covers[k] = covers
		// Merged straight from the target's raster, cell by cell in the
		// raster's order (a list of its reached cells and their values, 8
		// bytes per cell, was the largest transient of the run).
		fr.each(c.Ground.Cols, func(i int, v float32) {
			if cv := c.Least[i]; cv != cv || v < cv {
				c.Least[i], c.Best[i] = v, int16(k)
			}
			if float64(v) <= c.altAt(i) {
				if c.Count[i] < 255 {
					c.Count[i]++
				}
			}
		})
		return nil
	})
	if firstErr != nil {
		return nil, firstErr
	}
	if err != nil {
		return nil, err
	}
	if !found {
		return nil, ErrNoTargets
	}
	c.countZone()
	return c, nil
}

// countZone counts the zone's cells and covered cells, sums their
// ellipsoidal areas and the exclusive area of each target, and sets the
// covered fraction. It sets Areas when missing.
func (c *CoverageResult) countZone() {
	if c.Areas == nil {
		c.Areas = c.Ground.CellAreas()
	}
	c.ZoneCells, c.CoveredCells, c.ZoneArea, c.CoveredArea = 0, 0, 0, 0
	cols := c.Ground.Cols
	for r := 0; r < c.Ground.Rows; r++ {
		for cc := 0; cc < cols; cc++ {
			i := r*cols + cc
			if !c.inZone(i) {
				continue
			}
			a := c.Areas.AtCell(cc, r)
			c.ZoneCells++
			c.ZoneArea += a
			if c.Count[i] > 0 {
				c.CoveredCells++
				c.CoveredArea += a
			}
			// Where one target alone covers a cell it is the cell's Best:
			// its least altitude is at most the altitude flown there and
			// every other target's is above it or none (an equal one would
			// cover the cell too), so it is the strict least. (A per-cell
			// array of the last target to cover, 2 B/cell, was dropped for
			// this.)
			if c.Count[i] == 1 && c.Best[i] >= 0 {
				c.Exclusive[c.Best[i]] += a
			}
		}
	}
	c.CoveredFraction = 0
	if c.ZoneArea > 0 {
		c.CoveredFraction = c.CoveredArea / c.ZoneArea
	}
}

// NewEmptyCoverage is the coverage of ground when no target lies on it:
// nothing is covered, the zone (opts.Mask, nil for every cell) is counted
// with its ellipsoidal area, and each of the nTargets targets is Skipped.
func NewEmptyCoverage(ground *terrain.Local, opts CoverageOptions, nTargets int) *CoverageResult {
	n := ground.Cols * ground.Rows
	c := &CoverageResult{Ground: ground, Opts: opts, Least: make([]float32, n), Best: make([]int16, n), Count: make([]uint8, n),
		CellArea: ground.Cell * ground.Cell, Covers: make([]float64, nTargets), Exclusive: make([]float64, nTargets), Skipped: make([]bool, nTargets)}
	for i := range c.Least {
		c.Least[i], c.Best[i] = float32(math.NaN()), -1
	}
	for i := range c.Skipped {
		c.Skipped[i] = true
	}
	c.countZone()
	return c
}

// forTargets runs fn(k) for k in 0..n−1 on w goroutines, stopping at the
// first error or when ctx is done.
func forTargets(ctx context.Context, n, w int, fn func(k int) error) error {
	if w > n {
		w = n
	}
	next := make(chan int)
	var wg sync.WaitGroup
	var once sync.Once
	var first error
	stop := make(chan struct{})
	for g := 0; g < w; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range next {
				if err := fn(k); err != nil {
					once.Do(func() { first = err; close(stop) })
				}
			}
		}()
	}
loop:
	for k := 0; k < n; k++ {
		select {
		case next <- k:
		case <-stop:
			break loop
		case <-ctx.Done():
			once.Do(func() { first = ctx.Err(); close(stop) })
			break loop
		}
	}
	close(next)
	wg.Wait()
	return first
}

// fieldRaster is one target's least altitudes (m MSL) on its part of the
// window: rows r0..r0+rows−1 and columns c0..c0+cols−1 of Ground, row by
// row; NaN where the target is out of reach from below the ceiling. A nil
// *fieldRaster holds no cell.
type fieldRaster struct {
	c0, r0, cols, rows int
	v                  []float32
}

// each calls fn with the window index (gcols: the window's columns) and
// the value of every cell of the raster that has one, row by row.
func (f *fieldRaster) each(gcols int, fn func(i int, v float32)) {
	if f == nil {
		return
	}
	for r := 0; r < f.rows; r++ {
		row := f.v[r*f.cols : (r+1)*f.cols]
		base := (f.r0+r)*gcols + f.c0
		for cc, v := range row {
			if v == v {
				fn(base+cc, v)
			}
		}
	}
}

// fieldCover runs the backward solver for target t alone on the part of the
// window within its reach radius from the ceiling, and returns its least
// altitudes there (the highest over models), and the ellipsoidal area (m²)
// of the zone's cells it covers (value at most the altitude flown). The
// raster is nil when the target covers nothing.
func (c *CoverageResult) fieldCover(ctx context.Context, t Target, models []LossModel) (fr *fieldRaster, covers float64, err error) {
	g := c.Ground
	x, y := g.Frame.Forward(t.Lat, t.Lon)
	fx, fy := (x-g.X0)/g.Cell, (y-g.Y0)/g.Cell
	if fx < 0 || fy < 0 || fx > float64(g.Cols-1) || fy > float64(g.Rows-1) {
		return nil, 0, ErrNoTargets
	}
	if !(c.Ceiling > t.Elev+t.Reserve) {
		// Even over the field the least altitude (its elevation plus the
		// reserve) is above the ceiling: it covers nothing. Not an error —
		// the altitude flown may simply be below the high ground it is on.
		return nil, 0, nil
	}
	radius := 0.0
	for _, m := range models {
		r, err := ReachRadius(m, c.Ceiling, t.Elev+t.Reserve)
		if err != nil {
			return nil, 0, err
		}
		radius = math.Max(radius, r)
	}
	rc := int(math.Ceil(radius/g.Cell)) + 3
	c0, c1 := max(0, int(fx)-rc), min(g.Cols-1, int(fx)+rc+1)
	r0, r1 := max(0, int(fy)-rc), min(g.Rows-1, int(fy)+rc+1)
	sub := g.CropCells(c0, r0, c1, r1)
	var worst []float32
	for _, m := range models {
		res, err := Required(ctx, sub, []Target{t}, m, RequiredOptions{Clearance: c.Opts.Clearance, Ceiling: c.Ceiling, Workers: 1})
		if err != nil {
			return nil, 0, err
		}
		if worst == nil {
			worst = res.Required
			continue
		}
		for i, v := range res.Required {
			if v != v || v > worst[i] { // NaN: out of reach in this model
				worst[i] = v
			}
		}
	}
	fr = &fieldRaster{c0: c0, r0: r0, cols: sub.Cols, rows: sub.Rows, v: worst}
	fr.each(g.Cols, func(i int, v float32) {
		if float64(v) <= c.altAt(i) && c.inZone(i) {
			covers += c.Areas.At(i)
		}
	})
	return fr, covers, nil
}

// Polygons contours the coverage: the covered part of the zone (cells whose
// altitude flown is at least the least altitude) and the uncovered part, as
// lon/lat polygons (see ContourPolygons), with their areas in m². Cells
// outside the zone belong to neither, so both are clipped to the zone to
// within half a cell.
func (c *CoverageResult) Polygons() (covered, uncovered orb.MultiPolygon, coveredArea, uncoveredArea float64) {
	g := c.Ground
	big := 1e4
	margin := func(i int) float64 {
		l := float64(c.Least[i])
		if l != l {
			return -big
		}
		return c.altAt(i) - l
	}
	covered, coveredArea = ContourPolygons(g, func(cc, r int) float64 {
		i := r*g.Cols + cc
		if !c.inZone(i) {
			return math.NaN()
		}
		return margin(i)
	}, 0)
	uncovered, uncoveredArea = ContourPolygons(g, func(cc, r int) float64 {
		i := r*g.Cols + cc
		if !c.inZone(i) {
			return math.NaN()
		}
		m := margin(i)
		if m >= 0 {
			return -m - 1e-3 // strictly below the level where covered
		}
		return -m
	}, 1e-3)
	return covered, uncovered, coveredArea, uncoveredArea
}

// CandidateStep is one step of the greedy choice of candidate fields.
type CandidateStep struct {
	Candidate int     // index into the candidates
	Added     float64 // m² of the zone it adds to what is covered so far
	// CoveredFraction is the covered share of the zone after this step.
	CoveredFraction float64
}

// CandidateRanking is the outcome of CoverageResult.Candidates.
type CandidateRanking struct {
	Candidates []Target
	// Gain[i] is the area of the zone (m²) candidate i alone would add to
	// the existing coverage; Order lists the candidates by falling gain
	// (ties by index).
	Gain  []float64
	Order []int
	// Skipped[i] is true for a candidate off the window or on a void.
	Skipped []bool
	// Steps is the greedy choice: at each step the candidate that adds
	// the most to the coverage so far (the existing fields and the
	// candidates already chosen). It stops after k steps or when no
	// candidate adds anything.
	Steps []CandidateStep
}

// Candidates ranks candidate fields by the area of the zone each would add
// to the coverage c, and chooses up to k of them greedily (each step takes
// the candidate that adds the most given the ones chosen before: the
// standard greedy rule for maximum coverage, within 1 − 1/e of the best
// choice of k; Nemhauser, Wolsey and Fisher 1978). Each candidate is
// computed like a field of Coverage, with the same options.
func (c *CoverageResult) Candidates(ctx context.Context, candidates []Target, model LossModel, k int) (*CandidateRanking, error) {
	rk := &CandidateRanking{Candidates: candidates, Gain: make([]float64, len(candidates)), Skipped: make([]bool, len(candidates))}
	newCells := make([][]int32, len(candidates))
	var mu sync.Mutex
	done := 0
	err := forTargets(ctx, len(candidates), c.Opts.Workers, func(j int) error {
		fr, _, err := c.fieldCover(ctx, candidates[j], append([]LossModel{model}, c.Opts.Also...))
		if errors.Is(err, ErrNoTargets) {
			mu.Lock()
			rk.Skipped[j] = true
			mu.Unlock()
			return nil
		}
		if err != nil {
			return err
		}
		var add []int32
		fr.each(c.Ground.Cols, func(i int, v float32) {
			if float64(v) <= c.altAt(i) && c.inZone(i) && c.Count[i] == 0 {
				add = append(add, int32(i))
			}
		})
		mu.Lock()
		newCells[j] = add
		gain := 0.0
		for _, i := range add {
			gain += c.Areas.At(int(i))
		}
		rk.Gain[j] = gain
		done++
		if c.Opts.Progress != nil {
			c.Opts.Progress(float64(done) / float64(len(candidates)))
		}
		mu.Unlock()
		return nil
	})
	if err != nil {
		return nil, err
	}
	rk.Order = make([]int, len(candidates))
	for i := range rk.Order {
		rk.Order[i] = i
	}
	sort.SliceStable(rk.Order, func(a, b int) bool { return rk.Gain[rk.Order[a]] > rk.Gain[rk.Order[b]] })
	taken := make([]bool, len(c.Count))
	chosen := make([]bool, len(candidates))
	covered := c.CoveredArea
	for step := 0; step < k; step++ {
		best, bestN := -1, 0.0
		for j, cells := range newCells {
			if chosen[j] {
				continue
			}
			nn := 0.0
			for _, i := range cells {
				if !taken[i] {
					nn += c.Areas.At(int(i))
				}
			}
			if nn > bestN {
				best, bestN = j, nn
			}
		}
		if best < 0 {
			break
		}
		chosen[best] = true
		for _, i := range newCells[best] {
			taken[i] = true
		}
		covered += bestN
		frac := 0.0
		if c.ZoneArea > 0 {
			frac = covered / c.ZoneArea
		}
		rk.Steps = append(rk.Steps, CandidateStep{Candidate: best, Added: bestN, CoveredFraction: frac})
	}
	return rk, nil
}
