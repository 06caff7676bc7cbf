package reach

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// LossModel gives the height an aircraft loses per metre over the ground when
// it holds a track:
//
//	λ(h, θ) = (w + s) / G      (dimensionless, ≥ 0)
//
// at altitude h (metres MSL) on a track of bearing θ (radians, clockwise from
// true north), with w the still-air sink at the speed to fly, s the sinking
// air allowance and G the ground speed. It is +Inf where the aircraft makes no
// headway. The precomputed speed-to-fly Table implements it; the solvers only
// ever see a LossModel.
type LossModel interface {
	Loss(h, bearing float64) float64
}

// LossFunc adapts a function to the LossModel interface.
type LossFunc func(h, bearing float64) float64

// Loss calls f(h, bearing).
func (f LossFunc) Loss(h, bearing float64) float64 { return f(h, bearing) }

// ConstantLoss is a LossModel with one glide ratio E in every direction and at
// every altitude: λ = 1/E. It models still air with an altitude-independent
// polar and serves as the reference case of the tests.
type ConstantLoss float64

// Loss returns 1/E.
func (e ConstantLoss) Loss(h, bearing float64) float64 { return 1 / float64(e) }

// descent integrates a LossModel along straight segments of constant track.
// For each of nDir track directions θ_d = d·2π/nDir it tabulates the ground
// distance flown while descending from hTop to h,
//
//	D_d(h) = ∫_h^hTop dh' / λ(h', θ_d),
//
// on altitude rows h_i = hBot + i·dh (trapezoidal rule in 1/λ). A segment of
// ground length L begun at h1 ends at h2 with D(h2) = D(h1) + L, and a segment
// that must end at h2 begins at h1 with D(h1) = D(h2) − L; both are solved by
// inverse interpolation in the table and blended linearly between the two
// tabulated directions either side of the track. The loss is thus integrated
// through the altitude layers the segment crosses, not taken at one altitude.
type descent struct {
	hBot, hTop, dh float64
	nh, nDir       int
	dirStep        float64 // radians between tabulated directions
	invStep        float64 // 1/dirStep
	// dist[i*nDir+d] = D_d(h_i), non-increasing in i: the table by
	// altitude row, the directions of one row side by side, so that the
	// two columns of a blend share a cache line and the rows the solver's
	// lookups read at one time (around one altitude, all directions) are
	// a few kilobytes
	dist           []float64
	cols           []column  // cols[d] is direction d's column of dist
	isotropic      bool      // every direction has the same column: one lookup suffices
	maxRatio       float64   // largest ground distance per metre of height in the table
	dirMax, dirMin []float64 // largest and smallest ratio of each direction's column
	// invMax[d] = 1/dirMax[d] and invMin[d] = 1/dirMin[d] where the ratio
	// is > 0, else +Inf (for lossRangeDir)
	invMax, invMin []float64
	// env[i] is the envelope Σ_{k ≥ i} max_d (D_d(h_k) − D_d(h_k+1)): the
	// most ground any glide can cover descending from hTop to h_i, whatever
	// track it holds at each altitude (see rangeBound).
	env []float64
	// The row index of rowOf: column d's distances (0, row[0]] cut into
	// binM equal bins, cols[d].scale = binM/row[0] (−1 for a column without
	// headway), and bins[j*nDir+d] the largest row i ≤ nh−3 with
	// row[i] ≥ (j+1)·row[0]/binM: the row where the inversion of a distance
	// in bin j starts; bin binM (0) takes every distance beyond. binM is 0
	// (no index) for tables of fewer than 3 or more than 65536 rows.
	binM int
	bins []uint16
}

// minRatio returns the least ground distance per metre of height (m/m)
// over the table's rows and directions: the steepest descent any glide of
// the table makes; 0 where some direction makes no headway.
func (t *descent) minRatio() float64 {
	m := math.Inf(1)
	for d := 0; d < t.nDir; d++ {
		col := t.column(d)
		for i := 0; i+1 < t.nh; i++ {
			m = min(m, (col.at(i)-col.at(i+1))/t.dh)
		}
	}
	if math.IsInf(m, 1) || m < 0 {
		return 0
	}
	return m
}

// lossRangeDir returns the least and the largest height lost per metre of
// ground (1/ratio) at any altitude of the table in direction columns d0
// and d1 (vecIndex; +Inf where a column has a row without headway): a
// segment blended from the two columns loses height at a rate between
// them, since a blend of the two columns' altitudes lies between them.
func (t *descent) lossRangeDir(d0, d1 int) (lo, hi float64) {
	// 1/max(a, b) = min(1/a, 1/b) and 1/min(a, b) = max(1/a, 1/b) bit for
	// bit (division is correctly rounded, so monotone): the reciprocals are
	// tabulated once (invMax, invMin) instead of two divisions per walk.
	lo, hi = min(t.invMax[d0], t.invMax[d1]), max(t.invMin[d0], t.invMin[d1])
	if math.IsInf(lo, 1) {
		lo = 0
	}
	return lo, hi
}

// errNoGlide reports a model that gives no finite ground distance anywhere.
var errNoGlide = errors.New("reach: the aircraft makes no headway in any direction")

// Bounds of a descent table: the height span of NewTable's range, and at
// most 2²⁶ entries (512 MiB of float64) whatever the step.
const (
	maxDescentSpan  = 25000.0
	maxDescentCells = 1 << 26
)

// newDescent tabulates m between hBot and hTop (metres MSL) every dh metres
// over nDir directions.
func newDescent(m LossModel, hBot, hTop, dh float64, nDir int) (*descent, error) {
	if !(hTop > hBot) || dh <= 0 || nDir < 4 {
		return nil, fmt.Errorf("reach: bad descent table range %g..%g m step %g m, %d directions", hBot, hTop, dh, nDir)
	}
	// Bound the table before allocating it: heights span at most the
	// atmosphere a table may cover (NewTable's -5000..20000 m), so a range
	// beyond that is a caller's error, not a 288 GB allocation.
	if hTop-hBot > maxDescentSpan || math.IsInf(hTop, 0) || math.IsInf(hBot, 0) || nDir > 1<<16 {
		return nil, fmt.Errorf("reach: descent table range %g..%g m (%d directions) is beyond the %g m an atmosphere table spans", hBot, hTop, nDir, maxDescentSpan)
	}
	nh := int(math.Ceil((hTop-hBot)/dh)) + 1
	if nh < 2 {
		nh = 2
	}
	if int64(nh)*int64(nDir) > maxDescentCells {
		return nil, fmt.Errorf("reach: descent table of %d heights × %d directions exceeds %d entries; use a coarser height step", nh, nDir, int64(maxDescentCells))
	}
	dh = (hTop - hBot) / float64(nh-1)
	t := &descent{hBot: hBot, hTop: hTop, dh: dh, nh: nh, nDir: nDir, dirStep: 2 * math.Pi / float64(nDir), invStep: float64(nDir) / (2 * math.Pi)}
	// Built column by column (in row, one direction's altitudes), stored by
	// altitude row.
	t.dist = make([]float64, nDir*nh)
	row := make([]float64, nh)
	t.dirMax, t.dirMin = make([]float64, nDir), make([]float64, nDir)
	inv := make([]float64, nh)
	finite := false
	for d := 0; d < nDir; d++ {
		th := float64(d) * t.dirStep
		for i := 0; i < nh; i++ {
			l := m.Loss(hBot+float64(i)*dh, th)
			switch {
			case l > 0 && !math.IsInf(l, 1) && !math.IsNaN(l):
				inv[i] = 1 / l
			case l <= 0 && !math.IsNaN(l):
				// No height lost (rising air stronger than the sink): treat
				// as a very flat glide rather than an infinite one, so the
				// table stays monotone; the solver's window bounds the reach.
				inv[i] = 1e4
			default:
				inv[i] = 0 // no headway: no ground distance for that height
			}
		}
		row[nh-1] = 0
		for i := nh - 2; i >= 0; i-- {
			row[i] = row[i+1] + 0.5*(inv[i]+inv[i+1])*dh
		}
		if row[0] > 0 {
			finite = true
		}
		lo, hi := math.Inf(1), 0.0
		for i := 0; i+1 < nh; i++ {
			r := (row[i] - row[i+1]) / dh
			lo, hi = min(lo, r), max(hi, r)
		}
		t.dirMax[d], t.dirMin[d] = hi, lo
		t.maxRatio = max(t.maxRatio, hi)
		for i, x := range row {
			t.dist[i*nDir+d] = x
		}
	}
	if !finite {
		return nil, errNoGlide
	}
	t.invMax, t.invMin = make([]float64, nDir), make([]float64, nDir)
	for d := 0; d < nDir; d++ {
		t.invMax[d], t.invMin[d] = math.Inf(1), math.Inf(1)
		if r := t.dirMax[d]; r > 0 {
			t.invMax[d] = 1 / r
		}
		if r := t.dirMin[d]; r > 0 {
			t.invMin[d] = 1 / r
		}
	}
	t.env = make([]float64, nh)
	for i := nh - 2; i >= 0; i-- {
		inc := 0.0
		for d := 0; d < nDir; d++ {
			inc = max(inc, t.dist[i*nDir+d]-t.dist[(i+1)*nDir+d])
		}
		t.env[i] = t.env[i+1] + inc
	}
	t.cols = make([]column, nDir)
	for d := range t.cols {
		t.cols[d] = column{v: t.dist[d:], s: nDir}
	}
	t.binRows()
	t.isotropic = true
	for d := 1; d < nDir && t.isotropic; d++ {
		for i := 0; i < nh; i++ {
			if t.dist[i*nDir+d] != t.dist[i*nDir] {
				t.isotropic = false
				break
			}
		}
	}
	return t, nil
}

// rangeBound returns an upper bound (m) on the ground length of any glide
// of the table's solver from altitude top down to bottom (m MSL), whatever
// tracks it holds and wherever it bends: over each altitude row the length
// flown is at most the longest of the directions' (a blend of two
// directions, as the solver makes, lies between them), so the length is at
// most the envelope env. Beyond the table's ends it continues at maxRatio.
// The straight-line distance from the start of such a glide to its end is
// no more than its length, so cells farther than this from a field cannot
// reach it from the ceiling.
func (t *descent) rangeBound(top, bottom float64) float64 {
	if !(top > bottom) {
		return 0
	}
	return t.envAt(bottom) - t.envAt(top)
}

// envAt is env at altitude h (m), linear within a row, extended at
// maxRatio beyond the ends.
func (t *descent) envAt(h float64) float64 {
	f := (h - t.hBot) / t.dh
	if f <= 0 {
		return t.env[0] + (t.hBot-h)*t.maxRatio
	}
	if f >= float64(t.nh-1) {
		return t.env[t.nh-1] - (h-t.hTop)*t.maxRatio
	}
	i := int(f)
	u := f - float64(i)
	return t.env[i]*(1-u) + t.env[i+1]*u
}

// GlideRangeBound returns an upper bound (m) on the ground distance a glide
// in model can cover from altitude top down to bottom (both m MSL), over
// every combination of tracks: Σ over 10 m altitude rows of the longest
// distance any of 360 track directions covers in that row (trapezoidal rule
// in 1/λ, as the solvers integrate). A point farther than this from a field
// (plus a cell or two for the grid) cannot reach it from top; the commands
// use it to decide fields beyond any possible reach without a solver run.
// It is 0 when top ≤ bottom.
func GlideRangeBound(model LossModel, top, bottom float64) (float64, error) {
	if !(top > bottom) {
		return 0, nil
	}
	d, err := newDescentFor(model, bottom, top)
	if err != nil {
		return 0, err
	}
	return d.rangeBound(top, bottom), nil
}

// RangeBound answers GlideRangeBound for many altitude pairs from one
// table: build it once over the altitudes the questions span.
type RangeBound struct{ d *descent }

// NewRangeBound tabulates model between bottom and top (m MSL) as
// GlideRangeBound does.
func NewRangeBound(model LossModel, bottom, top float64) (*RangeBound, error) {
	if !(top > bottom) {
		return nil, fmt.Errorf("reach: bad range %g..%g m", bottom, top)
	}
	d, err := newDescentFor(model, bottom, top)
	if err != nil {
		return nil, err
	}
	return &RangeBound{d: d}, nil
}

// Bound is GlideRangeBound(model, top, bottom) (m). Beyond the tabulated
// altitudes it continues at the flattest glide of the table, which is an
// upper bound only where the model is no flatter there: tabulate what you
// ask.
func (r *RangeBound) Bound(top, bottom float64) float64 { return r.d.rangeBound(top, bottom) }

// dirIndex splits a bearing (radians) into the tabulated direction below it
// and the blend weight toward the next one.
func (t *descent) dirIndex(bearing float64) (d0, d1 int, w float64) {
	return t.splitDir(bearing / t.dirStep)
}

// splitDir splits f, a direction in units of the table's direction step (any
// real value; it is reduced modulo nDir), into the tabulated direction d0 at
// or below it, the next one d1 (wrapping to 0 after the last), and the blend
// weight w ∈ [0, 1) toward d1. A value a hair below a multiple of nDir
// (e.g. −1e-15) reduces to exactly nDir in floating point; that is direction
// 0 with weight 0, never direction 0 with weight nDir (which extrapolated
// the blend far beyond both tabulated columns). NaN gives direction 0.
func (t *descent) splitDir(f float64) (d0, d1 int, w float64) {
	n := float64(t.nDir)
	if f < 0 && f >= -n {
		// A bearing of vecIndex lies in (−n/2, n/2]; its west half reduces
		// to f + n, the value the reduction below gives it (f − Floor(f/n)·n
		// with Floor(f/n) = −1, or −0 when f/n underflows and then f + n),
		// without the Floor and the division (TestSplitDirWestHalf).
		f += n
	}
	if !(f >= 0 && f < n) {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return 0, 1, 0
		}
		f -= math.Floor(f/n) * n
		if f < 0 { // a tiny negative f whose f/n underflowed to −0
			f += n
		}
	}
	d0 = int(f)
	if d0 >= t.nDir { // f rounded up to n
		d0, f = 0, 0
	}
	w = f - float64(d0)
	d1 = d0 + 1
	if d1 == t.nDir {
		d1 = 0
	}
	return d0, d1, w
}

// binsPerRow is how many bins of rowOf's index a column has per
// altitude row: with one, 0.04 % of BenchmarkArriveVec's column lookups
// fell in a bin holding two row ends and went to the search; with two,
// none did.
const binsPerRow = 2

// binRows builds the descent's row index (binM, bins and the columns'
// scale and bins): binsPerRow bins per altitude row in each column.
func (t *descent) binRows() {
	nh, n := t.nh, t.nDir
	if nh < 3 || nh > 1<<16 {
		return
	}
	m := binsPerRow * (nh - 1)
	t.binM = m
	t.bins = make([]uint16, (m+1)*n)
	for d := 0; d < n; d++ {
		c := &t.cols[d]
		c.bins, c.scale = t.bins[d:], -1
		if !(c.at(0) > 0) {
			continue
		}
		c.scale = float64(m) / c.at(0)
		i := nh - 1
		for j := 0; j < m; j++ {
			thr := float64(j+1) * c.at(0) / float64(m)
			for i > 0 && c.at(i) < thr {
				i--
			}
			t.bins[j*n+d] = uint16(min(i, nh-3))
		}
	}
}

// rowOf returns the row i of a column that strictly brackets distance g,
// row[i] > g > row[i+1], found without a search through the column's
// index (the descent must have one: binM > 0), or −1 when the index
// cannot tell (the caller then searches, heightNear). The bin of g gives a row; one step
// down the column is allowed; the row is kept only where it brackets g
// strictly. There it is the only row that brackets g, so heightNear from
// any hint (and heightAt) ends on it and works out the same altitude
// (heightOnRow), bit for bit: a guess is checked, never trusted. Equal
// distances (g on a row, or a run of rows without headway) and g outside
// (0, row[0]) or NaN are left to the search. (Small enough to be inlined
// into arriveRow and departRow.)
func (t *descent) rowOf(row *column, g float64) int {
	v, n := row.v, row.s
	// bin binM: g ≥ row[0], g < 0 or NaN (any bin is safe: the row found
	// is checked)
	j := min(uint(int(g*row.scale)), uint(t.binM))
	i := int(row.bins[j*uint(n)])
	step := 0 // (compiled to a SETcc: the step is taken about half the time)
	if v[(i+1)*n] >= g {
		step = 1
	}
	i += step
	if v[i*n] > g && g > v[(i+1)*n] {
		return i
	}
	return -1
}

// heightOnRow is the altitude whose distance from the top is g in a
// column (row) where row[i] ≥ g ≥ row[i+1] and row[i] > row[i+1]: linear
// between the two rows.
func (t *descent) heightOnRow(row *column, i int, g float64) float64 {
	a, b := row.at(i), row.at(i+1)
	return t.hBot + (float64(i)+(a-g)/(a-b))*t.dh
}

// heightNear inverts a column of D (row, D_d(h_i) for each altitude row
// i) like heightAt, searching from row hint outward: the search a lookup
// falls back to where the row index (rowOf) cannot tell.
func (t *descent) heightNear(row *column, g float64, hint int) float64 {
	if g <= 0 {
		return t.hTop
	}
	if g > row.at(0) {
		return math.Inf(-1)
	}
	i := hint
	if i < 0 {
		i = 0
	}
	if i > t.nh-2 {
		i = t.nh - 2
	}
	// A hint that misses (the ground per row changes with altitude: the
	// wind's layers) is corrected by one secant step on the rows at the
	// hint, so the search below takes a step or two, not up to eight
	// (BenchmarkFootprint2000: the first hint was off by four rows or more
	// in a fifth of the calls). Where the search starts does not change
	// the altitude found: two rows that both bracket g give the same
	// altitude, but for a run of equal rows (no headway over a whole row)
	// that g meets exactly.
	if a, b := row.at(i), row.at(i+1); (a < g || b > g) && a > b {
		i += int((a - g) / (a - b))
		i = max(0, min(i, t.nh-2))
	}
	// Want row[i] ≥ g ≥ row[i+1].
	for steps := 0; ; steps++ {
		if steps > 8 {
			return t.heightAt(row, g)
		}
		if row.at(i) < g {
			i--
			if i < 0 {
				return t.hBot
			}
			continue
		}
		if row.at(i+1) > g {
			i++
			if i > t.nh-2 {
				return t.hTop
			}
			continue
		}
		break
	}
	if row.at(i) == row.at(i+1) {
		return t.hBot + float64(i)*t.dh
	}
	return t.heightOnRow(row, i, g)
}

// heightAt inverts a column of D (row): the altitude whose distance-from-top
// is g. It returns −Inf when g lies beyond the bottom of the table and hTop
// when g ≤ 0.
func (t *descent) heightAt(row *column, g float64) float64 {
	if g <= 0 {
		return t.hTop
	}
	if g > row.at(0) {
		return math.Inf(-1)
	}
	// row is non-increasing: find i with row[i] ≥ g ≥ row[i+1].
	i := sort.Search(t.nh, func(k int) bool { return row.at(k) < g }) - 1
	if i < 0 {
		return t.hBot
	}
	if i >= t.nh-1 {
		return t.hTop
	}
	if row.at(i) == row.at(i+1) {
		return t.hBot + float64(i)*t.dh
	}
	return t.heightOnRow(row, i, g)
}

// column returns direction d's column of D (D_d(h_i) for each altitude
// row i).
func (t *descent) column(d int) *column { return &t.cols[d] }

// column is one direction's column of a descent's dist: row i at v[i*s].
type column struct {
	v     []float64 // dist[d:]
	s     int       // nDir
	scale float64   // binM/row[0], −1 without headway (rowOf)
	bins  []uint16  // the descent's bins[d:], by the same stride (rowOf)
}

// at returns the column's row i, D_d(h_i).
func (c *column) at(i int) float64 { return c.v[i*c.s] }

// arrive returns the altitude after gliding a ground distance L (metres) from
// altitude h on bearing (radians). It is −Inf when the glide would end below
// the bottom of the table.
func (t *descent) arrive(h, bearing, L float64) float64 {
	d0, d1, w := t.dirIndex(bearing)
	return t.arriveBlend(d0, d1, w, h, L)
}

// arriveVec is arrive for a segment given as a vector (dx east, dy north, in
// any unit) and its ground length L (m): the solver's hot path.
func (t *descent) arriveVec(h, dx, dy, L float64) float64 {
	d0, d1, w := t.vecIndex(dx, dy)
	return t.arriveBlend(d0, d1, w, h, L)
}

// departVec is depart for a segment of travel direction (dx, dy).
func (t *descent) departVec(h, dx, dy, L float64) float64 {
	d0, d1, w := t.vecIndex(dx, dy)
	return t.departBlend(d0, d1, w, h, L)
}

// vecIndex is dirIndex for the bearing of the vector (dx east, dy north).
func (t *descent) vecIndex(dx, dy float64) (d0, d1 int, w float64) {
	return t.splitDir(bearingOf(dx, dy) * t.invStep)
}

// arriveBlend is arrive on the blend of direction columns d0 and d1 with
// weight w toward d1 (vecIndex). The altitude's row and fraction are the
// same in both columns: they are worked out once.
func (t *descent) arriveBlend(d0, d1 int, w, h, L float64) float64 {
	f := (h - t.hBot) / t.dh
	if f <= 0 {
		return math.Inf(-1)
	}
	i := int(f)
	if i >= t.nh-1 {
		i = t.nh - 2
		f = float64(i + 1)
	}
	u := f - float64(i)
	h0 := t.arriveRow(d0, i, u, L)
	if w == 0 || t.isotropic {
		return h0
	}
	h1 := t.arriveRow(d1, i, u, L)
	return h0*(1-w) + h1*w
}

// arriveRow is arrive in column d from the altitude at row i and fraction
// u toward row i+1.
func (t *descent) arriveRow(d, i int, u, L float64) float64 {
	row := t.column(d)
	g := row.at(i)*(1-u) + row.at(i+1)*u + L
	if t.binM > 0 {
		if k := t.rowOf(row, g); k >= 0 {
			return t.heightOnRow(row, k, g)
		}
	}
	perRow := row.at(i) - row.at(i+1) // ground distance per altitude row here
	hint := i
	if perRow > 0 {
		hint = i - int(L/perRow)
	}
	return t.heightNear(row, g, hint)
}

// depart returns the altitude at which a glide of ground length L on bearing
// must begin to end at altitude h. It is +Inf when that lies above the top of
// the table.
func (t *descent) depart(h, bearing, L float64) float64 {
	d0, d1, w := t.dirIndex(bearing)
	return t.departBlend(d0, d1, w, h, L)
}

// departBlend is depart on the blend of direction columns d0 and d1 with
// weight w toward d1 (as arriveBlend).
func (t *descent) departBlend(d0, d1 int, w, h, L float64) float64 {
	f := (h - t.hBot) / t.dh
	if f < 0 {
		f = 0
	}
	i := int(f)
	if i >= t.nh-1 {
		return math.Inf(1)
	}
	u := f - float64(i)
	h0 := t.departRow(d0, i, u, L)
	if w == 0 || t.isotropic || math.IsInf(h0, 1) {
		return h0
	}
	h1 := t.departRow(d1, i, u, L)
	return h0*(1-w) + h1*w
}

// departRow is depart in column d to the altitude at row i and fraction u
// toward row i+1.
func (t *descent) departRow(d, i int, u, L float64) float64 {
	row := t.column(d)
	g := row.at(i)*(1-u) + row.at(i+1)*u - L
	if g < 0 {
		return math.Inf(1)
	}
	if t.binM > 0 {
		if k := t.rowOf(row, g); k >= 0 {
			return t.heightOnRow(row, k, g)
		}
	}
	perRow := row.at(i) - row.at(i+1)
	hint := i
	if perRow > 0 {
		hint = i + int(L/perRow)
	}
	return t.heightNear(row, g, hint)
}

// bearingOf returns atan2(dx, dy) — the bearing, clockwise from north, of
// the vector (dx east, dy north) — in radians in (−π, π], by an octant
// reduction and a minimax polynomial for atan on [0, 1] (maximum error
// 1e-5 rad, far below the 1° spacing of the descent table). It is the hot
// path of the any-angle search; math.Atan2 is several times slower.
func bearingOf(dx, dy float64) float64 {
	ax, ay := math.Abs(dx), math.Abs(dy)
	if ax == 0 && ay == 0 {
		return 0
	}
	// angle from north toward east in the first quadrant: atan(ax/ay)
	var a float64
	if ax <= ay {
		a = atanUnit(ax / ay)
	} else {
		a = math.Pi/2 - atanUnit(ay/ax)
	}
	if dy < 0 {
		a = math.Pi - a
	}
	if dx < 0 {
		a = -a
	}
	return a
}

// atanUnit approximates atan(z) for z in [0, 1] (error < 1e-5 rad).
func atanUnit(z float64) float64 {
	z2 := z * z
	return z * (0.99997726 + z2*(-0.33262347+z2*(0.19354346+z2*(-0.11643287+z2*(0.05265332+z2*-0.01172120)))))
}
