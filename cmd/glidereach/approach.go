package main

import (
	"context"
	"errors"
	"fmt"
	"glidereach/reach/plan"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach/approach"
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
	sampler   *plan.ApproachTerrain
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
	if err := plan.CheckApproachDistance(run.startLat, run.startLon, plan.Field(run.field)); err != nil {
		return usage(err)
	}
	sampler, err := plan.ReadApproachTerrain(run.ground, run.startLat, run.startLon, plan.Field(run.field), planFields(all))
	if err != nil {
		return usage(err)
	}
	run.sampler = sampler
	elev, ok := sampler.Elevation(run.startLat, run.startLon)
	if !ok {
		return input.Usagef("--from", "%.5f,%.5f lies off the terrain data or on a void (unknown ground)", run.startLat, run.startLon)
	}
	run.startElev = elev
	if run.startAlt, err = o.pos.startAlt(elev); err != nil {
		return err
	}
	req := plan.ApproachRequest{Setup: &setup.Setup, Terrain: sampler, Lat: run.startLat, Lon: run.startLon, Alt: run.startAlt,
		Field: plan.Field(run.field), LandingDir: math.NaN(), Side: o.side, ApproachIAS: o.appSpeed.Value, Gust: o.gust.Value, Failure: fs}
	if len(all) > 1 {
		req.Others = planFields(all)
	}
	if o.landingDir.Given {
		req.LandingDir = o.landingDir.Value
	}
	if err := planApproach(ctx, run, req, fieldFlag(o)); err != nil {
		return err
	}
	if !goalElevGiven {
		run.fieldFrom = "terrain"
		if src == nil {
			run.fieldFrom = "--ground"
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

// planApproach plans the approach of req (plan.Approach) into run: the
// plan, the field with its elevation, the next field that works, and the
// wind of the --wind-error set that breaks the plan, in the command's
// words. fieldFlag names the flag the field came from.
func planApproach(ctx context.Context, run *approachRun, req plan.ApproachRequest, fieldFlag string) error {
	out, err := plan.Approach(ctx, req)
	if err != nil {
		var ie *plan.InputError
		if errors.As(err, &ie) && ie.Field == "Field" {
			return &input.UsageError{Where: fieldFlag, Err: ie.Err}
		}
		return approachErr(usage(err))
	}
	run.res, run.startElev = out.Plan, out.StartElev
	run.field.Elevation = out.Field.Elevation
	winds := run.setup.Winds
	if k := out.FailedWind; k >= 0 {
		run.res.Reason = fmt.Sprintf("in the wind %s (--wind-error case %d): %s", windText(winds[k]), k+1, out.WindReason)
	}
	if k := out.LastFailedWind; k >= 0 {
		run.worstWind = windText(winds[k])
	}
	run.searched = out.Searched
	if n := out.Next; n != nil {
		run.next = fmt.Sprintf("%s (%.1f km, %s landing %03.0f°)", n.Field.Name, n.DistanceM/1000, n.Plan.Variant, n.Plan.LandingDir)
	}
	return nil
}
