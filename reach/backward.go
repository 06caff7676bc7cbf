package reach

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sync"

	"glidereach/terrain"
)

// Target is a landing field for the backward solver: position in degrees,
// elevation in m MSL, and the height above it (m) the aircraft must still
// have on arrival.
type Target struct {
	Name     string
	Lat, Lon float64
	Elev     float64
	Reserve  float64
}

// RequiredOptions tune a backward reach computation.
type RequiredOptions struct {
	// Clearance is the least height above the terrain (m) the glide keeps
	// on the way. The floor at a point is terrain + min(Clearance, altitude
	// − field elevation), as in Footprint and FinalGlide: over ground
	// higher than the field the least altitude is never below the terrain
	// plus the clearance; within the clearance of the field's elevation,
	// over ground no higher than the field, it tapers to the reserve.
	Clearance float64
	// Ceiling (m MSL) bounds the altitudes computed: cells that would need
	// more are left without a value (NaN). Zero means 6000 m.
	Ceiling float64
	// Workers is the number of goroutines the independent runs are shared
	// among: fields whose reach from the ceiling overlaps are one run, and
	// runs apart from each other go to different workers (see required).
	// The result does not depend on it; 0 means 2.
	Workers int
	// Progress, if not nil, is called now and then with the share done.
	Progress func(done float64)
}

// RequiredResult holds, for every cell of Ground, the least altitude
// (m MSL) from which some target is reached with its reserve, and which
// target that is.
type RequiredResult struct {
	Ground   *terrain.Local
	Targets  []Target
	Required []float32 // m MSL; NaN where no target is reachable below the ceiling
	Best     []int16   // index into Targets; −1 where none
	// Elevation, when not nil, gives the ground elevation at a point for
	// reports (a DEM's own bilinear value), where Ground may hold an
	// obstacle surface (the highest sample per cell) that the solver kept
	// its clearance over. Nil means Ground's own value.
	Elevation func(lat, lon float64) (float64, bool)
}

// ErrNoTargets is returned by Required when no target lies on the ground window.
var ErrNoTargets = errors.New("reach: no landing field lies on the terrain window")

// Required computes, by propagation from the targets with reversed edges
// (lowest required altitude first), the least altitude at every cell from
// which a target is reached with its reserve, the glide staying at least the
// clearance above the terrain, with the loss the aircraft meets flying
// toward the target at the altitude where it is. Paths are any-angle, as in
// Footprint. Targets off the window or on a void are skipped; ErrNoTargets
// if none is left.
func Required(ctx context.Context, ground *terrain.Local, targets []Target, model LossModel, opts RequiredOptions) (*RequiredResult, error) {
	return required(ctx, ground, targets, model, opts, nil, true)
}

// required is Required with a hook that may adjust each propagation before
// it runs; c0, r0 are the cell offset of the propagation's window in ground.
//
// The work is proportional to what is asked: one descent table for the
// model, shared by every run; the targets are grouped into sets whose reach
// discs from the ceiling overlap (a glide from the ceiling down to a target
// covers at most GlideRangeBound of ground, whatever its tracks), and each
// set is one multi-source propagation on the part of the window its discs
// cover. Sets whose discs are apart share no cell below the ceiling, so
// their runs are independent: they are shared among opts.Workers
// goroutines, and the result is the same whatever the number of workers
// (each set's run is the one the whole window would have made: the same
// table, the same queue bounds, the same cells). No two workers sweep the
// same cells.
func required(ctx context.Context, ground *terrain.Local, targets []Target, model LossModel, opts RequiredOptions, hook func(p *propagation, c0, r0 int), merge bool) (*RequiredResult, error) {
	return requiredWith(ctx, ground, targets, model, opts, nil, nil, hook, merge)
}

// requiredWith is required with the descent table pre when it is not nil:
// the table an earlier run with the same ground, targets, model and
// ceiling built (the caller's promise).
//
// clip, when not nil, is called with the table and the source sets before
// the runs, and may narrow the sets' boxes (to cells no other cell's search
// needs: RequiredFrom's cut).
func requiredWith(ctx context.Context, ground *terrain.Local, targets []Target, model LossModel, opts RequiredOptions, pre *descent, clip func(d *descent, sets []*sourceSet), hook func(p *propagation, c0, r0 int), merge bool) (*RequiredResult, error) {
	if ground == nil || ground.Cols < 2 || ground.Rows < 2 {
		return nil, errors.New("reach: backward reach needs a terrain window of at least 2×2 cells")
	}
	if ground.Cols*ground.Rows > maxPropagationCells {
		return nil, errWindowTooLarge
	}
	if len(targets) > math.MaxInt16 {
		return nil, fmt.Errorf("reach: too many landing fields (%d, at most %d)", len(targets), math.MaxInt16)
	}
	ceiling := opts.Ceiling
	if ceiling == 0 {
		ceiling = 6000
	}
	lo := math.Inf(1)
	for _, e := range ground.Elev {
		if e == e && float64(e) < lo {
			lo = float64(e)
		}
	}
	var srcs []source
	fieldElev := make([]float32, len(targets))
	for i, t := range targets {
		fieldElev[i] = float32(t.Elev)
		x, y := ground.Frame.Forward(t.Lat, t.Lon)
		sx, sy := (x-ground.X0)/ground.Cell, (y-ground.Y0)/ground.Cell
		if sx < 0 || sy < 0 || sx > float64(ground.Cols-1) || sy > float64(ground.Rows-1) {
			continue
		}
		if _, ok := ground.Sample(x, y); !ok {
			continue
		}
		srcs = append(srcs, source{X: sx, Y: sy, Alt: t.Elev + t.Reserve, Index: i})
		lo = math.Min(lo, t.Elev)
	}
	if len(srcs) == 0 {
		return nil, ErrNoTargets
	}
	if !(ceiling > lo) {
		return nil, fmt.Errorf("reach: ceiling %.0f m is not above the lowest field or ground (%.0f m)", ceiling, lo)
	}
	d := pre
	var err error
	if d == nil {
		if d, err = newDescentFor(model, lo-10, ceiling+10); err != nil {
			return nil, err
		}
	}
	sets := sourceSets(ground, d, srcs, ceiling)
	if clip != nil {
		clip(d, sets)
	}
	workers := opts.Workers
	if workers <= 0 {
		workers = 2
	}
	n := ground.Cols * ground.Rows
	sc := scratchOf(ctx)
	results := make([]*propagation, len(sets))
	var mu sync.Mutex
	closed := make([]int, len(sets))
	work := 0
	for _, st := range sets {
		work += st.cells()
	}
	err = forTargets(ctx, len(sets), workers, func(k int) error {
		st := sets[k]
		sub, owns := ground, false
		if st.c0 != 0 || st.r0 != 0 || st.c1 != ground.Cols-1 || st.r1 != ground.Rows-1 {
			sub, owns = cropScratch(sc, ground, st.c0, st.r0, st.c1, st.r1), true
		}
		p := newPropagation(sub, d, true, sc)
		p.ownsGround = owns
		p.clearance = float32(opts.Clearance)
		p.ceiling = ceiling
		p.fieldElev = fieldElev
		p.srcs = make([]source, len(st.srcs))
		for j, s := range st.srcs {
			s.X -= float64(st.c0)
			s.Y -= float64(st.r0)
			p.srcs[j] = s
		}
		// The queue's bounds are the whole window's, so the run is the one
		// the whole window would have made.
		p.initQueue(lo-20, ceiling+20, bucketWidth(ground.Cell, d))
		for j := range p.srcs {
			p.seed(j)
		}
		if hook != nil {
			hook(p, st.c0, st.r0)
		}
		var prog func(int)
		if opts.Progress != nil {
			prog = func(c int) {
				mu.Lock()
				closed[k] = c
				t := 0
				for _, x := range closed {
					t += x
				}
				mu.Unlock()
				opts.Progress(math.Min(1, float64(t)/float64(work)))
			}
		}
		if err := p.run(ctx, prog); err != nil {
			return err
		}
		// Keep only what the merge needs.
		p.queue = nil
		results[k] = p
		return nil
	})
	if err != nil {
		return nil, err
	}
	if !merge {
		return &RequiredResult{Ground: ground, Targets: targets}, nil
	}
	res := &RequiredResult{Ground: ground, Targets: targets, Best: make([]int16, n)}
	if len(sets) == 1 && results[0].l == ground {
		res.Required = results[0].val
		for i, v := range res.Required {
			res.Best[i] = -1
			if v == v {
				res.Best[i] = int16(results[0].c[i].src())
			}
		}
		sc.recPool().put(results[0].c) // the values are the result's
		return res, nil
	}
	res.Required = make([]float32, n)
	nan := float32(math.NaN())
	for i := range res.Required {
		res.Required[i], res.Best[i] = nan, -1
	}
	// Sets reach disjoint cells below the ceiling; where their boxes
	// overlap, the lower value wins (the earlier set on a tie), so the
	// merge does not depend on the order the runs finished in.
	for k, st := range sets {
		p := results[k]
		cols := st.c1 - st.c0 + 1
		for r := st.r0; r <= st.r1; r++ {
			row := p.val[(r-st.r0)*cols : (r-st.r0+1)*cols]
			for j, v := range row {
				if v != v {
					continue
				}
				i := r*ground.Cols + st.c0 + j
				if cv := res.Required[i]; cv != cv || v < cv {
					res.Required[i] = v
					res.Best[i] = int16(p.c[(r-st.r0)*cols+j].src())
				}
			}
		}
		p.release()
	}
	return res, nil
}

// sourceSet is a group of sources whose reach discs overlap, and the box of
// cells (inclusive) their discs cover.
type sourceSet struct {
	srcs           []source
	c0, r0, c1, r1 int
}

func (s *sourceSet) cells() int { return (s.c1 - s.c0 + 1) * (s.r1 - s.r0 + 1) }

// sourceSets groups srcs (positions in cells of ground) into sets whose
// discs — the ground a glide from the ceiling down to the source's altitude
// can cover at most (GlideRangeBound of d), plus a margin of three cells for
// the cells beside a line of sight — overlap, directly or through other
// sources. The sets are in the order of their first source, the sources in
// each in their given order.
func sourceSets(ground *terrain.Local, d *descent, srcs []source, ceiling float64) []*sourceSet {
	const margin = 3
	rad := make([]float64, len(srcs))
	for i, s := range srcs {
		rad[i] = d.rangeBound(ceiling, s.Alt)/ground.Cell + margin
	}
	// Union-find over the pairs of overlapping discs.
	parent := make([]int, len(srcs))
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	for i := range srcs {
		for j := i + 1; j < len(srcs); j++ {
			if math.Hypot(srcs[i].X-srcs[j].X, srcs[i].Y-srcs[j].Y) <= rad[i]+rad[j] {
				a, b := find(i), find(j)
				if a != b {
					parent[max(a, b)] = min(a, b)
				}
			}
		}
	}
	var sets []*sourceSet
	at := map[int]*sourceSet{}
	for i, s := range srcs {
		root := find(i)
		st := at[root]
		c0 := max(0, int(math.Floor(s.X-rad[i])))
		r0 := max(0, int(math.Floor(s.Y-rad[i])))
		c1 := min(ground.Cols-1, int(math.Ceil(s.X+rad[i])))
		r1 := min(ground.Rows-1, int(math.Ceil(s.Y+rad[i])))
		if st == nil {
			st = &sourceSet{c0: c0, r0: r0, c1: c1, r1: r1}
			at[root] = st
			sets = append(sets, st)
		}
		st.srcs = append(st.srcs, s)
		st.c0, st.r0 = min(st.c0, c0), min(st.r0, r0)
		st.c1, st.r1 = max(st.c1, c1), max(st.r1, r1)
	}
	for _, st := range sets {
		// A window needs at least 2×2 cells.
		if st.c1 == st.c0 {
			if st.c1 < ground.Cols-1 {
				st.c1++
			} else {
				st.c0--
			}
		}
		if st.r1 == st.r0 {
			if st.r1 < ground.Rows-1 {
				st.r1++
			} else {
				st.r0--
			}
		}
	}
	return sets
}

// RequiredAt returns the least altitude (m MSL) at a point (degrees), by
// bilinear interpolation of the cells around it (the highest of them where
// one lacks a value), the field it leads to, and ok false off the window or
// where no field is reachable.
func (r *RequiredResult) RequiredAt(lat, lon float64) (alt float64, best int, ok bool) {
	g := r.Ground
	x, y := g.Frame.Forward(lat, lon)
	fx, fy := (x-g.X0)/g.Cell, (y-g.Y0)/g.Cell
	if fx < 0 || fy < 0 || fx > float64(g.Cols-1) || fy > float64(g.Rows-1) {
		return math.NaN(), -1, false
	}
	c, rr := int(fx), int(fy)
	if c >= g.Cols-1 {
		c = g.Cols - 2
	}
	if rr >= g.Rows-1 {
		rr = g.Rows - 2
	}
	tx, ty := fx-float64(c), fy-float64(rr)
	i := rr*g.Cols + c
	v := [4]float32{r.Required[i], r.Required[i+1], r.Required[i+g.Cols], r.Required[i+g.Cols+1]}
	b := [4]int16{r.Best[i], r.Best[i+1], r.Best[i+g.Cols], r.Best[i+g.Cols+1]}
	return bilinearRequired(v, b, tx, ty)
}

// bilinearRequired interpolates the least altitudes v of the four cells
// (c, r), (c+1, r), (c, r+1), (c+1, r+1) at weights tx, ty toward the
// second column and row; NaN where a cell of positive weight has no value.
// best is the field of the cell of largest weight.
func bilinearRequired(v [4]float32, bestOf [4]int16, tx, ty float64) (alt float64, best int, ok bool) {
	w := [4]float64{(1 - tx) * (1 - ty), tx * (1 - ty), (1 - tx) * ty, tx * ty}
	sum, bestW := 0.0, -1.0
	best = -1
	for k := range v {
		if v[k] != v[k] {
			if w[k] > 0 {
				return math.NaN(), -1, false
			}
			continue
		}
		sum += float64(v[k]) * w[k]
		if w[k] > bestW {
			bestW = w[k]
			best = int(bestOf[k])
		}
	}
	return sum, best, true
}

// RequiredFrom returns the least altitude (m MSL) at the point lat, lon
// (degrees) from which target is reached with its reserve, by a backward
// propagation from the target that ends as soon as the cells around the
// point are final. ok is false when the target cannot be reached from there
// below the ceiling.
//
// The propagation first runs pruned: a cell whose value v could only lie on
// a glide from the point needing more than T — v + d/E_max > T, with d the
// cell's distance from the point and E_max the table's best ground distance
// per metre of height (no glide loses less) — is not searched, T being the
// straight-line figure from the point plus a margin (the bound of an A*
// search, used as a cut, not as an order: the cells that are searched are
// searched in the same order). The pruned figure is kept when every cell
// around the point closed at a value at least a slack below T (three cells
// of the table's steepest descent plus 10 m, pruneSlackCells: room for the
// neighbours whose lines of sight gave the path its bends); otherwise the propagation runs
// again with a wider margin (pruneMargins; after the tight one, first cut at
// the figure it found, if it found one), and in the end unpruned. TestRequiredFromPrunedEqualsFull checks that the two give
// the same figures.
func RequiredFrom(ctx context.Context, ground *terrain.Local, target Target, model LossModel, opts RequiredOptions, lat, lon float64) (alt float64, ok bool, err error) {
	g := ground
	x, y := g.Frame.Forward(lat, lon)
	fx, fy := (x-g.X0)/g.Cell, (y-g.Y0)/g.Cell
	if fx < 0 || fy < 0 || fx > float64(g.Cols-1) || fy > float64(g.Rows-1) {
		return math.NaN(), false, ErrStartOffGround
	}
	opts.Workers = 1
	var pre *descent
	var bound *displacementBound
	if requiredFromPruned {
		for i, m := range pruneMargins {
			r, err := requiredFromRun(ctx, ground, target, model, opts, fx, fy, m, &pre, &bound)
			if err != nil || r.decided {
				return r.alt, r.ok, err
			}
			if i > 0 || !requiredFromFound || math.IsNaN(r.found) {
				continue
			}
			// The tight cut found a figure but could not vouch for it: no
			// glide from the point needs more than it (a cut only takes
			// paths away), so a cut at that figure holds every glide the
			// wide one would need, in a search the size of the figure's
			// rather than of the wide margin's.
			fm := &pruneMargin{Abs: pruneMargins[len(pruneMargins)-1].Abs, Rel: pruneMargins[len(pruneMargins)-1].Rel, Found: r.found}
			r, err = requiredFromRun(ctx, ground, target, model, opts, fx, fy, fm, &pre, &bound)
			if err != nil || r.decided {
				return r.alt, r.ok, err
			}
		}
	}
	r, err := requiredFromRun(ctx, ground, target, model, opts, fx, fy, nil, &pre, &bound)
	return r.alt, r.ok, err
}

// pruneMargin is a margin above the straight-line figure for a pruned run
// of RequiredFrom: Abs metres plus Rel of the straight figure's height
// above the field. Found, when not zero, is a figure an earlier cut found
// at the point: the cut is then at Found plus the slack, if that is below
// the margin's.
type pruneMargin struct{ Abs, Rel, Found float64 }

// requiredFromFound switches RequiredFrom's second cut at the figure the
// first one found (tests turn it off to compare).
var requiredFromFound = true

// fromRun is what one propagation of RequiredFrom gives: the figure at the
// point (alt, ok), whether the run vouches for it (decided), and the
// highest value of the point's cells when all of them closed (found; NaN
// otherwise).
type fromRun struct {
	alt, found float64
	ok         bool
	decided    bool
}

// pruneMargins are the margins RequiredFrom tries in turn before the
// unpruned run: a tight one (most glides need little more than the straight
// line), then wider ones for detours, each about 2.5 times the one before
// (a search's cost grows with its margin, so a run that fails costs a
// fraction of the next: a glide needing just more than the tight margin no
// longer pays for the widest one; in the demo sailplane's seven fields the
// one that missed the tight margin closed 252 k cells instead of 486 k).
var pruneMargins = []*pruneMargin{{Abs: 40, Rel: 0.05}, {Abs: 100, Rel: 0.12}, {Abs: 250, Rel: 0.3}}
var pruneSlackCells = 3.0

// requiredFromPruned switches RequiredFrom's pruned first run (tests turn
// it off to compare).
var requiredFromPruned = true

// requiredFromRun is one propagation of RequiredFrom for the point (fx, fy)
// (cell units of ground), pruned or not; decided is false when a pruned run
// cannot vouch for its figure (RequiredFrom then runs unpruned).
//
// pre and bound carry the descent table and its displacement bound from
// one run to the next (the same for every run of one RequiredFrom).
func requiredFromRun(ctx context.Context, ground *terrain.Local, target Target, model LossModel, opts RequiredOptions, fx, fy float64, prune *pruneMargin, pre **descent, bound **displacementBound) (res fromRun, err error) {
	g := ground
	c0, r0 := min(int(fx), g.Cols-2), min(int(fy), g.Rows-2)
	need := []int{r0*g.Cols + c0, r0*g.Cols + c0 + 1, (r0+1)*g.Cols + c0, (r0+1)*g.Cols + c0 + 1}
	// The run's values are read at the point's four cells only (as
	// RequiredAt does), not merged into a raster of the whole window.
	var run *propagation
	var rc0, rr0 int
	var in []int
	beyond, allClosed := false, false
	cut, slack, limit := false, 0.0, 0.0
	clip := func(d *descent, sets []*sourceSet) {
		*pre = d
		if prune == nil || len(sets) != 1 || len(sets[0].srcs) != 1 {
			return
		}
		st, src := sets[0], sets[0].srcs[0]
		// The straight-line figure at the point's cells (as segment).
		straight := math.Inf(-1)
		for _, q := range need {
			c, r := q%g.Cols, q/g.Cols
			dx, dy := float64(c)-src.X, float64(r)-src.Y
			straight = math.Max(straight, d.departVec(src.Alt, -dx, -dy, math.Hypot(dx, dy)*g.Cell))
		}
		worst := d.minRatio()
		if math.IsInf(straight, 0) || math.IsNaN(straight) || !(worst > 0) {
			return // no bound to cut with: the run is the uncut one
		}
		slack = pruneSlackCells*g.Cell/worst + 10
		if slack > 500 {
			return
		}
		if *bound == nil {
			*bound = newDisplacementBound(d)
		}
		b := *bound
		limit = straight + prune.Abs + prune.Rel*math.Max(straight-src.Alt, 0) + slack
		if prune.Found != 0 {
			limit = math.Min(limit, prune.Found+slack)
		}
		// Every searched cell q has B(q − point) ≤ limit − base and
		// B(field − q) ≤ limit − base (its value is at least the field's
		// base plus the bound of the glide from q to the field): the
		// intersection of two boxes, three cells wider for the cells
		// beside the lines of sight.
		H := (limit - src.Alt) / g.Cell
		const pad = 3
		c0 := int(math.Floor(math.Max(fx+H*b.minX, src.X-H*b.maxX))) - pad
		c1 := int(math.Ceil(math.Min(fx+H*b.maxX, src.X-H*b.minX))) + pad
		r0 := int(math.Floor(math.Max(fy+H*b.minY, src.Y-H*b.maxY))) - pad
		r1 := int(math.Ceil(math.Min(fy+H*b.maxY, src.Y-H*b.minY))) + pad
		c0, r0 = max(c0, st.c0, 0), max(r0, st.r0, 0)
		c1, r1 = min(c1, st.c1, g.Cols-1), min(r1, st.r1, g.Rows-1)
		for _, q := range need { // the point's cells stay in
			c, r := q%g.Cols, q/g.Cols
			c0, c1, r0, r1 = min(c0, c), max(c1, c), min(r0, r), max(r1, r)
		}
		if c1-c0 < 1 || r1-r0 < 1 {
			return
		}
		st.c0, st.r0, st.c1, st.r1 = c0, r0, c1, r1
		cut = true
	}
	_, err = requiredWith(ctx, ground, []Target{target}, model, opts, *pre, clip, func(p *propagation, wc0, wr0 int) {
		run, rc0, rr0 = p, wc0, wr0
		// The point's cells in the run's window; those outside it are
		// beyond reach from the ceiling and never close.
		for _, q := range need {
			c, r := q%g.Cols-wc0, q/g.Cols-wr0
			if c >= 0 && r >= 0 && c < p.cols && r < p.rows {
				in = append(in, r*p.cols+c)
			} else if g.Elev[q] == g.Elev[q] {
				// Beyond any glide from the ceiling: the point is out of
				// reach, which the run would find only at its end.
				beyond = true
				p.stop = func(int) bool { return true }
				return
			}
		}
		p.stop = func(_ int) bool {
			for _, q := range in {
				if p.c[q].st() != cellClosed && p.l.Elev[q] == p.l.Elev[q] {
					return false
				}
			}
			allClosed = true
			return true
		}
		if cut {
			p.pruneOn, p.pruneX, p.pruneY = true, fx-float64(wc0), fy-float64(wr0)
			p.pruneB, p.pruneT = *bound, limit
		}
	}, false)
	if err != nil {
		return fromRun{alt: math.NaN(), found: math.NaN()}, err
	}
	var v [4]float32
	for k, q := range need {
		c, r := q%g.Cols-rc0, q/g.Cols-rr0
		v[k] = float32(math.NaN())
		if c >= 0 && r >= 0 && c < run.cols && r < run.rows {
			v[k] = run.val[r*run.cols+c]
		}
	}
	decided := true
	if prune != nil && !cut {
		decided = false // nothing to cut with: the uncut run decides
	}
	found := math.NaN()
	if cut && !beyond {
		decided = allClosed
		if allClosed {
			found = math.Inf(-1)
		}
		for _, q := range in {
			if run.l.Elev[q] != run.l.Elev[q] {
				continue
			}
			if !(float64(run.val[q]) <= run.pruneT-slack) {
				decided = false
			}
			found = math.Max(found, float64(run.val[q])) // (NaN stays NaN)
		}
		if math.IsInf(found, -1) {
			found = math.NaN()
		}
	}
	if run != nil {
		run.release()
	}
	a, _, ok := bilinearRequired(v, [4]int16{}, fx-float64(c0), fy-float64(r0))
	return fromRun{alt: a, found: found, ok: ok, decided: decided}, nil
}

// RequiredForward returns the least start altitude (m MSL) at the point
// (lat, lon) in lo..hi from which a Footprint with opts arrives at target
// with at least its reserve (ArrivalAt ≥ Elev + Reserve), by bisection on
// forward runs until the bracket is narrower than tol metres; the upper end
// is returned, so the forward run from it reaches the field. ok is false
// when even hi does not. It costs one footprint per step and serves to
// settle the cases where the backward solver's figure and the forward one's
// verdict disagree (both searches are near-optimal, not optimal, and may
// bend their paths at different cells).
//
// lo must be above the terrain at the point; the forward solver is assumed
// monotone in the start altitude (a property test checks it).
func RequiredForward(ctx context.Context, ground *terrain.Local, lat, lon float64, target Target, model LossModel, opts FootprintOptions, lo, hi, tol float64) (alt float64, ok bool, err error) {
	if !(hi >= lo) || !(tol > 0) {
		return math.NaN(), false, fmt.Errorf("reach: RequiredForward: bad bracket %g..%g m or tolerance %g m", lo, hi, tol)
	}
	opts.Reserve = target.Reserve
	reaches := func(h float64) (bool, error) {
		f, err := Footprint(ctx, ground, Start{Lat: lat, Lon: lon, Alt: h}, model, opts)
		if err != nil {
			return false, err
		}
		a, ok := f.ArrivalAtField(target.Lat, target.Lon, target.Elev)
		return ok && a >= target.Elev+target.Reserve, nil
	}
	r, err := reaches(hi)
	if err != nil || !r {
		return math.NaN(), false, err
	}
	if r, err := reaches(lo); err != nil {
		return math.NaN(), false, err
	} else if r {
		return lo, true, nil
	}
	for hi-lo > tol {
		mid := (lo + hi) / 2
		r, err := reaches(mid)
		if err != nil {
			return math.NaN(), false, err
		}
		if r {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi, true, nil
}
