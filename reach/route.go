package reach

import (
	"errors"
	"math"
)

// RoutePoint is one sample of a planned route for RequiredResult.Route:
// position in degrees, distance from the route's start along it (m) and the
// planned altitude there (m MSL).
type RoutePoint struct {
	Lat, Lon float64
	Dist     float64 // m from the start, non-decreasing along the route
	Alt      float64 // planned altitude, m MSL
}

// RouteSample is the forced-landing judgement at one route point.
type RouteSample struct {
	RoutePoint
	// Terrain is the ground elevation under the point, m MSL (the result's
	// Elevation, else bilinear on the solver's window); NaN off the window
	// or on a void.
	Terrain float64
	// Least is the least altitude (m MSL) from which some field is reached
	// with its reserve (it includes the reserve); NaN when no field is
	// reachable from below the solver's ceiling, or the point is off the
	// window.
	Least float64
	// Best is the index of the field that Least leads to; −1 when none.
	Best int
	// Margin is Alt − Least, m: the height to spare above the least
	// altitude. Zero means the best field is reached with exactly its
	// reserve; the arrival height above that field is then about
	// reserve + Margin (exactly so when the glide ratio does not change
	// with altitude). Negative: short of the least altitude by that much.
	// NaN when Least is NaN.
	Margin float64
	// Covered is Margin ≥ 0: a field stays in reach with its reserve.
	Covered bool
}

// RouteGap is a stretch of the route with no field in reach with its
// reserve at the planned altitude.
type RouteGap struct {
	// Start and End are distances from the route's start (m). Where the
	// margin changes sign between two samples the boundary is placed where
	// the margin, interpolated linearly in distance, is zero; where a
	// neighbouring sample has no value (no field in reach at all) the
	// boundary is the covered sample itself, so the gap is never shorter
	// than the samples show.
	Start, End float64
	// Positions of Start and End, degrees (interpolated between samples).
	StartLat, StartLon float64
	EndLat, EndLon     float64
	// First and Last are the indices of the first and the last uncovered
	// sample of the gap.
	First, Last int
	// CloseAlt is the altitude (m MSL) that would close the gap when flown
	// over all of it: the highest least altitude of its samples. It is NaN
	// when some sample of the gap has no field in reach below the ceiling
	// the least altitudes were searched to (RouteProfile.Ceiling): the gap
	// is not closed by any altitude up to there.
	CloseAlt float64
}

// Length is End − Start, m.
func (g RouteGap) Length() float64 { return g.End - g.Start }

// RouteProfile is the result of RequiredResult.Route.
type RouteProfile struct {
	Samples []RouteSample
	Gaps    []RouteGap
	// Length is the distance of the last sample from the first, m.
	Length float64
	// CoveredFraction is the share of Length not in a gap, 0..1 (1 for a
	// route of zero length that is covered at its one point).
	CoveredFraction float64
	// Ceiling is the highest altitude the least altitudes were searched to
	// (m MSL), from the RequiredResult.
	Ceiling float64
}

// ErrNoRoutePoints is returned by Route for an empty route.
var ErrNoRoutePoints = errors.New("reach: the route has no points")

// Route judges every point of a planned route against the least-altitude
// raster r: at each point the least altitude (RequiredAt, bilinear), the best
// field and the margin Alt − Least, covered when the margin is ≥ 0. Runs of
// uncovered points form the gaps, whose ends are placed by linear
// interpolation of the margin in distance (see RouteGap). The covered
// fraction is 1 − Σ gap length / route length.
//
// Points must be in order along the route with non-decreasing Dist.
// ceiling is recorded in the profile for callers to report (the Ceiling the
// RequiredResult was computed with).
func (r *RequiredResult) Route(points []RoutePoint, ceiling float64) (*RouteProfile, error) {
	if len(points) == 0 {
		return nil, ErrNoRoutePoints
	}
	for i := 1; i < len(points); i++ {
		if !(points[i].Dist >= points[i-1].Dist) {
			return nil, errors.New("reach: route points are not in order of distance")
		}
	}
	g := r.Ground
	p := &RouteProfile{Samples: make([]RouteSample, len(points)), Ceiling: ceiling}
	for i, pt := range points {
		s := RouteSample{RoutePoint: pt, Best: -1, Least: math.NaN(), Margin: math.NaN(), Terrain: math.NaN()}
		x, y := g.Frame.Forward(pt.Lat, pt.Lon)
		if e, ok := g.Sample(x, y); ok {
			s.Terrain = e
			if r.Elevation != nil {
				if e, ok := r.Elevation(pt.Lat, pt.Lon); ok {
					s.Terrain = e
				}
			}
		}
		if a, best, ok := r.RequiredAt(pt.Lat, pt.Lon); ok {
			s.Least, s.Best = a, best
		}
		p.Samples[i] = s
	}
	p.Length = points[len(points)-1].Dist - points[0].Dist
	p.Recompute() // margins, gaps and the covered fraction from Least
	return p, nil
}

// routeGaps finds the runs of uncovered samples and places their ends.
func routeGaps(s []RouteSample) []RouteGap {
	var gaps []RouteGap
	for i := 0; i < len(s); {
		if s[i].Covered {
			i++
			continue
		}
		j := i
		for j+1 < len(s) && !s[j+1].Covered {
			j++
		}
		gp := RouteGap{First: i, Last: j, CloseAlt: math.Inf(-1)}
		for k := i; k <= j; k++ {
			if math.IsNaN(s[k].Least) {
				gp.CloseAlt = math.NaN()
				break
			}
			gp.CloseAlt = math.Max(gp.CloseAlt, s[k].Least)
		}
		if i == 0 {
			gp.Start, gp.StartLat, gp.StartLon = s[0].Dist, s[0].Lat, s[0].Lon
		} else {
			gp.Start, gp.StartLat, gp.StartLon = crossing(s[i-1], s[i])
		}
		if j == len(s)-1 {
			gp.End, gp.EndLat, gp.EndLon = s[j].Dist, s[j].Lat, s[j].Lon
		} else {
			gp.End, gp.EndLat, gp.EndLon = crossing(s[j+1], s[j])
		}
		gaps = append(gaps, gp)
		i = j + 1
	}
	return gaps
}

// crossing returns where the margin reaches zero between covered sample a
// and uncovered sample b (linear in distance): the distance and position.
// Without a margin at b the boundary is a itself (conservative).
func crossing(a, b RouteSample) (dist, lat, lon float64) {
	t := 0.0
	if !math.IsNaN(b.Margin) && a.Margin-b.Margin > 0 {
		t = a.Margin / (a.Margin - b.Margin)
	}
	t = math.Max(0, math.Min(1, t))
	return a.Dist + (b.Dist-a.Dist)*t, a.Lat + (b.Lat-a.Lat)*t, a.Lon + (b.Lon-a.Lon)*t
}
