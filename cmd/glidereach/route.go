package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/paulmach/orb"
	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
	"glidereach/reach/plan"
	"glidereach/reach/plan/demo"
	"glidereach/terrain"
)

func init() {
	register(newRouteCmd)
	registerDemoStep(40, "forced-landing gaps along the demo route", demoRoute)
}

// routeOptions are the route command's flags.
type routeOptions struct {
	glide     *glideFlags
	terr      *terrainFlags
	route     string
	routeName string
	fields    string
	alt       *input.Quantity
	agl       *input.Quantity
	ind       *input.Indicated
	step      *input.Quantity
	format    string
	out       string
	mapPNG    string
	report    string
	fail      *failureFlags
}

func newRouteCmd() *cobra.Command {
	o := &routeOptions{glide: newGlideFlags(), terr: newTerrainFlags(), fail: newFailureFlags(),
		alt: input.NewQuantity(input.Length, 0).Within(minAltMSL, maxAltMSL), agl: input.NewQuantity(input.Length, 0).Within(0, maxAGL), ind: input.NewIndicated(), step: input.NewQuantity(input.Length, 250).Within(10, 10000)}
	cmd := &cobra.Command{
		Use:   "route --route FILE --fields FILE [--alt ALT|--agl HEIGHT]",
		Short: "Forced-landing options along a planned route: gaps and the altitude that closes them",
		Long: `route samples a planned route (GPX 1.1 track or route, or a GeoJSON
LineString) every --step and judges each point: the least altitude from which
some landing field is still reached with the reserve (through the wind at
each altitude, keeping the clearance above terrain, around ridges), the best
field there, and the margin between the planned altitude and that least
altitude. Stretches where no field is in reach are gaps; for each gap it
gives where it starts and ends, its length and the altitude that would close
it. The planned altitude is --alt (MSL), --agl (above the terrain under each
point), or, when neither is given, the elevations stored in the route file.

The margin is planned − least altitude. The least altitude already includes
the reserve: a margin of 0 arrives over the best field with exactly the
reserve; a margin of +200 m arrives with about reserve + 200 m.

` + cautionText,
		Example: `  glidereach route --route testdata/routes/demo-route.gpx --fields testdata/fields/demo-fields.geojson --alt 4500ft
  glidereach route --route testdata/routes/fixture-route.gpx --fields testdata/fields/fixture-fields.geojson --agl 600m \
      --terrain testdata/geotiff/geo_int16_strip_none.tif --format csv --out profile.csv
  glidereach route --route testdata/routes/demo-route.geojson --fields testdata/fields/demo-fields.geojson --alt 2400m \
      --format geojson --out route.geojson --map route.png --report route.html`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runRoute(cmd.Context(), o, cmd.OutOrStdout(), cmd.ErrOrStderr())
		},
	}
	fs := cmd.Flags()
	o.glide.register(fs)
	o.terr.register(fs)
	o.fail.registerSpeedOnly(fs)
	fs.StringVar(&o.route, "route", "", "planned route: GPX 1.1 (track or route) or GeoJSON LineString file")
	fs.StringVar(&o.routeName, "route-name", "", "which route or track of the file, when it holds several")
	fs.StringVar(&o.fields, "fields", "", "landing fields: GeoJSON points or polygons with a name property")
	fs.Var(o.alt, "alt", o.alt.Help("planned altitude along the whole route: TRUE altitude MSL (m, ft), not the altimeter reading (see --alt-indicated)"))
	o.ind.Register(fs, "planned altitude")
	fs.Var(o.agl, "agl", o.agl.Help("planned height above the terrain under each point (m, ft), instead of --alt"))
	fs.Var(o.step, "step", o.step.Help("sampling step along the route (m, ft, km, nm)"))
	fs.StringVar(&o.format, "format", "text", "output format: text, json, geojson or csv (stdout, or --out)")
	fs.StringVar(&o.out, "out", "", "write the result to this file in --format (text summary still printed)")
	fs.StringVar(&o.mapPNG, "map", "", "draw a map of the route and its gaps to this PNG file")
	fs.StringVar(&o.report, "report", "", "write a self-contained HTML report with the altitude profile to this file")
	cmd.MarkFlagsMutuallyExclusive("alt", "agl")
	return cmd
}

// routeRun is everything a route computation produced, for the writers.
type routeRun struct {
	setup     *glideSetup
	ground    plan.Ground
	file      string
	name      string
	step      float64
	altMode   string // how the planned altitude was given, for output
	fields    []routeField
	targets   []reach.Target
	targetFld []int // field index of each target
	res       *reach.RequiredResult
	prof      *reach.RouteProfile
	ceiling   float64
	notes     []string
	fail      *failureState // --speed: a failure on the course at each point
}

// routeField is a landing field as the route and coverage commands used
// it.
type routeField = plan.RouteField

func runRoute(ctx context.Context, o *routeOptions, stdout, stderr io.Writer) error {
	switch o.format {
	case "text", "json", "geojson", "csv":
	default:
		return input.Usagef("--format", "%q: want text, json, geojson or csv", o.format)
	}
	if o.route == "" {
		return input.Usagef("--route", "a route file is required (GPX or GeoJSON LineString)")
	}
	if o.fields == "" {
		return input.Usagef("--fields", "a landing-field file is required (GeoJSON)")
	}
	if s := o.step.Value; !(s >= 10 && s <= 10000) {
		return input.Usagef("--step", "%v m is outside 10 m..10 km", s)
	}
	if err := checkOutputs(o.out, "", o.mapPNG, o.report); err != nil {
		return err
	}
	setup, err := o.glide.resolve()
	if err != nil {
		return err
	}
	setup.printWarnings(stderr)
	note, err := o.ind.AltitudeFlown(o.alt, o.agl)
	if err != nil {
		return err
	}
	if note != "" {
		setup.Notes = append(setup.Notes, note)
	}
	fstate, err := o.fail.resolveCourse()
	if err != nil {
		return err
	}
	src, err := o.terr.open()
	if err != nil {
		return err
	}
	fields, err := input.LoadFields(o.fields)
	if err != nil {
		return err
	}
	rt, err := input.LoadRouteNamed(o.route, o.routeName)
	if err != nil {
		return err
	}
	var rb orb.Bound
	for i, p := range rt.Points {
		if q := (orb.Point{p.Lon, p.Lat}); i == 0 {
			rb = orb.Bound{Min: q, Max: q}
		} else {
			rb = rb.Extend(q)
		}
	}
	if len(rt.Points) > 0 {
		for _, w := range farWarnings("route", rb, fields, "--fields", src) {
			fmt.Fprintln(stderr, "glidereach: warning:", w)
		}
	}
	run := &routeRun{setup: setup, ground: plan.Ground{Src: src, Flat: o.terr.ground.Value, Warn: warnOnce(stderr)}, file: o.route, name: rt.Name, step: o.step.Value, fail: fstate}
	prog := newProgress(stderr, "route")
	err = computeRoute(ctx, run, rt, fields, o, prog.set)
	prog.done()
	if err != nil {
		return err
	}
	return deliver(ctx, stdout, results{out: o.out, format: o.format, mapPNG: o.mapPNG, report: o.report,
		document: func(format string) ([]byte, error) { return routeOutput(run, format) },
		draw:     func(m, r string) error { return drawRoute(run, m, r) },
		text:     func(w io.Writer) { writeRouteText(w, run) }})
}

// routeOutput renders the run in a file format.
func routeOutput(run *routeRun, format string) ([]byte, error) {
	switch format {
	case "json":
		return routeJSON(run)
	case "geojson":
		return routeGeoJSON(run)
	case "csv":
		return routeCSV(run), nil
	}
	var b bytes.Buffer
	writeRouteText(&b, run)
	return b.Bytes(), nil
}

// computeRoute samples the route, builds the window, runs the backward
// solver from the fields and judges the samples.
func computeRoute(ctx context.Context, run *routeRun, rt *input.Route, fields []input.Field, o *routeOptions, progress func(float64)) error {
	samples, err := rt.Samples(run.step)
	if err != nil {
		return &input.UsageError{Where: run.file, Err: err}
	}
	var dem *terrain.Grid // DEM around the route, for --agl
	if o.agl.Given && run.ground.Src != nil {
		b := boundsOfSamples(samples)
		dem, err = run.ground.Src.Window(b[0]-0.01, b[1]-0.01, b[2]+0.01, b[3]+0.01)
		if err != nil {
			if errors.Is(err, terrain.ErrOutside) {
				return input.Usagef("--route", "the route lies outside the terrain data (%s)", run.ground.Describe())
			}
			return &input.UsageError{Where: "--terrain", Err: err}
		}
	}
	pts := make([]reach.RoutePoint, len(samples))
	for i, s := range samples {
		p := reach.RoutePoint{Lat: s.Lat, Lon: s.Lon, Dist: s.Dist}
		switch {
		case o.alt.Given:
			p.Alt = o.alt.Value
		case o.agl.Given:
			e := run.ground.Flat
			if dem != nil {
				v, ok := dem.Elevation(s.Lat, s.Lon)
				if !ok {
					return input.Usagef("--agl", "the terrain is unknown under the route at %.1f km (%.5f, %.5f): give --alt instead", s.Dist/1000, s.Lat, s.Lon)
				}
				e = v
			}
			p.Alt = e + o.agl.Value
		case s.HasEle:
			p.Alt = s.Ele
		default:
			return input.Usagef("--alt", "give --alt or --agl: the route %s has no elevation at every point to take as the planned altitude", run.file)
		}
		pts[i] = p
	}
	switch {
	case o.alt.Given:
		if v := o.alt.Value; v < -400 || v > 19000 {
			return input.Usagef("--alt", "%v m is outside -400..19000 m", v)
		}
		run.altMode = fmt.Sprintf("%.0f m MSL (%.0f ft) along the whole route (--alt)", o.alt.Value, o.alt.Value/0.3048)
		if o.ind.AltInd.Given {
			run.altMode = fmt.Sprintf("%.0f m MSL (%.0f ft) true along the whole route (--alt-indicated %.0f m, corrected for the temperature)", o.alt.Value, o.alt.Value/0.3048, o.ind.AltInd.Value)
		}
	case o.agl.Given:
		if v := o.agl.Value; !(v > 0 && v <= 10000) {
			return input.Usagef("--agl", "%v m is outside 0..10000 m above the terrain", v)
		}
		run.altMode = fmt.Sprintf("%.0f m (%.0f ft) above the terrain under each point (--agl)", o.agl.Value, o.agl.Value/0.3048)
	default:
		run.altMode = "the elevations of the route file, interpolated between its points"
	}
	for _, p := range pts {
		if p.Alt < -400 || p.Alt > 19000 {
			return input.Usagef(run.file, "planned altitude %.0f m at %.1f km is outside -400..19000 m", p.Alt, p.Dist/1000)
		}
	}
	minLon, maxLon := math.Inf(1), math.Inf(-1)
	for _, p := range pts {
		minLon, maxLon = math.Min(minLon, p.Lon), math.Max(maxLon, p.Lon)
	}
	if maxLon-minLon > 180 {
		return input.Usagef("--route", "%s crosses the antimeridian, which is not supported", run.file)
	}
	res, err := plan.Route(ctx, plan.RouteRequest{Setup: &run.setup.Setup, Ground: run.ground, Points: pts, Fields: planFields(fields),
		Step: run.step, Failure: run.fail, Progress: progress})
	if err != nil {
		return usage(err)
	}
	run.setup.State = failureAssumption(run.fail)
	run.ceiling, run.res, run.prof = res.Ceiling, res.Required, res.Profile
	run.fields, run.targets, run.targetFld = res.Fields, res.Targets, res.TargetField
	run.notes = append(run.notes, res.Notes...)
	return nil
}

// boundsOfSamples returns west, south, east, north of route samples.
func boundsOfSamples(s []input.RouteSample) [4]float64 {
	b := [4]float64{math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)}
	for _, p := range s {
		b[0], b[1] = math.Min(b[0], p.Lon), math.Min(b[1], p.Lat)
		b[2], b[3] = math.Max(b[2], p.Lon), math.Max(b[3], p.Lat)
	}
	return b
}

// areaWindow is plan.Ground.AreaWindow with its errors in the command's
// words, naming flag ("--route", "--area", "--box", "--corridor").
func areaWindow(g plan.Ground, minLat, minLon, maxLat, maxLon, margin float64, flag string) (*terrain.Local, *terrain.Grid, error) {
	field := strings.ToUpper(flag[2:3]) + flag[3:]
	l, grid, err := g.AreaWindow(minLat, minLon, maxLat, maxLon, margin, field)
	return l, grid, usage(err)
}

// demoRoute runs the route command on the embedded invented route, fields
// and landscape with the generic trainer in the demo's layered wind, and
// writes its JSON, GeoJSON, CSV, map and report.
func demoRoute(ctx context.Context, d *demoRun) error {
	sc, err := loadDemoScene()
	if err != nil {
		return err
	}
	dr := demo.Route()
	rt := demoRouteInput()
	g := newGlideFlags()
	g.aircraft, g.wind = dr.Aircraft, demoWindSpec()
	setup, err := g.resolve()
	if err != nil {
		return err
	}
	o := &routeOptions{alt: input.NewQuantity(input.Length, dr.Alt), agl: input.NewQuantity(input.Length, 0), ind: input.NewIndicated(), step: input.NewQuantity(input.Length, dr.Step)}
	o.alt.Given = true
	run := &routeRun{setup: setup, ground: plan.Ground{Src: sc.src}, file: "demo-route.gpx", name: rt.Name, step: o.step.Value}
	if err := computeRoute(ctx, run, rt, sc.fields, o, nil); err != nil {
		return err
	}
	for _, f := range []struct{ name, format string }{{"route.json", "json"}, {"route.geojson", "geojson"}, {"route-profile.csv", "csv"}} {
		out, err := routeOutput(run, f.format)
		if err != nil {
			return err
		}
		if err := d.writeBytes(f.name, out); err != nil {
			return err
		}
	}
	if err := d.drawBoth("route", func(m, r string) error { return drawRoute(run, m, r) }); err != nil {
		return err
	}
	writeRouteText(d.out, run)
	return nil
}
