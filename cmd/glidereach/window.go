package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"sync"

	"glidereach/cmd/glidereach/input"
	"glidereach/terrain"
)

// Window sizes. A DEM window keeps the DEM's resolution up to maxWindowSide
// cells a side and is coarsened beyond that; flat ground needs no detail
// and gets flatWindowSide cells a side (the any-angle solver is exact on
// flat ground, so that is ample for the 0.5 % accuracy bar).
const (
	maxWindowSide  = 2001
	flatWindowSide = 801
)

// ground is the terrain of a run: a DEM source, or flat at an elevation.
type ground struct {
	src  terrain.Source // nil: flat
	flat float64        // m MSL when src is nil
	// warn, if not nil, receives warnings about the terrain read (the
	// commands print them on stderr).
	warn func(string)
}

func (g ground) describe() string {
	if g.src == nil {
		return fmt.Sprintf("flat ground at %.0f m MSL (no terrain file given)", g.flat)
	}
	return g.src.Describe()
}

// elevationAt samples the ground at a point; ok false off the data or on a void.
func (g ground) elevationAt(lat, lon float64) (float64, bool, error) {
	if g.src == nil {
		return g.flat, true, nil
	}
	d := 0.0005
	grid, err := g.src.Window(lon-d, lat-d, lon+d, lat+d)
	if err != nil {
		if errors.Is(err, terrain.ErrOutside) {
			return math.NaN(), false, nil
		}
		return math.NaN(), false, err
	}
	v, ok := grid.Elevation(lat, lon)
	if ok && !(v >= minGround && v <= maxGround) {
		return math.NaN(), false, fmt.Errorf("%s: elevation %.0f m at %.5f,%.5f is outside %.0f..%.0f m (an undeclared no-data value, or not metres?)", g.src.Describe(), v, lat, lon, minGround, maxGround)
	}
	return v, ok, nil
}

// window returns a square Local of half-size radius (m) centred on lat0,
// lon0: resampled from the DEM, or flat. The Grid read from the DEM is
// returned too (nil for flat ground), for writing rasters on its lattice.
func (g ground) window(lat0, lon0, radius float64) (*terrain.Local, *terrain.Grid, error) {
	f := terrain.NewFrame(lat0, lon0)
	if radius < 500 {
		radius = 500
	}
	if g.src == nil {
		if err := checkRound("--from", lat0, lon0, radius); err != nil {
			return nil, nil, err
		}
		n := flatWindowSide
		cell := 2 * radius / float64(n-1)
		half := float64(n-1) / 2 * cell
		l := terrain.NewFlat(f, -half, -half, cell, n, n, g.flat)
		l.Source = g.describe()
		return l, nil, nil
	}
	cell := g.src.Resolution()
	if cell <= 0 || math.IsNaN(cell) {
		cell = 30
	}
	if err := checkRound("--from", lat0, lon0, radius); err != nil {
		return nil, nil, err
	}
	n := int(math.Ceil(2*radius/cell)) + 1
	if n > maxWindowSide {
		n = maxWindowSide
		cell = 2 * radius / float64(n-1)
	}
	half := float64(n-1) / 2 * cell
	w, s, e, nn := terrain.LocalExtent(f, -half, -half, cell, n, n)
	grid, err := g.src.Window(w, s, e, nn)
	if err != nil {
		if errors.Is(err, terrain.ErrOutside) {
			return nil, nil, input.Usagef("--from", "the position lies outside the terrain data (%s)", g.src.Describe())
		}
		return nil, nil, &input.UsageError{Where: "--terrain", Err: err}
	}
	// The solvers keep their clearance over the highest DEM sample in each
	// cell, so a ridge between samples is never cut down.
	l := terrain.ResampleHigh(grid, f, -half, -half, cell, n, n)
	l.Source = g.src.Describe()
	if w := terrainWarning(l); w != "" && g.warn != nil {
		g.warn(w)
	}
	return l, grid, nil
}

// maxPlaneRadius bounds how far a solver window may reach from its frame's
// origin (m). The solvers work on the plane tangent at the origin; at a
// distance d a distance across the radial direction shrinks by cos(d/R), so
// 500 km keeps that error below 0.31 % (R = 6371 km), within the 0.5 %
// accuracy bar. Larger areas must be split.
const maxPlaneRadius = 500e3

// checkPlane refuses, naming flag, a solver window x0..x1, y0..y1 (m, in
// frame f) that one local plane cannot represent: one that holds a pole
// (lon/lat outputs cannot draw a polar cap, and longitudes are undefined
// there) or one reaching more than maxPlaneRadius from the origin.
func checkPlane(flag string, f terrain.Frame, x0, y0, x1, y1 float64) error {
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
			return input.Usagef(flag, "the computed window (%.0f × %.0f km) holds the %s Pole: one local plane with lon/lat outputs cannot represent a polar cap; keep the area and its glides %.0f km or more from the pole", (x1-x0)/1000, (y1-y0)/1000, name, math.Max(x1-x0, y1-y0)/1000)
		}
	}
	if r := math.Hypot(math.Max(-x0, x1), math.Max(-y0, y1)); !(r <= maxPlaneRadius) {
		return input.Usagef(flag, "the computed window reaches %.0f km from its centre, more than the %.0f km one local plane represents within 0.31 %%; split the area (or lower the altitude)", r/1000, maxPlaneRadius/1000)
	}
	return nil
}

// checkRound is checkPlane for a window around a start whose glides reach
// at most radius (m): what counts is the circle the glides can reach, not
// the corners of the square window beyond it. A pole within it, or a radius
// beyond maxPlaneRadius, is refused naming flag.
func checkRound(flag string, lat0, lon0, radius float64) error {
	for _, pole := range []float64{90, -90} {
		if d := arcDistance(lat0, lon0, pole, lon0); d <= radius {
			name := "North"
			if pole < 0 {
				name = "South"
			}
			return input.Usagef(flag, "the glides could reach %.0f km, and the %s Pole is %.0f km away: one local plane with lon/lat outputs cannot represent a polar cap; start farther from the pole or lower", radius/1000, name, d/1000)
		}
	}
	if !(radius <= maxPlaneRadius) {
		return input.Usagef(flag, "the glides could reach %.0f km, more than the %.0f km one local plane represents within 0.31 %%; start lower", radius/1000, maxPlaneRadius/1000)
	}
	return nil
}

// arcDistance is the great-circle distance (m) between two points on the
// sphere of the authalic radius, 6371007 m: enough to size a window.
func arcDistance(lat1, lon1, lat2, lon2 float64) float64 {
	const r = 6371007.0
	p1, p2 := lat1*math.Pi/180, lat2*math.Pi/180
	dp, dl := p2-p1, (lon2-lon1)*math.Pi/180
	h := math.Sin(dp/2)*math.Sin(dp/2) + math.Cos(p1)*math.Cos(p2)*math.Sin(dl/2)*math.Sin(dl/2)
	return 2 * r * math.Asin(math.Min(1, math.Sqrt(h)))
}

// terrainWarning returns a warning when the window's elevations are not
// those of land (an undeclared no-data value taken as ground, or a misread
// file), else "".
func terrainWarning(l *terrain.Local) string {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, e := range l.Elev {
		if e == e {
			lo, hi = math.Min(lo, float64(e)), math.Max(hi, float64(e))
		}
	}
	if math.IsInf(lo, 1) {
		return ""
	}
	return implausibleElevations(lo, hi)
}

// lowest returns the lowest known elevation of l (m); +Inf when all are voids.
func lowest(l *terrain.Local) float64 {
	lo := math.Inf(1)
	for _, e := range l.Elev {
		if e == e && float64(e) < lo {
			lo = float64(e)
		}
	}
	return lo
}

// warnOnce returns a warn function for ground that prints each distinct
// warning once on w.
func warnOnce(w io.Writer) func(string) {
	var mu sync.Mutex
	seen := map[string]bool{}
	return func(msg string) {
		mu.Lock()
		defer mu.Unlock()
		if !seen[msg] {
			seen[msg] = true
			fmt.Fprintln(w, "glidereach: warning:", msg)
		}
	}
}

// pointElevation returns the elevation at a point of window l for a field:
// the DEM's own bilinear value when grid (the DEM window l was resampled
// from) is given — l itself holds the obstacle surface, the highest sample
// per cell, which would overstate a field's elevation — else l's value. ok
// is false off the window or on a void.
func pointElevation(l *terrain.Local, grid *terrain.Grid, lat, lon float64) (float64, bool) {
	x, y := l.Frame.Forward(lat, lon)
	te, on := l.Sample(x, y)
	if !on || grid == nil {
		return te, on
	}
	return grid.Elevation(lat, lon)
}

// displayTerrain is the terrain a map is drawn over for the solver window
// l: the DEM itself, resampled bilinearly onto l's extent at the DEM's own
// resolution (at most displaySide cells a side), not l. The solvers' window
// holds the highest DEM sample of each cell (conservative for clearance),
// and where its cells and the DEM's do not line up that maximum takes 2 or
// 3 samples by turns, which the hillshade drew as a lattice of squares
// (moiré); a window coarser than the DEM also drew as stair-steps. Flat
// ground, or a failure to read the DEM again, returns l.
func displayTerrain(l *terrain.Local, g ground) *terrain.Local {
	if g.src == nil || l.Flat {
		return l
	}
	const displaySide = 1600
	w := float64(max(l.Cols, l.Rows)-1) * l.Cell
	cell := math.Max(g.src.Resolution(), w/(displaySide-1))
	if !(cell > 0) || cell >= l.Cell {
		cell = math.Min(l.Cell, math.Max(cell, w/(displaySide-1)))
	}
	cols := int(float64(l.Cols-1)*l.Cell/cell) + 1
	rows := int(float64(l.Rows-1)*l.Cell/cell) + 1
	d, err := terrain.ResampleSource(g.src, l.Frame, l.X0, l.Y0, cell, cols, rows)
	if err != nil {
		return l
	}
	d.Source = l.Source
	return d
}
