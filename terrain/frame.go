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
	dx, dy, dz := px-f.x0, py-f.y0, pz-f.z0
	x = -f.sinLon*dx + f.cosLon*dy
	y = -f.sinLat*f.cosLon*dx - f.sinLat*f.sinLon*dy + f.cosLat*dz
	return x, y
}

// Inverse maps local x, y (metres) back to lat, lon (degrees) by Newton
// iteration on Forward; it converges to below 1 mm in three steps within
// 200 km of the origin.
func (f Frame) Inverse(x, y float64) (lat, lon float64) {
	cl := f.cosLat
	if cl < 1e-9 {
		cl = 1e-9
	}
	lat = f.Lat0 + y/f.m0*180/math.Pi
	lon = f.Lon0 + x/(f.n0*cl)*180/math.Pi
	for i := 0; i < 6; i++ {
		fx, fy := f.Forward(lat, lon)
		ex, ey := x-fx, y-fy
		if math.Abs(ex) < 1e-4 && math.Abs(ey) < 1e-4 {
			break
		}
		// The Jacobian of Forward at (lat, lon) is close to diagonal with
		// the local radii of curvature; that is enough for convergence.
		phi := lat * math.Pi / 180
		sp, cp := math.Sincos(phi)
		w := 1 - wgs84E2*sp*sp
		n := WGS84A / math.Sqrt(w)
		m := WGS84A * (1 - wgs84E2) / (w * math.Sqrt(w))
		if cp < 1e-9 {
			cp = 1e-9
		}
		lat += ey / m * 180 / math.Pi
		lon += ex / (n * cp) * 180 / math.Pi
	}
	return lat, lon
}
