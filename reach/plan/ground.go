package plan

import (
	"errors"
	"fmt"
	"math"

	"glidereach/terrain"
)

// Window sizes. A DEM window keeps the DEM's resolution up to MaxWindowSide
// cells a side and is coarsened beyond that; flat ground needs no detail
// and gets FlatWindowSide cells a side (the any-angle solver is exact on
// flat ground, so that is ample for the 0.5 % accuracy bar).
const (
	MaxWindowSide  = 2001
	FlatWindowSide = 801
)

// Area windows (route, coverage): one Local covering a lat/lon box plus the
// reach radius, kept under MaxAreaCells cells by coarsening the cell. Flat
// ground needs no detail (the solver is exact there) and gets at most
// FlatAreaCells cells of at least MinFlatCell metres.
const (
	MaxAreaCells  = 2001 * 2001
	FlatAreaCells = 1000 * 1000
	MinFlatCell   = 25.0 // m
)

// Elevations a DEM sample at a point may have (m MSL); one outside is an
// undeclared no-data value or not metres. Land on Earth lies between about
// −430 m (the Dead Sea shore) and 8849 m (the highest summit); both figures
// from memory, widened to round numbers.
const (
	MinGround = -500.0
	MaxGround = 9000.0
)

// MaxPlaneRadius bounds how far a solver window may reach from its frame's
// origin (m). The solvers work on the plane tangent at the origin; at a
// distance d a distance across the radial direction shrinks by cos(d/R), so
// 500 km keeps that error below 0.31 % (R = 6371 km), within the 0.5 %
// accuracy bar. Larger areas must be split.
const MaxPlaneRadius = 500e3

// Ground is the terrain of a run: a DEM source, or flat at an elevation.
type Ground struct {
	Src  terrain.Source // nil: flat
	Flat float64        // m MSL when Src is nil
	// Warn, if not nil, receives warnings about the terrain read (a
	// command prints them).
	Warn func(string)
}

// Describe names the ground for the outputs: the DEM's description, or
// "flat ground at … m MSL (no terrain file given)".
func (g Ground) Describe() string {
	if g.Src == nil {
		return fmt.Sprintf("flat ground at %.0f m MSL (no terrain file given)", g.Flat)
	}
	return g.Src.Describe()
}

// ElevationAt samples the ground at a point (m MSL, the DEM's bilinear
// value); ok is false off the data or on a void. A sample outside
// MinGround..MaxGround is an error (an undeclared no-data value, or not
// metres), as is a failed read.
func (g Ground) ElevationAt(lat, lon float64) (float64, bool, error) {
	if g.Src == nil {
		return g.Flat, true, nil
	}
	d := 0.0005
	grid, err := g.Src.Window(lon-d, lat-d, lon+d, lat+d)
	if err != nil {
		if errors.Is(err, terrain.ErrOutside) {
			return math.NaN(), false, nil
		}
		return math.NaN(), false, err
	}
	v, ok := grid.Elevation(lat, lon)
	if ok && !(v >= MinGround && v <= MaxGround) {
		return math.NaN(), false, fmt.Errorf("%s: elevation %.0f m at %.5f,%.5f is outside %.0f..%.0f m (an undeclared no-data value, or not metres?)", g.Src.Describe(), v, lat, lon, MinGround, MaxGround)
	}
	return v, ok, nil
}

// Window returns a square Local of half-size radius (m, at least 500 m)
// centred on lat0, lon0: from the DEM at its resolution (coarsened beyond
// MaxWindowSide cells a side), each cell holding the highest DEM sample in
// it (the obstacle surface: a ridge between samples is never cut down), or
// flat with FlatWindowSide cells a side. The Grid read from the DEM is
// returned too (nil for flat ground), for writing rasters on its lattice.
// Errors: *InputError naming "From" (the glides would reach a pole or
// beyond MaxPlaneRadius, or the position lies outside the data) or
// "Terrain" (the read failed).
func (g Ground) Window(lat0, lon0, radius float64) (*terrain.Local, *terrain.Grid, error) {
	f := terrain.NewFrame(lat0, lon0)
	if radius < 500 {
		radius = 500
	}
	if g.Src == nil {
		if err := CheckRound("From", lat0, lon0, radius); err != nil {
			return nil, nil, err
		}
		n := FlatWindowSide
		cell := 2 * radius / float64(n-1)
		half := float64(n-1) / 2 * cell
		l := terrain.NewFlat(f, -half, -half, cell, n, n, g.Flat)
		l.Source = g.Describe()
		return l, nil, nil
	}
	cell := g.Src.Resolution()
	if cell <= 0 || math.IsNaN(cell) {
		cell = 30
	}
	if err := CheckRound("From", lat0, lon0, radius); err != nil {
		return nil, nil, err
	}
	n := int(math.Ceil(2*radius/cell)) + 1
	if n > MaxWindowSide {
		n = MaxWindowSide
		cell = 2 * radius / float64(n-1)
	}
	half := float64(n-1) / 2 * cell
	w, s, e, nn := terrain.LocalExtent(f, -half, -half, cell, n, n)
	grid, err := g.Src.Window(w, s, e, nn)
	if err != nil {
		if errors.Is(err, terrain.ErrOutside) {
			return nil, nil, inputf("From", "the position lies outside the terrain data (%s)", g.Src.Describe())
		}
		return nil, nil, &InputError{Field: "Terrain", Err: err}
	}
	// The solvers keep their clearance over the highest DEM sample in each
	// cell, so a ridge between samples is never cut down.
	l := terrain.ResampleHigh(grid, f, -half, -half, cell, n, n)
	l.Source = g.Src.Describe()
	if w := TerrainWarning(l); w != "" && g.Warn != nil {
		g.Warn(w)
	}
	return l, grid, nil
}

// AreaWindow returns a Local on a frame centred on the lat/lon box, covering
// the box plus margin metres on every side: resampled from the DEM at its
// resolution (the highest sample per cell, as Window), coarsened to keep
// under MaxAreaCells cells, or flat (at most FlatAreaCells cells, cells of
// at least MinFlatCell). The DEM Grid read is returned too (nil for flat
// ground). field names the request field the box came from ("Route",
// "Area", "Box", "Corridor"); errors are *InputError naming it (the box
// too large for one plane, holding a pole, or outside the data) or
// "Terrain" (the read failed), and their text calls the box by field in
// lower case ("the area spans …").
func (g Ground) AreaWindow(minLat, minLon, maxLat, maxLon, margin float64, field string) (*terrain.Local, *terrain.Grid, error) {
	noun := lowerFirst(field)
	f := terrain.NewFrame((minLat+maxLat)/2, (minLon+maxLon)/2)
	x0, y0, x1, y1 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	corners := [][2]float64{{minLat, minLon}, {minLat, maxLon}, {maxLat, minLon}, {maxLat, maxLon}, {minLat, (minLon + maxLon) / 2}, {maxLat, (minLon + maxLon) / 2}}
	// Far corners would fold back onto the plane (orthographic): measure
	// them on the sphere first.
	for _, ll := range corners {
		if d := ArcDistance(f.Lat0, f.Lon0, ll[0], ll[1]); d > MaxPlaneRadius {
			return nil, nil, inputf(field, "the %s spans %.0f km from its centre, more than the %.0f km one local plane represents within 0.31 %%; split the area (an area across the antimeridian cannot be analysed in one piece)", noun, d/1000, MaxPlaneRadius/1000)
		}
	}
	for _, ll := range corners {
		x, y := f.Forward(ll[0], ll[1])
		x0, x1 = math.Min(x0, x), math.Max(x1, x)
		y0, y1 = math.Min(y0, y), math.Max(y1, y)
	}
	x0, y0, x1, y1 = x0-margin, y0-margin, x1+margin, y1+margin
	if err := CheckPlane(field, f, x0, y0, x1, y1); err != nil {
		return nil, nil, err
	}
	w, h := x1-x0, y1-y0
	cell, capCells := MinFlatCell, float64(FlatAreaCells)
	if g.Src != nil {
		cell, capCells = g.Src.Resolution(), float64(MaxAreaCells)
		if !(cell > 0) {
			cell = 30
		}
	}
	if (w/cell+1)*(h/cell+1) > capCells {
		cell = math.Sqrt(w*h/capCells) * 1.01
		for (math.Ceil(w/cell)+1)*(math.Ceil(h/cell)+1) > capCells {
			cell *= 1.01
		}
	}
	cols, rows := int(math.Ceil(w/cell))+1, int(math.Ceil(h/cell))+1
	if g.Src == nil {
		l := terrain.NewFlat(f, x0, y0, cell, cols, rows, g.Flat)
		l.Source = g.Describe()
		return l, nil, nil
	}
	ww, s, e, n := terrain.LocalExtent(f, x0, y0, cell, cols, rows)
	grid, err := g.Src.Window(ww, s, e, n)
	if err != nil {
		if errors.Is(err, terrain.ErrOutside) {
			return nil, nil, inputf(field, "lies outside the terrain data (%s)", g.Src.Describe())
		}
		return nil, nil, &InputError{Field: "Terrain", Err: err}
	}
	// Obstacle surface: the highest DEM sample per cell (see Window).
	l := terrain.ResampleHigh(grid, f, x0, y0, cell, cols, rows)
	l.Source = g.Src.Describe()
	return l, grid, nil
}

func lowerFirst(s string) string {
	if s == "" {
		return s
	}
	b := []byte(s)
	if b[0] >= 'A' && b[0] <= 'Z' {
		b[0] += 'a' - 'A'
	}
	return string(b)
}

// CheckPlane refuses, as an *InputError naming field, a solver window x0..x1,
// y0..y1 (m, in frame f) that one local plane cannot represent: one that
// holds a pole (lon/lat outputs cannot draw a polar cap, and longitudes are
// undefined there) or one reaching more than MaxPlaneRadius from the origin.
func CheckPlane(field string, f terrain.Frame, x0, y0, x1, y1 float64) error {
	for _, pole := range []float64{90, -90} {
		if pole*f.Lat0 < 0 {
			continue // the far pole is beyond the plane's horizon
		}
		px, py := f.Forward(pole, f.Lon0)
		if px >= x0 && px <= x1 && py >= y0 && py <= y1 {
			name := "North"
			if pole < 0 {
				name = "South"
			}
			return inputf(field, "the computed window (%.0f × %.0f km) holds the %s Pole: one local plane with lon/lat outputs cannot represent a polar cap; keep the area and its glides %.0f km or more from the pole", (x1-x0)/1000, (y1-y0)/1000, name, math.Max(x1-x0, y1-y0)/1000)
		}
	}
	if r := math.Hypot(math.Max(-x0, x1), math.Max(-y0, y1)); !(r <= MaxPlaneRadius) {
		return inputf(field, "the computed window reaches %.0f km from its centre, more than the %.0f km one local plane represents within 0.31 %%; split the area (or lower the altitude)", r/1000, MaxPlaneRadius/1000)
	}
	return nil
}

// CheckRound is CheckPlane for a window around a start whose glides reach
// at most radius (m): what counts is the circle the glides can reach, not
// the corners of the square window beyond it. A pole within it, or a radius
// beyond MaxPlaneRadius, is an *InputError naming field.
func CheckRound(field string, lat0, lon0, radius float64) error {
	for _, pole := range []float64{90, -90} {
		if d := ArcDistance(lat0, lon0, pole, lon0); d <= radius {
			name := "North"
			if pole < 0 {
				name = "South"
			}
			return inputf(field, "the glides could reach %.0f km, and the %s Pole is %.0f km away: one local plane with lon/lat outputs cannot represent a polar cap; start farther from the pole or lower", radius/1000, name, d/1000)
		}
	}
	if !(radius <= MaxPlaneRadius) {
		return inputf(field, "the glides could reach %.0f km, more than the %.0f km one local plane represents within 0.31 %%; start lower", radius/1000, MaxPlaneRadius/1000)
	}
	return nil
}

// ArcDistance is the great-circle distance (m) between two points (degrees)
// on the sphere of the authalic radius, 6371007 m: enough to size a window
// (haversine formula).
func ArcDistance(lat1, lon1, lat2, lon2 float64) float64 {
	const r = 6371007.0
	p1, p2 := lat1*math.Pi/180, lat2*math.Pi/180
	dp, dl := p2-p1, (lon2-lon1)*math.Pi/180
	h := math.Sin(dp/2)*math.Sin(dp/2) + math.Cos(p1)*math.Cos(p2)*math.Sin(dl/2)*math.Sin(dl/2)
	return 2 * r * math.Asin(math.Min(1, math.Sqrt(h)))
}

// Land elevations (m) beyond which ImplausibleElevations warns.
const (
	plausibleLowM  = -500
	plausibleHighM = 9000
)

// ImplausibleElevations returns a warning when lo..hi (m) goes beyond the
// elevations of land (MinGround..MaxGround): sea-floor data, or a no-data
// value the file does not declare (−32768, −9999, …) or samples misread.
// Such cells count as ground, not voids, so the user must know. "" when
// lo..hi is plausible.
func ImplausibleElevations(lo, hi float64) string {
	if lo >= plausibleLowM && hi <= plausibleHighM {
		return ""
	}
	return fmt.Sprintf("elevations go beyond %d..%d m, the range of land: unless this is sea-floor data, "+
		"the file may hold a no-data value it does not declare (such as -32768 or -9999) or be misread; "+
		"those cells are taken as ground, not as voids", plausibleLowM, plausibleHighM)
}

// TerrainWarning returns a warning when the window's elevations are not
// those of land (ImplausibleElevations), else "".
func TerrainWarning(l *terrain.Local) string {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, e := range l.Elev {
		if e == e {
			lo, hi = math.Min(lo, float64(e)), math.Max(hi, float64(e))
		}
	}
	if math.IsInf(lo, 1) {
		return ""
	}
	return ImplausibleElevations(lo, hi)
}

// Lowest returns the lowest known elevation of l (m); +Inf when all are voids.
func Lowest(l *terrain.Local) float64 {
	lo := math.Inf(1)
	for _, e := range l.Elev {
		if e == e && float64(e) < lo {
			lo = float64(e)
		}
	}
	return lo
}

// PointElevation returns the elevation (m MSL) at a point of window l for
// a field: the DEM's own bilinear value when grid (the DEM window l was
// resampled from) is given — l itself holds the obstacle surface, the
// highest sample per cell, which would overstate a field's elevation — else
// l's value. ok is false off the window or on a void.
func PointElevation(l *terrain.Local, grid *terrain.Grid, lat, lon float64) (float64, bool) {
	x, y := l.Frame.Forward(lat, lon)
	te, on := l.Sample(x, y)
	if !on || grid == nil {
		return te, on
	}
	return grid.Elevation(lat, lon)
}
