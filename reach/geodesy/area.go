package geodesy

import "math"

// RingArea returns the area (m²) on the WGS84 ellipsoid enclosed by ring, a
// closed or open sequence of lon/lat points (degrees) whose edges are
// straight in longitude and latitude, as RFC 7946 draws them (not
// geodesics). The result is positive for a counter-clockwise ring (RFC 7946
// exteriors) and negative for a clockwise one.
//
// It is Green's theorem on the ellipsoid: A = −∮ S(φ) dλ, where
//
//	S(φ) = (b²/2)·[ sin φ / (1 − e² sin² φ) + atanh(e sin φ) / e ]
//
// is the area per radian of longitude between the equator and latitude φ
// (the zone-area function; Snyder 1987, eq. 3-12, with q(φ) = 2S/b²), and
// along each edge φ is linear in λ. Edges are integrated by 5-point
// Gauss–Legendre on pieces at most 0.5° of latitude apart, which is exact
// to about 1e-12 relative. Longitudes are taken as given (a ring across the
// antimeridian needs continuous longitudes such as 179..181).
//
// References: J. P. Snyder, Map Projections — A Working Manual, USGS
// Professional Paper 1395 (1987), §3 "Authalic latitude"; WGS84 from NIMA
// TR8350.2 (2000).
func RingArea(ring [][2]float64) float64 {
	n := len(ring)
	if n >= 2 && ring[0] == ring[n-1] {
		n--
	}
	if n < 3 {
		return 0
	}
	sum := 0.0
	for i := 0; i < n; i++ {
		a, b := ring[i], ring[(i+1)%n]
		sum += edgeIntegral(a[0]*math.Pi/180, a[1]*math.Pi/180, b[0]*math.Pi/180, b[1]*math.Pi/180)
	}
	return -sum
}

// PolygonArea is the area (m²) of a polygon given as rings (exterior
// first, then holes), each straight-edged in lon/lat: |exterior| − Σ|hole|.
func PolygonArea(rings [][][2]float64) float64 {
	a := 0.0
	for i, r := range rings {
		s := math.Abs(RingArea(r))
		if i > 0 {
			s = -s
		}
		a += s
	}
	return a
}

// zoneS is S(φ) (m² per radian of longitude), φ in radians.
func zoneS(phi float64) float64 {
	const e2 = F * (2 - F)
	e := math.Sqrt(e2)
	s := math.Sin(phi)
	return B * B / 2 * (s/(1-e2*s*s) + math.Atanh(e*s)/e)
}

var glX = [5]float64{-0.9061798459386640, -0.5384693101056831, 0, 0.5384693101056831, 0.9061798459386640}
var glW = [5]float64{0.2369268850561891, 0.4786286704993665, 0.5688888888888889, 0.4786286704993665, 0.2369268850561891}

// edgeIntegral is ∫ S(φ) dλ from (l1, p1) to (l2, p2) with φ linear in λ.
func edgeIntegral(l1, p1, l2, p2 float64) float64 {
	dl := l2 - l1
	if dl == 0 {
		return 0
	}
	pieces := int(math.Ceil(math.Abs(p2-p1) / (0.5 * math.Pi / 180)))
	if pieces < 1 {
		pieces = 1
	}
	sum := 0.0
	for k := 0; k < pieces; k++ {
		t0, t1 := float64(k)/float64(pieces), float64(k+1)/float64(pieces)
		for j := range glX {
			t := t0 + (t1-t0)*(glX[j]+1)/2
			sum += glW[j] * (t1 - t0) / 2 * zoneS(p1+t*(p2-p1))
		}
	}
	return sum * dl
}
