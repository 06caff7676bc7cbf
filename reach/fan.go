package reach

import "math"

// A source fan lets the line-of-sight walk of a segment from a source (the
// start forward, a field backward: 98 % of the walks of a footprint) begin
// part way along the line, where every slab before is known to pass.
//
// Around a source, the lines are grouped into wedges: in each of the eight
// octants (major axis, its sign, the minor axis's sign) fanK wedges of
// equal slope |minor|/|major|. A wedge is cut along the major axis into
// bins, the columns of the pyramid's finest blocks (8 slabs). For bin j of
// a wedge the fan bounds, for every line of the wedge at once, the highest
// ground the walk would read over the bin's slabs (the finest blocks that
// the wedge's strip of squares touches, each the highest ground of its cells
// and of the cells one beyond: the squares and the cells of the check
// between centres) and the lowest the glide can be over them: the least
// altitude, over the descent table's columns the wedge's directions are
// blended from, at the bin's far end forward (its near end backward)
// measured at the wedge's steepest slope. A blend of two columns lies
// between them (arriveBlend, departBlend), and the glide's altitude is
// monotone along the line, so where
//
//	highest ground + clearance ≤ lowest glide − fanEps
//
// the walk would pass every square and every check of the bin on the exact
// altitude, with the clearance, and leave top as it was (backward, ground no
// higher than the field's elevation passes whatever the glide: top is the
// field's elevation there). The fan keeps, per wedge, how many bins from
// the source pass (worked out lazily, as far as a line needs) and the first
// that does not; a walk starts at the first slab of the first bin it cannot
// skip: the first failing one, or the bin holding its own end. The walk
// from there decides as the whole walk would (its per-square checks are
// exact; the skipped slabs would have passed without changing anything it
// carries but the anchor of its bounds and its record of failed blocks,
// which change its cost only). TestSourceFanSameDecisions checks it.

// fanK is the number of wedges per octant. At 1000 cells from the source a
// wedge is 2 cells wide; its strip of squares about 5.
const fanK = 512

// fanEps (m) is the margin the fan's bound must clear by: far above the
// rounding of a blend and of the table's arithmetic.
const fanEps = 1e-3

// sightFan switches the source fan on; tests turn it off.
var sightFan = true

// sourceFan is the fan of one source.
type sourceFan struct {
	usable bool
	pv     float64 // the source's value
	allow  float64 // backward: the field's elevation (ground passed whatever the glide)
	wedge  []fanWedge
}

// fanWedge is the state of one wedge: bins [0, pass) pass; when failed,
// bin pass does not. cols < 0: the wedge is not usable (a direction without
// headway); cols 0: its columns are not yet worked out.
type fanWedge struct {
	pass   int32
	failed bool
	nc     int8
	c      [3]int16
}

// fanOf returns the fan of source k (nil when there is none to be had).
func (p *propagation) fanOf(k int) *sourceFan {
	if len(p.fans) != len(p.srcs) {
		p.fans = make([]*sourceFan, len(p.srcs))
	}
	f := p.fans[k]
	if f == nil {
		s := p.srcs[k]
		f = &sourceFan{pv: s.Alt, usable: s.X >= 0 && s.Y >= 0 && s.X <= float64(p.cols-1) && s.Y <= float64(p.rows-1)}
		if p.backward {
			f.allow = float64(p.fieldElev[s.Index])
		}
		if f.usable {
			f.wedge = make([]fanWedge, 8*fanK)
		}
		p.fans[k] = f
	}
	return f
}

// fanStart returns the slab (major-axis column or row, as the walk of the
// segment from source k at (px, py) to cell (qc, qr) counts them) from which
// that walk must be made; every slab before it passes. It returns the
// walk's own first slab when the fan knows nothing better.
func (p *propagation) fanStart(k int, px, py float64, qc, qr int) int {
	xMajor, pa, pb, A, B, qa, nB := p.lineAxes(px, py, qc, qr)
	k0 := slabOf(pa)
	if !sightFan || A == 0 {
		return k0
	}
	f := p.fanOf(k)
	if !f.usable {
		return k0
	}
	sa, sb := 1, 1
	o := 0
	if !xMajor {
		o = 4
	}
	if A < 0 {
		sa = -1
		o += 2
	}
	if B < 0 {
		sb = -1
		o++
	}
	slope := math.Abs(B) / math.Abs(A)
	i := int(slope * fanK)
	if i >= fanK {
		i = fanK - 1
	}
	w := &f.wedge[o*fanK+i]
	kb0 := k0 >> 3
	jD := (qa>>3 - kb0) * sa // the bin holding the line's end
	if jD <= 0 {
		return k0
	}
	if w.nc == 0 {
		p.fanCols(w, xMajor, sa, sb, i)
	}
	if w.nc < 0 {
		return k0
	}
	for !w.failed && int(w.pass) < jD {
		if p.fanBin(f, w, xMajor, sa, sb, i, pa, pb, k0, int(w.pass), nB) {
			w.pass++
		} else {
			w.failed = true
		}
	}
	j := min(int(w.pass), jD)
	if j == 0 {
		return k0
	}
	kb := kb0 + sa*j
	if sa > 0 {
		return kb << 3
	}
	return kb<<3 + 7
}

// lineAxes gives the segment from (px, py) to cell (qc, qr) in the terms
// of its walk (walkLine): whether x is the major axis, the start's major
// and minor coordinates, the extents along them, the cell's major
// coordinate and the number of cells along the minor axis.
func (p *propagation) lineAxes(px, py float64, qc, qr int) (xMajor bool, pa, pb, A, B float64, qa, nB int) {
	dx, dy := float64(qc)-px, float64(qr)-py
	if math.Abs(dx) >= math.Abs(dy) {
		return true, px, py, dx, dy, qc, p.rows
	}
	return false, py, px, dy, dx, qr, p.cols
}

// fanCols works out the descent table's columns the directions of flight of
// wedge (xMajor, sa, sb, i) are blended from.
func (p *propagation) fanCols(w *fanWedge, xMajor bool, sa, sb, i int) {
	d := p.desc
	corner := func(s float64) float64 {
		a, b := float64(sa), float64(sb)*s
		dx, dy := a, b
		if !xMajor {
			dx, dy = b, a
		}
		if p.backward {
			dx, dy = -dx, -dy
		}
		return bearingOf(dx, dy) * d.invStep
	}
	f0, f1 := corner(float64(i)/fanK), corner(float64(i+1)/fanK)
	n := float64(d.nDir)
	if f1-f0 > n/2 {
		f1 -= n
	} else if f0-f1 > n/2 {
		f0 -= n
	}
	lo, hi := min(f0, f1)-0.01, max(f0, f1)+0.01
	c0, c1 := int(math.Floor(lo)), int(math.Floor(hi))+1
	if c1-c0+1 > len(w.c) {
		w.nc = -1
		return
	}
	for c := c0; c <= c1; c++ {
		ci := ((c % d.nDir) + d.nDir) % d.nDir
		if _, hiL := d.lossRangeDir(ci, ci); math.IsInf(hiL, 1) {
			w.nc = -1
			return
		}
		w.c[c-c0] = int16(ci)
	}
	w.nc = int8(c1 - c0 + 1)
}

// fanBin reports whether bin j of the wedge passes (see the comment at the
// top of this file).
func (p *propagation) fanBin(f *sourceFan, w *fanWedge, xMajor bool, sa, sb, i int, pa, pb float64, k0, j, nB int) bool {
	kb := (k0>>3 + sa*j)
	// The bin's slabs in the walk's order, first and last.
	kf, kl := kb<<3, kb<<3+7
	if sa < 0 {
		kf, kl = kl, kf
	}
	if j == 0 {
		kf = k0
	}
	half := 0.5 * float64(sa)
	uNear := max(0, float64(sa)*(float64(kf)-half-pa))
	uFar := float64(sa) * (float64(kl) + half - pa)
	s0, s1 := float64(i)/fanK-1e-9, float64(i+1)/fanK+1e-9
	var b0, b1 float64
	if sb > 0 {
		b0, b1 = pb+s0*uNear, pb+s1*uFar
	} else {
		b0, b1 = pb-s1*uFar, pb-s0*uNear
	}
	m0, m1 := int(math.Ceil(b0-0.5-sightEps)), int(math.Floor(b1+0.5+sightEps))
	if m0 < 0 || m1 >= nB {
		return false
	}
	gf := float64(p.pyr.lv[0].columnMax(xMajor, kb, m0, m1))
	if math.IsInf(gf, 1) || gf != gf {
		return false
	}
	d := p.desc
	c := float64(p.clearance)
	if p.backward {
		if gf <= f.allow {
			return true
		}
		r := uNear * math.Sqrt(1+s0*s0) * p.cell * (1 - 1e-12)
		h := math.Inf(1)
		for _, col := range w.c[:w.nc] {
			h = min(h, d.departBlend(int(col), int(col), 0, f.pv, r))
		}
		return gf+c <= h-fanEps
	}
	r := uFar*math.Sqrt(1+s1*s1)*p.cell*(1+1e-12) + 1e-9
	h := math.Inf(1)
	for _, col := range w.c[:w.nc] {
		h = min(h, d.arriveBlend(int(col), int(col), 0, f.pv, r))
	}
	return gf+c <= h-fanEps
}

// fanEndClear reports whether the rest of the line from the source at
// (px, py), with value pv, to cell (qc, qr), with value v, from slab ks
// (fanStart: the slabs before it pass) passes every square and every check
// between centres with the clearance and leaves top as it was, so that its
// walk would return top and true. It tries one test, the walk's own first
// one on the pyramid's finest blocks made without its set-up: where the
// rest lies within one column of those blocks (98 % of the walks the fan
// starts on BenchmarkFootprint2000; 60 % of those pass), the highest
// ground of the blocks that the squares of the slabs ks … the cell's touch
// (widened by a cell either side) plus the clearance must lie 1 mm
// (fanEps) below the lowest the glide can be there. Forward that is the
// cell's value v: the glide descends toward the cell (each of the table's
// columns is monotone in the distance flown, and so is their blend).
// Backward it is the field's pv, the least altitude anywhere on a glide
// that ends at the field, or ground no higher than the field's elevation
// allow, which passes whatever the glide (top, the field's elevation,
// stays). TestSourceFanSameDecisions compares the decisions and tops with
// the walk from the source's own slab.
func (p *propagation) fanEndClear(ks int, px, py, pv float64, qc, qr int, v float64, allow float32) bool {
	if !sightFan {
		return false
	}
	xMajor, pa, pb, A, B, qa, nB := p.lineAxes(px, py, qc, qr)
	if A == 0 || ks>>3 != qa>>3 {
		return false
	}
	half := 0.5
	if A < 0 {
		half = -0.5
	}
	t0 := (float64(ks) - half - pa) / A
	if t0 < 0 {
		t0 = 0
	}
	b0, b1 := pb+t0*B, pb+B
	if b0 > b1 {
		b0, b1 = b1, b0
	}
	// The squares' range (squaresOf: ceil(b0 − ½ − ε) … floor(b1 + ½ + ε))
	// and a cell either side, by truncation: below ceil and above floor
	// wherever the range starts in the window (a start below it gives
	// m0 < 0 either way), so the blocks read are never fewer.
	x0 := b0 - 0.5 - sightEps
	if x0 < 0 {
		return false
	}
	m0, m1 := int(x0)-1, int(b1+0.5+sightEps)+1
	if m0 < 0 || m1 >= nB {
		return false
	}
	g := p.pyr.lv[0].columnMax(xMajor, ks>>3, m0, m1)
	// (A void is +Inf in the pyramid: it passes neither test below.)
	gf := float64(g)
	c := float64(p.clearance)
	if p.backward {
		return g <= allow || gf+c <= pv-fanEps
	}
	return gf+c <= v-fanEps
}

// columnMax returns, for lv the pyramid's finest level (blocks of 8
// cells), the highest ground of its blocks in block column kb of the major
// axis (x when xMajor) that hold the cells m0 … m1 of the minor axis.
func (lv *pyrLevel) columnMax(xMajor bool, kb, m0, m1 int) float32 {
	g := float32(math.Inf(-1))
	for mb := m0 >> 3; mb <= m1>>3; mb++ {
		if xMajor {
			g = max(g, lv.max[mb*lv.bc+kb])
		} else {
			g = max(g, lv.max[kb*lv.bc+mb])
		}
	}
	return g
}
