package main

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach/geodesy"
	"glidereach/terrain"
)

// farFieldsM is the distance beyond which a start, route or area lying that
// far from every given field is most likely a typing slip (latitude and
// longitude swapped, a sign lost) rather than a plan: 300 km is more than a
// 1:50 glide from 6000 m (common practice, no source). Nothing is refused;
// the command warns on standard error and goes on.
const farFieldsM = 300e3

// boxDistance is the geodesic distance (m) between the nearest points of
// two lon/lat boxes (0 when they overlap): each coordinate is clamped into
// the other box's interval, which is exact for a point and close enough for
// boxes of a few degrees to judge "far".
func boxDistance(a, b orb.Bound) float64 {
	near := func(lo1, hi1, lo2, hi2 float64) (float64, float64) {
		switch {
		case hi1 < lo2:
			return hi1, lo2
		case hi2 < lo1:
			return lo1, hi2
		}
		m := math.Max(lo1, lo2)
		return m, m
	}
	lon1, lon2 := near(a.Min[0], a.Max[0], b.Min[0], b.Max[0])
	lat1, lat2 := near(a.Min[1], a.Max[1], b.Min[1], b.Max[1])
	d, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: lat1, Lon: lon1}, geodesy.LatLon{Lat: lat2, Lon: lon2})
	if err != nil {
		return math.Inf(1)
	}
	return d
}

// farWarnings returns the warnings for a start, route or area (what, its
// lon/lat box) that lies far from every field given (more than farFieldsM)
// or outside the terrain given (src; nil for flat ground): both usually mean
// coordinates in the wrong order. Empty fields (none given) are not judged.
func farWarnings(what string, zone orb.Bound, fields []input.Field, fieldsFlag string, src terrain.Source) []string {
	var warns []string
	if len(fields) > 0 {
		best := math.Inf(1)
		for _, f := range fields {
			p := orb.Point{f.Lon, f.Lat}
			best = math.Min(best, boxDistance(zone, orb.Bound{Min: p, Max: p}))
		}
		if best > farFieldsM {
			warns = append(warns, fmt.Sprintf("the %s lies %.0f km from the nearest field of %s; check that typed positions are LAT,LON (latitude first) and the file is the right one", what, best/1000, fieldsFlag))
		}
	}
	if src != nil {
		w, s, e, n := src.Extent()
		if d := boxDistance(zone, orb.Bound{Min: orb.Point{w, s}, Max: orb.Point{e, n}}); d > 0 {
			warns = append(warns, fmt.Sprintf("the %s lies %.0f km outside the terrain given (%s); check that typed positions are LAT,LON (latitude first)", what, d/1000, src.Describe()))
		}
	}
	return warns
}
