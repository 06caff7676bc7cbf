package reach

import (
	"math"

	"glidereach/terrain"
)

// The exact line-of-sight test of the any-angle propagation.
//
// A straight glide segment from a bend point P (the parent, value pv) to a
// cell centre Q (value v) is accepted only when the glide keeps the terrain
// floor over every cell square the segment crosses (a supercover: a square
// touched at a corner or along an edge counts), and, where the segment
// crosses a line of cell centres along its major axis, over the ground
// interpolated linearly between the two centres it passes between. The
// ground of a cell is its elevation over its whole square (the terrain
// window holds the highest DEM sample of each cell); a void or a square off
// the window blocks. Both ground models are applied, so the test is at least
// as strict as either.
//
// The squares are visited in order from P to Q, column by column of the
// major axis (a slab of one cell's width, in which the line crosses at most
// three squares): the traversal of
//
//	Amanatides, J. and Woo, A. (1987). A Fast Voxel Traversal Algorithm
//	for Ray Tracing. Eurographics '87, pp. 3–10,
//
// made inclusive at the square boundaries. The glide's altitude along the
// segment is bounded from below without integrating it: forward (the
// aircraft flies P → Q, losing height) at a fraction τ of the way
//
//	h(τ) ≥ max(v + (1−τ)·L·λmin, pv − τ·L·λmax),
//
// backward (it flies Q → P, arriving at P with pv)
//
//	h(τ) ≥ max(pv + τ·L·λmin, v − (1−τ)·L·λmax),
//
// where L is the segment's ground length and λmin, λmax the least and the
// largest height lost per metre of ground at any altitude of the descent
// table's two direction columns the segment is blended from
// (lossRangeDir). Over a square the lowest point of the interval
// the segment spends in it counts (forward its far end, backward its near
// end). Only where that bound fails is the altitude worked out exactly, by
// the descent table over the partial segment (the value the solver would
// give that point). So the test errs only toward refusing a line. Between
// exact altitudes the last one worked out anchors a tighter pair of bounds
// (anchorLow, anchorHigh: from there the glide loses between λmin and λmax
// per metre), which decide most squares where the glide runs low, either
// way, without the table; a square they cannot decide is worked out
// exactly, so the walk decides as it would without them
// (TestSightShortcutsSameDecisions).
//
// A hierarchical pyramid of the ground (groundPyramid: blocks of 8×8, 64×64,
// 512×512 and 4096×4096 cells holding the highest ground of the block and of the cells
// one beyond it, +Inf where any is a void) lets the walk pass a whole run of
// slabs at once where even the lowest bound of the glide over the run
// clears the highest ground of every block the run touches. The walk stops
// at the first obstruction.
// A walk from a source may start part way along its line, where the
// source's fan (fan.go) has found every slab before to pass.
//
// The floor: the glide must be at least terrain + clearance high, except
// over ground no higher than allow (the landing cell's elevation forward for
// an end value, the field's backward), where it may be lower: a square of
// ground t under a glide at altitude h blocks when t > max(h − clearance,
// allow) (DEVELOPERS.md "Reserve and clearance"). A square where
// t > h − clearance but t ≤ allow is passed below the clearance; the highest
// such ground is returned as top (the forward end values' record).

// pyramid levels: block sides 2^3, 2^6, 2^9, 2^12 cells. The 4096 level
// lets a long line that clears everything under it pass in one test (on
// grids of up to 4096 cells across, the whole line's box) instead of one
// per 512-cell block (BenchmarkFootprint2000: 3.7 instead of 4.0 block
// tests a walk; the same decisions, since a passed run of blocks is one
// every square of which the finer levels would pass).
var pyrShifts = [...]uint{3, 6, 9, 12}

// The walk indexes the levels with li&3: there must be four.
var _ = [1]int{}[len(pyrShifts)-4]

// groundPyramid holds, per level, the highest ground (m MSL) of each block
// of cells dilated by one cell on every side (the linear check between
// centres reads the cell beside the line's square), +Inf where any of those
// cells is a void.
type groundPyramid struct {
	lv [len(pyrShifts)]pyrLevel
	// highest is the highest ground of the whole window, +Inf when it
	// holds a void.
	highest float32
	// split is the coarsest level of more than one block (−1: none). A
	// level of one block holds highest alone, and a walk from sightFrom,
	// whose glide aboveAll has found below highest plus the clearance at
	// its lowest end, cannot pass it: sightDir and sightEnd start their
	// walks at split (BenchmarkFootprint2000: one block test fewer a walk).
	// Which blocks a walk tries changes only its cost, never its decision:
	// a passed block is one every square of which the walk would pass.
	split int
}

type pyrLevel struct {
	bc, br int // blocks across and down
	max    []float32
}

// newGroundPyramid builds the pyramid of l: each block of the finest level
// reads its 10×10 cells (about 1.6 reads per cell), each coarser block the
// 8×8 blocks below it.
func newGroundPyramid(l *terrain.Local) *groundPyramid {
	g := &groundPyramid{}
	cols, rows := l.Cols, l.Rows
	inf := float32(math.Inf(1))
	for li, sh := range pyrShifts {
		b := 1 << sh
		bc, br := (cols+b-1)>>sh, (rows+b-1)>>sh
		lv := pyrLevel{bc: bc, br: br, max: make([]float32, bc*br)}
		if li == 0 {
			for by := 0; by < br; by++ {
				r0, r1 := max(by*b-1, 0), min(by*b+b, rows-1)
				for bx := 0; bx < bc; bx++ {
					c0, c1 := max(bx*b-1, 0), min(bx*b+b, cols-1)
					m := float32(math.Inf(-1))
					for r := r0; r <= r1 && m != inf; r++ {
						row := l.Elev[r*cols+c0 : r*cols+c1+1]
						for _, e := range row {
							if e != e {
								m = inf
								break
							}
							m = max(m, e)
						}
					}
					lv.max[by*bc+bx] = m
				}
			}
		} else {
			fine := &g.lv[li-1]
			f := 1 << (sh - pyrShifts[li-1])
			for by := 0; by < br; by++ {
				for bx := 0; bx < bc; bx++ {
					m := float32(math.Inf(-1))
					for y := by * f; y < min(by*f+f, fine.br); y++ {
						for x := bx * f; x < min(bx*f+f, fine.bc); x++ {
							m = max(m, fine.max[y*fine.bc+x])
						}
					}
					lv.max[by*bc+bx] = m
				}
			}
		}
		g.lv[li] = lv
	}
	top := &g.lv[len(pyrShifts)-1]
	g.highest = float32(math.Inf(-1))
	for _, m := range top.max {
		g.highest = max(g.highest, m)
	}
	g.split = -1
	for li := len(pyrShifts) - 1; li >= 0; li-- {
		if g.lv[li].bc*g.lv[li].br > 1 {
			g.split = li
			break
		}
	}
	return g
}

// sightEps makes the traversal inclusive at square boundaries: a line
// within this (cell units) of a boundary counts on both sides.
const sightEps = 1e-9

// sightDir walks the segment from (px, py) (cell units; value pv) to cell
// (qc, qr) (value v) and reports whether the glide on it keeps the floor
// (see the comment at the top of this file), with the highest ground passed
// below the clearance, starting from top. The cell's own square is not
// part of the walk (the caller checks the cell itself). allow is the ground
// level the glide may pass below the clearance over (−Inf: nowhere). fd is
// the segment's direction of flight, worked out once with its value
// (segmentDir, the solver's hot path).
func (p *propagation) sightDir(px, py, pv float64, qc, qr int, v float64, allow, top float32, fd flightDir) (float32, bool) {
	return p.walkLine(px, py, pv, float64(qc), float64(qr), qc, qr, v, allow, top, true, false, p.pyr.split, fd)
}

// sightDirFrom is sightDir from a source, the walk started at slab kStart
// (fanStart: every slab before it passes).
func (p *propagation) sightDirFrom(px, py, pv float64, qc, qr int, v float64, allow, top float32, fd flightDir, kStart int) (float32, bool) {
	return p.sightFromSlab(px, py, pv, qc, qr, v, allow, top, fd, kStart, false)
}

// sightEndFrom is sightEnd from a source, started at slab kStart: ok is
// sightDirFrom's, and top exceeds allow exactly when sightDirFrom's does
// (all that sightEnd's caller asks of it).
func (p *propagation) sightEndFrom(px, py, pv float64, qc, qr int, v float64, allow, top float32, fd flightDir, kStart int) (float32, bool) {
	return p.sightFromSlab(px, py, pv, qc, qr, v, allow, top, fd, kStart, true)
}

// sightFromSlab is the walk of sightDirFrom (loose: sightEndFrom's). The
// start slab is handed to walkLine through the propagation (one run's walks
// are made one at a time) and reset after it. A rest of the line that
// fanEndClear finds clear is not walked.
func (p *propagation) sightFromSlab(px, py, pv float64, qc, qr int, v float64, allow, top float32, fd flightDir, kStart int, loose bool) (float32, bool) {
	if p.fanEndClear(kStart, px, py, pv, qc, qr, v, allow) {
		return top, true
	}
	p.walkStart = kStart
	t, ok := p.walkLine(px, py, pv, float64(qc), float64(qr), qc, qr, v, allow, top, true, loose, p.pyr.split, fd)
	p.walkStart = noWalkStart
	return t, ok
}

// noWalkStart: a walk starts at the parent's slab.
const noWalkStart = math.MinInt

// sightEnd is sightDir for a caller that needs of top only whether it
// exceeds allow (an end value at a cell below its own clearance, whose
// record becomes the cell's ground: offer). Ground no higher than allow can
// then neither block the glide nor make top exceed allow, so the walk
// passes a whole run of blocks no higher than allow without asking where
// the glide is, raising top to their highest ground instead of to the
// highest of the squares it passes below the clearance: ok is sightDir's,
// and top exceeds allow exactly when sightDir's does (top only grows, and
// ground above allow is checked as sightDir checks it).
func (p *propagation) sightEnd(px, py, pv float64, qc, qr int, v float64, allow, top float32, fd flightDir) (float32, bool) {
	return p.walkLine(px, py, pv, float64(qc), float64(qr), qc, qr, v, allow, top, true, true, p.pyr.split, fd)
}

// flightDirOf is the direction of flight of the segment (dx, dy) from a
// parent to a cell (cell units): forward toward the cell, backward toward
// the parent.
func (p *propagation) flightDirOf(dx, dy float64) flightDir {
	var fd flightDir
	if p.backward {
		fd.d0, fd.d1, fd.wt = p.desc.vecIndex(-dx, -dy)
	} else {
		fd.d0, fd.d1, fd.wt = p.desc.vecIndex(dx, dy)
	}
	return fd
}

// sightTo is sight to any point (qx, qy) (cell units), not only a cell
// centre: the end of a field's final segment (arrivalAtCellXY). With
// skipEnd the square holding the end point is left out of the walk (a
// cell's own square, which the solver checks itself); without it every
// square the segment touches is walked, the end point's included.
func (p *propagation) sightTo(px, py, pv, qx, qy float64, v float64, allow, top float32, skipEnd bool) (float32, bool) {
	// The end point's square: the one whose centre is nearest (a point on
	// a square boundary is in the square a cell centre rounds to).
	qc, qr := int(math.Round(qx)), int(math.Round(qy))
	return p.walkLine(px, py, pv, qx, qy, qc, qr, v, allow, top, skipEnd, false, len(pyrShifts)-1, p.flightDirOf(qx-px, qy-py))
}

// walkLine is the walk of sightTo, with the end point's square (qc, qr)
// and the direction of flight fd given; loose is sightEnd's. The walk tries
// the pyramid's levels from first down.
func (p *propagation) walkLine(px, py, pv, qx, qy float64, qc, qr int, v float64, allow, top float32, skipEnd, loose bool, first int, fd flightDir) (float32, bool) {
	dx, dy := qx-px, qy-py
	if dx == 0 && dy == 0 {
		return top, true
	}
	// Fields are set one by one (a composite literal is built in a
	// temporary and copied: twice the stores).
	var w sightWalk
	w.p, w.pv, w.v = p, pv, v
	w.L = math.Hypot(dx, dy) * p.cell
	w.allow, w.top = float64(allow), top
	w.skipEnd, w.loose, w.first = skipEnd, loose, first
	w.kStart = p.walkStart
	w.d0, w.d1, w.wt = fd.d0, fd.d1, fd.wt
	w.lamMin, w.lamMax = p.desc.lossRangeDir(fd.d0, fd.d1)
	if math.Abs(dx) >= math.Abs(dy) {
		w.pa, w.pb, w.da, w.db, w.qa, w.qb = px, py, dx, dy, qc, qr
		w.strA, w.strB, w.nA, w.nB = 1, p.cols, p.cols, p.rows
	} else {
		w.pa, w.pb, w.da, w.db, w.qa, w.qb = py, px, dy, dx, qr, qc
		w.strA, w.strB, w.nA, w.nB, w.swapped = p.cols, 1, p.rows, p.cols, true
	}
	w.sgn, w.half = 1, 0.5
	if w.da < 0 {
		w.sgn, w.half = -1, -0.5
	}
	w.backward, w.finMax = p.backward, !math.IsInf(w.lamMax, 1)
	// (if-forms of min and max: pv is never NaN here, and the builtins'
	// NaN and signed-zero handling costs more than the walk's other set-up)
	if p.backward {
		w.pvBot = pv
		if b := p.desc.hBot; b > pv {
			w.pvBot = b
		}
		w.lowEnd, w.highEnd = pv, v
	} else {
		w.pvTop = pv
		if t := p.desc.hTop; t < pv {
			w.pvTop = t
		}
		w.lowEnd, w.highEnd = v, w.pvTop
	}
	ok := w.run()
	return w.top, ok
}

// sightWalk is the state of one sight call, in major (a) and minor (b)
// axis coordinates.
type sightWalk struct {
	p              *propagation
	pa, pb, da, db float64 // start and extent (cell units)
	qa, qb         int
	sgn            int
	strA, strB     int // index strides of the axes
	nA, nB         int // cells along the axes
	swapped        bool
	skipEnd        bool // the end point's own square is not walked (a cell's)
	first          int  // the coarsest pyramid level tried
	loose          bool // top is asked only whether it exceeds allow (sightEnd)
	pv, v, L       float64
	lamMin, lamMax float64
	allow          float64
	// per-walk constants of the bounds: backward (p.backward), lamMax
	// finite, half = ±0.5 (the slab's half width toward the walk), and the
	// start altitudes of lowBound's and highBound's steep terms
	backward, finMax bool
	half             float64
	pvTop, pvBot     float64
	// lowBound's ends: forward v and pvTop, backward pv and v
	lowEnd, highEnd float64
	top             float32
	// the descent table's columns of the direction of flight (vecIndex)
	d0, d1 int
	wt     float64
	// the current slab's lowest end (fraction) and the lower bound and
	// exact altitude there (slabEx NaN until needed)
	slabTau, slabLB, slabEx float64
	// the last exact altitude worked out (ancH at fraction ancTau; ancOK
	// once there is one): the anchor of anchorLow
	ancTau, ancH float64
	ancOK        bool
	// kStart is the slab the walk starts at (noWalkStart: the parent's)
	kStart int
}

// sightAnchored switches the walk's anchored bound (anchorLow) on; tests
// turn it off to check that the walk decides the same without it.
var sightAnchored = true

// anchorEps (m) is taken off anchorLow before it is trusted: far above the
// rounding of the descent table's arithmetic (about 1e-9 m at the
// altitudes and distances of a table), so a test the anchored bound passes
// is one the exact altitude passes too.
const anchorEps = 1e-6

// anchorLow is a lower bound of the glide's altitude at fraction tau from
// the last exact altitude worked out on the segment (ancH at ancTau), −Inf
// when there is none: the glide loses between λmin and λmax per metre of
// ground (lossRangeDir), so forward
//
//	h(τ) ≥ ancH − (τ − ancTau)·L·λmax   for τ ≥ ancTau,
//	h(τ) ≥ ancH + (ancTau − τ)·L·λmin   for τ < ancTau,
//
// and backward (the altitude needed grows with τ) the mirror. lowBound is
// the same bound anchored at the segment's two ends; anchored at the last
// exact point it is tight over the next few squares, so a walk that goes
// square by square where the glide runs low works out the exact altitude
// only where the ground comes within about a cell's descent of the floor.
func (w *sightWalk) anchorLow(tau float64) float64 {
	if !w.ancOK {
		return math.Inf(-1)
	}
	if w.backward {
		if tau >= w.ancTau {
			return w.ancH + (tau-w.ancTau)*w.L*w.lamMin
		}
		if !w.finMax {
			return math.Inf(-1)
		}
		return w.ancH - (w.ancTau-tau)*w.L*w.lamMax
	}
	if tau < w.ancTau {
		return w.ancH + (w.ancTau-tau)*w.L*w.lamMin
	}
	if !w.finMax {
		return math.Inf(-1)
	}
	return w.ancH - (tau-w.ancTau)*w.L*w.lamMax
}

// anchorHigh is the upper bound mirroring anchorLow (+Inf when there is
// no anchor): forward h(τ) ≤ ancH − (τ − ancTau)·L·λmin for τ ≥ ancTau and
// ≤ ancH + (ancTau − τ)·L·λmax before it; backward the mirror.
func (w *sightWalk) anchorHigh(tau float64) float64 {
	if !w.ancOK {
		return math.Inf(1)
	}
	if w.backward {
		if tau < w.ancTau {
			return w.ancH - (w.ancTau-tau)*w.L*w.lamMin
		}
		if !w.finMax {
			return math.Inf(1)
		}
		return w.ancH + (tau-w.ancTau)*w.L*w.lamMax
	}
	if tau >= w.ancTau {
		return w.ancH - (tau-w.ancTau)*w.L*w.lamMin
	}
	if !w.finMax {
		return math.Inf(1)
	}
	return w.ancH + (w.ancTau-tau)*w.L*w.lamMax
}

// anchorBlocks reports whether ground tf (m MSL) is within the clearance c
// of the glide at fraction tau on anchorHigh alone (the exact altitude
// there would not clear it either).
func (w *sightWalk) anchorBlocks(tf, c, tau float64) bool {
	return sightAnchored && tf > w.anchorHigh(tau)-c+anchorEps
}

// anchorClears reports whether ground tf (m MSL) is cleared by the
// clearance c at fraction tau on anchorLow alone.
func (w *sightWalk) anchorClears(tf, c, tau float64) bool {
	return sightAnchored && tf <= w.anchorLow(tau)-c-anchorEps
}

// lowBound is the lower bound of the glide's altitude at fraction tau:
// the slow term from the lower end (forward v over (1−τ)·L, backward pv
// over τ·L, at λmin) and the steep one from the upper end (forward pvTop
// over τ·L, backward v over (1−τ)·L, at λmax), as the comment at the top of
// this file gives them, in one branch-free form the compiler inlines. (An
// if-form of max: the slow term is finite; where λmax is +Inf the steep one
// is −Inf or NaN and never taken, as with the finMax test it replaces.)
func (w *sightWalk) lowBound(tau float64) float64 {
	slow, steep := 1-tau, tau
	if w.backward {
		slow, steep = tau, 1-tau
	}
	h := w.lowEnd + slow*w.L*w.lamMin
	if s := w.highEnd - steep*w.L*w.lamMax; s > h {
		h = s
	}
	return h
}

// exact is the glide's altitude at fraction tau from the descent table:
// forward the arrival after tau·L from pv, backward the altitude needed
// tau·L before reaching the parent with pv.
//
// A finite altitude at tau > 0 becomes the anchor of anchorLow (at tau 0
// the table's value may differ from pv: a glide from above the table's
// top starts at its top).
func (w *sightWalk) exact(tau float64) float64 {
	if tau <= 0 {
		return w.pv
	}
	d := w.p.desc
	var h float64
	if w.backward {
		h = d.departBlend(w.d0, w.d1, w.wt, w.pv, tau*w.L)
	} else {
		h = d.arriveBlend(w.d0, w.d1, w.wt, w.pv, tau*w.L)
	}
	if !math.IsInf(h, 0) && h == h {
		w.ancTau, w.ancH, w.ancOK = tau, h, true
	}
	return h
}

// tauIn and tauOut bound the fraction of the segment over slab k (the
// major-axis column of cells k).
//
// (if-forms of max and min: the fraction is never NaN, da being the
// segment's major extent, never 0 here, and the builtins' NaN and
// signed-zero handling cost several instructions a call; a −0 in place of
// 0 changes no sum or comparison the walk makes.)
func (w *sightWalk) tauIn(k int) float64 {
	t := (float64(k) - w.half - w.pa) / w.da
	if t < 0 {
		t = 0
	}
	return t
}

func (w *sightWalk) tauOut(k int) float64 {
	t := (float64(k) + w.half - w.pa) / w.da
	if t > 1 {
		t = 1
	}
	return t
}

// squaresOf returns the minor-axis range of squares the segment touches
// over [t0, t1].
func (w *sightWalk) squaresOf(t0, t1 float64) (int, int) {
	b0, b1 := w.pb+t0*w.db, w.pb+t1*w.db
	if b0 > b1 {
		b0, b1 = b1, b0
	}
	return int(math.Ceil(b0 - 0.5 - sightEps)), int(math.Floor(b1 + 0.5 + sightEps))
}

// ground checks ground t under the glide over the fraction interval
// [t0, t1] of a square in the current slab: false when it blocks;
// otherwise it records t in top when the glide passes it below the
// clearance. The slab's lowest bound and exact altitude (at its lowest
// end, slabTau) are tried first, then the square's own lowest point.
func (w *sightWalk) ground(t float32, t0, t1 float64) bool {
	if t <= w.top {
		return true // no higher than ground already passed (top ≤ allow)
	}
	if t != t {
		return false
	}
	c := float64(w.p.clearance)
	tf := float64(t)
	if tf <= w.slabLB-c {
		return true
	}
	tl := t0 // backward the glide is lowest toward the parent
	if !w.backward {
		tl = t1
	}
	if w.slabEx != w.slabEx {
		if w.anchorClears(tf, c, tl) {
			return true
		}
		if w.anchorBlocks(tf, c, tl) {
			// Nor does the exact altitude at the slab's lowest end (no
			// higher than at tl) clear it.
			return w.flag(t)
		}
		w.slabEx = w.exact(w.slabTau)
	}
	if tf <= w.slabEx-c {
		return true
	}
	if tl != w.slabTau && !w.anchorBlocks(tf, c, tl) && (w.anchorClears(tf, c, tl) || tf <= w.exact(tl)-c) {
		return true
	}
	return w.flag(t)
}

// groundAt is ground for a single point at fraction tau.
func (w *sightWalk) groundAt(t float32, tau float64) bool {
	if t <= w.top {
		return true
	}
	c := float64(w.p.clearance)
	tf := float64(t)
	if tf <= w.lowBound(tau)-c || w.anchorClears(tf, c, tau) || !w.anchorBlocks(tf, c, tau) && tf <= w.exact(tau)-c {
		return true
	}
	return w.flag(t)
}

// flag records ground t passed below the clearance, or reports that it
// blocks (above allow).
func (w *sightWalk) flag(t float32) bool {
	if float64(t) > w.allow {
		return false
	}
	w.top = max(w.top, t)
	return true
}

// blockClear reports whether the run of slabs k..kEnd lies over blocks of
// level li whose highest ground the glide's lower bound over the run clears
// (or that lie no higher than top: nothing to record there); where the
// bound does not, the exact altitude at the run's lowest end is tried.
func (w *sightWalk) blockClear(li int, k, kEnd int) bool {
	t0, t1 := w.tauIn(k), w.tauOut(kEnd)
	m0, m1 := w.squaresOf(t0, t1)
	if m0 < 0 || m1 >= w.nB {
		return false
	}
	// (li&3 and &63: no bounds check, no test for a shift of 64 or more;
	// there are four levels, each shift below 64)
	sh := pyrShifts[li&3] & 63
	lv := &w.p.pyr.lv[li&3]
	ka := k >> sh
	bm := float32(math.Inf(-1))
	if w.swapped {
		row := lv.max[ka*lv.bc:]
		for mb := m0 >> sh; mb <= m1>>sh; mb++ {
			bm = max(bm, row[mb])
		}
	} else {
		for mb := m0 >> sh; mb <= m1>>sh; mb++ {
			bm = max(bm, lv.max[mb*lv.bc+ka])
		}
	}
	if bm <= w.top {
		return true
	}
	if w.loose && float64(bm) <= w.allow {
		w.top = bm // (> top here)
		return true
	}
	if math.IsInf(float64(bm), 1) {
		return false // a void
	}
	tl := t0
	if !w.backward {
		tl = t1
	}
	c := float64(w.p.clearance)
	if float64(bm) <= w.lowBound(tl)-c {
		return true
	}
	if float64(bm) > w.highBound(tl)-c {
		return false // not even the highest the glide can be clears it
	}
	if w.anchorBlocks(float64(bm), c, tl) {
		return false
	}
	return w.anchorClears(float64(bm), c, tl) || float64(bm) <= w.exact(tl)-c
}

// highBound is an upper bound of the glide's altitude at fraction tau,
// the mirror of lowBound (the least loss from the upper end, the largest
// from the lower end).
func (w *sightWalk) highBound(tau float64) float64 {
	if w.backward {
		h := w.v - (1-tau)*w.L*w.lamMin
		if w.finMax {
			// The table starts a climb-back from below its bottom there
			// (pvBot = max(pv, the table's bottom)).
			h = min(h, w.pvBot+tau*w.L*w.lamMax)
		}
		return h
	}
	h := w.pv - tau*w.L*w.lamMin
	if w.finMax {
		h = min(h, w.v+(1-tau)*w.L*w.lamMax)
	}
	return h
}

// slabOf is the slab (major-axis column) holding a parent at major
// coordinate a: its centre's column (a parent is a cell centre, an integer,
// but for a source).
func slabOf(a float64) int {
	k := int(a)
	if float64(k) != a {
		k = int(math.Round(a))
	}
	return k
}

// run walks the slabs from the parent's to the cell's.
func (w *sightWalk) run() bool {
	p := w.p
	elev := p.l.Elev
	// The parent's slab, or the one the source's fan starts the walk at.
	k0 := slabOf(w.pa)
	if w.kStart != noWalkStart {
		k0 = w.kStart
	}
	long := (w.qa-k0)*w.sgn > 2
	// failed[li] is the block column of level li known not to clear.
	failed := [len(pyrShifts)]int{-1 << 30, -1 << 30, -1 << 30, -1 << 30}
	// An end value's walk (loose) that fails mostly fails in the last
	// slabs before its cell, where the glide is lowest and ground above
	// the cell's own blocks it (BenchmarkFootprint2000: of 60 k such
	// failures, 44 k in the cell's slab or the one before, found after
	// the whole line was walked): those endFirst+1 slabs are walked
	// first, square by square, and the walk proper follows from its start
	// only if they pass (endFirst 1: 10.63 → 10.39 G instructions; 2 and
	// 3 gave 10.42 and 10.45). Each square's test does not depend on the
	// order (a square passes when its ground is no higher than the glide
	// less the clearance, than allow, or than the top the walk started
	// with; top only grows, by the highest ground passed, to at most
	// allow), so the walk decides the same and, on a clear line, returns
	// the same top (TestSightEndFirstSameRuns). A blocked line's top,
	// which no caller uses, may be lower: the walk stops where it fails.
	pre := w.loose && sightEndFirst && (w.qa-k0)*w.sgn > endFirst
	k := k0
	if pre {
		k = w.qa - endFirst*w.sgn
	}
	for ; ; k += w.sgn {
		if long && !pre && k != w.qa {
			skipped := false
			for li := w.first; li >= 0; li-- {
				sh := pyrShifts[li&3] & 63 // (as in blockClear)
				kb := k >> sh
				if failed[li&3] == kb {
					continue
				}
				var kEnd int
				if w.sgn > 0 {
					kEnd = min(w.qa, (kb+1)<<sh-1)
				} else {
					kEnd = max(w.qa, kb<<sh)
				}
				if kEnd == k && li > 0 {
					continue
				}
				if w.blockClear(li, k, kEnd) {
					if kEnd == w.qa {
						return true
					}
					k = kEnd
					skipped = true
					break
				}
				failed[li&3] = kb
			}
			if skipped {
				continue
			}
		}
		if k < 0 || k >= w.nA {
			return false
		}
		t0, t1 := w.tauIn(k), w.tauOut(k)
		w.slabTau = t0
		if !w.backward {
			w.slabTau = t1
		}
		w.slabLB, w.slabEx = w.lowBound(w.slabTau), math.NaN()
		m0, m1 := w.squaresOf(t0, t1)
		for m := m0; m <= m1; m++ {
			if w.skipEnd && k == w.qa && m == w.qb {
				continue // the cell itself
			}
			if m < 0 || m >= w.nB {
				return false
			}
			// The fraction interval over square m within the slab.
			s0, s1 := t0, t1
			if w.db != 0 {
				u0 := (float64(m) - 0.5 - w.pb) / w.db
				u1 := (float64(m) + 0.5 - w.pb) / w.db
				if u0 > u1 {
					u0, u1 = u1, u0
				}
				s0, s1 = max(s0, u0), min(s1, u1)
				if s0 > s1 { // touched at a boundary only
					s0, s1 = min(s0, s1), max(s0, s1)
				}
			}
			if !w.ground(elev[k*w.strA+m*w.strB], s0, s1) {
				return false
			}
		}
		// The crossing of the line of cell centres of this slab.
		if tc := (float64(k) - w.pa) / w.da; tc > sightEps && tc < 1-sightEps {
			b := w.pb + tc*w.db
			m := int(math.Floor(b))
			if u := b - float64(m); u > sightEps && m >= 0 && m+1 < w.nB {
				ea, eb := elev[k*w.strA+m*w.strB], elev[k*w.strA+(m+1)*w.strB]
				if ea == ea && eb == eb {
					// Linear between the two, kept within them (no float32
					// residue above equal neighbours).
					g := min(max(ea*float32(1-u)+eb*float32(u), min(ea, eb)), max(ea, eb))
					if !w.groundAt(g, tc) {
						return false
					}
				}
			}
		}
		if k == w.qa {
			if pre {
				pre = false
				k = k0 - w.sgn // the walk proper, from its start
				continue
			}
			return true
		}
	}
}

// endFirst is how many slabs before its cell's an end value's walk tries
// first (run).
const endFirst = 1

// sightEndFirst switches run's first look at an end value's last slabs
// on; tests turn it off to check that the runs give the same values
// without it.
var sightEndFirst = true
