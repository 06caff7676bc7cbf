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
	// --alt-indicated becomes the true --alt here (the ICAO cold-
	// temperature correction), with the note every output carries, as in
	// glidereach coverage.
	altNote, err := o.ind.AltitudeFlown(o.alt, o.agl)
	if err != nil {
		return nil, err
	}
	if o.alt.Given == o.agl.Given {
		return nil, input.Usagef("--alt", "give exactly one altitude flown: --alt (true MSL), --agl (above the terrain) or --alt-indicated")
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
	if !strings.EqualFold(filepath.Ext(o.fgb), ".fgb") && o.fgb != "" {
		return nil, input.Usagef("--fgb", "%q: FlatGeobuf is written to a .fgb file", o.fgb)
	}
	if o.pick < 0 || o.pick > 100 {
		return nil, input.Usagef("--pick", "%d is outside 0..100", o.pick)
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
	r.out = Outputs{COG: abs(o.cog), FGB: abs(o.fgb), Summary: abs(o.summary), Pick: o.pick}

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
	resFrom, clrFrom := "the default", "the default"
	if ac.HasReserve || ac.Reserve > 0 {
		resFrom = "the aircraft profile"
	}
	if ac.HasClearance || ac.Clearance > 0 {
		clrFrom = "the aircraft profile"
	}
	if o.reserve.Given {
		resFrom = "--reserve"
	}
	if o.clearance.Given {
		clrFrom = "--clearance"
	}
	r.warnings = plan.SetupWarnings(setup, resFrom, clrFrom)
	wtext := plan.WindText(setup.Wind, input.WindStyleOf(o.wind, o.windAloft))
	if o.windError != "" {
		d, sp, err := input.ParseWindError(o.windError)
		if err != nil {
			return nil, input.FlagError("--wind-error", o.windError, err)
		}
		setup.WithWindError(d, sp)
		if len(setup.Winds) > 1 {
			wtext += plan.WindErrorText(d, sp, len(setup.Winds))
		}
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

	if o.cell.Given && !(o.cell.Value >= 1 && o.cell.Value <= 1000) {
		return nil, input.Usagef("--cell", "%v m is outside 1..1000 m", o.cell.Value)
	}
	// The fields, at their own elevation or the ground's at their point.
	fields, err := input.LoadFields(o.fields)
	if err != nil {
		return nil, err
	}
	var cands []input.Field
	if o.candidates != "" {
		if cands, err = input.LoadFields(o.candidates); err != nil {
			return nil, err
		}
		r.out.Ranked = true
	}
	targets := func(fs []input.Field) []reach.Target {
		var ts []reach.Target
		for _, f := range fs {
			el := math.NaN()
			if f.HasElevation {
				el = f.Elevation
			}
			ts = append(ts, reach.Target{Name: f.Name, Lat: f.Lat, Lon: f.Lon, Elev: el, Reserve: setup.Reserve})
		}
		return ts
	}
	// The lattice, the ceiling and the loss models as glidereach coverage
	// --tiled makes them (reach/plan.PlanTiled).
	b := zone.Bounds()
	req := plan.TiledRequest{Setup: setup, Ground: ground, West: b.Min[0], South: b.Min[1], East: b.Max[0], North: b.Max[1],
		ZoneName: zoneFlag[2:], Alt: o.alt.Value, AGL: o.agl.Given, Tile: o.tile, Fields: targets(fields), Candidates: targets(cands)}
	if o.agl.Given {
		req.Alt = o.agl.Value
	}
	if o.cell.Given {
		req.Cell = o.cell.Value
	}
	tp, err := plan.PlanTiled(req)
	if err != nil {
		var ie *plan.InputError
		if errors.As(err, &ie) && ie.Field == "Zone" {
			return nil, &input.UsageError{Where: zoneFlag, Err: ie.Err}
		}
		return nil, flagFor(err)
	}
	p := tp.Plan
	r.plan = p
	// What the outputs say about the run: the library's words, as
	// glidereach coverage --tiled writes them (the FlatGeobuf's title and
	// description).
	r.out.Zone = zoneText(o, zone)
	assumptions := setup.Assumptions(wtext, r.warnings)
	if altNote != "" {
		assumptions = append(assumptions, altNote)
	}
	altFlown := plan.AltFlownText(o.agl.Given, req.Alt)
	if !o.agl.Given && o.ind.AltInd.Given {
		altFlown = plan.AltFlownIndicatedText(o.alt.Value, o.ind.AltInd.Value)
	}
	r.out.Assumptions = plan.TiledAssumptions(assumptions, p,
		plan.TiledText{AltFlown: altFlown, Zone: r.out.Zone, Terrain: ground.Describe(), Flat: src == nil, DEMCell: tp.DEMCell})
	if r.in.Plan, err = p.Encode(); err != nil {
		return nil, err
	}
	return r, nil
}

// zoneText names the zone as the flags gave it (paths as typed).
func zoneText(o *options, z input.Zone) string {
	switch {
	case o.area != "":
		return plan.AreaText(o.area)
	case o.box != "":
		b := z.Bounds()
		return plan.BoxText(b.Min[0], b.Min[1], b.Max[0], b.Max[1])
	}
	w := 0.0
	if c, ok := z.(*input.Corridor); ok {
		w = c.Width
	}
	return plan.CorridorText(w, o.corridor[:strings.LastIndex(o.corridor, ",")])
}

// flagFor names the flag of a reach/plan input error.
func flagFor(err error) error {
	var ie *plan.InputError
	if !errors.As(err, &ie) {
		return err
	}
	flag := map[string]string{"Mass": "--mass", "Bugs": "--bugs", "AirSink": "--air-sink", "MacCready": "--mc",
		"Reserve": "--reserve", "Clearance": "--clearance", "Aircraft": "--aircraft", "Terrain": "--terrain",
		"Cell": "--cell", "Alt": "--alt"}[ie.Field]
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
