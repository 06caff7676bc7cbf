package reach

import (
	"errors"
	"math"

	"github.com/paulmach/orb"

	"glidereach/reach/geodesy"
)

// Level is one contour of a footprint: the ground reached with at least
// ArrivalAGL metres above it, as lon/lat polygons (RFC 7946 winding, holes for
// unreachable ground inside, coordinates rounded to 6 decimals ≈ 0.1 m).
type Level struct {
	ArrivalAGL float64
	Polygons   orb.MultiPolygon
	Area       float64 // m², on the local frame
}

// Rings contours the arrival height above ground at each level (m): marching
// squares on the cell values, rings simplified inward only (Douglas–Peucker that never bridges a concave stretch) to at most
// half a cell of error, regions smaller than one cell dropped.
func (f *FootprintResult) Rings(levels []float64) []Level {
	g := f.Ground
	// Row r of AGL, read straight from the two rasters.
	row := func(r int, dst []float64) {
		arr, elev := f.Arrival[r*g.Cols:(r+1)*g.Cols], g.Elev[r*g.Cols:(r+1)*g.Cols]
		for c := range dst {
			dst[c] = float64(arr[c]) - float64(elev[c])
		}
	}
	out := make([]Level, 0, len(levels))
	for _, lv := range levels {
		mp, area := contourPolygonsRows(g, row, lv)
		out = append(out, Level{ArrivalAGL: lv, Polygons: mp, Area: area})
	}
	return out
}

func round6(v float64) float64 { return math.Round(v*1e6) / 1e6 }

// Farthest returns the greatest distance (m, on the local frame) from the
// start to a cell reached with at least agl metres above the ground, and its
// bearing (degrees true).
func (f *FootprintResult) Farthest(agl float64) (dist, bearing float64) {
	g := f.Ground
	sx, sy := f.StartX, f.StartY
	best, bc, br := -1.0, 0.0, 0.0
	for r := 0; r < g.Rows; r++ {
		for c := 0; c < g.Cols; c++ {
			if f.AGL(c, r) >= agl {
				dx, dy := float64(c)-sx, float64(r)-sy
				if d := dx*dx + dy*dy; d > best {
					best, bc, br = d, dx, dy
				}
			}
		}
	}
	if best < 0 {
		return 0, math.NaN()
	}
	b := math.Atan2(bc, br) * 180 / math.Pi
	if b < 0 {
		b += 360
	}
	return math.Sqrt(best) * g.Cell, b
}

// FarthestVertex returns the vertex of the level's outer rings farthest
// from (lat, lon) (degrees) by geodesic distance: the point (lon/lat, as in
// the GeoJSON output, rounded to 6 decimals), its distance (m) and its
// bearing from the start (degrees true, 0..360). The farthest point of a
// region from a point lies on its outer boundary, and simplification keeps
// a subset of the contour's vertices, so this is the farthest point of the
// ring as written. The contour lies between the last cell reached with the
// level and the first reached below it (or not at all), so the vertex is
// within one cell of the farthest reached cell centre. ok is false when
// the level is empty.
func (l *Level) FarthestVertex(lat, lon float64) (p orb.Point, dist, bearing float64, ok bool) {
	from := geodesy.LatLon{Lat: lat, Lon: lon}
	dist = -1
	for _, poly := range l.Polygons {
		if len(poly) == 0 {
			continue
		}
		for _, v := range poly[0] {
			s, az, _, err := geodesy.Inverse(from, geodesy.LatLon{Lat: v[1], Lon: v[0]})
			if err != nil {
				continue
			}
			if s > dist {
				p, dist, bearing = v, s, math.Mod(az+360, 360)
			}
		}
	}
	if dist < 0 {
		return orb.Point{}, 0, math.NaN(), false
	}
	return p, dist, bearing, true
}

// Intersect combines footprints computed on the same Ground from the same
// start under different assumptions (for example the members of a
// wind-uncertainty set) into the conservative one: at every cell the lowest
// arrival altitude of the members, NaN where any member does not arrive;
// ArrivalAt is the lowest of the members' too. It returns an error when
// the members do not share their Ground.
func Intersect(members []*FootprintResult) (*FootprintResult, error) {
	if len(members) == 0 {
		return nil, errors.New("reach: Intersect needs at least one footprint")
	}
	if len(members) == 1 {
		return members[0], nil
	}
	first := members[0]
	out := *first
	out.Arrival = make([]float32, len(first.Arrival))
	copy(out.Arrival, first.Arrival)
	for _, m := range members[1:] {
		if m.Ground != first.Ground {
			return nil, errors.New("reach: Intersect: footprints on different terrain windows")
		}
		for i, a := range m.Arrival {
			if a != a || a < out.Arrival[i] {
				out.Arrival[i] = a
			}
		}
	}
	out.members = members
	return &out, nil
}
