package input

import (
	"fmt"
	"math"
	"strings"

	"github.com/paulmach/orb"

	"glidereach/reach/geodesy"
)

// Corridor is the ground within Width/2 metres of a route, either side:
// the set of points whose distance to the route's polyline (geodesic
// segments) is at most Width/2. It is the --corridor of the coverage command.
//
// Distances are computed on short pieces of the route (at most pieceLen long,
// cut along the geodesic by geodesy.Sample) in a local east/north plane:
//
//	dx = Δλ·N(φp)·cos φm,  dy = Δφ·M(φp),  φm = (φ + φp)/2
//	M = a(1−e²)/(1−e²sin²φ)^{3/2},  N = a/(1−e²sin²φ)^{1/2}
//
// with φp the piece's mid-latitude and cos φm taken to first order (see
// pieceDistance)
// (the mid-latitude plane; its error grows with the square of the distance
// over the earth's radius). Against geodesic distances (geodesy.Inverse,
// TestCorridorAgainstGeodesic) it agrees to 5e-5 relative plus 0.2 m for
// half-widths up to 20 km, also at 60° latitude (about 1 m at 20 km, from
// the plane and the radii held at the piece; a few cm from the 2 km chords).
// A test costs a few hundred ns (BenchmarkCorridorContains). Corridors do not cross the antimeridian.
type Corridor struct {
	Route *Route
	Width float64 // full width, m; the corridor extends Width/2 either side of the route

	half   float64
	limit  float64 // Contains tests distance ≤ limit: half less the simplification tolerance
	bound  orb.Bound
	pieces []piece
	cell   float64            // bucket size, degrees
	bucket map[[2]int][]int32 // cell → pieces whose widened box overlaps it
}

var _ Zone = (*Corridor)(nil)

type piece struct {
	lat0, lon0, lat1, lon1 float64
	latm                   float64 // mid-latitude of the piece, degrees
	kx, ky                 float64 // m per degree of lon and lat at latm: N·cos φ·π/180, M·π/180
	tanm                   float64 // tan(latm), for the first-order change of kx with latitude
}

func newPiece(lat0, lon0, lat1, lon1 float64) piece {
	p := piece{lat0: lat0, lon0: lon0, lat1: lat1, lon1: lon1, latm: (lat0 + lat1) / 2}
	s, co := math.Sincos(p.latm * math.Pi / 180)
	w := 1 - wgs84E2*s*s
	n := geodesy.A / math.Sqrt(w)
	m := geodesy.A * (1 - wgs84E2) / (w * math.Sqrt(w))
	p.kx, p.ky = n*co*math.Pi/180, m*math.Pi/180
	p.tanm = s / co
	return p
}

// corridorTolerance is the Douglas–Peucker tolerance (m) a route is
// simplified with before the corridor is built: a recorded track has a
// point every few metres, and the cost of each test grew with them (10⁵
// points took 33 s); straight runs of points collapse to one piece.
const corridorTolerance = 1.0

// simplifyLine returns the points of line kept by Douglas–Peucker with
// tolerance tol (m): every dropped point lies within tol of the chord
// between the kept points around it, measured in the plane of the chord's
// mid-latitude (equirectangular, radii of curvature there), which is
// accurate far below tol for chords of a few hundred km. The first and last
// points are kept. Iterative, so a line of 10⁶ points needs no deep stack.
func simplifyLine(line []geodesy.LatLon, tol float64) []geodesy.LatLon {
	n := len(line)
	if n < 3 {
		return line
	}
	keep := make([]bool, n)
	keep[0], keep[n-1] = true, true
	stack := [][2]int{{0, n - 1}}
	for len(stack) > 0 {
		ij := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		i, j := ij[0], ij[1]
		if j-i < 2 {
			continue
		}
		a, b := line[i], line[j]
		p := newPiece(a.Lat, a.Lon, b.Lat, b.Lon)
		worst, at := -1.0, -1
		for k := i + 1; k < j; k++ {
			if d := pieceDistance(&p, line[k].Lat, line[k].Lon); d > worst {
				worst, at = d, k
			}
		}
		if worst > tol {
			keep[at] = true
			stack = append(stack, [2]int{i, at}, [2]int{at, j})
		}
	}
	out := make([]geodesy.LatLon, 0, n)
	for k, ok := range keep {
		if ok {
			out = append(out, line[k])
		}
	}
	return out
}

// pieceLen is the longest straight piece a route is cut into, m.
const pieceLen = 2000.0

// maxCorridorHalf bounds the half-width so the local plane stays accurate.
const maxCorridorHalf = 100e3

// WGS84 for the radii of curvature (NIMA TR8350.2).
var wgs84E2 = geodesy.F * (2 - geodesy.F)

// NewCorridor returns the corridor of total width width (m) around route.
// It returns an error for a width that is not positive or exceeds 200 km,
// for a route that crosses the antimeridian, or one that cannot be sampled.
func NewCorridor(route *Route, width float64) (*Corridor, error) {
	if !(width > 0) || width > 2*maxCorridorHalf {
		return nil, fmt.Errorf("corridor width %v m: want more than 0 and at most %v m", width, 2*maxCorridorHalf)
	}
	if route == nil || len(route.Points) < 2 {
		return nil, fmt.Errorf("corridor needs a route of at least 2 points")
	}
	for i := 1; i < len(route.Points); i++ {
		if math.Abs(route.Points[i].Lon-route.Points[i-1].Lon) > 180 {
			return nil, fmt.Errorf("route crosses the antimeridian at point %d; corridors across it are not supported", i)
		}
	}
	line := route.Line()
	simple := line
	if width/2 >= 100*corridorTolerance { // narrower corridors keep every point
		simple = simplifyLine(line, corridorTolerance)
	}
	sp, err := geodesy.Sample(simple, pieceLen)
	if err != nil {
		return nil, fmt.Errorf("corridor: %w", err)
	}
	c := &Corridor{Route: route, Width: width, half: width / 2, limit: width / 2}
	if len(simple) < len(line) {
		// Every point of the route lies within corridorTolerance of the
		// simplified line, so a point within half − tolerance of it is
		// within half of the route: the zone never takes in ground outside
		// the corridor.
		c.limit = c.half - corridorTolerance
	}
	b := orb.Bound{Min: orb.Point{sp[0].Lon, sp[0].Lat}, Max: orb.Point{sp[0].Lon, sp[0].Lat}}
	for i := 1; i < len(sp); i++ {
		c.pieces = append(c.pieces, newPiece(sp[i-1].Lat, sp[i-1].Lon, sp[i].Lat, sp[i].Lon))
		b = b.Extend(orb.Point{sp[i].Lon, sp[i].Lat})
	}
	if len(c.pieces) == 0 { // all points equal: checkRoute refuses this, but be safe
		c.pieces = []piece{newPiece(sp[0].Lat, sp[0].Lon, sp[0].Lat, sp[0].Lon)}
	}
	// Widen the box by the half-width: in latitude by half/M (M ≥ 6335 km),
	// in longitude by half/(N cos φ) at the most poleward latitude reached.
	dLat := c.half / 6335000 * 180 / math.Pi
	maxAbsLat := math.Min(89.9, math.Max(math.Abs(b.Min[1]), math.Abs(b.Max[1]))+dLat)
	dLon := math.Min(180, c.half/(geodesy.A*math.Cos(maxAbsLat*math.Pi/180))*180/math.Pi)
	c.bound = orb.Bound{
		Min: orb.Point{math.Max(-180, b.Min[0]-dLon), math.Max(-90, b.Min[1]-dLat)},
		Max: orb.Point{math.Min(180, b.Max[0]+dLon), math.Min(90, b.Max[1]+dLat)},
	}
	// Buckets: cells of about max(half, pieceLen) in latitude degrees.
	c.cell = math.Max(c.half, pieceLen) / 111000
	c.bucket = make(map[[2]int][]int32)
	for i, p := range c.pieces {
		x0, x1 := math.Min(p.lon0, p.lon1)-dLon, math.Max(p.lon0, p.lon1)+dLon
		y0, y1 := math.Min(p.lat0, p.lat1)-dLat, math.Max(p.lat0, p.lat1)+dLat
		for cx := c.key(x0); cx <= c.key(x1); cx++ {
			for cy := c.key(y0); cy <= c.key(y1); cy++ {
				k := [2]int{cx, cy}
				c.bucket[k] = append(c.bucket[k], int32(i))
			}
		}
	}
	return c, nil
}

func (c *Corridor) key(v float64) int { return int(math.Floor(v / c.cell)) }

// Bounds returns the lon/lat box of the corridor.
func (c *Corridor) Bounds() orb.Bound { return c.bound }

// Contains reports whether lat, lon (degrees) lie within Width/2 of the
// route (of its simplified line, less the simplification tolerance, for a
// route dense enough to be simplified; see NewCorridor). It stops at the
// first piece close enough.
func (c *Corridor) Contains(lat, lon float64) bool {
	if !(lon >= c.bound.Min[0] && lon <= c.bound.Max[0] && lat >= c.bound.Min[1] && lat <= c.bound.Max[1]) {
		return false
	}
	for _, i := range c.bucket[[2]int{c.key(lon), c.key(lat)}] {
		if pieceDistance(&c.pieces[i], lat, lon) <= c.limit {
			return true
		}
	}
	return false
}

// Distance returns the distance (m) from lat, lon to the nearest point of
// the route, or +Inf when it is farther than the half-width from every piece
// bucketed near it (the corridor only indexes its own neighbourhood).
func (c *Corridor) Distance(lat, lon float64) float64 {
	best := math.Inf(1)
	for _, i := range c.bucket[[2]int{c.key(lon), c.key(lat)}] {
		p := &c.pieces[i]
		d := pieceDistance(p, lat, lon)
		if d < best {
			best = d
		}
	}
	return best
}

// pieceDistance is the distance from (lat, lon) to the straight piece p in
// the mid-latitude plane (see Corridor). The scale of longitude at the mean
// latitude of point and piece is taken to first order from the piece's own,
//
//	kx(φm) ≈ kx(φp)·(1 − tan φp·(φ − φp)/2),
//
// which leaves an error of order (φ − φp)²; the change of M and N with
// latitude (relative about e²·Δφ, 2e-5 at 20 km) is neglected.
func pieceDistance(p *piece, lat, lon float64) float64 {
	kx := p.kx * (1 - p.tanm*(lat-p.latm)*(math.Pi/360))
	ax, ay := (p.lon1-p.lon0)*kx, (p.lat1-p.lat0)*p.ky
	qx, qy := (lon-p.lon0)*kx, (lat-p.lat0)*p.ky
	t := 0.0
	if l2 := ax*ax + ay*ay; l2 > 0 {
		t = math.Max(0, math.Min(1, (qx*ax+qy*ay)/l2))
	}
	return math.Hypot(qx-t*ax, qy-t*ay)
}

// ParseCorridor reads the value of a corridor flag, "ROUTE,WIDTH": the
// route file (GPX or GeoJSON, see LoadRoute) and the full width with a
// length unit ("route.gpx,10km"; a bare number is metres). The split is at
// the last comma, so a file name may contain commas. Errors are *UsageError
// naming "--corridor" or the route file.
func ParseCorridor(spec string) (*Corridor, error) {
	i := strings.LastIndex(spec, ",")
	if i <= 0 || i == len(spec)-1 {
		return nil, Usagef("--corridor", "%q: want ROUTE,WIDTH (e.g. route.gpx,10km)", spec)
	}
	path, ws := strings.TrimSpace(spec[:i]), spec[i+1:]
	w, err := ParseQuantity(ws, Length)
	if err != nil {
		return nil, FlagError("--corridor", spec, err)
	}
	r, err := LoadRoute(path)
	if err != nil {
		return nil, err
	}
	c, err := NewCorridor(r, w)
	if err != nil {
		return nil, FlagError("--corridor", spec, err)
	}
	return c, nil
}
