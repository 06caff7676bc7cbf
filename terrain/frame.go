package terrain

import "math"

// WGS84 ellipsoid (NIMA TR8350.2, 3rd ed., 2000).
const (
	WGS84A  = 6378137.0         // semi-major axis, m
	WGS84F  = 1 / 298.257223563 // flattening
	wgs84E2 = WGS84F * (2 - WGS84F)
)

// Frame is a local metric frame: the east-north plane tangent to the WGS84
// ellipsoid at an origin. X points east, Y north, both in metres. A point is
// mapped by converting it to earth-centred coordinates and projecting it
// orthogonally onto the tangent plane, so distances within 100 km of the
// origin agree with ellipsoidal distances to better than 1e-4 relative.
//
// The solvers work in a Frame so that their grids have square cells in
// metres, whatever the source DEM's coordinate reference system.
type Frame struct {
	Lat0, Lon0                     float64 // origin, degrees
	sinLat, cosLat, sinLon, cosLon float64
	x0, y0, z0                     float64 // origin in earth-centred metres
	m0, n0                         float64 // meridian and prime-vertical radii of curvature at the origin, m
}

// NewFrame returns the frame tangent at lat0, lon0 (degrees).
func NewFrame(lat0, lon0 float64) Frame {
	f := Frame{Lat0: lat0, Lon0: lon0}
	phi, lam := lat0*math.Pi/180, lon0*math.Pi/180
	f.sinLat, f.cosLat = math.Sincos(phi)
	f.sinLon, f.cosLon = math.Sincos(lam)
	f.x0, f.y0, f.z0 = ecef(phi, lam)
	w := 1 - wgs84E2*f.sinLat*f.sinLat
	f.n0 = WGS84A / math.Sqrt(w)
	f.m0 = WGS84A * (1 - wgs84E2) / (w * math.Sqrt(w))
	return f
}

// ecef returns earth-centred coordinates (m) of a point on the ellipsoid
// surface at geodetic latitude phi and longitude lam (radians).
func ecef(phi, lam float64) (x, y, z float64) {
	sp, cp := math.Sincos(phi)
	sl, cl := math.Sincos(lam)
	n := WGS84A / math.Sqrt(1-wgs84E2*sp*sp)
	return n * cp * cl, n * cp * sl, n * (1 - wgs84E2) * sp
}

// Forward maps lat, lon (degrees) to local x (east) and y (north) in metres.
func (f Frame) Forward(lat, lon float64) (x, y float64) {
	px, py, pz := ecef(lat*math.Pi/180, lon*math.Pi/180)
	return f.project(px, py, pz)
}

// project maps earth-centred coordinates (m) orthogonally onto the frame's
// tangent plane: local x (east) and y (north), m.
func (f Frame) project(px, py, pz float64) (x, y float64) {
	dx, dy, dz := px-f.x0, py-f.y0, pz-f.z0
	x = -f.sinLon*dx + f.cosLon*dy
	y = -f.sinLat*f.cosLon*dx - f.sinLat*f.sinLon*dy + f.cosLat*dz
	return x, y
}

// Inverse maps local x, y (metres) back to lat, lon (degrees), exactly:
// the ellipsoid point P whose orthogonal projection onto the tangent plane
// is (x, y) is O + x·ê + y·n̂ + t·û, with t the larger root of the quadratic
// that puts P on the ellipsoid (the near side), and P's geodetic latitude
// on the surface is atan2(z, (1 − e²)·√(x² + y²)) in earth-centred
// coordinates. It holds at the poles, where the former Newton iteration
// in longitude diverged (longitudes of ±766° at 89.9° N).
//
// The longitude is the one closest to the frame's Lon0 (within ±180° of
// it), so a window across the antimeridian keeps continuous longitudes
// (e.g. 180.05); callers that write lon/lat normalise (NormLon). A point
// beyond the plane's horizon (more than an earth radius away) maps to the
// horizon.
func (f Frame) Inverse(x, y float64) (lat, lon float64) {
	// Basis of the frame in earth-centred coordinates.
	ex, ey := -f.sinLon, f.cosLon
	nx, ny, nz := -f.sinLat*f.cosLon, -f.sinLat*f.sinLon, f.cosLat
	ux, uy, uz := f.cosLat*f.cosLon, f.cosLat*f.sinLon, f.sinLat
	qx, qy, qz := f.x0+x*ex+y*nx, f.y0+x*ey+y*ny, f.z0+y*nz
	const a2 = WGS84A * WGS84A
	b2 := a2 * (1 - wgs84E2)
	A := (ux*ux+uy*uy)/a2 + uz*uz/b2
	B := 2 * ((qx*ux+qy*uy)/a2 + qz*uz/b2)
	C := (qx*qx+qy*qy)/a2 + qz*qz/b2 - 1
	d := B*B - 4*A*C
	if d < 0 {
		d = 0
	}
	t := (-B + math.Sqrt(d)) / (2 * A)
	px, py, pz := qx+t*ux, qy+t*uy, qz+t*uz
	lat = math.Atan2(pz, (1-wgs84E2)*math.Hypot(px, py)) * 180 / math.Pi
	lon = math.Atan2(py, px) * 180 / math.Pi
	lon = f.Lon0 + math.Remainder(lon-f.Lon0, 360)
	return lat, lon
}

// NormLon returns lon (degrees) in [-180, 180).
func NormLon(lon float64) float64 {
	l := math.Mod(lon+180, 360)
	if l < 0 {
		l += 360
	}
	return l - 180
}
