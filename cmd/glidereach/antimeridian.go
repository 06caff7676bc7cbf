package main

import (
	"math"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

// RFC 7946 wants longitudes in [-180, 180] and any line or polygon that
// crosses the antimeridian cut in two, one part on each side (§3.1.9).
// The solvers work in a local plane whose longitudes stay continuous around
// the start (a footprint from 180° E spans 179.9..180.1), so the GeoJSON
// writers pass every document through splitAntimeridian. Geometries within
// [-180, 180] are left exactly as they are. Edges are straight in lon/lat,
// as RFC 7946 draws them, so a cut point is interpolated linearly in lon/lat.

// splitAntimeridian rewrites the geometries of fc in place.
func splitAntimeridian(fc *geojson.FeatureCollection) {
	for _, f := range fc.Features {
		if f.Geometry != nil {
			f.Geometry = splitGeometry(f.Geometry)
		}
	}
}

func splitGeometry(g orb.Geometry) orb.Geometry {
	b := g.Bound()
	if b.Min[0] >= -180 && b.Max[0] <= 180 {
		return g
	}
	switch g := g.(type) {
	case orb.Point:
		return orb.Point{round6(normLon180(g[0])), g[1]}
	case orb.MultiPoint:
		out := make(orb.MultiPoint, len(g))
		for i, p := range g {
			out[i] = orb.Point{round6(normLon180(p[0])), p[1]}
		}
		return out
	case orb.LineString:
		return multiLine(splitLine(g))
	case orb.MultiLineString:
		var out orb.MultiLineString
		for _, l := range g {
			out = append(out, splitLine(l)...)
		}
		return multiLine(out)
	case orb.Polygon:
		return multiPoly(splitPolygon(g))
	case orb.MultiPolygon:
		var out orb.MultiPolygon
		for _, p := range g {
			out = append(out, splitPolygon(p)...)
		}
		return multiPoly(out)
	case orb.Collection:
		out := make(orb.Collection, len(g))
		for i, x := range g {
			out[i] = splitGeometry(x)
		}
		return out
	}
	return g
}

// normLon180 is lon in [-180, 180], keeping 180 as it is.
func normLon180(lon float64) float64 {
	if lon >= -180 && lon <= 180 {
		return lon
	}
	return math.Remainder(lon, 360)
}

func multiLine(ls orb.MultiLineString) orb.Geometry {
	if len(ls) == 1 {
		return ls[0]
	}
	return ls
}

func multiPoly(ps orb.MultiPolygon) orb.Geometry {
	if len(ps) == 1 {
		return ps[0]
	}
	if ps == nil {
		return orb.MultiPolygon{}
	}
	return ps
}

// strips returns the offsets k·360 of the [-180, 180] + k·360 strips that
// b touches.
func strips(b orb.Bound) []float64 {
	var ks []float64
	for k := math.Floor((b.Min[0] + 180) / 360); k*360-180 <= b.Max[0]; k++ {
		ks = append(ks, k*360)
	}
	return ks
}

// splitPolygon cuts p into its parts within each 360° strip and shifts each
// part into [-180, 180]. Every ring is clipped to the strip (Sutherland–
// Hodgman: exact for a strip, which is convex); a part whose outer ring
// vanishes is dropped with its holes.
func splitPolygon(p orb.Polygon) []orb.Polygon {
	if len(p) == 0 {
		return nil
	}
	var out []orb.Polygon
	for _, k := range strips(p[0].Bound()) {
		lo, hi := k-180, k+180
		var part orb.Polygon
		for i, r := range p {
			c := clipRing(clipRing(r, lo, false), hi, true)
			if len(c) < 4 || ringArea2(c) == 0 {
				if i == 0 {
					break
				}
				continue
			}
			for j := range c {
				c[j] = orb.Point{round6(c[j][0] - k), c[j][1]}
			}
			part = append(part, c)
		}
		if len(part) > 0 {
			out = append(out, part)
		}
	}
	return out
}

// clipRing keeps the part of the closed ring r with lon ≤ x (below true)
// or lon ≥ x.
func clipRing(r orb.Ring, x float64, below bool) orb.Ring {
	if len(r) < 4 {
		return nil
	}
	in := func(p orb.Point) bool {
		if below {
			return p[0] <= x
		}
		return p[0] >= x
	}
	n := len(r) - 1 // the last point repeats the first
	var out orb.Ring
	for i := 0; i < n; i++ {
		cur, prev := r[i], r[(i+n-1)%n]
		switch {
		case in(cur):
			if !in(prev) {
				out = append(out, cutAt(prev, cur, x))
			}
			out = append(out, cur)
		case in(prev):
			out = append(out, cutAt(prev, cur, x))
		}
	}
	if len(out) > 0 {
		out = append(out, out[0])
	}
	return out
}

// cutAt is the point of segment a–b at longitude x.
func cutAt(a, b orb.Point, x float64) orb.Point {
	t := (x - a[0]) / (b[0] - a[0])
	return orb.Point{x, round6(a[1] + t*(b[1]-a[1]))}
}

// ringArea2 is twice the signed shoelace area of r (degrees²).
func ringArea2(r orb.Ring) float64 {
	s := 0.0
	for i := 0; i+1 < len(r); i++ {
		s += r[i][0]*r[i+1][1] - r[i+1][0]*r[i][1]
	}
	return s
}

// splitLine cuts l into its pieces within each 360° strip, shifted into
// [-180, 180].
func splitLine(l orb.LineString) orb.MultiLineString {
	var out orb.MultiLineString
	for _, k := range strips(l.Bound()) {
		lo, hi := k-180, k+180
		var cur orb.LineString
		flush := func() {
			if len(cur) >= 2 {
				out = append(out, cur)
			}
			cur = nil
		}
		for i := 0; i+1 < len(l); i++ {
			a, b := l[i], l[i+1]
			t0, t1 := 0.0, 1.0
			if d := b[0] - a[0]; d != 0 {
				ta, tb := (lo-a[0])/d, (hi-a[0])/d
				if ta > tb {
					ta, tb = tb, ta
				}
				t0, t1 = math.Max(t0, ta), math.Min(t1, tb)
			} else if a[0] < lo || a[0] > hi {
				t0, t1 = 1, 0
			}
			if t0 > t1 {
				flush()
				continue
			}
			pa := orb.Point{round6(a[0] + t0*(b[0]-a[0]) - k), round6(a[1] + t0*(b[1]-a[1]))}
			pb := orb.Point{round6(a[0] + t1*(b[0]-a[0]) - k), round6(a[1] + t1*(b[1]-a[1]))}
			if len(cur) == 0 || cur[len(cur)-1] != pa {
				flush()
				cur = append(cur, pa)
			}
			cur = append(cur, pb)
			if t1 < 1 {
				flush()
			}
		}
		flush()
	}
	return out
}
