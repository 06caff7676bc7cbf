// Package geodesy solves the two geodesic problems on the WGS84 ellipsoid and
// samples polylines along geodesics at a fixed step.
//
// Model and conventions:
//
//   - Ellipsoid: WGS84, a = 6378137 m, 1/f = 298.257223563 (NIMA TR8350.2,
//     3rd ed., 2000).
//   - Positions are geodetic latitude and longitude in decimal degrees, north
//     and east positive. Latitude must lie in [-90, 90]; longitude may be any
//     finite value and results are normalised to (-180, 180].
//   - Distances are metres along the geodesic (the shortest path on the
//     ellipsoid surface).
//   - Bearings (azimuths) are degrees true, clockwise from north, in [0, 360).
//     The initial bearing is the direction of travel at the first point; the
//     final bearing is the direction of travel on arrival at the second
//     point (not the back azimuth, which differs by 180°).
//
// Method: Vincenty's iterative formulae (inverse and direct), accurate to
// well below a millimetre for distances of practical interest. The inverse
// iteration does not converge for some nearly antipodal pairs (points almost
// opposite each other on the earth); Inverse then returns ErrNoConvergence
// instead of a wrong answer. No path a glide computation needs is anywhere
// near antipodal, so a caller can treat that error as bad input.
//
// References:
//
//	T. Vincenty, "Direct and inverse solutions of geodesics on the ellipsoid
//	with application of nested equations", Survey Review 23(176):88-93, 1975.
//	C. F. F. Karney, "Algorithms for geodesics", J. Geodesy 87:43-55, 2013
//	(for the failure region of Vincenty's inverse).
package geodesy
