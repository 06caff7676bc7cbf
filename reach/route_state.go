package reach

import "math"

// Recompute sets each sample's Margin and Covered from its Least and the
// planned altitude, and the gaps and covered fraction from them again,
// after a caller has replaced some samples' Least (for example with the
// least altitude from an engine-failure state at each point).
func (p *RouteProfile) Recompute() {
	for i := range p.Samples {
		s := &p.Samples[i]
		s.Margin, s.Covered = math.NaN(), false
		if !math.IsNaN(s.Least) {
			s.Margin = s.Alt - s.Least
			s.Covered = s.Margin >= 0
		}
	}
	p.Gaps = routeGaps(p.Samples)
	gapLen := 0.0
	for _, gp := range p.Gaps {
		gapLen += gp.Length()
	}
	switch {
	case p.Length > 0:
		p.CoveredFraction = math.Max(0, math.Min(1, 1-gapLen/p.Length))
	case len(p.Gaps) == 0:
		p.CoveredFraction = 1
	default:
		p.CoveredFraction = 0
	}
}
