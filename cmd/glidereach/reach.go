package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"sync"

	"github.com/paulmach/orb"
	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/reach/plan"
	"glidereach/terrain"
)

func init() { register(newReachCmd) }

// reachOptions are the reach command's flags.
type reachOptions struct {
	pos    *positionFlags
	glide  *glideFlags
	terr   *terrainFlags
	fields string
	levels []string
	out    string
	format string
	raster string
	mapPNG string
	report string
	fail   *failureFlags
}

func newReachCmd() *cobra.Command {
	o := &reachOptions{pos: newPositionFlags(), glide: newGlideFlags(), terr: newTerrainFlags(), fail: newFailureFlags()}
	cmd := &cobra.Command{
		Use:   "reach",
		Short: "Ground reachable without thrust from a position and altitude (footprint)",
		Long: `reach computes the best arrival altitude at every cell around a start position,
gliding at the speed to fly through the wind at each altitude, keeping the
clearance above terrain, and contours the ground reachable with the reserve
height (and any --levels). Landing fields given with --fields are judged one
by one: reachable or not, arrival height, and the start altitude that would
just reach them with the reserve.

` + cautionText,
		Example: `  glidereach reach --from -0.5,-24.5 --alt 1500m --aircraft trainer --out reach.geojson
  glidereach reach --from 0.0,-25.0 --agl 3000ft --wind 0m:240/10kt,1500m:270/20kt \
      --terrain testdata/geotiff/geo_int16_strip_none.tif --fields testdata/fields/fixture-fields.geojson --levels 0m,150m
  glidereach reach --from -0.5,-24.5 --alt 1200m --format json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runReach(cmd.Context(), o, cmd.OutOrStdout(), cmd.ErrOrStderr())
		},
	}
	fs := cmd.Flags()
	o.pos.register(fs)
	o.glide.register(fs)
	o.terr.register(fs)
	fs.StringVar(&o.fields, "fields", "", "landing fields: GeoJSON points or polygons with a name property")
	fs.StringSliceVar(&o.levels, "levels", nil, fmt.Sprintf("further arrival heights above ground to contour, e.g. 0m,150m; at most %d, each 0..5000 m", maxLevels))
	fs.StringVar(&o.out, "out", "", "write the result to this file (GeoJSON FeatureCollection; JSON with --format json)")
	fs.StringVar(&o.format, "format", "text", "output format: text, json or geojson (stdout, or --out)")
	fs.StringVar(&o.raster, "raster", "", "write the arrival height above ground as a raster (.tif GeoTIFF or .asc ESRI ASCII grid)")
	fs.StringVar(&o.mapPNG, "map", "", "draw a map of the result to this PNG file")
	fs.StringVar(&o.report, "report", "", "write a self-contained HTML report to this file")
	o.fail.register(fs)
	return cmd
}

// parseLevels parses --levels: at most maxLevels arrival heights above
// the ground, each 0..5000 m. Errors are usage errors naming the flag.
func parseLevels(levels []string) ([]float64, error) {
	if len(levels) > maxLevels {
		return nil, input.Usagef("--levels", "%d levels given; at most %d", len(levels), maxLevels)
	}
	var extra []float64
	for _, s := range levels {
		v, err := input.ParseQuantity(s, input.Length)
		if err != nil {
			return nil, input.FlagError("--levels", s, err)
		}
		if v < 0 || v > 5000 {
			return nil, input.Usagef("--levels", "%q is outside 0..5000 m", s)
		}
		extra = append(extra, v)
	}
	return extra, nil
}

// maxLevels bounds --levels: each level is one more contouring of the
// footprint, and a map cannot show more than a handful apart.
const maxLevels = 20

// fieldResult is one landing field judged from the start.
type fieldResult struct {
	Name        string  `json:"name"`
	Lat         float64 `json:"lat"`
	Lon         float64 `json:"lon"`
	ElevationM  float64 `json:"elevation_m"`
	Reachable   bool    `json:"reachable"`
	ArrivalAGLM float64 `json:"arrival_agl_m"`          // NaN written as null
	RequiredMSL float64 `json:"required_msl_m"`         // NaN written as null
	DistanceM   float64 `json:"distance_m"`             //
	BearingDeg  float64 `json:"bearing_deg"`            //
	LengthM     float64 `json:"length_m,omitempty"`     //
	Surface     string  `json:"surface,omitempty"`      //
	MarginM     float64 `json:"margin_above_reserve_m"` // arrival − reserve
	Note        string  `json:"note,omitempty"`         //
}

// reachRun is everything a reach computation produced, for the writers.
type reachRun struct {
	setup      *glideSetup
	ground     plan.Ground
	startLat   float64
	startLon   float64
	startAlt   float64
	startElev  float64
	heading    float64
	res        *reach.FootprintResult
	members    []*reach.FootprintResult // one per wind of setup.Winds (res is their Intersect)
	levels     []reach.Level
	fields     []fieldResult
	farthest   float64       // m, geodesic, start to farPoint (0 when nothing is reached)
	farBearing float64       // degrees true
	farPoint   orb.Point     // the reserve ring's vertex farthest from the start (lon, lat)
	grid       *terrain.Grid // DEM window, nil on flat ground
	// edge is set when the footprint runs into the edge of the terrain
	// data (see terrainEdge): the ground beyond was not computed.
	edge *edgeCut

	fail    *failureState       // nil: no failure state (--heading)
	sectors []reach.SectorStart // the failure's sector starts (nominal wind)
}

func runReach(ctx context.Context, o *reachOptions, stdout, stderr io.Writer) error {
	switch o.format {
	case "text", "json", "geojson":
	default:
		return input.Usagef("--format", "%q: want text, json or geojson", o.format)
	}
	if !o.pos.from.Given {
		return input.Usagef("--from", "the start position is required (LAT,LON)")
	}
	extra, err := parseLevels(o.levels)
	if err != nil {
		return err
	}
	if err := checkOutputs(o.out, o.raster, o.mapPNG, o.report); err != nil {
		return err
	}
	setup, err := o.glide.resolve()
	if err != nil {
		return err
	}
	setup.printWarnings(stderr)
	src, err := o.terr.open()
	if err != nil {
		return err
	}
	var fields []input.Field
	if o.fields != "" {
		fields, err = input.LoadFields(o.fields)
		if err != nil {
			return err
		}
	}
	start := orb.Point{o.pos.from.Lon, o.pos.from.Lat}
	for _, w := range farWarnings("start", orb.Bound{Min: start, Max: start}, fields, "--fields", nil) {
		fmt.Fprintln(stderr, "glidereach: warning:", w)
	}
	fstate, err := o.fail.resolve()
	if err != nil {
		return err
	}
	run, err := computeReachFrom(ctx, setup, plan.Ground{Src: src, Flat: o.terr.ground.Value, Warn: warnOnce(stderr)}, o.pos, fields, extra, stderr, fstate)
	if err != nil {
		return err
	}

	return deliver(ctx, stdout, results{out: o.out, format: o.format, raster: o.raster, mapPNG: o.mapPNG, report: o.report,
		document: func(format string) ([]byte, error) {
			if format == "json" {
				return reachJSON(run)
			}
			return reachGeoJSON(run) // geojson, and the --out file of text mode
		},
		writeRaster: func(path string) error { return writeArrivalRaster(path, run) },
		draw:        func(m, r string) error { return drawReach(run, m, r) },
		text:        func(w io.Writer) { writeReachText(w, run) }})
}

// computeReach runs the footprint and judges the fields.
func computeReach(ctx context.Context, setup *glideSetup, gr plan.Ground, pos *positionFlags, fields []input.Field, extraLevels []float64, stderr io.Writer) (*reachRun, error) {
	return computeReachFrom(ctx, setup, gr, pos, fields, extraLevels, stderr, nil)
}

// computeReachFrom is computeReach from an engine failure's state (nil:
// already gliding at the speed to fly, as computeReach).
func computeReachFrom(ctx context.Context, setup *glideSetup, gr plan.Ground, pos *positionFlags, fields []input.Field, extraLevels []float64, stderr io.Writer, fstate *failureState) (*reachRun, error) {
	lat, lon := pos.from.Lat, pos.from.Lon
	elev, ok, err := gr.ElevationAt(lat, lon)
	if err != nil {
		return nil, &input.UsageError{Where: "--terrain", Err: err}
	}
	if !ok {
		return nil, input.Usagef("--from", "%.5f,%.5f lies off the terrain data or on a void (unknown ground)", lat, lon)
	}
	alt, err := pos.startAlt(elev)
	if err != nil {
		return nil, err
	}
	if pos.note != "" {
		setup.Notes = append(setup.Notes, pos.note)
	}
	if alt <= elev {
		return nil, input.Usagef("--alt", "%.0f m MSL is not above the terrain at the start (%.0f m)", alt, elev)
	}
	run := &reachRun{setup: setup, ground: gr, startLat: lat, startLon: lon, startAlt: alt, startElev: elev, heading: math.NaN(), fail: fstate}
	if fstate != nil {
		run.heading = fstate.HeadingDeg
	}
	setup.checkStartClearance(stderr, alt, elev)
	setup.State = fstate.assumption()
	if fstate != nil {
		setup.State += "; the footprint is the shape this state gives: the glide toward each direction starts after the turn to it (either way, up to 270°)"
	}
	// From a failure state the glides start up to a few km away and may
	// start higher (the energy credit): widen the window and the tables.
	pad, topExtra := 0.0, 0.0
	if fstate != nil {
		credit, err := fstate.credit(setup, alt)
		if err != nil {
			return nil, err
		}
		pad, topExtra = 3000, credit+100
	}

	// Size the window from the best downwind glide down to the lowest ground
	// it meets (a first guess below the start's ground, then corrected).
	l, grid, err := setup.SizeWindow(plan.WindowSize{Top: alt + topExtra, TableTop: alt + 50 + topExtra, Bottom: math.Min(elev-300, 0), Below: 50},
		func(radius float64) (*terrain.Local, *terrain.Grid, error) {
			return gr.Window(lat, lon, radius*1.02+1000+pad)
		})
	if err != nil {
		return nil, usage(err)
	}
	run.grid = grid
	lo := plan.Lowest(l)
	if math.IsInf(lo, 1) {
		return nil, input.Usagef("--terrain", "the terrain around the start is all voids")
	}
	minLevel := setup.Reserve
	for _, v := range extraLevels {
		minLevel = math.Min(minLevel, v)
	}
	prog := newProgress(stderr, "reach")
	// The winds of --wind-error are independent runs: two at a time (each
	// run is the same whatever runs beside it, and the members keep the
	// winds' order, so the result does not depend on the cores).
	members := make([]*reach.FootprintResult, len(setup.Winds))
	shares := make([]float64, len(setup.Winds))
	var shareMu sync.Mutex
	err = plan.ForEach(ctx, len(setup.Winds), 2, func(k int) error {
		tab, err := setup.TableFor(setup.Winds[k], lo+math.Min(minLevel, 0)-260, alt+60+topExtra)
		if err != nil {
			return &input.UsageError{Where: "--aircraft", Err: err}
		}
		n := float64(len(setup.Winds))
		fopts := reach.FootprintOptions{
			Reserve: setup.Reserve, Clearance: setup.Clearance, Levels: extraLevels,
			Progress: func(d float64) {
				shareMu.Lock()
				shares[k] = d
				t := 0.0
				for _, x := range shares {
					t += x
				}
				shareMu.Unlock()
				prog.set(t / n)
			}}
		var res *reach.FootprintResult
		if fstate != nil {
			secs, err := failureSectors(setup, setup.Winds[k], l, lat, lon, alt, fstate)
			if err != nil {
				return err
			}
			if k == 0 {
				run.sectors = secs
			}
			res, err = reach.FootprintFromState(ctx, l, reach.Start{Lat: lat, Lon: lon, Alt: alt}, secs, tab, fopts)
		} else {
			res, err = reach.Footprint(ctx, l, reach.Start{Lat: lat, Lon: lon, Alt: alt}, tab, fopts)
		}
		if err != nil {
			switch {
			case errors.Is(err, reach.ErrStartBelowGround), errors.Is(err, reach.ErrStartOffGround):
				return &input.UsageError{Where: "--from", Err: err}
			}
			return err
		}
		members[k] = res
		return nil
	})
	prog.done()
	if err != nil {
		return nil, err
	}
	res, err := reach.Intersect(members)
	if err != nil {
		return nil, err
	}
	run.res, run.members = res, members
	levels := append([]float64{setup.Reserve}, extraLevels...)
	sort.Sort(sort.Reverse(sort.Float64Slice(levels))) // highest first, as a pilot reads them
	run.levels = res.Rings(dedupe(levels))
	// The farthest point: the reserve ring's vertex farthest from the start
	// (geodesic), which a reader finds in the GeoJSON rings as written; it is
	// within one cell of the farthest cell reached with the reserve.
	for _, lv := range run.levels {
		if lv.ArrivalAGL != setup.Reserve {
			continue
		}
		if p, d, b, ok := lv.FarthestVertex(lat, lon); ok {
			run.farthest, run.farBearing, run.farPoint = d, b, p
		}
	}
	run.edge = terrainEdge(res, grid, math.Min(minLevel, setup.Reserve))

	// Fields: each is judged in every wind by its own backward run; the
	// (field, wind) runs are independent and shared between two workers.
	run.fields = make([]fieldResult, len(fields))
	jobs := make([]*fieldJob, len(fields))
	for i, f := range fields {
		fr, job, err := prepareField(run, f, l)
		if err != nil {
			return nil, err
		}
		run.fields[i], jobs[i] = fr, job
	}
	// One table per wind for every field: from the lowest ground of the
	// window or field to the highest ceiling.
	flo, fhi := plan.Lowest(l), math.Inf(-1)
	for _, j := range jobs {
		if j != nil {
			flo, fhi = math.Min(flo, j.target.Elev), math.Max(fhi, j.ceiling)
		}
	}
	if !math.IsInf(fhi, -1) {
		tabs, err := fieldTables(ctx, run, flo-60, fhi+60)
		if err != nil {
			return nil, err
		}
		bounds := make([]*reach.RangeBound, len(tabs))
		for k, t := range tabs {
			if bounds[k], err = reach.NewRangeBound(t, flo-50, fhi+50); err != nil {
				return nil, &input.UsageError{Where: "--aircraft", Err: err}
			}
		}
		for i, j := range jobs {
			if j == nil {
				continue
			}
			need, err := placeField(run, l, &run.fields[i], j, bounds)
			if err != nil {
				return nil, err
			}
			if !need {
				jobs[i] = nil
			}
		}
		if err := judgeFields(ctx, run, l, jobs, tabs); err != nil {
			return nil, err
		}
	}
	for i, job := range jobs {
		if job != nil {
			run.fields[i] = job.finish(run.fields[i])
		}
	}
	sort.SliceStable(run.fields, func(i, j int) bool {
		a, b := run.fields[i], run.fields[j]
		if a.Reachable != b.Reachable {
			return a.Reachable
		}
		if a.Reachable {
			return a.ArrivalAGLM > b.ArrivalAGLM
		}
		return nanLast(a.RequiredMSL, b.RequiredMSL)
	})
	return run, nil
}

func nanLast(a, b float64) bool {
	if math.IsNaN(a) {
		return false
	}
	if math.IsNaN(b) {
		return true
	}
	return a < b
}

func dedupe(v []float64) []float64 {
	var out []float64
	seen := map[float64]bool{}
	for _, x := range v {
		if !seen[x] {
			seen[x] = true
			out = append(out, x)
		}
	}
	return out
}

// fieldJob is what the backward runs of one field need and produce.
type fieldJob struct {
	onWindow bool
	// fromLat, fromLon are where the glide to the field starts (the start,
	// or the failure state's sector start), cost the altitude (m) the
	// failure costs before it.
	fromLat, fromLon, cost float64
	dist                   float64        // m from the start (geodesic), NaN if unknown
	win                    *terrain.Local // the window the runs search
	target                 reach.Target
	ceiling                float64 // m MSL
	lo                     float64 // lowest ground of win or the field, m MSL
	req                    []float64
	ok                     []bool
}

// finish folds the runs of every wind into the field's figure: the
// highest required altitude (it must hold in every wind), none when any
// wind has none.
func (j *fieldJob) finish(fr fieldResult) fieldResult {
	req, ok := math.Inf(-1), true
	for k := range j.req {
		if !j.ok[k] {
			ok = false
			break
		}
		req = math.Max(req, j.req[k])
	}
	if ok {
		fr.RequiredMSL = req
	} else if fr.Note == "" {
		fr.Note = fmt.Sprintf("not reachable from below %.0f m MSL", j.ceiling)
	}
	return fr
}

// prepareField judges a field from the footprint (reachable or not, arrival
// height) and sets up the search for the start altitude that would just
// reach it with the reserve; job is nil when no search is needed.
func prepareField(run *reachRun, f input.Field, l *terrain.Local) (fieldResult, *fieldJob, error) {
	fr := fieldResult{Name: f.Name, Lat: f.Lat, Lon: f.Lon, LengthM: f.Length, Surface: f.Surface,
		ArrivalAGLM: math.NaN(), RequiredMSL: math.NaN(), MarginM: math.NaN()}
	s, az, _, err := geodesy.Inverse(geodesy.LatLon{Lat: run.startLat, Lon: run.startLon}, geodesy.LatLon{Lat: f.Lat, Lon: f.Lon})
	if err == nil {
		fr.DistanceM, fr.BearingDeg = s, math.Mod(az+360, 360)
	}
	te, onWindow := plan.PointElevation(l, run.grid, f.Lat, f.Lon)
	switch {
	case f.HasElevation:
		fr.ElevationM = f.Elevation
	case onWindow:
		fr.ElevationM = te
	default:
		e, ok, err := run.ground.ElevationAt(f.Lat, f.Lon)
		if err != nil {
			return fr, nil, &input.UsageError{Where: "--terrain", Err: err}
		}
		if !ok {
			fr.Note = "off the terrain data: elevation unknown"
			return fr, nil, nil
		}
		fr.ElevationM = e
	}
	reserve := run.setup.Reserve
	if onWindow {
		if a, ok := run.res.ArrivalAtField(f.Lat, f.Lon, fr.ElevationM); ok {
			fr.ArrivalAGLM = a - fr.ElevationM
			fr.MarginM = fr.ArrivalAGLM - reserve
			fr.Reachable = fr.ArrivalAGLM >= reserve
		}
	} else {
		fr.Note = "beyond the computed window: out of reach"
	}
	// From a failure state the glide starts at the sector start that
	// claims the field, and what the failure costs before it (the start's
	// altitude less the sector's) is added to the figure.
	fromLat, fromLon, cost, dist := run.startLat, run.startLon, 0.0, fr.DistanceM
	if err != nil {
		dist = math.NaN()
	}
	if run.sectors != nil {
		sec, ok := sectorFor(l, run.sectors, f.Lat, f.Lon)
		if !ok {
			if fr.Note == "" {
				fr.Note = "inside the turn after the failure: no straight glide from the failure state reaches it"
			}
			return fr, nil, nil
		}
		fromLat, fromLon, cost = sec.Start.Lat, sec.Start.Lon, run.startAlt-sec.Start.Alt
		if d, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: fromLat, Lon: fromLon}, geodesy.LatLon{Lat: f.Lat, Lon: f.Lon}); err == nil {
			dist = d
		} else {
			dist = math.NaN()
		}
	}
	ceiling := math.Max(run.startAlt, fr.ElevationM+reserve) + 4000
	nw := len(run.setup.Winds)
	return fr, &fieldJob{ceiling: ceiling, onWindow: onWindow, dist: dist, fromLat: fromLat, fromLon: fromLon, cost: cost,
		target: reach.Target{Name: f.Name, Lat: f.Lat, Lon: f.Lon, Elev: fr.ElevationM, Reserve: reserve},
		req:    make([]float64, nw), ok: make([]bool, nw)}, nil
}

// placeField decides a field beyond any possible reach without a solver
// run, and otherwise chooses the window its searches cover; it returns
// false when no search is needed (the note says why). bounds are the
// winds' range bounds, covering the field's altitudes up to its ceiling.
func placeField(run *reachRun, l *terrain.Local, fr *fieldResult, j *fieldJob, bounds []*reach.RangeBound) (bool, error) {
	// A field farther than any glide from the ceiling can cover, whatever
	// its tracks (reach.GlideRangeBound; the longest over the winds), with
	// 5 % and 2 km to spare for the grid and the local frame, is out of
	// reach.
	if !math.IsNaN(j.dist) {
		bound := 0.0
		for _, rb := range bounds {
			bound = math.Max(bound, rb.Bound(j.ceiling, j.target.Elev+j.target.Reserve))
		}
		if j.dist > 1.05*bound+2000 {
			if fr.Note == "" {
				fr.Note = fmt.Sprintf("not reachable from below %.0f m MSL", j.ceiling)
			}
			return false, nil
		}
	}
	// The least start altitude: backward from the field over the whole
	// forward window (RequiredFrom stops as soon as the start's cells are
	// final, so only ground needing less altitude than the start's figure is
	// searched). A box around start and field missed the way around a
	// ridge with open ends and contradicted the forward figures.
	j.win = l
	if !j.onWindow {
		midLat, midLon := (j.fromLat+j.target.Lat)/2, (j.fromLon+j.target.Lon)/2
		w, _, err := run.ground.Window(midLat, midLon, j.dist/2*1.3+2000)
		if err != nil {
			fr.Note = "required altitude not computed: " + usage(err).Error()
			return false, nil
		}
		j.win = w
	}
	j.lo = math.Min(plan.Lowest(j.win), j.target.Elev)
	return true, nil
}

// judgeFields runs the backward searches of every field in every wind, two
// at a time. The speed-to-fly table of each wind is built once, over the
// range every field needs, and shared (a table built per field, or widened
// when a later field needed more, made a field's figure depend on the
// order the fields were judged in).
func judgeFields(ctx context.Context, run *reachRun, l *terrain.Local, jobs []*fieldJob, tabs []*reach.Table) error {
	lo, hi := math.Inf(1), math.Inf(-1)
	type pair struct{ f, k int }
	var work []pair
	for i, j := range jobs {
		if j == nil {
			continue
		}
		lo, hi = math.Min(lo, j.lo), math.Max(hi, j.ceiling)
		for k := range run.setup.Winds {
			work = append(work, pair{i, k})
		}
	}
	if len(work) == 0 {
		return nil
	}
	if tlo, thi := tabs[0].Range(); tlo > lo-60 || thi < hi+60 {
		var err error
		if tabs, err = fieldTables(ctx, run, lo-60, hi+60); err != nil {
			return err
		}
	}
	return plan.ForEach(ctx, len(work), 2, func(w int) error {
		j, k := jobs[work[w].f], work[w].k
		tab := tabs[k]
		r, rok, err := reach.RequiredFrom(ctx, j.win, j.target, tab,
			reach.RequiredOptions{Clearance: run.setup.Clearance, Ceiling: j.ceiling}, j.fromLat, j.fromLon)
		if err != nil {
			if !errors.Is(err, reach.ErrNoTargets) && !errors.Is(err, reach.ErrStartOffGround) {
				return err
			}
			rok = false
		}
		if j.win == l && run.sectors == nil {
			// (From a failure state the forward figure is the sectors'
			// union, which a bisection from one point would not fly.)
			r, rok, err = run.reconcile(ctx, k, l, j.target, tab, r, rok, j.ceiling)
			if err != nil {
				return err
			}
		}
		j.req[k], j.ok[k] = r+j.cost, rok
		return nil
	})
}

// fieldTables builds the speed-to-fly table of every wind over lo..hi (m
// MSL), two at a time.
func fieldTables(ctx context.Context, run *reachRun, lo, hi float64) ([]*reach.Table, error) {
	tabs, err := run.setup.Tables(ctx, lo, hi)
	return tabs, usage(err)
}

// reconcile makes the required altitude r of wind k agree with the forward
// footprint's verdict at the start: a start at or above the required
// altitude reaches the field with the reserve, one below does not. Both
// searches are near-optimal (their paths may bend at different cells), so
// where the backward figure and the forward verdict disagree — the forward
// run reaches the field but r is above the start or missing, or it does
// not but r is at or below the start — the figure is found again by
// bisection on forward runs from the start (reach.RequiredForward, to
// 0.25 m), which is what the verdict rests on. Neither figure is derived
// from the other by subtraction.
func (run *reachRun) reconcile(ctx context.Context, k int, l *terrain.Local, target reach.Target, tab reach.LossModel, r float64, rok bool, ceiling float64) (float64, bool, error) {
	a, reached := run.members[k].ArrivalAtField(target.Lat, target.Lon, target.Elev)
	reachable := reached && a >= target.Elev+target.Reserve
	start := run.startAlt
	if reachable == (rok && r <= start) {
		return r, rok, nil
	}
	opts := reach.FootprintOptions{Clearance: run.setup.Clearance}
	base := math.Max(run.startElev+1, target.Elev+target.Reserve) // no glide climbs
	find := func(lo, hi float64) (float64, bool, error) {
		lo = math.Max(lo, base)
		if hi < lo {
			return math.NaN(), false, nil
		}
		v, ok, err := reach.RequiredForward(ctx, l, run.startLat, run.startLon, target, tab, opts, lo, hi, 0.25)
		if err == nil && ok && v == lo && lo > base {
			// Reached already at the guessed bottom: search down to base.
			return reach.RequiredForward(ctx, l, run.startLat, run.startLon, target, tab, opts, base, lo, 0.25)
		}
		return v, ok, err
	}
	if reachable {
		// The forward run reaches the field: the figure is at most the start.
		guess := start - 1.1*(a-target.Elev-target.Reserve) - 20
		v, ok, err := find(guess, start)
		if err != nil || !ok {
			return start, true, err // the start itself reaches it
		}
		return math.Min(v, start), true, nil
	}
	// The forward run does not reach it: the figure is above the start.
	short := 50.0
	if reached {
		short = target.Elev + target.Reserve - a
	}
	hi := math.Min(start+1.2*short+20, ceiling)
	v, ok, err := find(start, hi)
	if err == nil && !ok && hi < ceiling {
		v, ok, err = find(hi, ceiling)
	}
	if err != nil || !ok {
		return math.NaN(), false, err
	}
	return math.Max(v, math.Nextafter(start, math.Inf(1))), true, nil
}

// edgeCut says where a footprint is cut off by the edge of the terrain data.
type edgeCut struct {
	BearingDeg float64 // from the start to the mean of the cut cells, degrees true
	// AllRound is set when the cut cells lie on several sides of the start
	// (their mean direction is weak), so no one bearing describes them.
	AllRound bool
	Cells    int     // footprint cells next to the edge
	CoverM   float64 // half-size of the window the solver wanted, m: terrain this far around the start avoids the cut
}

// terrainEdge finds footprint cells (arrival at least minAGL above the
// ground) next to a cell that lies outside the terrain data (off grid, the
// DEM window read; a void inside the data is an obstacle, not an edge) or on
// the border of the solver's window. Such a footprint ends where the data
// ends, not where the glide does, and must say so; nil when none is, or on
// flat ground.
func terrainEdge(res *reach.FootprintResult, grid *terrain.Grid, minAGL float64) *edgeCut {
	if grid == nil || res == nil || res.Ground == nil {
		return nil
	}
	l := res.Ground
	off := func(c, r int) bool {
		if c < 0 || r < 0 || c >= l.Cols || r >= l.Rows {
			return true
		}
		if e := l.Elev[r*l.Cols+c]; e == e {
			return false
		}
		x, y := l.XY(c, r)
		lat, lon := l.Frame.Inverse(x, y)
		return !inside(grid, lat, lon)
	}
	var n int
	var ux, uy float64
	sx0, sy0 := l.Frame.Forward(res.Start.Lat, res.Start.Lon)
	for r := 0; r < l.Rows; r++ {
		for c := 0; c < l.Cols; c++ {
			k := r*l.Cols + c
			a, e := res.Arrival[k], l.Elev[k]
			if a != a || e != e || float64(a-e) < minAGL {
				continue
			}
			if off(c-1, r) || off(c+1, r) || off(c, r-1) || off(c, r+1) {
				x, y := l.XY(c, r)
				if d := math.Hypot(x-sx0, y-sy0); d > 0 {
					ux, uy = ux+(x-sx0)/d, uy+(y-sy0)/d
				}
				n++
			}
		}
	}
	if n == 0 {
		return nil
	}
	brg := math.Mod(math.Atan2(ux, uy)*180/math.Pi+360, 360)
	return &edgeCut{BearingDeg: brg, AllRound: math.Hypot(ux, uy)/float64(n) < 0.5, Cells: n, CoverM: float64(max(l.Cols, l.Rows)-1) * l.Cell / 2}
}

// edgeText is the warning a footprint cut off by the data's edge carries in
// every output.
func (e *edgeCut) text() string {
	return fmt.Sprintf("the footprint is cut off by the edge of the terrain data (%s): the ground beyond was not computed, "+
		"so the reach there may be larger than shown and the farthest reach may be the data's edge; give terrain covering %.0f km around the start",
		e.where(), math.Ceil(e.CoverM/1000))
}

// where says where the cut lies: "toward 213°" or "on several sides".
func (e *edgeCut) where() string {
	if e.AllRound {
		return "on several sides"
	}
	return fmt.Sprintf("toward %03.0f°", e.BearingDeg)
}
