package main

import (
	"context"
	"fmt"
	"io"
	"path/filepath"
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
	register(newCoverageCmd)
	registerDemoStep(50, "emergency-field coverage of the demo area, and where a new field helps most", demoCoverage)
}

// coverageOptions are the coverage command's flags.
type coverageOptions struct {
	glide      *glideFlags
	terr       *terrainFlags
	fields     string
	area       string
	box        string
	corridor   string
	alt        *input.Quantity
	agl        *input.Quantity
	ind        *input.Indicated
	candidates string
	pick       int
	raster     string
	format     string
	out        string
	mapPNG     string
	report     string
	tiledOpts  *tiledFlags
}

func newCoverageCmd() *cobra.Command {
	o := &coverageOptions{glide: newGlideFlags(), terr: newTerrainFlags(), alt: input.NewQuantity(input.Length, 0).Within(minAltMSL, maxAltMSL), agl: input.NewQuantity(input.Length, 0).Within(0, maxAGL), ind: input.NewIndicated(), pick: 3,
		tiledOpts: &tiledFlags{cell: input.NewQuantity(input.Length, 0)}}
	cmd := &cobra.Command{
		Use:   "coverage --fields FILE (--area FILE | --box LAT,LON,LAT,LON | --corridor ROUTE,WIDTH) (--alt ALT|--agl HEIGHT)",
		Short: "How much of an area or corridor has a landing field in reach, and which new field helps most",
		Long: `coverage computes, for every cell of an area (GeoJSON polygons, --area,
or a box typed as two opposite corners LAT,LON,LAT,LON, --box) or of a corridor along a route, whether some landing field is in
reach with the reserve from the altitude flown there (--alt MSL, or --agl
above the terrain at each cell), through the wind at each altitude and
around the terrain. It reports the covered share, the covered and uncovered
parts as polygons, the least altitude from which a field is reached at every
cell (--raster, GeoTIFF or ESRI ASCII grid), and for every field the area it
covers and the area only it covers. With --candidates it ranks candidate
fields by the area each would add and chooses the best --pick of them one
by one, each choice taking the one that adds most to what is covered.

One solver grid holds at most 2001 × 2001 cells: a larger area is solved
on coarser cells (the output says so). --tiled solves it at the DEM's own
resolution whatever its size: each field on its own window, merged tile by
tile on the DEM's lattice, on all cores (--workers), with work files in
--work-dir so a stopped run continues where it was; --cog writes the least
altitude as a cloud-optimised GeoTIFF, --fgb the covered and uncovered
parts as FlatGeobuf. --work-dir, --cog, --fgb and --cell imply --tiled.

` + cautionText,
		Example: `  glidereach coverage --fields testdata/fields/demo-fields.geojson --box -0.8,-24.85,-0.15,-24.15 --alt 1500m
  glidereach coverage --fields testdata/fields/fixture-fields.geojson --corridor testdata/routes/fixture-route.gpx,2km \
      --agl 600m --terrain testdata/geotiff/geo_int16_strip_none.tif --raster least.tif
  glidereach coverage --fields testdata/fields/demo-fields.geojson --area testdata/areas/demo-area.geojson --alt 1200m \
      --candidates testdata/fields/demo-candidates.geojson --pick 2 \
      --format geojson --out coverage.geojson --map coverage.png`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runCoverage(cmd.Context(), o, cmd.OutOrStdout(), cmd.ErrOrStderr())
		},
	}
	fs := cmd.Flags()
	o.glide.register(fs)
	o.terr.register(fs)
	fs.StringVar(&o.fields, "fields", "", "existing landing fields: GeoJSON points or polygons with a name property")
	fs.StringVar(&o.area, "area", "", "area to analyse: a GeoJSON Polygon/MultiPolygon file (a typed box goes in --box)")
	fs.StringVar(&o.box, "box", "", "area to analyse: a box given by two opposite corners LAT,LON,LAT,LON (latitude first, like --from; not across 180°)")
	fs.StringVar(&o.corridor, "corridor", "", "corridor to analyse: ROUTE,WIDTH (GPX/GeoJSON route and full width, e.g. plan.gpx,10km)")
	fs.Var(o.alt, "alt", o.alt.Help("altitude flown over the area: TRUE altitude MSL (m, ft), not the altimeter reading (see --alt-indicated)"))
	o.ind.Register(fs, "altitude flown")
	fs.Var(o.agl, "agl", o.agl.Help("height flown above the terrain at each cell (m, ft), instead of --alt"))
	fs.StringVar(&o.candidates, "candidates", "", "candidate fields (GeoJSON, like --fields) to rank by the area each would add")
	fs.IntVar(&o.pick, "pick", 3, "with --candidates: how many to choose one by one (greedy)")
	fs.StringVar(&o.raster, "raster", "", "write the least altitude (m MSL) to reach a field as a raster (.tif GeoTIFF or .asc)")
	fs.StringVar(&o.format, "format", "text", "output format: text, json or geojson (stdout, or --out)")
	fs.StringVar(&o.out, "out", "", "write the result to this file in --format (text summary still printed)")
	fs.StringVar(&o.mapPNG, "map", "", "draw a map of the coverage to this PNG file")
	fs.StringVar(&o.report, "report", "", "write a self-contained HTML report to this file")
	t := o.tiledOpts
	fs.BoolVar(&t.tiled, "tiled", false, "solve at the DEM's resolution tile by tile, for areas larger than one solver grid")
	fs.StringVar(&t.workDir, "work-dir", "", "with --tiled: directory of the work files; a stopped run given it again continues (default: a temporary one)")
	fs.IntVar(&t.workers, "workers", 0, "with --tiled: field runs at a time (0: all cores)")
	fs.IntVar(&t.tile, "tile", 0, "with --tiled: output tile side in cells, a multiple of 16 (0: 1024)")
	fs.StringVar(&t.cog, "cog", "", "with --tiled: write the least altitude (m MSL) as a cloud-optimised GeoTIFF (.tif)")
	fs.StringVar(&t.fgb, "fgb", "", "with --tiled: write the covered and uncovered parts and the fields as FlatGeobuf (.fgb)")
	fs.Var(t.cell, "cell", t.cell.Help("with --tiled: solver cell coarser than the DEM's (m); the output says so"))
	cmd.MarkFlagsMutuallyExclusive("alt", "agl")
	cmd.MarkFlagsMutuallyExclusive("area", "box", "corridor")
	return cmd
}

// coverageRun is everything a coverage computation produced.
type coverageRun struct {
	setup    *glideSetup
	ground   plan.Ground
	zone     input.Zone
	zoneText string
	altMode  string
	fields   []routeField
	cands    []routeField
	res      *reach.CoverageResult
	rank     *reach.CandidateRanking
	grid     *terrain.Grid
	notes    []string
	// contoured parts, lon/lat
	coveredArea, uncoveredArea float64
	covered, uncovered         orb.MultiPolygon
}

func runCoverage(ctx context.Context, o *coverageOptions, stdout, stderr io.Writer) error {
	switch o.format {
	case "text", "json", "geojson":
	default:
		return input.Usagef("--format", "%q: want text, json or geojson", o.format)
	}
	if o.fields == "" {
		return input.Usagef("--fields", "a landing-field file is required (GeoJSON)")
	}
	if o.area == "" && o.box == "" && o.corridor == "" {
		return input.Usagef("--area", "give the area to analyse: --area FILE, --box LAT,LON,LAT,LON or --corridor ROUTE,WIDTH")
	}
	note, err := o.ind.AltitudeFlown(o.alt, o.agl)
	if err != nil {
		return err
	}
	if !o.alt.Given && !o.agl.Given {
		return input.Usagef("--alt", "give the altitude flown: --alt (true MSL), --agl (above the terrain) or --alt-indicated")
	}
	if o.alt.Given && (o.alt.Value < -400 || o.alt.Value > 19000) {
		return input.Usagef("--alt", "%v m is outside -400..19000 m", o.alt.Value)
	}
	if o.agl.Given && !(o.agl.Value > 0 && o.agl.Value <= 10000) {
		return input.Usagef("--agl", "%v m is outside 0..10000 m above the terrain", o.agl.Value)
	}
	if o.pick < 0 || o.pick > 100 {
		return input.Usagef("--pick", "%d is outside 0..100", o.pick)
	}
	if err := checkOutputs(o.out, o.raster, o.mapPNG, o.report); err != nil {
		return err
	}
	setup, err := o.glide.resolve()
	if err != nil {
		return err
	}
	setup.printWarnings(stderr)
	if note != "" {
		setup.Notes = append(setup.Notes, note)
	}
	src, err := o.terr.open()
	if err != nil {
		return err
	}
	fields, err := input.LoadFields(o.fields)
	if err != nil {
		return err
	}
	var cands []input.Field
	if o.candidates != "" {
		cands, err = input.LoadFields(o.candidates)
		if err != nil {
			return err
		}
	}
	run := &coverageRun{setup: setup, ground: plan.Ground{Src: src, Flat: o.terr.ground.Value, Warn: warnOnce(stderr)}}
	if o.area != "" {
		reg, err := input.ParseArea(o.area)
		if err != nil {
			return err
		}
		run.zone, run.zoneText = reg, plan.AreaText(o.area)
	} else if o.box != "" {
		reg, err := input.ParseBox(o.box)
		if err != nil {
			return err
		}
		b := reg.Bounds()
		run.zone, run.zoneText = reg, plan.BoxText(b.Min[0], b.Min[1], b.Max[0], b.Max[1])
	} else {
		cor, err := input.ParseCorridor(o.corridor)
		if err != nil {
			return err
		}
		run.zone, run.zoneText = cor, plan.CorridorText(cor.Width, o.corridor[:strings.LastIndex(o.corridor, ",")])
	}
	for _, w := range farWarnings(strings.Fields(run.zoneText)[0], run.zone.Bounds(), fields, "--fields", src) {
		fmt.Fprintln(stderr, "glidereach: warning:", w)
	}
	if o.tiledOpts != nil && o.tiledOpts.wanted() {
		return runCoverageTiled(ctx, run, o, fields, cands, stdout, stderr)
	}
	prog := newProgress(stderr, "coverage")
	err = computeCoverage(ctx, run, o, fields, cands, prog.set)
	prog.done()
	if err != nil {
		return err
	}
	return deliver(ctx, stdout, results{out: o.out, format: o.format, raster: o.raster, mapPNG: o.mapPNG, report: o.report,
		document:    func(format string) ([]byte, error) { return coverageOutput(run, format) },
		writeRaster: func(path string) error { return writeLeastRaster(path, run) },
		draw:        func(m, r string) error { return drawCoverage(run, m, r) },
		text:        func(w io.Writer) { writeCoverageText(w, run) }})
}

func coverageOutput(run *coverageRun, format string) ([]byte, error) {
	if format == "geojson" {
		return coverageGeoJSON(run)
	}
	if format == "json" {
		return coverageJSON(run)
	}
	var b strings.Builder
	writeCoverageText(&b, run)
	return []byte(b.String()), nil
}

// computeCoverage builds the window, the mask of the zone, runs the
// coverage and the candidates.
func computeCoverage(ctx context.Context, run *coverageRun, o *coverageOptions, fields, cands []input.Field, progress func(float64)) error {
	flag := "--area"
	if o.corridor != "" {
		flag = "--corridor"
	} else if o.box != "" {
		flag = "--box"
	}
	if o.agl.Given {
		run.altMode = fmt.Sprintf("%.0f m (%.0f ft) above the terrain at each cell (--agl)", o.agl.Value, o.agl.Value/0.3048)
	} else {
		run.altMode = fmt.Sprintf("%.0f m MSL (%.0f ft) everywhere (--alt)", o.alt.Value, o.alt.Value/0.3048)
		if o.ind.AltInd.Given {
			run.altMode = plan.AltFlownIndicatedText(o.alt.Value, o.ind.AltInd.Value)
		}
	}
	req := plan.CoverageRequest{Setup: &run.setup.Setup, Ground: run.ground, Zone: run.zone, ZoneField: strings.ToUpper(flag[2:3]) + flag[3:],
		Alt: o.alt.Value, Fields: planFields(fields), Candidates: planFields(cands), Pick: o.pick, Progress: progress}
	if o.agl.Given {
		req.Alt, req.AGL = o.agl.Value, true
	}
	res, err := plan.Coverage(ctx, req)
	if err != nil {
		return usage(err)
	}
	run.grid, run.res, run.rank = res.Grid, res.Coverage, res.Ranking
	run.fields, run.cands = res.Fields, res.Candidates
	run.notes = append(run.notes, res.Notes...)
	if run.ground.Src != nil && res.Coverage != nil {
		if dem, cell := run.ground.Src.Resolution(), res.Coverage.Ground.Cell; dem > 0 && cell > 1.05*dem {
			run.notes = append(run.notes, fmt.Sprintf("solved on %.0f m cells, coarser than the DEM's %.0f m (one solver grid holds at most %d × %d cells); --tiled solves at the DEM's resolution", cell, dem, plan.MaxWindowSide, plan.MaxWindowSide))
		}
	}
	run.covered, run.uncovered, run.coveredArea, run.uncoveredArea = res.Covered, res.Uncovered, res.CoveredArea, res.UncoveredArea
	return nil
}

// writeLeastRaster writes the least altitude (m MSL) on the DEM's lattice
// (its CRS) when that is not much finer than the solver grid, else on a
// lon/lat lattice of about the solver's cell size.
func writeLeastRaster(path string, run *coverageRun) error {
	l := run.res.Ground
	var g *terrain.Grid
	if run.grid != nil && run.grid.Cols*run.grid.Rows <= 2*l.Cols*l.Rows {
		g = terrain.OntoGrid(l, run.res.Least, run.grid)
	} else {
		g = terrain.LatLonGrid(l, run.res.Least)
	}
	g.Name = "least altitude to reach a landing field with the reserve, m MSL"
	return writeRaster(path, g, "least altitude (m MSL) from which a landing field is reached with the reserve; NaN where none is below the ceiling")
}

// demoCoverage runs the coverage command on the embedded invented area,
// fields and landscape with the generic trainer in the demo's layered
// wind, ranks the invented candidates and writes JSON, GeoJSON, the
// least-altitude GeoTIFF, a map and a report.
func demoCoverage(ctx context.Context, d *demoRun) error {
	sc, err := loadDemoScene()
	if err != nil {
		return err
	}
	dc := demo.Coverage()
	reg := input.NewRegion(dc.Area)
	g := newGlideFlags()
	g.aircraft, g.wind = dc.Aircraft, demoWindSpec()
	setup, err := g.resolve()
	if err != nil {
		return err
	}
	o := &coverageOptions{alt: input.NewQuantity(input.Length, dc.Alt), agl: input.NewQuantity(input.Length, 0), ind: input.NewIndicated(), pick: dc.Pick, area: "demo-area.geojson"}
	o.alt.Given = true
	run := &coverageRun{setup: setup, ground: plan.Ground{Src: sc.src}, zone: reg, zoneText: "area demo-area.geojson (invented)"}
	if err := computeCoverage(ctx, run, o, sc.fields, demoCandidates(), func(float64) {}); err != nil {
		return err
	}
	for _, f := range []struct{ name, format string }{{"coverage.json", "json"}, {"coverage.geojson", "geojson"}} {
		out, err := coverageOutput(run, f.format)
		if err != nil {
			return err
		}
		if err := d.writeBytes(f.name, out); err != nil {
			return err
		}
	}
	if err := writeLeastRaster(filepath.Join(d.dir, "coverage-least-msl.tif"), run); err != nil {
		return err
	}
	d.files = append(d.files, "coverage-least-msl.tif")
	if err := d.drawBoth("coverage", func(m, r string) error { return drawCoverage(run, m, r) }); err != nil {
		return err
	}
	writeCoverageText(d.out, run)
	return nil
}
