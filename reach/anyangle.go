package reach

import (
	"context"
	"math"

	"glidereach/terrain"
)

// Cell states of the any-angle propagation.
const (
	cellUntouched uint8 = iota
	cellOpen            // has a value and may be expanded (in the heap until closed)
	cellClosed          // expanded; its value is final
	cellEnd             // has a value but may only be an end point (below the clearance)
	cellEndDone         // an end point whose neighbours have been offered end values
	cellVoid            // a void (unknown ground, an obstacle) a line of sight has met: carries its shadow
)

// voidObs is the obstruction a void carries into the lines of sight beside
// it: large, so a line passing within a cell of unknown ground is blocked.
const voidObs = float32(1e4)

// noParentObs is the obstruction of a segment with no intermediate cells.
const noParentObs = float32(-1e30)

// noTop is the top of a path that is nowhere below the clearance.
var noTop = float32(math.Inf(-1))

// source is a virtual point where a propagation starts: the start of a
// forward footprint or a landing field of a backward one. X, Y are in cell
// units of the raster (cell (c, r) has its centre at (c, r)).
type source struct {
	X, Y  float64
	Alt   float64 // altitude there, m MSL
	Index int     // caller's index (field number)
}

// propagation is the state of one any-angle label-setting run over a
// terrain.Local: a Theta*-style search in which every cell keeps a
// line-of-sight parent, so paths are straight from their last bend point
// rather than bound to eight grid directions. Whether the straight segment
// from a parent to a new cell keeps the clearance is decided in O(1) from the
// segment's two grid neighbours one step back toward the parent, which share
// that parent: each cell stores obs, the largest value of
//
//	terrain + clearance − altitude on the segment
//
// met on its own segment (≤ 0 means clear), and the new cell's value is the
// linear interpolation of its two predecessors' obs (the scheme of the
// "XDraw" viewshed approximation, applied to a gliding line of sight). A
// segment is accepted when that is ≤ 0; a path bends where it is not.
//
// Forward runs maximise arrival altitude (highest first); backward runs
// minimise the altitude needed to reach a source (lowest first), with the
// aircraft flying toward the source.
type propagation struct {
	l          *terrain.Local
	desc       *descent
	backward   bool
	clearance  float32
	endLevel   float32 // forward: lowest height above ground still worth keeping as an end value
	ceiling    float64 // backward: altitudes above this are not propagated
	cols, rows int
	cell       float64

	val []float32 // forward: best arrival altitude; backward: least required altitude (m MSL); NaN none
	obs []float32
	// top (forward) is the highest terrain (m MSL) under the points of the
	// path to each cell where the glide is below the clearance (the cell
	// itself included), −Inf when there is none: the path is a valid glide
	// to a landing point only when that point's ground is at least as high
	// (the terrain floor, DEVELOPERS.md "Reserve and clearance").
	top   []float32
	par   []int32 // ≥ 0 parent cell; −1−k virtual source k
	state []uint8
	src   []uint16 // backward: which source the value leads to
	// fieldElev (backward) is the elevation (m MSL) of the field of each
	// source Index, for the terrain floor.
	fieldElev []float32
	srcs      []source
	queue     *bucketQueue
	// stop, if not nil, is asked after each expansion whether the run may
	// end early (the cells a caller needs are final).
	stop func(cell int) bool
	// prune (backward, RequiredFrom): when pruneOn, a cell is not offered
	// a value v with v + pruneB(cell − (pruneX, pruneY)) > pruneT, pruneB
	// being the least height any glide loses over that displacement: no
	// glide from the point (pruneX, pruneY) needing at most pruneT passes
	// through such a value (see RequiredFrom).
	pruneOn        bool
	pruneX, pruneY float64
	pruneB         *displacementBound
	pruneT         float64
}

func newPropagation(l *terrain.Local, d *descent, backward bool) *propagation {
	n := l.Cols * l.Rows
	p := &propagation{l: l, desc: d, backward: backward, cols: l.Cols, rows: l.Rows, cell: l.Cell}
	p.val = make([]float32, n)
	p.obs = make([]float32, n)
	p.par = make([]int32, n)
	p.state = make([]uint8, n)
	nan := float32(math.NaN())
	for i := range p.val {
		p.val[i] = nan
	}
	if backward {
		p.src = make([]uint16, n)
	} else {
		p.top = make([]float32, n)
		for i := range p.top {
			p.top[i] = noTop
		}
	}
	return p
}

// initQueue sizes the bucket queue for values between lo and hi (m) and
// bucket width w (m).
func (p *propagation) initQueue(lo, hi, w float64) {
	if p.backward {
		lo, hi = -hi, -lo
	}
	p.queue = newBucketQueue(lo, hi, w)
}

// key orders the heap: highest altitude first forward, lowest first backward.
func (p *propagation) key(v float32) float32 {
	if p.backward {
		return -v
	}
	return v
}

// better reports whether a is a better value than b (b may be NaN).
func (p *propagation) better(a, b float32) bool {
	if b != b { // NaN
		return true
	}
	if p.backward {
		return a < b
	}
	return a > b
}

// parentPos returns the position (cell units) and value of parent index pi.
func (p *propagation) parentPos(pi int32) (x, y float64, v float64) {
	if pi < 0 {
		s := &p.srcs[-1-pi]
		return s.X, s.Y, s.Alt
	}
	c := int(pi) % p.cols
	r := int(pi) / p.cols
	return float64(c), float64(r), float64(p.val[pi])
}

// segment returns the value at cell (qc, qr) reached on a straight segment
// from a point (px, py) with value pv: forward the arrival altitude, backward
// the altitude needed at the cell to glide to the point.
func (p *propagation) segment(px, py, pv float64, qc, qr int) float64 {
	dx, dy := float64(qc)-px, float64(qr)-py
	L := math.Sqrt(dx*dx+dy*dy) * p.cell
	if L == 0 {
		return pv
	}
	if p.backward {
		// The aircraft flies from q toward the parent.
		return p.desc.departVec(pv, -dx, -dy, L)
	}
	return p.desc.arriveVec(pv, dx, dy, L)
}

// rayCells finds the two cells either side of the segment from parent pi at
// (px, py) to cell (qc, qr), one step back toward the parent, and which of
// them the segment's figures may be read from (they must share the parent):
// useA, useB, with u the weight of b. short is true when the segment has no
// intermediate cell; ok is false when neither cell can be used.
func (p *propagation) rayCells(pi int32, px, py float64, qc, qr int) (ia, ib int, u float64, useA, useB, short, ok bool) {
	dx, dy := float64(qc)-px, float64(qr)-py
	adx, ady := math.Abs(dx), math.Abs(dy)
	if adx >= ady {
		if adx <= 1 {
			return 0, 0, 0, false, false, true, true
		}
		sx := 1
		if dx < 0 {
			sx = -1
		}
		cb := qc - sx
		yb := float64(qr) - dy/adx
		r0 := int(math.Floor(yb))
		u = yb - float64(r0)
		if cb < 0 || cb >= p.cols || r0 < 0 || r0 >= p.rows {
			return 0, 0, 0, false, false, false, false
		}
		ia = r0*p.cols + cb
		ib = ia
		if u > 1e-9 {
			if r0+1 >= p.rows {
				return 0, 0, 0, false, false, false, false
			}
			ib = ia + p.cols
		}
	} else {
		if ady <= 1 {
			return 0, 0, 0, false, false, true, true
		}
		sy := 1
		if dy < 0 {
			sy = -1
		}
		rb := qr - sy
		xb := float64(qc) - dx/ady
		c0 := int(math.Floor(xb))
		u = xb - float64(c0)
		if rb < 0 || rb >= p.rows || c0 < 0 || c0 >= p.cols {
			return 0, 0, 0, false, false, false, false
		}
		ia = rb*p.cols + c0
		ib = ia
		if u > 1e-9 {
			if c0+1 >= p.cols {
				return 0, 0, 0, false, false, false, false
			}
			ib = ia + 1
		}
	}
	okA := p.par[ia] == pi && p.state[ia] != cellUntouched
	okB := p.par[ib] == pi && p.state[ib] != cellUntouched
	switch {
	case okA && okB:
		return ia, ib, u, true, true, false, true
	case okA && u <= 0.5:
		return ia, ib, u, true, false, false, true
	case okB && u >= 0.5:
		return ia, ib, u, false, true, false, true
	}
	return 0, 0, 0, false, false, false, false
}

// rayObs returns the obstruction met on the segment from parent pi at
// (px, py) to cell (qc, qr), up to but excluding the cell, and whether it
// could be decided from cells that share the parent. Where only one of the
// two cells beside the line shares the parent, the other one's ground still
// counts where the line passes between them: its own obstruction (ground +
// floor − the shared cell's altitude; a void counts as voidObs) is
// interpolated with the shared cell's, so a one-cell wall beside the line
// is not ignored because its own value came along another path.
func (p *propagation) rayObs(pi int32, px, py float64, qc, qr int) (float32, bool) {
	ia, ib, u, useA, useB, short, ok := p.rayCells(pi, px, py, qc, qr)
	o, ok := p.rayObsCells(pi, px, py, 0, ia, ib, u, useA, useB, short, ok)
	if !ok || o > 0 || short {
		return o, ok
	}
	return max(o, p.midObs(px, py, qc, qr, ia, ib, u, useA, useB)), true
}

// midObs checks the last step of the segment from the parent to cell
// (qc, qr) half-way between the crossing one step back and the cell, where
// the line passes from one column (or row) of cells to the next: there it
// lies over the squares of the cells on both sides, and the highest of them
// counts (a void blocks). Lines crossing a wall one cell thick that runs
// diagonally pass between its cell centres, over the corner its squares
// share; the crossings at cell centres alone do not see it. The altitude is
// the line's at the crossing one step back, less the least height lost over
// the half step.
func (p *propagation) midObs(px, py float64, qc, qr, ia, ib int, u float64, useA, useB bool) float32 {
	t, alt, src, void := p.midGround(px, py, qc, qr, ia, ib, u, useA, useB)
	switch {
	case void:
		return 1
	case math.IsInf(float64(t), -1):
		return noParentObs
	}
	var s uint16
	if p.backward {
		s = p.src[src]
	}
	return p.floorObs(t, alt, s)
}

// midGround is the ground midObs checks: the highest of the cell squares
// half-way along the last step, −Inf where it is not above the ground at
// the crossing one step back (+1 cm), void true where a void or the window's
// edge is there; alt is the line's altitude there (forward: the crossing's,
// less the least height lost over the half step) and src the cell beside
// the line whose source it leads to.
func (p *propagation) midGround(px, py float64, qc, qr, ia, ib int, u float64, useA, useB bool) (t, alt float32, src int, void bool) {
	dx, dy := float64(qc)-px, float64(qr)-py
	var c0, c1, r0, r1 int
	xMajor := math.Abs(dx) >= math.Abs(dy)
	if xMajor {
		sx := 1
		if dx < 0 {
			sx = -1
		}
		c0, c1 = qc-sx, qc
		r0, r1 = halfRound(float64(qr) - dy/math.Abs(dx)/2)
	} else {
		sy := 1
		if dy < 0 {
			sy = -1
		}
		r0, r1 = qr-sy, qr
		c0, c1 = halfRound(float64(qc) - dx/math.Abs(dy)/2)
	}
	t = float32(math.Inf(-1))
	for _, c := range [2]int{c0, c1} {
		for _, r := range [2]int{r0, r1} {
			if c < 0 || r < 0 || c >= p.cols || r >= p.rows {
				return 0, 0, 0, true
			}
			e := p.l.Elev[r*p.cols+c]
			if e != e {
				return 0, 0, 0, true
			}
			t = max(t, e)
		}
	}
	// Only where the squares there hold ground higher than the ground at
	// the crossing (a feature between the lines of cell centres), and then
	// lowered by the half step; elsewhere the crossing's own check stands,
	// so a glide over even ground is not cut short where it nears the
	// clearance.
	if ta, tb := p.l.Elev[ia], p.l.Elev[ib]; ta == ta && tb == tb && !(t > ta*float32(1-u)+tb*float32(u)+0.01) { // 1 cm: not a rounding residue on even ground
		return float32(math.Inf(-1)), 0, 0, false
	}
	src = ia
	switch {
	case useA && useB:
		alt = p.val[ia]*float32(1-u) + p.val[ib]*float32(u)
	case useA:
		alt = p.val[ia]
	default:
		alt, src = p.val[ib], ib
	}
	if !p.backward && p.desc.maxRatio > 0 {
		var step float64
		if xMajor {
			step = math.Hypot(1, dy/dx) / 2
		} else {
			step = math.Hypot(1, dx/dy) / 2
		}
		alt -= float32(step * p.cell / p.desc.maxRatio)
	}
	return t, alt, src, false
}

// halfRound returns the index of the cell whose span (±0.5) holds v, twice,
// or both neighbours when v lies on the boundary between them (within
// 1e-9).
func halfRound(v float64) (int, int) {
	f := math.Floor(v)
	if math.Abs(v-f-0.5) < 1e-9 {
		return int(f), int(f) + 1
	}
	r := int(math.Round(v))
	return r, r
}

// maxShadowDepth bounds the recursion of rayObsDepth along a line.
const maxShadowDepth = 48

func (p *propagation) rayObsDepth(pi int32, px, py float64, qc, qr, depth int) (float32, bool) {
	ia, ib, u, useA, useB, short, ok := p.rayCells(pi, px, py, qc, qr)
	return p.rayObsCells(pi, px, py, depth, ia, ib, u, useA, useB, short, ok)
}

// rayObsCells is rayObsDepth given the cells beside the line (rayCells).
func (p *propagation) rayObsCells(pi int32, px, py float64, depth, ia, ib int, u float64, useA, useB, short, ok bool) (float32, bool) {
	switch {
	case !ok:
		return 0, false
	case short:
		return noParentObs, true
	case useA && useB:
		return p.obs[ia]*float32(1-u) + p.obs[ib]*float32(u), true
	}
	// One cell shares the parent: interpolate its obstruction with the
	// other cell's own (its ground plus the floor, at the shared cell's
	// altitude), as XDraw would had both shared the parent.
	shared, other, wo := ia, ib, u
	if useB {
		shared, other, wo = ib, ia, 1-u
	}
	if wo <= 1e-9 {
		return p.obs[shared], true
	}
	v := p.val[shared]
	t, blocked := p.crossTerrain(ia, ib, u)
	if blocked {
		return 1, true
	}
	var src uint16
	if p.backward {
		src = p.src[shared]
	}
	ownOther := voidObs
	if to := p.l.Elev[other]; to == to {
		ownOther = p.floorObs(to, v, src)
		// The other cell was reached along another line (often because the
		// line from this parent was blocked there: a shadow edge), so its
		// record says nothing about this parent's line. Work out the
		// obstruction of this parent's line up to it instead; undecidable
		// counts as blocked.
		if depth < maxShadowDepth {
			oc, or := other%p.cols, other/p.cols
			ob, ok := p.rayObsDepth(pi, px, py, oc, or, depth+1)
			if !ok {
				ob = 1
			}
			ownOther = max(ownOther, ob)
		} else {
			ownOther = max(ownOther, 1)
		}
	}
	// The most conservative of: the shared cell's own record, the ground at
	// the crossing (linear between the two centres), and the interpolation.
	return max(p.obs[shared], p.floorObs(t, v, src), p.obs[shared]*float32(1-wo)+ownOther*float32(wo)), true
}

// floorObs is the obstruction (m; ≤ 0 clear) of ground t under a glide at
// altitude v toward source src: t + min(clearance, v − field elevation) − v
// backward, t + clearance − v forward, written so that ground at the
// field's elevation gives exactly t − e (no rounding residue that would
// block a line over flat ground).
func (p *propagation) floorObs(t, v float32, src uint16) float32 {
	if p.backward {
		if e := p.fieldElev[src]; v-e < p.clearance {
			return t - e
		}
	}
	return t + p.clearance - v
}

// crossTerrain is the ground (m MSL) where a line passes between cells ia
// and ib at weight u toward ib: linear between the two, blocked when the
// nearer one (or both) is a void.
func (p *propagation) crossTerrain(ia, ib int, u float64) (float32, bool) {
	a, b := p.l.Elev[ia], p.l.Elev[ib]
	switch {
	case a != a && b != b:
		return 0, true
	case a != a:
		if u < 0.5 {
			return 0, true
		}
		a = b
	case b != b:
		if u > 0.5 {
			return 0, true
		}
		b = a
	}
	return a*float32(1-u) + b*float32(u), false
}

// stepObs is the obstruction of a one-cell step from cell s (value sv) to
// its neighbour q (value v): none for a step along a row or column; for a
// diagonal step, the line passes between the two cells beside it at their
// midpoint, where the ground is their mean (a void beside it blocks) and
// the altitude is the mean of the two ends.
func (p *propagation) stepObs(s, q int, sv, v float64, srcIdx uint16) float32 {
	sc, sr := s%p.cols, s/p.cols
	qc, qr := q%p.cols, q/p.cols
	if sc == qc || sr == qr {
		return noParentObs
	}
	a, b := sr*p.cols+qc, qr*p.cols+sc
	if p.l.Elev[a] != p.l.Elev[a] || p.l.Elev[b] != p.l.Elev[b] {
		return 1 // a void beside the corner
	}
	t, _ := p.crossTerrain(a, b, 0.5)
	return p.floorObs(t, float32((sv+v)/2), srcIdx)
}

// rayTop is rayObs for the forward terrain floor: the highest terrain (m
// MSL) under the points of the segment where the glide is below the
// clearance, up to but excluding the cell, or −Inf when there is none. It
// takes the larger of the two cells' figures (conservative), and where
// only one shares the parent, the crossing between them as rayObs does.
func (p *propagation) rayTop(pi int32, px, py float64, qc, qr int) (float32, bool) {
	ia, ib, u, useA, useB, short, ok := p.rayCells(pi, px, py, qc, qr)
	switch {
	case !ok:
		return 0, false
	case short:
		if pi < 0 {
			return noTop, true
		}
		return p.top[pi], true
	}
	t := noTop
	if useA {
		t = max(t, p.top[ia])
	}
	if useB {
		t = max(t, p.top[ib])
	}
	if !(useA && useB) {
		shared := ia
		if useB {
			shared = ib
		}
		tc, blocked := p.crossTerrain(ia, ib, u)
		if blocked {
			return float32(math.Inf(1)), true
		}
		if tc+p.clearance > p.val[shared] {
			t = max(t, tc)
		}
	}
	// The last half step, as midObs: ground between the lines of cell
	// centres under the glide where it is below the clearance there.
	tm, alt, _, void := p.midGround(px, py, qc, qr, ia, ib, u, useA, useB)
	switch {
	case void:
		return float32(math.Inf(1)), true
	case !math.IsInf(float64(tm), -1) && tm+p.clearance > alt:
		t = max(t, tm)
	}
	return t, true
}

// offer records value v at cell q reached from parent pi with obstruction
// prev met before the cell, if it is better than what q has.
//
// Forward, a cell below the clearance is an end point: it is not flown over
// on the way anywhere else, but while it is at least endLevel above the
// ground its neighbours are offered end values through it (endOnly), so the
// contours below the clearance (down to touching the ground) are traced
// with the last part of the glide below the clearance, as a landing is.
// top is the highest terrain under the path's points below the clearance
// before q (forward; noTop when there is none).
func (p *propagation) offer(q int, pi int32, v float64, prev float32, srcIdx uint16, top float32, endOnly bool) {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return
	}
	t := p.l.Elev[q]
	vf := float32(v)
	if p.backward && v > p.ceiling {
		return
	}
	if p.pruneOn {
		dx, dy := float64(q%p.cols)-p.pruneX, float64(q/p.cols)-p.pruneY
		if v+p.pruneB.height(dx*p.cell, dy*p.cell) > p.pruneT {
			return
		}
	}
	if !p.better(vf, p.val[q]) {
		return
	}
	own := t + p.clearance - vf
	if p.backward {
		// The terrain floor (DEVELOPERS.md "Reserve and clearance"): the
		// glide keeps the clearance above the terrain, except where it is
		// within the clearance of the field's own elevation over ground no
		// higher than the field (the final part of the glide, tapering to
		// the reserve): floor = t + min(clearance, v − field elevation).
		// (Written so that flat ground at the field's elevation gives
		// exactly 0, not a rounding residue that would block the line.)
		if e := p.fieldElev[srcIdx]; vf-e < p.clearance {
			own = t - e
		}
		if own > 0 {
			// The glide would pass below the floor here: the least altitude
			// that keeps it is the clearance height itself (here t is above
			// the field), and the straight line through this cell is blocked
			// for cells beyond.
			vf = t + p.clearance
			if !p.better(vf, p.val[q]) {
				return
			}
			if float64(vf) > p.ceiling {
				return
			}
			p.val[q], p.par[q], p.obs[q] = vf, pi, own
		} else {
			p.val[q], p.par[q], p.obs[q] = vf, pi, max(prev, own)
		}
		p.src[q] = srcIdx
		p.state[q] = cellOpen
		p.queue.push(int32(q), p.key(p.val[q]))
		return
	}
	if endOnly && (p.state[q] == cellOpen || p.state[q] == cellClosed) {
		return
	}
	if own <= 0 && !endOnly {
		p.val[q], p.par[q] = vf, pi
		p.obs[q] = max(prev, own)
		p.top[q] = noTop
		p.state[q] = cellOpen
		p.queue.push(int32(q), p.key(vf))
		return
	}
	// Below the clearance (here or earlier on the path): an end value, for
	// contours and fields, never flown over on the way elsewhere. It is a
	// valid glide only when every point of the path below the clearance
	// lies over ground no higher than this cell's: the terrain floor
	// t + min(clearance, altitude − landing elevation) of DEVELOPERS.md
	// "Reserve and clearance", the same rule as the backward solver's and
	// the final glide's.
	if top > t {
		return
	}
	if p.state[q] == cellOpen || p.state[q] == cellClosed {
		// An open or closed cell that gets a better value stays above the
		// clearance (better means higher); nothing to do here.
		return
	}
	p.val[q], p.par[q] = vf, pi
	p.obs[q] = max(own, 1e-3) // positive: no line of sight passes through an end point
	if own > 0 {
		top = max(top, t)
	}
	p.top[q] = top
	p.state[q] = cellEnd
	if vf >= t+p.endLevel {
		p.queue.push(int32(q), p.key(vf))
	}
}

// seed starts the propagation at virtual source k: the cells around it are
// reached on straight segments from it.
func (p *propagation) seed(k int) {
	s := p.srcs[k]
	pi := int32(-1 - k)
	c0, r0 := int(math.Floor(s.X)), int(math.Floor(s.Y))
	for r := r0 - 1; r <= r0+2; r++ {
		for c := c0 - 1; c <= c0+2; c++ {
			if c < 0 || r < 0 || c >= p.cols || r >= p.rows {
				continue
			}
			// Only the cells within one cell of the source in both axes:
			// a longer first segment would pass over ground no check sees.
			if math.Abs(float64(c)-s.X) > 1 || math.Abs(float64(r)-s.Y) > 1 {
				continue
			}
			q := r*p.cols + c
			if p.l.Elev[q] != p.l.Elev[q] { // void
				continue
			}
			v := p.segment(s.X, s.Y, s.Alt, c, r)
			p.offer(q, pi, v, noParentObs, uint16(s.Index), noTop, false)
		}
	}
}

var nbrDC = [8]int{1, 1, 0, -1, -1, -1, 0, 1}
var nbrDR = [8]int{0, 1, 1, 1, 0, -1, -1, -1}

// run expands cells best first until none is left or ctx is cancelled. The
// progress callback, if not nil, is called now and then with the number of
// cells closed.
func (p *propagation) run(ctx context.Context, progress func(closed int)) error {
	closed := 0
	for {
		si32, b, ok := p.queue.pop()
		if !ok {
			break
		}
		s := int(si32)
		if p.queue.bucket(p.key(p.val[s])) != b {
			continue // stale entry
		}
		endOnly := false
		switch p.state[s] {
		case cellOpen:
			p.state[s] = cellClosed
		case cellEnd:
			if p.backward {
				continue
			}
			p.state[s] = cellEndDone
			endOnly = true
		default:
			continue // stale entry
		}
		closed++
		if p.stop != nil && p.stop(s) {
			break
		}
		if closed&0xffff == 0 {
			if err := ctx.Err(); err != nil {
				return err
			}
			if progress != nil {
				progress(closed)
			}
		}
		sc, sr := s%p.cols, s/p.cols
		sv := float64(p.val[s])
		pi := p.par[s]
		px, py, pv := p.parentPos(pi)
		var srcIdx uint16
		if p.backward {
			srcIdx = p.src[s]
		}
		for k := 0; k < 8; k++ {
			qc, qr := sc+nbrDC[k], sr+nbrDR[k]
			if qc < 0 || qr < 0 || qc >= p.cols || qr >= p.rows {
				continue
			}
			q := qr*p.cols + qc
			if p.state[q] == cellClosed && !p.better(float32(sv), p.val[q]) {
				continue // closed with a value no lower cell can improve
			}
			if p.l.Elev[q] != p.l.Elev[q] { // void: an obstacle
				if p.state[q] == cellUntouched {
					// Record the line of sight that met it, so the lines
					// beside it interpolate its obstruction and its shadow
					// is carried like a wall's (the cells behind a void are
					// not reached by lines threaded between clear cells
					// either side of it).
					p.state[q], p.obs[q] = cellVoid, voidObs
					if p.top != nil {
						p.top[q] = float32(math.Inf(1))
					}
					p.par[q] = int32(s)
					if _, ok := p.rayObs(pi, px, py, qc, qr); ok {
						p.par[q] = pi
					}
				}
				continue
			}
			if endOnly {
				if p.state[q] == cellEndDone {
					continue
				}
				// Straight on from s's parent when the cells beside the
				// line share it (a glide below the clearance is straight, not
				// a chain of steps between cell centres), and bent at s.
				if top, ok := p.rayTop(pi, px, py, qc, qr); ok {
					v := p.segment(px, py, pv, qc, qr)
					p.offer(q, pi, v, noParentObs, srcIdx, top, true)
				}
				v := p.segment(float64(sc), float64(sr), sv, qc, qr)
				if p.stepObs(s, q, sv, v, srcIdx) <= 0 {
					p.offer(q, int32(s), v, noParentObs, srcIdx, p.top[s], true)
				}
				continue
			}
			// Straight on from s's parent, if the line of sight holds.
			if prev, ok := p.rayObs(pi, px, py, qc, qr); ok && prev <= 0 {
				v := p.segment(px, py, pv, qc, qr)
				if pi >= 0 && math.Abs(float64(qc)-px) == 1 && math.Abs(float64(qr)-py) == 1 {
					// A diagonal step straight from the parent: its corner.
					prev = max(prev, p.stepObs(int(pi), q, pv, v, srcIdx))
				}
				if prev <= 0 {
					p.offer(q, pi, v, prev, srcIdx, noTop, false)
					continue
				}
			}
			// Otherwise the path bends at s; a diagonal step must clear the
			// corner between the two cells beside it (a wall one cell thick
			// running diagonally has no gap to slip through).
			v := p.segment(float64(sc), float64(sr), sv, qc, qr)
			if ob := p.stepObs(s, q, sv, v, srcIdx); ob <= 0 {
				p.offer(q, int32(s), v, ob, srcIdx, noTop, false)
			}
		}
	}
	if progress != nil {
		progress(closed)
	}
	return nil
}
