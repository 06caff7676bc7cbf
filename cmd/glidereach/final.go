package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/reach/plan"
	"glidereach/reach/plan/demo"
)

func init() {
	register(newFinalCmd)
	registerDemoStep(30, "final glide home over the ridges", demoFinal)
}

// finalOptions are the final command's flags.
type finalOptions struct {
	pos    *positionFlags
	glide  *glideFlags
	terr   *terrainFlags
	to     []string
	fields string
	field  string
	step   *input.Quantity
	out    string
	format string
	mapPNG string
	report string
	fail   *failureFlags
}

func newFinalCmd() *cobra.Command {
	o := &finalOptions{pos: newPositionFlags(), glide: newGlideFlags(), terr: newTerrainFlags(), step: input.NewQuantity(input.Length, 0).Within(1, 5000), fail: newFailureFlags()}
	cmd := &cobra.Command{
		Use:   "final",
		Short: "Final glide to a goal, directly or through turn points: required altitude, arrival, terrain clearance",
		Long: `final computes the glide from a position and altitude through optional turn
points to a goal: per leg the track, the wind along and across it, the speed to
fly for the MacCready setting, the ground speed, glide ratio, height lost and
time; in total the altitude required at the start to arrive with the reserve
(integrated backward from the goal through the wind and density layers), the
arrival height, the margin and the time. The terrain under the glide line is
sampled at the DEM's cell size: the lowest clearance and where it is, and
whether the line is blocked (less than --clearance above the terrain) with the
extra start altitude that clears it. It also finds the highest MacCready
setting that still arrives with the reserve and the time that saves.

Give each --to as LAT,LON; the last one is the goal, the others are turn
points in order. The goal's elevation comes from LAT,LON@ELEV (a length with
a unit, e.g. @350m or @1150ft), else from the DEM, else from --ground. With
--fields FILE --field NAME the named field is the goal and every --to is a
turn point. Without --alt or --agl the glide starts at the required altitude.

` + cautionText,
		Example: `  glidereach final --from -0.68,-24.32 --alt 1900m --to -0.28,-24.55 --aircraft sailplane
  glidereach final --from -0.6,-24.6 --agl 1200m --to -0.45,-24.42 --to -0.62,-24.3@150m \
      --wind 0m:240/10kt,1500m:270/20kt --mc 1.5m/s --format json
  glidereach final --from -0.01,-25.04 --alt 2400m --to 0.02,-24.96 \
      --terrain testdata/geotiff/geo_int16_strip_none.tif --map final.png --report final.html`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runFinal(cmd.Context(), o, cmd.OutOrStdout(), cmd.ErrOrStderr())
		},
	}
	fs := cmd.Flags()
	o.pos.register(fs)
	o.glide.register(fs)
	o.terr.register(fs)
	o.fail.register(fs)
	fs.StringArrayVar(&o.to, "to", nil, "turn point or goal LAT,LON[@ELEV] (repeat; the last is the goal)")
	fs.StringVar(&o.fields, "fields", "", "landing fields file (GeoJSON) to take the goal from with --field")
	fs.StringVar(&o.field, "field", "", "name of the goal field in --fields")
	fs.Var(o.step, "step", o.step.Help("sample spacing along the line (m, ft); default and maximum the DEM's cell size (100 m on flat ground)"))
	fs.StringVar(&o.out, "out", "", "write the result to this file (GeoJSON; JSON with --format json)")
	fs.StringVar(&o.format, "format", "text", "output format: text, json or geojson (stdout, or --out)")
	fs.StringVar(&o.mapPNG, "map", "", "draw a map of the glide line to this PNG file")
	fs.StringVar(&o.report, "report", "", "write a self-contained HTML report with the altitude profile to this file")
	return cmd
}

// finalPoint is a turn point or the goal as given on the command line.
type finalPoint struct {
	Lat, Lon float64
	Elev     float64 // m MSL; meaningful when HasElev
	HasElev  bool
}

// parseFinalPoint parses "LAT,LON" or "LAT,LON@ELEV" (ELEV a length with
// an optional unit, bare numbers are metres).
func parseFinalPoint(s string) (finalPoint, error) {
	var p finalPoint
	pos, elev, hasElev := strings.Cut(s, "@")
	lat, lon, err := input.ParseLatLon(strings.TrimSpace(pos))
	if err != nil {
		return p, err
	}
	p.Lat, p.Lon = lat, lon
	if hasElev {
		v, err := input.ParseQuantity(elev, input.Length)
		if err != nil {
			return p, fmt.Errorf("elevation after @: %w", err)
		}
		if v < -500 || v > 9000 {
			return p, fmt.Errorf("elevation %q is outside -500..9000 m", elev)
		}
		p.Elev, p.HasElev = v, true
	}
	return p, nil
}

// finalRun is everything a final-glide computation produced, for the writers.
type finalRun struct {
	setup     *glideSetup
	ground    plan.Ground
	startLat  float64
	startLon  float64
	startElev float64 // ground at the start, m MSL
	altGiven  bool    // false: the glide starts at the required altitude
	goalName  string
	goalFrom  string // where the goal elevation came from
	worstWind string // with --wind-error: the wind the figures are for
	goalNote  string // a warning about the goal elevation, if any
	// ind, when the start was given as an altimeter reading, turns true
	// altitudes back into readings on the same source.
	ind *input.Indicated
	res *reach.FinalGlideResult
	// fromRequired is the glide flown from the required altitude, when the
	// glide from the given altitude is short: its legs are what the pilot
	// would fly, where the short glide's legs run on below the ground.
	fromRequired *reach.FinalGlideResult
}

func runFinal(ctx context.Context, o *finalOptions, stdout, stderr io.Writer) error {
	switch o.format {
	case "text", "json", "geojson":
	default:
		return input.Usagef("--format", "%q: want text, json or geojson", o.format)
	}
	if !o.pos.from.Given {
		return input.Usagef("--from", "the start position is required (LAT,LON)")
	}
	if err := checkOutputs(o.out, "", o.mapPNG, o.report); err != nil {
		return err
	}
	if o.step.Given && !(o.step.Value >= 1 && o.step.Value <= 5000) {
		return input.Usagef("--step", "%v m is outside 1..5000 m", o.step.Value)
	}
	points := make([]finalPoint, 0, len(o.to))
	for i, s := range o.to {
		p, err := parseFinalPoint(s)
		if err != nil {
			return input.FlagError(fmt.Sprintf("--to (#%d)", i+1), s, err)
		}
		points = append(points, p)
	}
	run := &finalRun{}
	var goal finalPoint
	switch {
	case o.field != "" || o.fields != "":
		if o.fields == "" {
			return input.Usagef("--field", "needs --fields FILE to look the field up in")
		}
		if o.field == "" {
			return input.Usagef("--field", "name the goal field of %s", o.fields)
		}
		fields, err := input.LoadFields(o.fields)
		if err != nil {
			return err
		}
		f, err := input.FindField(fields, o.field, "--field")
		if err != nil {
			return err
		}
		goal = finalPoint{Lat: f.Lat, Lon: f.Lon, Elev: f.Elevation, HasElev: f.HasElevation}
		run.goalName = f.Name
		if f.HasElevation {
			run.goalFrom = "field file"
		}
	case len(points) == 0:
		return input.Usagef("--to", "the goal is required (LAT,LON[@ELEV], or --fields FILE --field NAME)")
	default:
		goal = points[len(points)-1]
		points = points[:len(points)-1]
		run.goalName = "goal"
		if goal.HasElev {
			run.goalFrom = "--to"
		}
	}
	for i, p := range points {
		if p.HasElev {
			return input.Usagef(fmt.Sprintf("--to (#%d)", i+1), "%q is a turn point; only the goal (the last --to, or --field) takes @ELEV", o.to[i])
		}
	}
	route := []geodesy.LatLon{{Lat: o.pos.from.Lat, Lon: o.pos.from.Lon}}
	for _, p := range points {
		route = append(route, geodesy.LatLon{Lat: p.Lat, Lon: p.Lon})
	}
	route = append(route, geodesy.LatLon{Lat: goal.Lat, Lon: goal.Lon})
	for i := 0; i+1 < len(route); i++ {
		s, _, _, err := geodesy.Inverse(route[i], route[i+1])
		flag := fmt.Sprintf("--to (#%d)", i+1)
		if i+1 == len(route)-1 && o.field != "" {
			flag = "--field"
		}
		switch {
		case err != nil:
			return input.Usagef(flag, "leg %d: %v", i+1, err)
		case s < 1:
			return input.Usagef(flag, "leg %d has zero length (the point repeats the one before it)", i+1)
		case s > 2000e3:
			return input.Usagef(flag, "leg %d is %.0f km long; a final glide is at most 2000 km", i+1, s/1000)
		}
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
	run.setup, run.ground = setup, plan.Ground{Src: src, Flat: o.terr.ground.Value, Warn: warnOnce(stderr)}
	run.startLat, run.startLon = o.pos.from.Lat, o.pos.from.Lon
	elev, ok, err := run.ground.ElevationAt(run.startLat, run.startLon)
	if err != nil {
		return &input.UsageError{Where: "--terrain", Err: err}
	}
	if !ok {
		return input.Usagef("--from", "%.5f,%.5f lies off the terrain data or on a void (unknown ground)", run.startLat, run.startLon)
	}
	run.startElev = elev
	startAlt := math.NaN()
	if o.pos.given() {
		a, err := o.pos.startAlt(elev)
		if err != nil {
			return err
		}
		if o.pos.note != "" {
			setup.Notes = append(setup.Notes, o.pos.note)
		}
		if a <= elev {
			return input.Usagef("--alt", "%.0f m MSL is not above the terrain at the start (%.0f m)", a, elev)
		}
		startAlt, run.altGiven = a, true
		if o.pos.ind.AltInd.Given {
			run.ind = o.pos.ind
		}
		setup.checkStartClearance(stderr, a, elev)
	}
	if !goal.HasElev {
		flag := "--to"
		if o.field != "" {
			flag = "--field"
		}
		e, ok, err := run.ground.ElevationAt(goal.Lat, goal.Lon)
		if err != nil {
			return &input.UsageError{Where: "--terrain", Err: err}
		}
		if !ok {
			return input.Usagef(flag, "the goal %.5f,%.5f lies off the terrain data or on a void; give its elevation as LAT,LON@ELEV", goal.Lat, goal.Lon)
		}
		goal.Elev = e
		if src != nil {
			run.goalFrom = "terrain"
		} else {
			run.goalFrom = "--ground"
		}
	}
	if goal.HasElev && src != nil {
		// A goal elevation far from the DEM's makes the clearance near the
		// goal meaningless; say so rather than guess which is right.
		if e, ok, err := run.ground.ElevationAt(goal.Lat, goal.Lon); err == nil && ok && math.Abs(e-goal.Elev) > 30 {
			run.goalNote = fmt.Sprintf("the terrain data give %.0f m at the goal, %+.0f m from the %.0f m used", e, e-goal.Elev, goal.Elev)
		}
	}
	fstate, err := o.fail.resolve()
	if err != nil {
		return err
	}
	if fstate != nil && !run.altGiven {
		return input.Usagef("--heading", "the failure state needs the altitude at the failure (--alt or --agl)")
	}
	if fstate == nil {
		setup.State = failureAssumption(fstate)
	}
	if err := computeFinalFrom(ctx, run, route, startAlt, goal.Elev, o.step, fstate); err != nil {
		return err
	}

	// Files first, so that a failure leaves nothing half-written and stdout
	// shows the summary only for a complete run.
	return deliver(ctx, stdout, results{out: o.out, format: o.format, mapPNG: o.mapPNG, report: o.report,
		document: func(format string) ([]byte, error) { return finalOutput(run, format) },
		draw:     func(m, r string) error { return drawFinal(run, m, r) },
		text:     func(w io.Writer) { writeFinalText(w, run) }})
}

// finalOutput is the --out / stdout document: JSON, or GeoJSON for the
// geojson and text formats (a file written in text mode is GeoJSON, as for
// reach).
func finalOutput(run *finalRun, format string) ([]byte, error) {
	if format == "json" {
		return finalJSON(run)
	}
	return finalGeoJSON(run)
}

// computeFinal runs the glide with the terrain along the line
// (plan.FinalGlide) from startAlt (NaN: from the altitude it requires) and
// returns it; it sets run.worstWind.
func computeFinal(ctx context.Context, run *finalRun, route []geodesy.LatLon, startAlt, goalElev float64, step *input.Quantity) (*reach.FinalGlideResult, error) {
	if err := computeFinalFrom(ctx, run, route, startAlt, goalElev, step, nil); err != nil {
		return nil, err
	}
	return run.res, nil
}

// computeFinalFrom is computeFinal from an engine failure's state fs (nil:
// already gliding at the speed to fly): it sets run.res, run.fromRequired
// (the legs as flown from the required altitude, when the glide is short),
// run.worstWind and the state's assumption.
func computeFinalFrom(ctx context.Context, run *finalRun, route []geodesy.LatLon, startAlt, goalElev float64, step *input.Quantity, fs *failureState) error {
	s := run.setup
	req := plan.FinalRequest{Setup: &s.Setup, Ground: run.ground, Route: route, Alt: startAlt, GoalElev: goalElev, Failure: fs}
	if step.Given {
		req.Step = step.Value
	}
	out, err := plan.FinalGlide(ctx, req)
	if err != nil {
		return usage(err)
	}
	if seq := out.Before; seq != nil {
		s.State = failureAssumption(fs) + fmt.Sprintf("; before the glide: %.0f m lost (negative: gained) in %.0f s, turn %.0f°, the glide starting %.0f m from the failure point (the failure's own path is not checked against the terrain)",
			seq.Height, seq.Time, seq.TurnAngle*180/math.Pi, math.Hypot(seq.East, seq.North))
	}
	run.res, run.fromRequired = out.Glide, out.FromRequired
	// The wind named is that of the last glide flown (the one from the
	// required altitude when it was flown), as the legs shown are.
	worst := out.Worst
	if out.FromRequiredWorst >= 0 {
		worst = out.FromRequiredWorst
	}
	if winds := s.Winds; len(winds) > 1 {
		run.worstWind = windText(winds[worst])
		if worst == 0 {
			run.worstWind += " (the nominal wind)"
		}
	}
	return nil
}

// demoFinal computes the demo's final glide and writes its GeoJSON, JSON,
// map and report.
func demoFinal(ctx context.Context, d *demoRun) error {
	sc, err := loadDemoScene()
	if err != nil {
		return err
	}
	g := newGlideFlags()
	fr := demo.Final() // the sailplane home to Tern Hollow via a turn point
	g.aircraft = fr.Aircraft
	g.wind = demoWindSpec()
	g.mc.Value = fr.MacCready
	setup, err := g.resolve()
	if err != nil {
		return err
	}
	f, err := input.FindField(sc.fields, fr.Field, "demo")
	if err != nil {
		return err
	}
	run := &finalRun{setup: setup, ground: plan.Ground{Src: sc.src}, startLat: fr.Lat, startLon: fr.Lon,
		altGiven: true, goalName: f.Name, goalFrom: "terrain"}
	elev, ok, err := run.ground.ElevationAt(run.startLat, run.startLon)
	if err != nil || !ok {
		return fmt.Errorf("demo final glide: no terrain at the start (%v)", err)
	}
	run.startElev = elev
	goalElev, ok, err := run.ground.ElevationAt(f.Lat, f.Lon)
	if err != nil || !ok {
		return fmt.Errorf("demo final glide: no terrain at %s (%v)", f.Name, err)
	}
	route := []geodesy.LatLon{{Lat: run.startLat, Lon: run.startLon}, {Lat: fr.TurnLat, Lon: fr.TurnLon}, {Lat: f.Lat, Lon: f.Lon}}
	if err := computeFinalFrom(ctx, run, route, fr.Alt, goalElev, input.NewQuantity(input.Length, 0), nil); err != nil {
		return err
	}
	for _, out := range []struct{ name, format string }{{"final-sailplane.geojson", "geojson"}, {"final-sailplane.json", "json"}} {
		data, err := finalOutput(run, out.format)
		if err != nil {
			return err
		}
		if err := d.writeBytes(out.name, data); err != nil {
			return err
		}
	}
	if err := d.drawBoth("final-sailplane", func(m, r string) error { return drawFinal(run, m, r) }); err != nil {
		return err
	}
	writeFinalText(d.out, run)
	return nil
}
