package geodesy

import (
	"errors"
	"fmt"
	"math"
)

// WGS84 ellipsoid (NIMA TR8350.2, 3rd ed., 2000).
const (
	A = 6378137.0         // semi-major axis, m
	F = 1 / 298.257223563 // flattening
	B = A * (1 - F)       // semi-minor axis, m (6356752.314245)
)

// Errors returned by the solvers. They are wrapped with the offending values;
// test with errors.Is.
var (
	// ErrNoConvergence: Vincenty's inverse iteration did not converge, which
	// happens only for nearly antipodal points.
	ErrNoConvergence = errors.New("geodesy: no convergence (points nearly antipodal)")
	// ErrInvalid: a latitude outside [-90, 90], a NaN or infinite value.
	ErrInvalid = errors.New("geodesy: invalid coordinate or value")
)

// LatLon is a position in decimal degrees (north and east positive).
type LatLon struct {
	Lat, Lon float64
}

const (
	deg = math.Pi / 180
	// maxIter bounds Vincenty's iterations. Away from the antipodal region the
	// inverse converges in fewer than ten; 200 lets slowly converging pairs
	// close to it finish.
	maxIter = 200
	// tol is the convergence tolerance on the auxiliary longitude and on σ,
	// radians (1e-12 rad is about 6 µm on the earth).
	tol = 1e-12
)

func validLat(lat float64) bool { return lat >= -90 && lat <= 90 } // false for NaN

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// reduced returns sin and cos of the reduced latitude U, tan U = (1-f) tan φ.
func reduced(latDeg float64) (sinU, cosU float64) {
	sp, cp := math.Sincos(latDeg * deg)
	u := math.Atan2((1-F)*sp, cp)
	return math.Sincos(u)
}

// normBearing maps a bearing in radians to degrees in [0, 360).
func normBearing(rad float64) float64 {
	d := math.Mod(rad/deg, 360)
	if d < 0 {
		d += 360
	}
	if d >= 360 {
		d = 0
	}
	return d
}

// normLon maps a longitude in degrees to (-180, 180].
func normLon(lon float64) float64 {
	l := math.Mod(lon, 360)
	if l <= -180 {
		l += 360
	} else if l > 180 {
		l -= 360
	}
	return l
}

// Inverse returns the geodesic distance s12 (m) from p1 to p2 and the
// bearings (degrees true, [0, 360)) at p1 (initial) and at p2 (final, the
// direction of travel on arrival), by Vincenty's inverse method:
//
//	λ ← L + (1−C)·f·sinα·(σ + C·sinσ·(cos2σm + C·cosσ·(2cos²2σm − 1)))   iterated
//	s12 = b·A·(σ − Δσ)
//
// with U the reduced latitudes, L the difference in longitude, and A, B, C,
// Δσ the series of Vincenty (1975), equations (3) to (6) and (10) to (19).
// For coincident points s12 = 0 and both bearings are 0. For the poles the
// bearings follow the limit along the meridian of the other point.
//
// It returns ErrInvalid for a latitude outside [-90, 90] or a non-finite
// value, and ErrNoConvergence when the iteration fails (nearly antipodal
// points, e.g. (0°, 0°) to (0.5°, 179.7°)).
func Inverse(p1, p2 LatLon) (s12, az1, az2 float64, err error) {
	if !validLat(p1.Lat) || !validLat(p2.Lat) || !finite(p1.Lon) || !finite(p2.Lon) {
		return 0, 0, 0, fmt.Errorf("%w: inverse from %v to %v", ErrInvalid, p1, p2)
	}
	L := normLon(p2.Lon-p1.Lon) * deg
	sinU1, cosU1 := reduced(p1.Lat)
	sinU2, cosU2 := reduced(p2.Lat)

	lambda := L
	var sinSigma, cosSigma, sigma, cos2Alpha, cos2SigmaM, sinLambda, cosLambda float64
	converged := false
	for i := 0; i < maxIter; i++ {
		sinLambda, cosLambda = math.Sincos(lambda)
		t1 := cosU2 * sinLambda
		t2 := cosU1*sinU2 - sinU1*cosU2*cosLambda
		sinSigma = math.Hypot(t1, t2)
		if sinSigma == 0 {
			// Coincident points (or both at the same pole).
			return 0, 0, 0, nil
		}
		cosSigma = sinU1*sinU2 + cosU1*cosU2*cosLambda
		sigma = math.Atan2(sinSigma, cosSigma)
		sinAlpha := cosU1 * cosU2 * sinLambda / sinSigma
		cos2Alpha = 1 - sinAlpha*sinAlpha
		if cos2Alpha != 0 {
			cos2SigmaM = cosSigma - 2*sinU1*sinU2/cos2Alpha
		} else {
			cos2SigmaM = 0 // equatorial line
		}
		C := F / 16 * cos2Alpha * (4 + F*(4-3*cos2Alpha))
		prev := lambda
		lambda = L + (1-C)*F*sinAlpha*(sigma+C*sinSigma*(cos2SigmaM+C*cosSigma*(-1+2*cos2SigmaM*cos2SigmaM)))
		if math.Abs(lambda) > math.Pi || math.IsNaN(lambda) {
			break // λ has left its domain: the antipodal failure
		}
		if math.Abs(lambda-prev) < tol {
			converged = true
			break
		}
	}
	if !converged {
		return 0, 0, 0, fmt.Errorf("%w: from %v to %v", ErrNoConvergence, p1, p2)
	}
	u2 := cos2Alpha * (A*A - B*B) / (B * B)
	bigA := 1 + u2/16384*(4096+u2*(-768+u2*(320-175*u2)))
	bigB := u2 / 1024 * (256 + u2*(-128+u2*(74-47*u2)))
	c2 := cos2SigmaM * cos2SigmaM
	dSigma := bigB * sinSigma * (cos2SigmaM + bigB/4*(cosSigma*(-1+2*c2)-
		bigB/6*cos2SigmaM*(-3+4*sinSigma*sinSigma)*(-3+4*c2)))
	s12 = B * bigA * (sigma - dSigma)
	az1 = normBearing(math.Atan2(cosU2*sinLambda, cosU1*sinU2-sinU1*cosU2*cosLambda))
	az2 = normBearing(math.Atan2(cosU1*sinLambda, -sinU1*cosU2+cosU1*sinU2*cosLambda))
	return s12, az1, az2, nil
}

// Direct returns the point p2 reached from p1 after s12 metres along the
// geodesic that leaves p1 at bearing az1 (degrees true), and the bearing of
// travel at p2, by Vincenty's direct method:
//
//	σ ← s12/(b·A) + Δσ   iterated,   σ1 = atan2(tan U1, cos α1)
//
// (Vincenty 1975, equations (1) to (9)). s12 may be negative (travel
// backwards along the same geodesic). It returns ErrInvalid for a latitude
// outside [-90, 90] or a non-finite value. The iteration converges for every
// input; ErrNoConvergence is returned only as a guard.
func Direct(p1 LatLon, az1, s12 float64) (p2 LatLon, az2 float64, err error) {
	if !validLat(p1.Lat) || !finite(p1.Lon) || !finite(az1) || !finite(s12) {
		return LatLon{}, 0, fmt.Errorf("%w: direct from %v bearing %v distance %v", ErrInvalid, p1, az1, s12)
	}
	sinA1, cosA1 := math.Sincos(az1 * deg)
	sinU1, cosU1 := reduced(p1.Lat)
	sigma1 := math.Atan2(sinU1, cosU1*cosA1) // tan σ1 = tan U1 / cos α1
	sinAlpha := cosU1 * sinA1
	cos2Alpha := 1 - sinAlpha*sinAlpha
	u2 := cos2Alpha * (A*A - B*B) / (B * B)
	bigA := 1 + u2/16384*(4096+u2*(-768+u2*(320-175*u2)))
	bigB := u2 / 1024 * (256 + u2*(-128+u2*(74-47*u2)))

	sigma0 := s12 / (B * bigA)
	sigma := sigma0
	var sinSigma, cosSigma, cos2SigmaM float64
	converged := false
	for i := 0; i < maxIter; i++ {
		cos2SigmaM = math.Cos(2*sigma1 + sigma)
		sinSigma, cosSigma = math.Sincos(sigma)
		c2 := cos2SigmaM * cos2SigmaM
		dSigma := bigB * sinSigma * (cos2SigmaM + bigB/4*(cosSigma*(-1+2*c2)-
			bigB/6*cos2SigmaM*(-3+4*sinSigma*sinSigma)*(-3+4*c2)))
		prev := sigma
		sigma = sigma0 + dSigma
		if math.Abs(sigma-prev) < tol {
			converged = true
			break
		}
	}
	if !converged {
		return LatLon{}, 0, fmt.Errorf("%w: direct from %v bearing %v distance %v", ErrNoConvergence, p1, az1, s12)
	}
	cos2SigmaM = math.Cos(2*sigma1 + sigma)
	sinSigma, cosSigma = math.Sincos(sigma)
	tmp := sinU1*sinSigma - cosU1*cosSigma*cosA1
	lat2 := math.Atan2(sinU1*cosSigma+cosU1*sinSigma*cosA1, (1-F)*math.Hypot(sinAlpha, tmp))
	lambda := math.Atan2(sinSigma*sinA1, cosU1*cosSigma-sinU1*sinSigma*cosA1)
	C := F / 16 * cos2Alpha * (4 + F*(4-3*cos2Alpha))
	L := lambda - (1-C)*F*sinAlpha*(sigma+C*sinSigma*(cos2SigmaM+C*cosSigma*(-1+2*cos2SigmaM*cos2SigmaM)))
	p2 = LatLon{Lat: lat2 / deg, Lon: normLon(p1.Lon + L/deg)}
	az2 = normBearing(math.Atan2(sinAlpha, -tmp))
	return p2, az2, nil
}
