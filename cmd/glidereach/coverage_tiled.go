package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
	"glidereach/reach/plan"
	"glidereach/reach/tiling"
)

// tiledFlags are coverage's flags of the tiled path.
type tiledFlags struct {
	tiled   bool
	workDir string
	workers int
	tile    int
	cog     string
	fgb     string
	cell    *input.Quantity
}

// wanted reports whether the tiled path was asked for: --tiled, or a flag
// only it has.
func (t *tiledFlags) wanted() bool {
	return t.tiled || t.workDir != "" || t.cog != "" || t.fgb != "" || t.cell.Given
}

// tiledRun is what a tiled coverage produced.
type tiledRun struct {
	*coverageRun
	plan                       *tiling.Plan
	res                        *tiling.Result
	rank                       *tiling.Ranking
	workers                    int
	demCell                    float64
	coveredArea, uncoveredArea float64
	covered, uncovered         orb.MultiPolygon
}

// checkTiled refuses bad values of the tiled flags and the outputs the
// tiled path has not (exit status 2).
func checkTiled(o *coverageOptions) error {
	t := o.tiledOpts
	if t.workers < 0 || t.workers > 1024 {
		return input.Usagef("--workers", "%d is outside 1..1024 (0: all cores)", t.workers)
	}
	if t.tile != 0 && (t.tile < 64 || t.tile > 8192 || t.tile%16 != 0) {
		return input.Usagef("--tile", "%d cells is not a multiple of 16 in 64..8192", t.tile)
	}
	if t.cell.Given && !(t.cell.Value >= 1 && t.cell.Value <= 1000) {
		return input.Usagef("--cell", "%v m is outside 1..1000 m", t.cell.Value)
	}
	if o.mapPNG != "" || o.report != "" {
		flag := "--map"
		if o.mapPNG == "" {
			flag = "--report"
		}
		return input.Usagef(flag, "a map or report is drawn from one solver grid; the tiled path (--tiled, --work-dir, --cog, --fgb, --cell) writes --cog, --fgb, --raster and --out instead")
	}
	if t.cog != "" {
		if err := checkOutputPath("--cog", t.cog); err != nil {
			return err
		}
		if e := strings.ToLower(filepath.Ext(t.cog)); e != ".tif" && e != ".tiff" {
			return input.Usagef("--cog", "%q: a cloud-optimised GeoTIFF is written to a .tif file", t.cog)
		}
	}
	if t.fgb != "" {
		if err := checkOutputPath("--fgb", t.fgb); err != nil {
			return err
		}
		if !strings.EqualFold(filepath.Ext(t.fgb), ".fgb") {
			return input.Usagef("--fgb", "%q: FlatGeobuf is written to a .fgb file", t.fgb)
		}
	}
	if t.workDir != "" {
		if fi, err := os.Stat(t.workDir); err == nil && !fi.IsDir() {
			return input.Usagef("--work-dir", "%q is a file, not a directory", t.workDir)
		}
	}
	return nil
}

// runCoverageTiled is runCoverage's tiled path: check, compute, write.
func runCoverageTiled(ctx context.Context, run *coverageRun, o *coverageOptions, fields, cands []input.Field, stdout, stderr io.Writer) error {
	if err := checkTiled(o); err != nil {
		return err
	}
	prog := newProgress(stderr, "coverage (tiled)")
	tr, err := computeTiled(ctx, run, o, fields, cands, prog.set, stderr)
	prog.done()
	if err != nil {
		return err
	}
	var wrote []string
	for _, p := range []string{o.raster, o.tiledOpts.cog, o.tiledOpts.fgb} {
		if p != "" {
			wrote = append(wrote, p)
		}
	}
	document := func(format string) ([]byte, error) {
		switch format {
		case "geojson":
			return tiledGeoJSON(tr)
		case "json":
			return tiledJSON(tr)
		}
		var b strings.Builder
		writeTiledText(&b, tr)
		return []byte(b.String()), nil
	}
	return deliver(ctx, stdout, results{out: o.out, format: o.format, document: document,
		text: func(w io.Writer) {
			writeTiledText(w, tr)
			if len(wrote) > 0 {
				fmt.Fprintln(w)
			}
			for _, p := range wrote {
				fmt.Fprintf(w, "wrote %s\n", p)
			}
		}})
}

// computeTiled runs the tiled coverage: the DEM's lattice over the zone,
// one field run per field at the DEM's resolution, merged tile by tile.
func computeTiled(ctx context.Context, run *coverageRun, o *coverageOptions, fields, cands []input.Field, progress func(float64), stderr io.Writer) (*tiledRun, error) {
	t := o.tiledOpts
	b := run.zone.Bounds()
	flag := zoneFlag(o)
	targets := func(fs []input.Field) []reach.Target {
		ts := make([]reach.Target, len(fs))
		for i, f := range fs {
			ts[i] = reach.Target{Name: f.Name, Lat: f.Lat, Lon: f.Lon, Elev: math.NaN(), Reserve: run.setup.Reserve}
			if f.HasElevation {
				ts[i].Elev = f.Elevation
			}
		}
		return ts
	}
	req := plan.TiledRequest{Setup: &run.setup.Setup, Ground: run.ground, West: b.Min[0], South: b.Min[1], East: b.Max[0], North: b.Max[1],
		ZoneName: flag[2:], Alt: o.alt.Value, AGL: o.agl.Given, Tile: t.tile, Fields: targets(fields), Candidates: targets(cands), Notes: run.notes}
	if o.agl.Given {
		req.Alt = o.agl.Value
	}
	if t.cell.Given {
		req.Cell = t.cell.Value
	}
	tp, err := plan.PlanTiled(req)
	if err != nil {
		var ie *plan.InputError
		if errors.As(err, &ie) && ie.Field == "Zone" {
			return nil, &input.UsageError{Where: flag, Err: ie.Err}
		}
		return nil, usage(err)
	}
	p := tp.Plan
	run.notes = p.Notes
	tr := &tiledRun{coverageRun: run, demCell: tp.DEMCell}
	run.altMode = plan.AltFlownText(o.agl.Given, req.Alt)
	if !o.agl.Given && o.ind.AltInd.Given {
		run.altMode = plan.AltFlownIndicatedText(o.alt.Value, o.ind.AltInd.Value)
	}
	routeFields := func(fs []input.Field, ts []reach.Target) []routeField {
		rf := make([]routeField, len(fs))
		for i, f := range fs {
			rf[i] = routeField{Field: plan.Field(f), Target: i}
			rf[i].Elev = ts[i].Elev
			if math.IsNaN(ts[i].Elev) {
				rf[i].Note = "on unknown ground or off the terrain data"
			}
		}
		return rf
	}
	run.fields, run.cands = routeFields(fields, p.Fields), routeFields(cands, p.Candidates)
	tr.plan = p
	dir := t.workDir
	if dir == "" {
		d, err := os.MkdirTemp("", "glidereach-coverage-*")
		if err != nil {
			return nil, err
		}
		defer os.RemoveAll(d)
		dir = d
	} else if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, input.Usagef("--work-dir", "%v", err)
	}
	tr.workers = t.workers
	if tr.workers == 0 {
		tr.workers = runtime.NumCPU()
	}
	res, err := tiling.Run(ctx, run.ground.Src, p, tiling.RunOptions{Workers: tr.workers, WorkDir: dir, Zone: run.zone.Contains, Progress: progress})
	if errors.Is(err, tiling.ErrOtherPlan) {
		return nil, &input.UsageError{Where: "--work-dir", Err: err}
	}
	if errors.Is(err, tiling.ErrCorrupt) {
		// A work file damaged outside the run (the run writes each file
		// whole, by rename): the user's input, not a failure of the run.
		return nil, input.Usagef("--work-dir", "%v (remove that file, or the whole work directory, to compute it again)", err)
	}
	if err != nil {
		if ctx.Err() != nil && t.workDir != "" {
			fmt.Fprintf(stderr, "glidereach: stopped; the finished tiles are kept in %s: run the same command again to continue\n", t.workDir)
		}
		return nil, err
	}
	tr.res = res
	if res.Totals.ZoneCells == 0 {
		return nil, input.Usagef(flag, "the %s holds no cell of the DEM's lattice", flag[2:])
	}
	for i := range run.fields {
		if res.Skipped[i] && run.fields[i].Note == "" {
			run.fields[i].Note = "too far to reach the area from the altitude flown, or on unknown ground"
		}
	}
	for j := range run.cands {
		if res.Skipped[len(run.fields)+j] && run.cands[j].Note == "" {
			run.cands[j].Note = "too far to reach the area from the altitude flown, or on unknown ground"
		}
	}
	if len(p.Candidates) > 0 {
		tr.rank = res.Totals.Rank(o.pick)
	}
	tr.covered, tr.uncovered, tr.coveredArea, tr.uncoveredArea, err = tiling.Contour(p, res)
	if err != nil {
		return nil, err
	}
	// Outputs that need the work files are written now, before a
	// temporary work directory goes.
	if t.cog != "" {
		if err := writeFileAtomic(t.cog, func(f *os.File) error {
			return tiling.WriteCOG(f, p, res, plan.TiledCOGDescription)
		}); err != nil {
			return nil, err
		}
	}
	if o.raster != "" {
		g, err := tiling.LeastGrid(p, res)
		if err != nil {
			return nil, err
		}
		g.Name = "least altitude to reach a landing field with the reserve, m MSL"
		if err := writeRaster(o.raster, g, "least altitude (m MSL) from which a landing field is reached with the reserve; NaN where none is below the ceiling"); err != nil {
			return nil, err
		}
	}
	if t.fgb != "" {
		if err := writeFileAtomic(t.fgb, func(f *os.File) error { return writeTiledFGB(f, tr) }); err != nil {
			return nil, err
		}
	}
	return tr, nil
}

func zoneFlag(o *coverageOptions) string {
	if o.corridor != "" {
		return "--corridor"
	} else if o.box != "" {
		return "--box"
	}
	return "--area"
}

// assumptions are the tiled run's: the setup's, then the library's words
// for the tiled run (plan.TiledAssumptions), which glidereach-pipeline
// writes too.
func (tr *tiledRun) assumptions() []string {
	return plan.TiledAssumptions(tr.setup.assumptions(), tr.plan, tr.tiledText())
}

// tiledText is what the assumptions say about the run beyond the setup.
func (tr *tiledRun) tiledText() plan.TiledText {
	return plan.TiledText{AltFlown: tr.altMode, Zone: tr.zoneText, Terrain: tr.ground.Describe(), Flat: tr.ground.Src == nil, DEMCell: tr.demCell}
}

func writeTiledText(w io.Writer, tr *tiledRun) {
	fmt.Fprintf(w, "Coverage of the %s (tiled)\n", tr.zoneText)
	fmt.Fprintf(w, "Altitude flown: %s\n", tr.altMode)
	fmt.Fprintf(w, "Aircraft: %s   Wind: %s\n", tr.setup.Aircraft.Name, tr.setup.WindText)
	fmt.Fprintf(w, "Terrain: %s\n\n", tr.ground.Describe())
	tr.figures().write(w, tr.coverageRun, len(tr.uncovered))
	for _, n := range tr.notes {
		fmt.Fprintln(w, "NOTE:", n)
	}
	fmt.Fprintf(w, "\nRun: %d field jobs on %d workers, %d of %d tiles taken from the work directory.\n", tr.res.Ran, tr.workers, tr.res.Resumed, len(tr.plan.Tiles()))
	fmt.Fprintln(w, "\nAssumptions:")
	for _, a := range tr.assumptions() {
		fmt.Fprintln(w, "  -", a)
	}
	fmt.Fprintln(w, "\nCAUTION:", reach.Caution)
}

// figures are the tiled run's coverageFigures.
func (tr *tiledRun) figures() coverageFigures {
	t := tr.res.Totals
	f := coverageFigures{coveredFraction: t.CoveredFraction, coveredArea: t.CoveredArea, zoneArea: t.ZoneArea,
		covers: t.Covers, exclusive: t.Exclusive}
	if rk := tr.rank; rk != nil {
		f.ranked, f.order, f.gain, f.steps = true, rk.Order, rk.Gain, rk.Steps
	}
	return f
}

func (tr *tiledRun) fieldsJSON() []map[string]any { return tr.figures().fieldsJSON(tr.fields) }

func (tr *tiledRun) candidatesJSON() (ranking, steps []map[string]any) {
	return tr.figures().candidatesJSON(tr.cands)
}

func tiledJSON(tr *tiledRun) ([]byte, error) {
	t := tr.res.Totals
	l := tr.plan.Lattice
	out := map[string]any{
		"caution":           reach.Caution,
		"analysed":          tr.zoneText,
		"altitude_flown":    tr.altMode,
		"aircraft":          tr.setup.Aircraft.Name,
		"wind":              tr.setup.WindText,
		"reserve_m":         tr.setup.Reserve,
		"clearance_m":       tr.setup.Clearance,
		"terrain":           tr.ground.Describe(),
		"covered_fraction":  fractionDown(t.CoveredFraction),
		"area_m2":           math.Round(t.ZoneArea),
		"covered_m2":        math.Round(t.CoveredArea),
		"uncovered_parts":   len(tr.uncovered),
		"cell_size_m":       num(tr.plan.Cell),
		"dem_cell_size_m":   num(tr.demCell),
		"computed_to_msl_m": num(tr.plan.Ceiling),
		"tiled": map[string]any{"lattice_cols": l.Cols, "lattice_rows": l.Rows, "epsg": l.EPSG, "tile_cells": tr.plan.TileSide(),
			"tiles": len(tr.plan.Tiles()), "field_jobs": tr.res.Ran, "tiles_resumed": tr.res.Resumed, "workers": tr.workers},
		"fields":      tr.fieldsJSON(),
		"notes":       append([]string{}, tr.notes...),
		"assumptions": tr.assumptions(),
	}
	if tr.rank != nil {
		out["candidates"], out["picks"] = tr.candidatesJSON()
	}
	return jsonDoc(out, "  ")
}

func tiledGeoJSON(tr *tiledRun) ([]byte, error) {
	t := tr.res.Totals
	fc := geojson.NewFeatureCollection()
	fc.ExtraMembers = geojson.Properties{"caution": reach.Caution}
	cov := geojson.NewFeature(multiGeometry(tr.covered))
	cov.Properties = map[string]any{"kind": "covered", "caution": reach.Caution, "covered_fraction": fractionDown(t.CoveredFraction),
		"area_m2": math.Round(t.CoveredArea), "contour_area_m2": math.Round(tr.coveredArea),
		"altitude_flown": tr.altMode, "aircraft": tr.setup.Aircraft.Name, "wind": tr.setup.WindText,
		"reserve_m": tr.setup.Reserve, "clearance_m": tr.setup.Clearance, "terrain": tr.ground.Describe(),
		"assumptions": tr.assumptions(), "planning_only": true}
	fc.Append(cov)
	unc := geojson.NewFeature(multiGeometry(tr.uncovered))
	unc.Properties = map[string]any{"kind": "uncovered", "caution": reach.Caution, "area_m2": math.Round(t.ZoneArea - t.CoveredArea),
		"contour_area_m2": math.Round(tr.uncoveredArea), "parts": len(tr.uncovered)}
	fc.Append(unc)
	if zp := tr.zonePolygons(); len(zp) > 0 {
		z := geojson.NewFeature(zp)
		z.Properties = map[string]any{"kind": "area", "analysed": tr.zoneText, "area_m2": math.Round(t.ZoneArea)}
		fc.Append(z)
	}
	for _, f := range tr.fieldsJSON() {
		ff := geojson.NewFeature(orb.Point{round6(f["lon"].(float64)), round6(f["lat"].(float64))})
		delete(f, "lat")
		delete(f, "lon")
		f["kind"] = "field"
		ff.Properties = f
		fc.Append(ff)
	}
	ranking, _ := tr.candidatesJSON()
	picked := map[int]int{}
	if tr.rank != nil {
		for k, s := range tr.rank.Steps {
			picked[s.Candidate] = k + 1
		}
	}
	for k, c := range ranking {
		ff := geojson.NewFeature(orb.Point{round6(c["lon"].(float64)), round6(c["lat"].(float64))})
		delete(c, "lat")
		delete(c, "lon")
		c["kind"] = "candidate"
		c["picked_step"] = nil
		if s, ok := picked[tr.rank.Order[k]]; ok {
			c["picked_step"] = s
		}
		ff.Properties = c
		fc.Append(ff)
	}
	return jsonDoc(fc, " ")
}

// writeTiledFGB writes the covered and uncovered parts and the fields as
// FlatGeobuf (plan.WriteTiledFGB, as glidereach-pipeline --fgb does).
func writeTiledFGB(w io.Writer, tr *tiledRun) error {
	return plan.WriteTiledFGB(w, tr.plan, tr.res.Totals, tr.covered, tr.uncovered, tr.zoneText, tr.assumptions())
}
