package main

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strings"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
	"glidereach/reach/plan"
	"glidereach/reach/tiling"
	"glidereach/terrain"
)

// ceilingMargin (m) is how far above the highest altitude flown the least
// altitudes are computed (glidereach coverage's margin): cells needing more
// than the ceiling get none, so they count as not covered.
const ceilingMargin = 300.0

// request is a checked run: its plan, what the workers need to rebuild the
// inputs, and the warnings the setup gave.
type request struct {
	plan     *tiling.Plan
	in       Inputs
	out      Outputs
	warnings []string
}

// newRequest checks the flags and builds the run's plan.
func newRequest(o *options) (*request, error) {
	if o.fields == "" {
		return nil, input.Usagef("--fields", "a landing-field file is required (GeoJSON)")
	}
	zones := 0
	for _, z := range []string{o.area, o.box, o.corridor} {
		if z != "" {
			zones++
		}
	}
	if zones != 1 {
		return nil, input.Usagef("--area", "give exactly one zone to analyse: --area FILE, --box LAT,LON,LAT,LON or --corridor ROUTE,WIDTH")
	}
	if o.alt.Given == o.agl.Given {
		return nil, input.Usagef("--alt", "give exactly one altitude flown: --alt (true MSL) or --agl (above the terrain)")
	}
	if o.agl.Given && !(o.agl.Value > 0) {
		return nil, input.Usagef("--agl", "%v m: the height flown must be above the terrain", o.agl.Value)
	}
	if o.workDir == "" {
		return nil, input.Usagef("--work-dir", "a work directory is required (it holds the run's tiles and lets a stopped run continue)")
	}
	if o.tile != 0 && (o.tile < 64 || o.tile > 8192 || o.tile%16 != 0) {
		return nil, input.Usagef("--tile", "%d cells is not a multiple of 16 in 64..8192", o.tile)
	}
	if e := strings.ToLower(filepath.Ext(o.cog)); o.cog != "" && e != ".tif" && e != ".tiff" {
		return nil, input.Usagef("--cog", "%q: a cloud-optimised GeoTIFF is written to a .tif file", o.cog)
	}
	if e := strings.ToLower(filepath.Ext(o.summary)); o.summary != "" && e != ".json" {
		return nil, input.Usagef("--summary", "%q: the summary is JSON, written to a .json file", o.summary)
	}
	r := &request{}
	// The workers reopen the inputs by path, from whatever directory they
	// run in: every path they are given is absolute.
	r.in = Inputs{Area: abs(o.area), Box: o.box, Corridor: o.corridor, WorkDir: abs(o.workDir)}
	for _, t := range o.terrain {
		r.in.Terrain = append(r.in.Terrain, abs(t))
	}
	if i := strings.LastIndex(o.corridor, ","); i > 0 {
		r.in.Corridor = abs(o.corridor[:i]) + o.corridor[i:]
	}
	r.out = Outputs{COG: abs(o.cog), Summary: abs(o.summary)}

	// The aircraft and the air (reach/plan's Setup, as glidereach's).
	ac, err := input.LoadAircraft(o.aircraft)
	if err != nil {
		return nil, err
	}
	w, err := input.WindFromFlags(o.wind, o.windAloft)
	if err != nil {
		return nil, err
	}
	cond := reach.Conditions{Mass: o.mass.Value, Bugs: o.bugs.Value, AirSink: o.airSink.Value, MacCready: o.mc.Value}
	reserve, clearance := math.NaN(), math.NaN()
	if o.reserve.Given {
		reserve = o.reserve.Value
	}
	if o.clearance.Given {
		clearance = o.clearance.Value
	}
	setup, err := plan.NewSetup(ac, cond, o.isaDev.Value, w, reserve, clearance)
	if err != nil {
		return nil, flagFor(err)
	}
	if !(setup.Reserve <= maxMargin) || !(setup.Clearance <= maxMargin) {
		return nil, input.Usagef(o.aircraft, "the profile's reserve %v m or clearance %v m is outside 0..%v m", setup.Reserve, setup.Clearance, maxMargin)
	}
	if setup.Reserve < 150 {
		r.warnings = append(r.warnings, fmt.Sprintf("reserve %.0f m is below the 150 m (about 500 ft) that common practice keeps for a circuit (no source)", setup.Reserve))
	}
	if setup.Clearance < 50 {
		r.warnings = append(r.warnings, fmt.Sprintf("clearance %.0f m is below the 50 m above terrain that common practice keeps en route (no source)", setup.Clearance))
	}
	if o.windError != "" {
		d, sp, err := input.ParseWindError(o.windError)
		if err != nil {
			return nil, input.FlagError("--wind-error", o.windError, err)
		}
		setup.WithWindError(d, sp)
	}

	// The ground.
	var src terrain.Source
	if len(o.terrain) > 0 {
		var opts terrain.OpenOptions
		if o.crs != "" {
			code := strings.TrimPrefix(strings.ToUpper(strings.TrimSpace(o.crs)), "EPSG:")
			var epsg int
			if _, err := fmt.Sscanf(code, "%d", &epsg); err != nil {
				return nil, input.Usagef("--crs", "%q is not an EPSG code (e.g. EPSG:4326)", o.crs)
			}
			opts.CRS = terrain.CRS{EPSG: epsg}
			if err := terrain.CheckCRS(opts.CRS); err != nil {
				return nil, &input.UsageError{Where: "--crs", Err: err}
			}
			r.in.CRS = epsg
		}
		switch o.voids {
		case "obstacle", "":
		case "fill":
			opts.FillVoids = 64
			r.in.FillVoids = 64
		default:
			return nil, input.Usagef("--voids", "%q: want obstacle or fill", o.voids)
		}
		if src, err = terrain.OpenWith(opts, o.terrain...); err != nil {
			return nil, &input.UsageError{Where: "--terrain", Err: err}
		}
	}
	zone, err := openZone(o.area, o.box, o.corridor)
	if err != nil {
		return nil, err
	}
	zoneFlag := "--area"
	if o.box != "" {
		zoneFlag = "--box"
	} else if o.corridor != "" {
		zoneFlag = "--corridor"
	}
	ground := plan.Ground{Src: src, Flat: o.ground.Value}

	// The lattice and the solver cell: the DEM's resolution, or --cell
	// (never finer than the DEM; a coarser one is said in the outputs).
	var notes []string
	demCell := defaultFlatCell
	if src != nil {
		if demCell = src.Resolution(); !(demCell > 0) {
			demCell = defaultFlatCell
		}
	}
	cell := demCell
	if o.cell.Given {
		if !(o.cell.Value >= 1 && o.cell.Value <= 1000) {
			return nil, input.Usagef("--cell", "%v m is outside 1..1000 m", o.cell.Value)
		}
		if src != nil && o.cell.Value < demCell*0.999 {
			return nil, input.Usagef("--cell", "%.1f m is finer than the DEM's %.1f m: the solver works at the DEM's resolution or coarser", o.cell.Value, demCell)
		}
		cell = o.cell.Value
		if src != nil && cell > demCell*1.001 {
			notes = append(notes, fmt.Sprintf("solver cell %.1f m as asked (--cell), coarser than the DEM's %.1f m: terrain detail between cells is taken as the highest DEM sample of each cell", cell, demCell))
		}
	}
	b := zone.Bounds()
	lat, err := tiling.LatticeFor(src, b.Min[0], b.Min[1], b.Max[0], b.Max[1], cell)
	if err != nil {
		return nil, &input.UsageError{Where: zoneFlag, Err: err}
	}
	if int64(lat.Cols)*int64(lat.Rows) > 4e9 {
		return nil, input.Usagef(zoneFlag, "the %s holds %d × %d cells of the DEM's lattice, more than 4×10⁹", zoneFlag[2:], lat.Cols, lat.Rows)
	}

	// The ground's range over the lattice, read a window of 1024 × 1024
	// cells at a time (the launcher's memory stays that of one window).
	lo, hi := ground.Flat, ground.Flat
	if src != nil {
		if lo, hi, err = groundRange(src, lat); err != nil {
			return nil, &input.UsageError{Where: "--terrain", Err: err}
		}
		if math.IsInf(hi, -1) {
			return nil, input.Usagef("--terrain", "the terrain over the %s is all voids", zoneFlag[2:])
		}
	}
	top := o.alt.Value
	if o.agl.Given {
		top = hi + o.agl.Value
	} else if lo >= top {
		return nil, input.Usagef("--alt", "%.0f m MSL is not above the lowest ground of the %s (%.0f m)", top, zoneFlag[2:], lo)
	}
	ceiling := math.Min(top+ceilingMargin, 19500)

	// The fields, at their own elevation or the ground's at their point.
	fields, err := input.LoadFields(o.fields)
	if err != nil {
		return nil, err
	}
	var targets []reach.Target
	for _, f := range fields {
		el := f.Elevation
		if !f.HasElevation {
			e, ok, err := ground.ElevationAt(f.Lat, f.Lon)
			if err != nil {
				return nil, &input.UsageError{Where: "--terrain", Err: err}
			}
			if el = e; !ok {
				el = math.NaN()
			}
		}
		if !math.IsNaN(el) {
			lo = math.Min(lo, el)
		}
		targets = append(targets, reach.Target{Name: f.Name, Lat: f.Lat, Lon: f.Lon, Elev: el, Reserve: setup.Reserve})
	}

	// One loss model per wind of the set, from 1000 m below the lowest
	// ground and field (windows reach beyond the zone; below the table its
	// lowest row is used) to above the ceiling.
	tabLo := math.Max(-500, lo-1000)
	var models []tiling.LossGrid
	for _, wp := range setup.Winds {
		tab, err := setup.TableFor(wp, tabLo, ceiling+60)
		if err != nil {
			return nil, &input.UsageError{Where: "--aircraft", Err: err}
		}
		hMin, hMax := tab.Range()
		lg, err := tiling.SampleLoss(tab, hMin, hMax)
		if err != nil {
			return nil, err
		}
		models = append(models, lg)
	}
	p := &tiling.Plan{Lattice: lat, Tile: o.tile, Fields: targets, Models: models, Clearance: setup.Clearance,
		Alt: o.alt.Value, AGL: o.agl.Given, Ceiling: ceiling, Cell: cell, Flat: ground.Flat, Notes: notes}
	if o.agl.Given {
		p.Alt = o.agl.Value
	}
	if err := p.Check(); err != nil {
		return nil, err
	}
	r.plan = p
	if r.in.Plan, err = p.Encode(); err != nil {
		return nil, err
	}
	return r, nil
}

// groundRange returns the lowest and highest DEM samples over the lattice
// (+Inf, −Inf when all are voids or off the data), read one window of
// 1024 × 1024 lattice cells at a time.
func groundRange(src terrain.Source, lat tiling.Lattice) (lo, hi float64, err error) {
	lo, hi = math.Inf(1), math.Inf(-1)
	p0 := &tiling.Plan{Lattice: lat, Tile: 1024}
	g := lat.Grid()
	for _, id := range p0.Tiles() {
		c0, r0, cols, rows := p0.TileBox(id)
		la0, lo0, err := g.FromCRS(g.X0+float64(c0)*g.DX, g.Y0-float64(r0)*g.DY)
		if err != nil {
			return 0, 0, err
		}
		la1, lo1, err := g.FromCRS(g.X0+float64(c0+cols-1)*g.DX, g.Y0-float64(r0+rows-1)*g.DY)
		if err != nil {
			return 0, 0, err
		}
		dem, err := src.Window(math.Min(lo0, lo1), math.Min(la0, la1), math.Max(lo0, lo1), math.Max(la0, la1))
		if errors.Is(err, terrain.ErrOutside) {
			continue // a window off the DEM: unknown ground
		}
		if err != nil {
			return 0, 0, err
		}
		if a, z, ok := dem.ElevationRange(); ok {
			lo, hi = math.Min(lo, a), math.Max(hi, z)
		}
	}
	return lo, hi, nil
}

// flagFor names the flag of a reach/plan input error.
func flagFor(err error) error {
	var ie *plan.InputError
	if !errors.As(err, &ie) {
		return err
	}
	flag := map[string]string{"Mass": "--mass", "Bugs": "--bugs", "AirSink": "--air-sink", "MacCready": "--mc",
		"Reserve": "--reserve", "Clearance": "--clearance", "Aircraft": "--aircraft", "Terrain": "--terrain"}[ie.Field]
	return &input.UsageError{Where: flag, Err: ie.Err}
}

// abs returns path made absolute ("" stays ""; a path that cannot be made
// absolute stays as given).
func abs(path string) string {
	if path == "" {
		return ""
	}
	if a, err := filepath.Abs(path); err == nil {
		return a
	}
	return path
}
