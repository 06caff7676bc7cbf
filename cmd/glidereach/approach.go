package main

import (
	"context"
	"errors"
	"fmt"
	"glidereach/reach/plan"
	"io"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach/approach"
	"glidereach/reach/geodesy"
	"glidereach/terrain"
)

func init() { register(newApproachCmd) }

// approachOptions are the approach command's flags.
type approachOptions struct {
	pos        *positionFlags
	glide      *glideFlags
	terr       *terrainFlags
	fail       *failureFlags
	fields     string
	field      string
	to         string
	landingDir *input.Quantity
	side       string
	appSpeed   *input.Quantity
	gust       *input.Quantity
	variation  string
	units      string
	out        string
	format     string
	mapPNG     string
	report     string
}

func newApproachCmd() *cobra.Command {
	o := &approachOptions{pos: newPositionFlags(), glide: newGlideFlags(), terr: newTerrainFlags(), fail: newFailureFlags(),
		landingDir: input.NewQuantity(input.Angle, 0).Within(0, 360), appSpeed: input.NewQuantity(input.Speed, 0).Within(0, 150), gust: input.NewQuantity(input.Speed, 0).Within(0, 30)}
	cmd := &cobra.Command{
		Use:   "approach",
		Short: "Plan the landing pattern to one field from the aircraft's state: direction, gates, heights",
		Long: `approach plans the landing pattern to one field after an engine failure. It
picks the landing direction with the most headwind within the crosswind limit,
builds the pattern backward from the aim point through the wind at the approach
speed (final, base, downwind on the pattern side, entry), and joins it from the
aircraft's position, altitude and (with --heading, --speed) its state at the
failure: reaction time, energy trade, turn. Too high, it circles over the entry
gate or lengthens the downwind; too low, it tries a shorter downwind, straight
to base, then straight in. Terrain is checked under every leg. The gates give
position, height above the field and MSL, track, heading to hold, distance
and time to touchdown; "decide by" is the last point on the heading at which
turning for this plan still works.

The field is --fields FILE --field NAME (a Point, Polygon or LineString strip
with optional landing_directions and pattern_side), or --to LAT,LON[@ELEV]
with an optional --landing-dir. Pattern defaults follow the profile's kind
(sailplane or powered, profile key kind).

` + cautionText,
		Example: `  glidereach approach --from -0.45,-24.6 --alt 1200m --heading 90 --speed 100kt \
      --fields testdata/fields/demo-fields.geojson --field "Driftwood Common" --wind 240/12kt
  glidereach approach --from -0.45,-24.6 --agl 600m --to -0.5,-24.5@120m --landing-dir 250 \
      --aircraft sailplane --format json
  glidereach approach --from -0.45,-24.6 --alt 3000ft --to -0.5,-24.5 --units ft-kt --variation 7W`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runApproach(cmd.Context(), o, cmd.OutOrStdout())
		},
	}
	fs := cmd.Flags()
	o.pos.register(fs)
	o.glide.register(fs)
	o.terr.register(fs)
	o.fail.register(fs)
	fs.StringVar(&o.fields, "fields", "", "landing fields file (GeoJSON) to take the field from with --field")
	fs.StringVar(&o.field, "field", "", "name of the field in --fields")
	fs.StringVar(&o.to, "to", "", "the field as a point LAT,LON[@ELEV] instead of --fields/--field")
	fs.Var(o.landingDir, "landing-dir", o.landingDir.Help("landing direction, degrees true (the track on final); default: the best of the field's"))
	fs.StringVar(&o.side, "side", "", "pattern side, left or right; default the field's pattern_side, else left")
	fs.Var(o.appSpeed, "approach-speed", o.appSpeed.Help("approach speed IAS in calm air (kt, km/h); default the profile's, else 1.3 × stall; half the headwind is added"))
	fs.Var(o.gust, "gust", o.gust.Help("gust addition to the approach speed (kt, km/h)"))
	fs.StringVar(&o.variation, "variation", "", "magnetic variation, e.g. 7W, 3.5E or -7 (west negative): headings are printed magnetic too")
	fs.StringVar(&o.units, "units", "m-kt", "units of the text: m-kt (heights m, speeds kt), ft-kt or m-kmh")
	fs.StringVar(&o.out, "out", "", "write the plan to this file (GeoJSON; JSON with --format json)")
	fs.StringVar(&o.format, "format", "text", "output format: text, json or geojson (stdout, or --out)")
	fs.StringVar(&o.mapPNG, "map", "", "draw the pattern over the terrain to this PNG file")
	fs.StringVar(&o.report, "report", "", "write a self-contained HTML report with the altitude profile to this file")
	hideDefault(fs, "landing-dir", "approach-speed")
	return cmd
}

// approachRun is everything a plan produced, for the writers.
type approachRun struct {
	setup     *glideSetup
	ground    plan.Ground
	fail      *failureState
	field     input.Field
	fieldFrom string
	startLat  float64
	startLon  float64
	startAlt  float64
	startElev float64
	res       *approach.Result
	next      string // the next field that works, when this one does not
	worstWind string
	variation float64 // degrees, east positive; NaN when not given
	units     displayUnits
	sampler   *approachSampler
	searched  bool // the other fields of the file were tried
}

// parseVariation reads "7W", "3.5E", "-7" or "7" (east positive).
func parseVariation(s string) (float64, error) {
	t := strings.ToUpper(strings.TrimSpace(s))
	sign := 1.0
	switch {
	case strings.HasSuffix(t, "W"):
		sign, t = -1, strings.TrimSpace(strings.TrimSuffix(t, "W"))
	case strings.HasSuffix(t, "E"):
		t = strings.TrimSpace(strings.TrimSuffix(t, "E"))
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("not a variation (want e.g. 7W, 3.5E or -7)")
	}
	v *= sign
	if v < -180 || v > 180 {
		return 0, fmt.Errorf("%v° is outside -180..180", v)
	}
	return v, nil
}

func runApproach(ctx context.Context, o *approachOptions, stdout io.Writer) error {
	switch o.format {
	case "text", "json", "geojson":
	default:
		return input.Usagef("--format", "%q: want text, json or geojson", o.format)
	}
	u, ok := unitSets[o.units]
	if !ok {
		return input.Usagef("--units", "%q: want m-kt, ft-kt or m-kmh", o.units)
	}
	if !o.pos.from.Given {
		return input.Usagef("--from", "the aircraft's position is required (LAT,LON)")
	}
	if err := checkOutputs(o.out, "", o.mapPNG, o.report); err != nil {
		return err
	}
	run := &approachRun{variation: math.NaN(), units: u}
	if o.variation != "" {
		v, err := parseVariation(o.variation)
		if err != nil {
			return input.FlagError("--variation", o.variation, err)
		}
		run.variation = v
	}
	fs, err := o.fail.resolve()
	if err != nil {
		return err
	}
	run.fail = fs
	if o.landingDir.Given && !(o.landingDir.Value >= 0 && o.landingDir.Value <= 360) {
		return input.Usagef("--landing-dir", "%v° is outside 0..360", o.landingDir.Value)
	}
	switch o.side {
	case "", "left", "right":
	default:
		return input.Usagef("--side", "%q: want left or right", o.side)
	}
	var all []input.Field
	var goalElevGiven bool
	switch {
	case o.fields != "" || o.field != "":
		if o.to != "" {
			return input.Usagef("--to", "give --to or --fields/--field, not both")
		}
		if o.fields == "" {
			return input.Usagef("--field", "needs --fields FILE to look the field up in")
		}
		if o.field == "" {
			return input.Usagef("--field", "name the field of %s to plan for", o.fields)
		}
		all, err = input.LoadFields(o.fields)
		if err != nil {
			return err
		}
		f, err := input.FindField(all, o.field, "--field")
		if err != nil {
			return err
		}
		run.field, goalElevGiven = f, f.HasElevation
		run.fieldFrom = "field file"
	case o.to != "":
		p, err := parseFinalPoint(o.to)
		if err != nil {
			return input.FlagError("--to", o.to, err)
		}
		run.field = input.Field{Name: "field", Lat: p.Lat, Lon: p.Lon, Elevation: p.Elev, HasElevation: p.HasElev}
		goalElevGiven = p.HasElev
		run.fieldFrom = "--to"
	default:
		return input.Usagef("--field", "the field is required (--fields FILE --field NAME, or --to LAT,LON[@ELEV])")
	}
	setup, err := o.glide.resolve()
	if err != nil {
		return err
	}
	run.setup = setup
	src, err := o.terr.open()
	if err != nil {
		return err
	}
	run.ground = plan.Ground{Src: src, Flat: o.terr.ground.Value, Warn: warnOnce(os.Stderr)}
	run.startLat, run.startLon = o.pos.from.Lat, o.pos.from.Lon
	dist, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: run.startLat, Lon: run.startLon}, geodesy.LatLon{Lat: run.field.Lat, Lon: run.field.Lon})
	if err != nil {
		return input.Usagef("--from", "%v", err)
	}
	if dist > 150e3 {
		return input.Usagef("--from", "the field is %.0f km away; an approach plan is for fields within 150 km", dist/1000)
	}
	sampler, err := approachTerrain(run, all)
	if err != nil {
		return err
	}
	run.sampler = sampler
	elev, ok := sampler.at(run.startLat, run.startLon)
	if !ok {
		return input.Usagef("--from", "%.5f,%.5f lies off the terrain data or on a void (unknown ground)", run.startLat, run.startLon)
	}
	run.startElev = elev
	if run.startAlt, err = o.pos.startAlt(elev); err != nil {
		return err
	}
	if run.startAlt <= elev {
		return input.Usagef("--alt", "%.0f m MSL is not above the terrain at the aircraft (%.0f m)", run.startAlt, elev)
	}
	if !goalElevGiven {
		e, ok := sampler.field(run.field.Lat, run.field.Lon)
		if !ok {
			return input.Usagef(fieldFlag(o), "the field %.5f,%.5f lies off the terrain data or on a void; give its elevation", run.field.Lat, run.field.Lon)
		}
		run.field.Elevation = e
		run.fieldFrom = "terrain"
		if src == nil {
			run.fieldFrom = "--ground"
		}
	}
	base := approach.Request{
		Aircraft: setup.Aircraft, Cond: setup.Cond, Atm: setup.Atm, Wind: setup.Wind, Ground: sampler.high,
		Clearance: setup.Clearance, Lat: run.startLat, Lon: run.startLon, Alt: run.startAlt,
		LandingDir: math.NaN(), Side: o.side, ApproachIAS: o.appSpeed.Value, Gust: o.gust.Value, Step: sampler.step,
	}
	if o.landingDir.Given {
		base.LandingDir = o.landingDir.Value
	}
	if fs != nil {
		base.Failure = &approach.Failure{HeadingDeg: fs.HeadingDeg, IAS: fs.IAS, ReactionTime: fs.Reaction, Efficiency: fs.Efficiency, Bank: fs.Bank}
	}
	req := base
	req.Field = approachField(run.field)
	res, err := planWorst(ctx, run, req)
	if err != nil {
		return err
	}
	run.res = res
	if !res.Feasible && len(all) > 1 {
		run.searched = true
		if run.next, err = nextField(ctx, run, base, all); err != nil {
			return err
		}
	}
	return deliver(ctx, stdout, results{out: o.out, format: o.format, mapPNG: o.mapPNG, report: o.report,
		document: func(format string) ([]byte, error) {
			if format == "json" {
				return approachJSON(run)
			}
			return approachGeoJSON(run)
		},
		draw: func(m, r string) error { return drawApproach(run, m, r) },
		text: func(w io.Writer) { writeApproachText(w, run) }})
}

func fieldFlag(o *approachOptions) string {
	if o.to != "" {
		return "--to"
	}
	return "--field"
}

// approachErr maps the planner's input errors to the flag or key a user
// typed.
func approachErr(err error) error {
	var ie *approach.InputError
	if errors.As(err, &ie) {
		flag := map[string]string{"approach_speed": "--approach-speed", "landing_dir": "--landing-dir", "bank": "--bank",
			"speed": "--speed", "heading": "--heading", "pattern_side": "--side", "gust": "--gust",
			"reaction_time": "--reaction-time", "energy_efficiency": "--energy-efficiency", "alt": "--alt",
			"landing_directions": "--fields (landing_directions)", "strip": "--fields (strip)"}[ie.Input]
		if flag == "" {
			flag = ie.Input
		}
		return &input.UsageError{Where: flag, Err: err}
	}
	return err
}

// planWorst plans in the nominal wind and, with --wind-error, checks the
// same landing direction in every other wind: the plan holds only when it
// holds in all of them.
func planWorst(ctx context.Context, run *approachRun, req approach.Request) (*approach.Result, error) {
	res, err := approach.Plan(ctx, req)
	if err != nil {
		return nil, approachErr(err)
	}
	if !res.Feasible || len(run.setup.Winds) < 2 {
		return res, nil
	}
	for k, w := range run.setup.Winds[1:] {
		r2 := req
		r2.Wind = w
		r2.LandingDir = res.LandingDir
		alt, err := approach.Plan(ctx, r2)
		if err != nil {
			return nil, approachErr(err)
		}
		if !alt.Feasible {
			res.Feasible = false
			res.Reason = fmt.Sprintf("in the wind %s (--wind-error case %d): %s", windText(w), k+2, alt.Reason)
			run.worstWind = windText(w)
			return res, nil
		}
	}
	return res, nil
}

// approachField converts a field of the input layer.
func approachField(f input.Field) approach.Field {
	af := approach.Field{Name: f.Name, Lat: f.Lat, Lon: f.Lon, Elev: f.Elevation, Directions: f.LandingDirs, Side: f.PatternSide}
	if len(f.Strip) == 2 {
		af.Strip = &[2]geodesy.LatLon{{Lat: f.Strip[0][1], Lon: f.Strip[0][0]}, {Lat: f.Strip[1][1], Lon: f.Strip[1][0]}}
	}
	return af
}

// nextField plans the other fields of the file, nearest first (at most
// ten), and names the first that works.
func nextField(ctx context.Context, run *approachRun, base approach.Request, all []input.Field) (string, error) {
	type cand struct {
		f input.Field
		d float64
	}
	var cs []cand
	for _, f := range all {
		if strings.EqualFold(f.Name, run.field.Name) {
			continue
		}
		s, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: run.startLat, Lon: run.startLon}, geodesy.LatLon{Lat: f.Lat, Lon: f.Lon})
		if err != nil || s > 150e3 {
			continue
		}
		cs = append(cs, cand{f, s})
	}
	sort.Slice(cs, func(i, j int) bool { return cs[i].d < cs[j].d })
	if len(cs) > 10 {
		cs = cs[:10]
	}
	sampler := run.sampler
	for _, c := range cs {
		f := c.f
		if !f.HasElevation {
			e, ok := sampler.field(f.Lat, f.Lon)
			if !ok {
				continue
			}
			f.Elevation = e
		}
		if !(base.Alt > f.Elevation) {
			continue
		}
		req := base
		req.LandingDir = math.NaN()
		req.Field = approachField(f)
		res, err := planWorst(ctx, run, req)
		if err != nil {
			var ue *input.UsageError
			if errors.As(err, &ue) {
				continue // that field's own data do not fit; not this run's fault
			}
			return "", err
		}
		if res.Feasible {
			return fmt.Sprintf("%s (%.1f km, %s landing %03.0f°)", f.Name, c.d/1000, res.Variant, res.LandingDir), nil
		}
	}
	return "", nil
}

// approachSampler gives the terrain of a plan: the highest DEM sample
// around a point for clearances (the obstacle surface the solvers use) and
// the DEM's bilinear value for a field's elevation.
type approachSampler struct {
	grid *terrain.Grid // nil on flat ground
	flat float64
	step float64 // m
}

func (s *approachSampler) high(lat, lon float64) (float64, bool) {
	if s.grid == nil {
		return s.flat, true
	}
	return s.grid.HighAround(lat, lon)
}

func (s *approachSampler) at(lat, lon float64) (float64, bool) { return s.field(lat, lon) }

func (s *approachSampler) field(lat, lon float64) (float64, bool) {
	if s.grid == nil {
		return s.flat, true
	}
	return s.grid.Elevation(lat, lon)
}

// approachTerrain reads one DEM window around the aircraft and the field
// (and the other fields within 30 km of the aircraft, for the search of
// the next field that works), 10 km beyond them:
// room for the pattern, a long straight-in and the holding.
func approachTerrain(run *approachRun, all []input.Field) (*approachSampler, error) {
	if run.ground.Src == nil {
		return &approachSampler{flat: run.ground.Flat, step: 50}, nil
	}
	w, e := math.Min(run.startLon, run.field.Lon), math.Max(run.startLon, run.field.Lon)
	s, n := math.Min(run.startLat, run.field.Lat), math.Max(run.startLat, run.field.Lat)
	// Fields within 30 km of the aircraft, for the search of the next
	// field that works.
	for _, f := range all {
		if d, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: run.startLat, Lon: run.startLon}, geodesy.LatLon{Lat: f.Lat, Lon: f.Lon}); err == nil && d < 30e3 {
			w, e = math.Min(w, f.Lon), math.Max(e, f.Lon)
			s, n = math.Min(s, f.Lat), math.Max(n, f.Lat)
		}
	}
	const padM = 10000.0
	dLat := padM / 111000
	dLon := padM / (111000 * math.Max(0.1, math.Cos(run.field.Lat*math.Pi/180)))
	grid, err := run.ground.Src.Window(w-dLon, s-dLat, e+dLon, n+dLat)
	if err != nil {
		if errors.Is(err, terrain.ErrOutside) {
			return nil, input.Usagef("--from", "the aircraft and the field lie outside the terrain data (%s)", run.ground.Src.Describe())
		}
		return nil, &input.UsageError{Where: "--terrain", Err: err}
	}
	step := math.Max(10, math.Min(50, run.ground.Src.Resolution()))
	return &approachSampler{grid: grid, step: step}, nil
}
