package reach

import (
	"context"
	"fmt"
	"math"
	"math/bits"

	"glidereach/terrain"
)

// Cell states of the any-angle propagation.
const (
	cellUntouched uint8 = iota
	cellOpen            // has a value and may be expanded (in the heap until closed)
	cellClosed          // expanded; its value is final
	cellEnd             // has a value but may only be an end point (below the clearance)
	cellEndDone         // an end point whose neighbours have been offered end values
	cellVoid            // a void (unknown ground: an obstacle), marked when the run is set up
)

// noTop is the top of a path that is nowhere below the clearance.
var noTop = float32(math.Inf(-1))

// cellRec is one cell's state in the propagation but its value (val),
// packed into 8 bytes so that the tests on a neighbour read one record and
// the value (eight records to a cache line):
//
//	ps    the parent in the upper 29 bits (signed: ≥ 0 parent cell, −1−k
//	      virtual source k) and the cell's state (cellUntouched …) in the
//	      lower 3
//	aux   forward: top, as float32 bits: the highest terrain (m MSL) under
//	      the points of the path to the cell where the glide is below the
//	      clearance (the cell itself included), −Inf when there is none:
//	      the path is a valid glide to a landing point only when that
//	      point's ground is at least as high (the terrain floor,
//	      DEVELOPERS.md "Reserve and clearance");
//	      backward: which source the value leads to
//
// A run therefore holds at most maxPropagationCells cells.
type cellRec struct {
	ps  uint32
	aux uint32
}

// maxPropagationCells is the most cells a propagation's window may hold: a
// parent index must fit the 29 bits of cellRec.ps (16384 × 16384 cells,
// whose records and values alone would take 3.2 GB).
const maxPropagationCells = 1<<28 - 1

// errWindowTooLarge is returned for a solver window of more than
// maxPropagationCells cells.
var errWindowTooLarge = fmt.Errorf("reach: terrain window too large for one solver run (at most %d cells)", maxPropagationCells)

// st returns the cell's state.
func (r *cellRec) st() uint8 { return uint8(r.ps & 7) }

// par returns the cell's parent (≥ 0 a cell, −1−k source k).
func (r *cellRec) par() int32 { return int32(r.ps) >> 3 }

// setSt sets the cell's state, keeping its parent.
func (r *cellRec) setSt(st uint8) { r.ps = r.ps&^7 | uint32(st) }

// set sets the cell's parent and state.
func (r *cellRec) set(par int32, st uint8) { r.ps = uint32(par)<<3 | uint32(st) }

// top returns the forward record's top (see cellRec).
func (r *cellRec) top() float32 { return math.Float32frombits(r.aux) }

// setTop sets the forward record's top.
func (r *cellRec) setTop(t float32) { r.aux = math.Float32bits(t) }

// src returns the backward record's source.
func (r *cellRec) src() uint16 { return uint16(r.aux) }

// setSrc sets the backward record's source.
func (r *cellRec) setSrc(k uint16) { r.aux = uint32(k) }

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
// from a parent to a new cell keeps the terrain floor is decided exactly by
// walking every cell square the segment crosses (sightDir, reach/sightline.go),
// passing whole blocks of cells at once where the glide clears their highest
// ground (groundPyramid); a path bends where the line of sight fails.
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
	// nbrOff is the index offset of each neighbour (nbrDC, nbrDR).
	nbrOff [8]int

	// val is each cell's value: forward the best arrival altitude,
	// backward the least required altitude (m MSL); NaN none. It is the
	// result raster itself (Arrival, Required).
	val []float32
	// c holds the rest of each cell's search state in one 12-byte record
	// (cellRec), so a neighbour's tests touch two cache lines (its record
	// and its value) and no more.
	c   []cellRec
	pyr *groundPyramid
	// scratch is the pools the run's buffers came from (nil: allocated);
	// ownsGround is set when l is a crop made for this run alone, its
	// elevations a scratch buffer that release gives back.
	scratch    *scratch
	ownsGround bool
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
	// fans are the sources' fans (fan.go), made when first asked;
	// walkStart is the slab the next walk starts at (sightDirFrom).
	fans      []*sourceFan
	walkStart int
}

func newPropagation(l *terrain.Local, d *descent, backward bool, s *scratch) *propagation {
	n := l.Cols * l.Rows
	p := &propagation{l: l, desc: d, backward: backward, cols: l.Cols, rows: l.Rows, cell: l.Cell, scratch: s, walkStart: noWalkStart}
	p.c = s.recPool().get(n)
	p.val = s.f32Pool().get(n)
	p.pyr = newGroundPyramid(l)
	for k := range p.nbrOff {
		p.nbrOff[k] = nbrDR[k]*p.cols + nbrDC[k]
	}
	nan := float32(math.NaN())
	aux := math.Float32bits(noTop)
	if backward {
		aux = 0 // the source (set with the value)
	}
	// Voids are marked in the state, so the search tests one byte per
	// neighbour before it reads anything else of the cell.
	for i, e := range l.Elev {
		st := cellUntouched
		if e != e {
			st = cellVoid
		}
		p.val[i] = nan
		p.c[i] = cellRec{ps: uint32(st), aux: aux}
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

// colRow returns the column and row of cell i (0 ≤ i < cols·rows <
// 2²⁸: a 32-bit division, several times faster than a 64-bit one).
func (p *propagation) colRow(i int) (c, r int) {
	u, n := uint32(i), uint32(p.cols)
	return int(u % n), int(u / n)
}

// parentPos returns the position (cell units) and value of parent index pi.
func (p *propagation) parentPos(pi int32) (x, y float64, v float64) {
	if pi < 0 {
		s := &p.srcs[-1-pi]
		return s.X, s.Y, s.Alt
	}
	c, r := p.colRow(int(pi))
	return float64(c), float64(r), float64(p.val[pi])
}

// segment returns the value at cell (qc, qr) reached on a straight segment
// from a point (px, py) with value pv: forward the arrival altitude, backward
// the altitude needed at the cell to glide to the point.
func (p *propagation) segment(px, py, pv float64, qc, qr int) float64 {
	v, _ := p.segmentDir(px, py, pv, qc, qr)
	return v
}

// flightDir is the direction of flight of a segment as the descent table's
// two columns and the blend weight toward the second (descent.vecIndex):
// forward toward the cell, backward toward the parent.
type flightDir struct {
	d0, d1 int
	wt     float64
}

// segmentDir is segment that also returns the direction of flight, which
// the line-of-sight walk of the same segment needs (sightDir): it is worked
// out once per segment.
func (p *propagation) segmentDir(px, py, pv float64, qc, qr int) (float64, flightDir) {
	dx, dy := float64(qc)-px, float64(qr)-py
	L := math.Sqrt(dx*dx+dy*dy) * p.cell
	if p.backward {
		// The aircraft flies from q toward the parent.
		dx, dy = -dx, -dy
	}
	var fd flightDir
	fd.d0, fd.d1, fd.wt = p.desc.vecIndex(dx, dy)
	if L == 0 {
		return pv, fd
	}
	if p.backward {
		return p.desc.departBlend(fd.d0, fd.d1, fd.wt, pv, L), fd
	}
	return p.desc.arriveBlend(fd.d0, fd.d1, fd.wt, pv, L), fd
}

// wants reports whether value v (from segment) at cell q could be taken by
// offer: the cheap tests offer makes before a line of sight is walked.
func (p *propagation) wants(q int, v float64, endOnly bool) bool {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return false
	}
	if p.backward {
		return v <= p.ceiling && p.better(float32(v), p.val[q])
	}
	cq := &p.c[q]
	if !p.better(float32(v), p.val[q]) {
		return false
	}
	if st := cq.st(); st == cellOpen || st == cellClosed {
		// An open or closed cell only takes a value above the clearance
		// on a clear line (an end value never replaces it).
		return !endOnly && p.l.Elev[q]+p.clearance-float32(v) <= 0
	}
	return true
}

// sightFrom walks the line of sight from parent pi at (px, py) with value
// pv to cell q at (qc, qr) with value v and direction of flight fd (from
// segmentDir; sightDir) under the floor that applies:
// backward the field's (srcIdx); forward, for a cell the glide reaches above
// the clearance, the clearance everywhere, and for one below it (an end
// value, or endOnly) the terrain floor of an end value, ground no higher than
// the cell's (top carries the path's record before the parent).
//
// A segment whose glide is everywhere at least the clearance above the
// window's highest ground (aboveAll) is clear without a walk: the walk
// would pass every square on its lower bound alone, which is no lower than
// the glide's lowest end (forward the cell's value v, backward the parent's
// pv), and leave top as it was. Most segments of a footprint from high up
// are such (60 % on BenchmarkFootprint2000).
func (p *propagation) sightFrom(pi int32, px, py, pv float64, qc, qr, q int, v float64, fd flightDir, srcIdx uint16, endOnly bool) (float32, bool) {
	if p.backward {
		e := p.fieldElev[srcIdx]
		if p.aboveAll(pv) {
			return e, true
		}
		return p.sight(pi, px, py, pv, qc, qr, v, e, e, fd, false)
	}
	t := p.l.Elev[q]
	if !endOnly && t+p.clearance-float32(v) <= 0 {
		if p.aboveAll(v) {
			return noTop, true
		}
		return p.sight(pi, px, py, pv, qc, qr, v, noTop, noTop, fd, false)
	}
	top := noTop
	if pi >= 0 {
		top = p.c[pi].top()
	}
	if p.aboveAll(v) {
		return top, true
	}
	if t+p.clearance-float32(v) > 0 {
		// The cell is below its own clearance: offer keeps
		// max(top, the cell's ground) as its record, the cell's ground
		// whenever the walk's top is no higher (sightEnd).
		return p.sight(pi, px, py, pv, qc, qr, v, t, top, fd, true)
	}
	return p.sight(pi, px, py, pv, qc, qr, v, t, top, fd, false)
}

// sight is the walk sightFrom makes (loose: the end value's, sightEnd):
// from a source (pi < 0) started where the source's fan allows
// (sightDirFrom, sightEndFrom), from a bend point whole (sightDir,
// sightEnd).
func (p *propagation) sight(pi int32, px, py, pv float64, qc, qr int, v float64, allow, top float32, fd flightDir, loose bool) (float32, bool) {
	if pi < 0 {
		return p.sightFromSlab(px, py, pv, qc, qr, v, allow, top, fd, p.fanStart(int(-1-pi), px, py, qc, qr), loose)
	}
	if loose {
		return p.sightEnd(px, py, pv, qc, qr, v, allow, top, fd)
	}
	return p.sightDir(px, py, pv, qc, qr, v, allow, top, fd)
}

// sightAboveAll switches sightFrom's test against the window's highest
// ground on; tests turn it off to check that the runs give the same values
// without it.
var sightAboveAll = true

// aboveAll reports whether a glide no lower than low (m MSL) anywhere on a
// segment keeps the clearance over the window's highest ground (false when
// the window holds a void: voids block).
func (p *propagation) aboveAll(low float64) bool {
	return sightAboveAll && float64(p.pyr.highest) <= low-float64(p.clearance)
}

// offer records value v at cell q reached from parent pi, if it is better
// than what q has. The line of sight from the parent has been checked
// (sightFrom); top is the highest ground the path passes below the
// clearance before q (forward; noTop when there is none).
//
// Forward, a cell below the clearance is an end point: it is not flown over
// on the way anywhere else, but while it is at least endLevel above the
// ground its neighbours are offered end values through it (endOnly), so the
// contours below the clearance (down to touching the ground) are traced
// with the last part of the glide below the clearance, as a landing is.
func (p *propagation) offer(q int, pi int32, v float64, srcIdx uint16, top float32, endOnly bool) {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return
	}
	t := p.l.Elev[q]
	vf := float32(v)
	if p.backward && v > p.ceiling {
		return
	}
	if p.pruneOn {
		qc, qr := p.colRow(q)
		dx, dy := float64(qc)-p.pruneX, float64(qr)-p.pruneY
		if v+p.pruneB.height(dx*p.cell, dy*p.cell) > p.pruneT {
			return
		}
	}
	cq := &p.c[q]
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
		// exactly 0, not a rounding residue.)
		if e := p.fieldElev[srcIdx]; vf-e < p.clearance {
			own = t - e
		}
		if own > 0 {
			// The glide would pass below the floor here: the least altitude
			// that keeps it is the clearance height itself (here t is above
			// the field).
			vf = t + p.clearance
			if !p.better(vf, p.val[q]) {
				return
			}
			if float64(vf) > p.ceiling {
				return
			}
		}
		p.val[q] = vf
		cq.set(pi, cellOpen)
		cq.setSrc(srcIdx)
		p.queue.push(int32(q), p.key(vf))
		return
	}
	if st := cq.st(); endOnly && (st == cellOpen || st == cellClosed) {
		return
	}
	if own <= 0 && !endOnly && top == noTop {
		p.val[q] = vf
		cq.set(pi, cellOpen)
		cq.setTop(noTop)
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
	if st := cq.st(); st == cellOpen || st == cellClosed {
		// An open or closed cell that gets a better value stays above the
		// clearance (better means higher); nothing to do here.
		return
	}
	p.val[q] = vf
	if own > 0 {
		top = max(top, t)
	}
	cq.set(pi, cellEnd)
	cq.setTop(top)
	if vf >= t+p.endLevel {
		p.queue.push(int32(q), p.key(vf))
	}
}

// seed starts the propagation at virtual source k: the cells around it are
// reached on straight segments from it. Only the cells within one cell of
// the source in both axes are seeded, and without a walk of the line of
// sight: the aircraft is at the source (forward) or the field (backward),
// and those segments lie over the source's own cell and the cells beside it.
func (p *propagation) seed(k int) {
	s := p.srcs[k]
	pi := int32(-1 - k)
	c0, r0 := int(math.Floor(s.X)), int(math.Floor(s.Y))
	for r := r0 - 1; r <= r0+2; r++ {
		for c := c0 - 1; c <= c0+2; c++ {
			if c < 0 || r < 0 || c >= p.cols || r >= p.rows {
				continue
			}
			if math.Abs(float64(c)-s.X) > 1 || math.Abs(float64(r)-s.Y) > 1 {
				continue
			}
			q := r*p.cols + c
			if p.l.Elev[q] != p.l.Elev[q] { // void
				continue
			}
			v := p.segment(s.X, s.Y, s.Alt, c, r)
			p.offer(q, pi, v, uint16(s.Index), noTop, false)
		}
	}
}

// notFromParent returns the bit set of the neighbours k (nbrDC, nbrDR) of
// cell s, which is not on the window's edge, that do not hold a value from
// the parent whose ps bits are piBits: those the expansion has to try.
func (p *propagation) notFromParent(s int, piBits uint32) uint8 {
	n := p.cols
	up, mid, dn := p.c[s-n-1:s-n+2], p.c[s-1:s+2], p.c[s+n-1:s+n+2]
	return notFrom(mid[2].ps, piBits) | notFrom(dn[2].ps, piBits)<<1 | notFrom(dn[1].ps, piBits)<<2 |
		notFrom(dn[0].ps, piBits)<<3 | notFrom(mid[0].ps, piBits)<<4 | notFrom(up[0].ps, piBits)<<5 |
		notFrom(up[1].ps, piBits)<<6 | notFrom(up[2].ps, piBits)<<7
}

// notFrom is 0 where record bits ps hold a value from the parent of bits
// piBits (the test of run's loop: the parent bits are piBits and the state
// is not cellUntouched, 0), else 1. piBits has its low 3 bits clear, so
// that is ps ∈ [piBits+1, piBits+7], or d = ps − piBits − 1 < 7 in
// uint32 (a ps below the range wraps far above it), worked out without a
// branch: d + 2³² − 7 reaches bit 32 exactly when d ≥ 7.
func notFrom(ps, piBits uint32) uint8 {
	d := ps - piBits - 1
	return uint8((uint64(d) + (1<<32 - 7)) >> 32)
}

var nbrDC = [8]int{1, 1, 0, -1, -1, -1, 0, 1}
var nbrDR = [8]int{0, 1, 1, 1, 0, -1, -1, -1}

// run expands cells best first until none is left or ctx is cancelled. The
// progress callback, if not nil, is called now and then with the number of
// cells closed.
//
// Each neighbour q of an expanded cell s is tried on the straight segment
// from s's parent (Theta*); when that value would improve q and the line
// of sight holds (sightDir, the exact walk), q takes that parent; when the
// line of sight fails, the path bends at s. When the straight value would
// not improve q, the bend is not tried (as in Theta*, which tries the bend
// only where the line of sight fails): a missed improvement only makes the
// answer more conservative.
func (p *propagation) run(ctx context.Context, progress func(closed int)) error {
	closed := 0
	for {
		si32, b, ok := p.queue.pop()
		if !ok {
			break
		}
		s := int(si32)
		cs := &p.c[s]
		if p.queue.bucket(p.key(p.val[s])) != b {
			continue // stale entry
		}
		endOnly := false
		switch cs.st() {
		case cellOpen:
			cs.setSt(cellClosed)
		case cellEnd:
			if p.backward {
				continue
			}
			cs.setSt(cellEndDone)
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
		sc, sr := p.colRow(s)
		sv := float64(p.val[s])
		pi := cs.par()
		px, py, pv := p.parentPos(pi)
		var srcIdx uint16
		if p.backward {
			srcIdx = cs.src()
		}
		// Away from the window's edge every neighbour is in it, at a fixed
		// offset from s: no test of its column and row, which most
		// neighbours (those that already hold s's parent) never need.
		inner := sc > 0 && sr > 0 && sc < p.cols-1 && sr < p.rows-1
		piBits := uint32(pi) << 3
		// The neighbours to try: all, but away from the edge those that
		// already hold s's parent are left out at once (most are), as the
		// test at the top of the loop would leave them. (Trying one
		// changes no other's record, so the set may be taken first.)
		try := uint8(0xff)
		if inner && !endOnly {
			try = p.notFromParent(s, piBits)
		}
		for ; try != 0; try &= try - 1 {
			k := bits.TrailingZeros8(try)
			var q int
			if inner {
				q = s + p.nbrOff[k]
			} else {
				qc, qr := sc+nbrDC[k], sr+nbrDR[k]
				if qc < 0 || qr < 0 || qc >= p.cols || qr >= p.rows {
					continue
				}
				q = qr*p.cols + qc
			}
			cq := &p.c[q]
			// A cell that already holds a value from s's parent would get
			// the same value again on the straight segment: nothing to do.
			// (The parent compared in place: ps's upper 29 bits. Most
			// neighbours end here, so it is tested first; a void, whose
			// parent bits are 0, is skipped either way.)
			ps := cq.ps
			sameParent := ps&^7 == piBits && ps&7 != uint32(cellUntouched)
			if sameParent && !endOnly {
				continue
			}
			st := uint8(ps & 7)
			if st == cellVoid { // unknown ground: an obstacle
				continue
			}
			if endOnly && st == cellEndDone {
				continue
			}
			qc, qr := sc+nbrDC[k], sr+nbrDR[k]
			if st == cellClosed && !p.better(float32(sv), p.val[q]) {
				continue // closed with a value no lower cell can improve
			}
			// Straight on from s's parent, if the line of sight holds.
			if sameParent {
				// (endOnly: the bend at s is tried below)
			} else if v, fd := p.segmentDir(px, py, pv, qc, qr); p.wants(q, v, endOnly) {
				if top, ok := p.sightFrom(pi, px, py, pv, qc, qr, q, v, fd, srcIdx, endOnly); ok {
					p.offer(q, pi, v, srcIdx, top, endOnly)
					if !endOnly {
						continue
					}
				}
			} else if !endOnly {
				continue
			}
			// Otherwise the path bends at s (an end value is tried bent at
			// s as well: a glide below the clearance may end either way).
			v, fd := p.segmentDir(float64(sc), float64(sr), sv, qc, qr)
			if !p.wants(q, v, endOnly) {
				continue
			}
			if top, ok := p.sightFrom(int32(s), float64(sc), float64(sr), sv, qc, qr, q, v, fd, srcIdx, endOnly); ok {
				p.offer(q, int32(s), v, srcIdx, top, endOnly)
			}
		}
	}
	if progress != nil {
		progress(closed)
	}
	return nil
}
