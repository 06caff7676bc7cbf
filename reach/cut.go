package reach

import (
	"math"
	"slices"
)

// displacementBound is a lower bound on the height (m) that any glide of a
// descent table loses to move by a given ground displacement, whatever
// tracks it holds and wherever it bends: the gauge of the set K of ground
// displacements per metre of height.
//
// A straight segment of length L on a tabulated track k loses at least
// L·c_k, c_k being the least height per metre of ground over the table's
// altitude rows on that track (the steepest row of the envelope inverted),
// and a segment between two tracks loses the blend of theirs, at least
// L·((1−w)·c_k + w·c_{k+1}). Its displacement per metre of height lies on
// the segment from the origin to P(φ) = u(φ)/c(φ), u the unit vector of
// the track. A path of segments moves by Δ = Σ L_i·u_i for a height
// H = Σ loss_i, so Δ/H is a convex combination of such points: it lies in
// K, the convex hull of the origin and the curve P. Hence H ≥ |Δ|/ρ(φ_Δ),
// with ρ(φ) the farthest point of K along the bearing φ_Δ of Δ. The curve is
// sampled twice per tabulated track, ρ is taken as its largest value over
// each half-degree bin and its neighbours (the bearing of a vector is
// computed with a small error), and 0.1 % is added: the bound errs low.
//
// This is the heuristic of an A* search (Hart, Nilsson and Raphael, "A
// Formal Basis for the Heuristic Determination of Minimum Cost Paths",
// IEEE Trans. SSC 4(2), 1968): admissible (never above the true cost) and,
// being a gauge (a norm-like function, subadditive), consistent.
type displacementBound struct {
	invRho []float64 // per bin: 1/ρ (m of height per m of ground); +Inf where K holds no displacement
	// minX … maxY are the bounding box of K (m of ground per m of height,
	// east and north), 0.1 % wider.
	minX, maxX, minY, maxY float64
}

// boundBins is the number of bearing bins of a displacementBound.
const boundBins = 720

// newDisplacementBound returns the bound of table t.
func newDisplacementBound(t *descent) *displacementBound {
	c := make([]float64, t.nDir)
	for d := range c {
		col := t.column(d)
		best := 0.0 // largest ground distance per metre of height on this track
		for i := 0; i+1 < t.nh; i++ {
			best = math.Max(best, (col.at(i)-col.at(i+1))/t.dh)
		}
		c[d] = 1 / best // +Inf: no headway on this track at any altitude
	}
	const sub = 2
	pts := make([][2]float64, 0, t.nDir*sub+1)
	pts = append(pts, [2]float64{0, 0})
	for d := 0; d < t.nDir; d++ {
		for s := 0; s < sub; s++ {
			w := float64(s) / sub
			cb := (1-w)*c[d] + w*c[(d+1)%t.nDir]
			if math.IsInf(cb, 1) || !(cb > 0) {
				continue
			}
			phi := (float64(d) + w) * t.dirStep
			sin, cos := math.Sincos(phi)
			pts = append(pts, [2]float64{sin / cb, cos / cb})
		}
	}
	hull := convexHull(pts)
	rho := func(phi float64) float64 {
		ux, uy := math.Sincos(phi)
		far := 0.0
		for i := range hull {
			a, b := hull[i], hull[(i+1)%len(hull)]
			if t, ok := rayHits(ux, uy, a, b); ok {
				far = math.Max(far, t)
			}
		}
		return far
	}
	step := 2 * math.Pi / boundBins
	edge := make([]float64, boundBins+1)
	for j := range edge {
		edge[j] = rho(float64(j) * step)
	}
	binMax := make([]float64, boundBins)
	for j := range binMax {
		binMax[j] = math.Max(edge[j], edge[j+1])
	}
	for _, v := range hull {
		a := math.Atan2(v[0], v[1])
		if a < 0 {
			a += 2 * math.Pi
		}
		j := min(int(a/step), boundBins-1)
		binMax[j] = math.Max(binMax[j], math.Hypot(v[0], v[1]))
	}
	b := &displacementBound{invRho: make([]float64, boundBins)}
	for _, v := range hull {
		b.minX, b.maxX = math.Min(b.minX, v[0]*1.001), math.Max(b.maxX, v[0]*1.001)
		b.minY, b.maxY = math.Min(b.minY, v[1]*1.001), math.Max(b.maxY, v[1]*1.001)
	}
	for j := range b.invRho {
		r := math.Max(binMax[j], math.Max(binMax[(j+boundBins-1)%boundBins], binMax[(j+1)%boundBins]))
		b.invRho[j] = 1 / (r * 1.001)
	}
	return b
}

// height returns the bound (m) for the displacement (dx east, dy north) in
// metres: +Inf where no glide of the table moves that way.
func (b *displacementBound) height(dx, dy float64) float64 {
	L := math.Sqrt(dx*dx + dy*dy)
	if L == 0 {
		return 0
	}
	a := bearingOf(dx, dy)
	if a < 0 {
		a += 2 * math.Pi
	}
	j := int(a * (boundBins / (2 * math.Pi)))
	if j >= boundBins || j < 0 {
		j = 0
	}
	return L * b.invRho[j]
}

// rayHits returns where the ray t·(ux, uy), t ≥ 0, meets the segment a–b,
// and whether it does (the farther end where the ray runs along it).
func rayHits(ux, uy float64, a, b [2]float64) (float64, bool) {
	ex, ey := b[0]-a[0], b[1]-a[1]
	den := ux*ey - uy*ex
	if math.Abs(den) < 1e-15 {
		// Parallel: on the ray's line only if a is; take the farther end.
		if math.Abs(a[0]*uy-a[1]*ux) > 1e-12 {
			return 0, false
		}
		t := math.Max(a[0]*ux+a[1]*uy, b[0]*ux+b[1]*uy)
		return t, t >= 0
	}
	// a + s·e = t·u  →  t = (a × e)/(u × e), s = (a × u)/(u × e).
	t := (a[0]*ey - a[1]*ex) / den
	s := (a[0]*uy - a[1]*ux) / den
	if t < 0 || s < -1e-12 || s > 1+1e-12 {
		return 0, false
	}
	return t, true
}

// convexHull returns the convex hull of pts, counter-clockwise, by
// Andrew's monotone chain (A. M. Andrew, "Another efficient algorithm for
// convex hulls in two dimensions", Information Processing Letters 9(5),
// 1979).
func convexHull(pts [][2]float64) [][2]float64 {
	p := slices.Clone(pts)
	slices.SortFunc(p, func(a, b [2]float64) int {
		if a[0] != b[0] {
			if a[0] < b[0] {
				return -1
			}
			return 1
		}
		switch {
		case a[1] < b[1]:
			return -1
		case a[1] > b[1]:
			return 1
		}
		return 0
	})
	if len(p) < 3 {
		return p
	}
	cross := func(o, a, b [2]float64) float64 {
		return (a[0]-o[0])*(b[1]-o[1]) - (a[1]-o[1])*(b[0]-o[0])
	}
	h := make([][2]float64, 0, 2*len(p))
	for _, q := range p {
		for len(h) >= 2 && cross(h[len(h)-2], h[len(h)-1], q) <= 0 {
			h = h[:len(h)-1]
		}
		h = append(h, q)
	}
	lower := len(h) + 1
	for i := len(p) - 2; i >= 0; i-- {
		q := p[i]
		for len(h) >= lower && cross(h[len(h)-2], h[len(h)-1], q) <= 0 {
			h = h[:len(h)-1]
		}
		h = append(h, q)
	}
	return h[:len(h)-1]
}
