package main

import (
	"context"
	"fmt"
	"io"
	"math"

	"github.com/paulmach/orb"
	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
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
// already gliding at the speed to fly, as computeReach): the start
// altitude from the flags, then plan.Reach.
func computeReachFrom(ctx context.Context, setup *glideSetup, gr plan.Ground, pos *positionFlags, fields []input.Field, extraLevels []float64, stderr io.Writer, fstate *failureState) (*reachRun, error) {
	lat, lon := pos.from.Lat, pos.from.Lon
	elev, err := plan.StartElevation(gr, lat, lon)
	if err != nil {
		return nil, usage(err)
	}
	alt, err := pos.startAlt(elev)
	if err != nil {
		return nil, err
	}
	if pos.note != "" {
		setup.Notes = append(setup.Notes, pos.note)
	}
	if alt > elev {
		setup.checkStartClearance(stderr, alt, elev)
	}
	setup.State = failureAssumption(fstate)
	if fstate != nil {
		setup.State += "; the footprint is the shape this state gives: the glide toward each direction starts after the turn to it (either way, up to 270°)"
	}
	prog := newProgress(stderr, "reach")
	req := plan.ReachRequest{Setup: &setup.Setup, Ground: gr, Lat: lat, Lon: lon, Alt: alt, Levels: extraLevels,
		Fields: planFields(fields), Failure: fstate, FieldName: flagOf, Progress: prog.set}
	res, err := plan.Reach(ctx, req)
	prog.done()
	if err != nil {
		return nil, usage(err)
	}
	run := &reachRun{setup: setup, ground: gr, startLat: lat, startLon: lon, startAlt: alt, startElev: res.StartElev, heading: math.NaN(), fail: fstate,
		res: res.Footprint, members: res.Members, levels: res.Levels, farthest: res.Farthest, farBearing: res.FarBearing, farPoint: res.FarPoint,
		grid: res.Grid, edge: res.Edge, sectors: res.Sectors, fields: make([]fieldResult, len(res.Fields))}
	if fstate != nil {
		run.heading = fstate.HeadingDeg
	}
	for i, f := range res.Fields {
		run.fields[i] = fieldResult(f)
	}
	return run, nil
}

// planFields converts the fields read from a file to the library's.
func planFields(fs []input.Field) []plan.Field {
	if fs == nil {
		return nil
	}
	out := make([]plan.Field, len(fs))
	for i, f := range fs {
		out[i] = plan.Field(f)
	}
	return out
}

// edgeCut says where a footprint is cut off by the edge of the terrain
// data (plan.TerrainEdge).
type edgeCut = plan.EdgeCut

// edgeText is the warning a footprint cut off by the data's edge carries in
// every output.
func edgeText(e *edgeCut) string {
	return fmt.Sprintf("the footprint is cut off by the edge of the terrain data (%s): the ground beyond was not computed, "+
		"so the reach there may be larger than shown and the farthest reach may be the data's edge; give terrain covering %.0f km around the start",
		edgeWhere(e), math.Ceil(e.CoverM/1000))
}

// where says where the cut lies: "toward 213°" or "on several sides".
func edgeWhere(e *edgeCut) string {
	if e.AllRound {
		return "on several sides"
	}
	return fmt.Sprintf("toward %03.0f°", e.BearingDeg)
}
