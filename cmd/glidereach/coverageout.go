package main

import (
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"text/tabwriter"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"glidereach/cmd/glidereach/input"
	"glidereach/cmd/glidereach/render"
	"glidereach/reach"
)

func (run *coverageRun) assumptions() []string {
	a := run.setup.assumptions()
	l := run.res.Ground
	a = append(a, "altitude flown: "+run.altMode,
		"a cell is covered when some field is reached from its centre with the reserve; shares and areas count cells",
		fmt.Sprintf("least altitudes computed up to %.0f m MSL (raster empty above)", run.res.Ceiling),
		fmt.Sprintf("solver grid %d×%d cells of %.0f m (%.4f km² each in its tangent plane; areas are summed with each cell's area on the WGS84 ellipsoid)", l.Cols, l.Rows, l.Cell, run.res.CellArea/1e6),
		"analysed: "+run.zoneText,
		"terrain: "+run.ground.Describe())
	return a
}

func km2(m2 float64) float64 { return m2 / 1e6 }

// zoneArea is the area of the zone as counted, m².
func (run *coverageRun) zoneArea() float64 { return run.res.ZoneArea }

// coverageFigures are the figures the coverage outputs print, from one
// solver grid or from tiles: the covered share and areas (m²), each field's
// covered and exclusive areas, and the candidates' ranking (ranked false
// when no candidates were given).
type coverageFigures struct {
	coveredFraction, coveredArea, zoneArea float64
	covers, exclusive                      []float64
	ranked                                 bool
	order                                  []int
	gain                                   []float64
	steps                                  []reach.CandidateStep
}

// figures are the single-grid run's coverageFigures.
func (run *coverageRun) figures() coverageFigures {
	r := run.res
	f := coverageFigures{coveredFraction: r.CoveredFraction, coveredArea: r.CoveredArea, zoneArea: run.zoneArea(),
		covers: r.Covers, exclusive: r.Exclusive}
	if rk := run.rank; rk != nil {
		f.ranked, f.order, f.gain, f.steps = true, rk.Order, rk.Gain, rk.Steps
	}
	return f
}

// write prints the covered share, the fields' table and the candidates'
// ranking (covered figures round down, uncovered ones up).
func (f coverageFigures) write(w io.Writer, run *coverageRun, uncoveredParts int) {
	fmt.Fprintf(w, "A field is in reach with the %.0f m reserve from %.1f %% of the area (%.1f of %.1f km²).\n",
		run.setup.Reserve, pctDown(f.coveredFraction), math.Floor(km2(f.coveredArea)*10+1e-9)/10, km2(f.zoneArea))
	fmt.Fprintf(w, "Uncovered: %.1f km² in %d part(s).\n\n", math.Ceil(km2(f.zoneArea-f.coveredArea)*10-1e-9)/10, uncoveredParts)
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "FIELD\tELEV m\tCOVERS km²\tONLY IT km²\tNOTE\t")
	for i, fd := range run.fields {
		fmt.Fprintf(tw, "%s\t%s\t%.1f\t%.1f\t%s\t\n", fd.Name, fmtM(fd.Elev), km2(f.covers[i]), km2(f.exclusive[i]), fd.Note)
	}
	tw.Flush()
	if !f.ranked {
		return
	}
	fmt.Fprintln(w, "\nCandidates by the area each would add alone:")
	tw = tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "RANK\tCANDIDATE\tADDS km²\tNOTE\t")
	for k, i := range f.order {
		fmt.Fprintf(tw, "%d\t%s\t%.1f\t%s\t\n", k+1, run.cands[i].Name, km2(f.gain[i]), run.cands[i].Note)
	}
	tw.Flush()
	fmt.Fprintf(w, "\nGreedy choice (each step adds the candidate that adds most to what is covered so far):\n")
	if len(f.steps) == 0 {
		fmt.Fprintln(w, "  no candidate adds any covered area")
	}
	for k, s := range f.steps {
		fmt.Fprintf(w, "  %d. %s: +%.1f km², covered %.1f %%\n", k+1, run.cands[s.Candidate].Name, km2(s.Added), pctDown(s.CoveredFraction))
	}
}

func writeCoverageText(w io.Writer, run *coverageRun) {
	fmt.Fprintf(w, "Coverage of the %s\n", run.zoneText)
	fmt.Fprintf(w, "Altitude flown: %s\n", run.altMode)
	fmt.Fprintf(w, "Aircraft: %s   Wind: %s\n", run.setup.Aircraft.Name, run.setup.WindText)
	fmt.Fprintf(w, "Terrain: %s\n\n", run.ground.Describe())
	run.figures().write(w, run, len(run.uncovered))
	for _, n := range run.notes {
		fmt.Fprintln(w, "NOTE:", n)
	}
	fmt.Fprintln(w, "\nAssumptions:")
	for _, a := range run.assumptions() {
		fmt.Fprintln(w, "  -", a)
	}
	fmt.Fprintln(w, "\nCAUTION:", reach.Caution)
}

func (run *coverageRun) fieldsJSON() []map[string]any {
	return run.figures().fieldsJSON(run.fields)
}

func (run *coverageRun) candidatesJSON() (ranking, steps []map[string]any) {
	return run.figures().candidatesJSON(run.cands)
}

// fieldsJSON lists the fields with the zone area each covers (alone or
// with others) and the part no other field covers (m², rounded): the
// single-grid and the tiled paths give the same keys.
func (fg coverageFigures) fieldsJSON(fields []routeField) []map[string]any {
	covers, exclusive := fg.covers, fg.exclusive
	out := make([]map[string]any, 0, len(fields))
	for i, f := range fields {
		m := map[string]any{"name": f.Name, "lat": f.Lat, "lon": f.Lon, "elevation_m": num(f.Elev),
			"covers_m2": math.Round(covers[i]), "exclusive_m2": math.Round(exclusive[i])}
		if f.Note != "" {
			m["note"] = f.Note
		}
		out = append(out, m)
	}
	return out
}

// candidatesJSON lists the candidates by rank with the area each alone
// adds, and the greedy picks, for both coverage paths (nil, nil without a
// ranking).
func (fg coverageFigures) candidatesJSON(cands []routeField) (ranking, steps []map[string]any) {
	if !fg.ranked {
		return nil, nil
	}
	gain := fg.gain
	for k, i := range fg.order {
		c := cands[i]
		m := map[string]any{"rank": k + 1, "name": c.Name, "lat": c.Lat, "lon": c.Lon, "elevation_m": num(c.Elev), "adds_m2": math.Round(gain[i])}
		if c.Note != "" {
			m["note"] = c.Note
		}
		ranking = append(ranking, m)
	}
	steps = []map[string]any{}
	for k, s := range fg.steps {
		steps = append(steps, map[string]any{"step": k + 1, "name": cands[s.Candidate].Name, "adds_m2": math.Round(s.Added),
			"covered_fraction": fractionDown(s.CoveredFraction)})
	}
	return ranking, steps
}

func coverageJSON(run *coverageRun) ([]byte, error) {
	r := run.res
	out := map[string]any{
		"caution":           reach.Caution,
		"analysed":          run.zoneText,
		"altitude_flown":    run.altMode,
		"aircraft":          run.setup.Aircraft.Name,
		"wind":              run.setup.WindText,
		"reserve_m":         run.setup.Reserve,
		"clearance_m":       run.setup.Clearance,
		"terrain":           run.ground.Describe(),
		"covered_fraction":  fractionDown(r.CoveredFraction),
		"area_m2":           math.Round(run.zoneArea()),
		"covered_m2":        math.Round(r.CoveredArea),
		"uncovered_parts":   len(run.uncovered),
		"cell_size_m":       num(r.Ground.Cell),
		"computed_to_msl_m": num(r.Ceiling),
		"fields":            run.fieldsJSON(),
		"notes":             append([]string{}, run.notes...),
		"assumptions":       run.assumptions(),
	}
	if run.rank != nil {
		out["candidates"], out["picks"] = run.candidatesJSON()
	}
	return jsonDoc(out, "  ")
}

func multiGeometry(mp orb.MultiPolygon) orb.Geometry {
	if mp == nil {
		return orb.MultiPolygon{}
	}
	return mp
}

// zonePolygons returns the outline of the zone for output: the polygons of
// an area, nothing for a corridor (its outline is the route and width).
func (run *coverageRun) zonePolygons() orb.MultiPolygon {
	if reg, ok := run.zone.(*input.Region); ok {
		return reg.Polygons
	}
	return nil
}

// coverageGeoJSON is the RFC 7946 FeatureCollection: the covered and the
// uncovered part (MultiPolygons), the area outline, the fields and the
// candidates.
func coverageGeoJSON(run *coverageRun) ([]byte, error) {
	r := run.res
	fc := geojson.NewFeatureCollection()
	fc.ExtraMembers = geojson.Properties{"caution": reach.Caution}
	cov := geojson.NewFeature(multiGeometry(run.covered))
	cov.Properties = map[string]any{"kind": "covered", "caution": reach.Caution, "covered_fraction": fractionDown(r.CoveredFraction),
		"area_m2": math.Round(r.CoveredArea), "contour_area_m2": math.Round(run.coveredArea),
		"altitude_flown": run.altMode, "aircraft": run.setup.Aircraft.Name, "wind": run.setup.WindText,
		"reserve_m": run.setup.Reserve, "clearance_m": run.setup.Clearance, "terrain": run.ground.Describe(),
		"assumptions": run.assumptions(), "planning_only": true}
	fc.Append(cov)
	unc := geojson.NewFeature(multiGeometry(run.uncovered))
	unc.Properties = map[string]any{"kind": "uncovered", "caution": reach.Caution, "area_m2": math.Round(run.zoneArea() - r.CoveredArea),
		"contour_area_m2": math.Round(run.uncoveredArea), "parts": len(run.uncovered)}
	fc.Append(unc)
	if zp := run.zonePolygons(); len(zp) > 0 {
		z := geojson.NewFeature(zp)
		z.Properties = map[string]any{"kind": "area", "analysed": run.zoneText, "area_m2": math.Round(run.zoneArea())}
		fc.Append(z)
	}
	for _, f := range run.fieldsJSON() {
		ff := geojson.NewFeature(orb.Point{round6(f["lon"].(float64)), round6(f["lat"].(float64))})
		delete(f, "lat")
		delete(f, "lon")
		f["kind"] = "field"
		ff.Properties = f
		fc.Append(ff)
	}
	ranking, _ := run.candidatesJSON()
	picked := map[string]int{}
	if run.rank != nil {
		for k, s := range run.rank.Steps {
			picked[run.cands[s.Candidate].Name] = k + 1
		}
	}
	for _, c := range ranking {
		ff := geojson.NewFeature(orb.Point{round6(c["lon"].(float64)), round6(c["lat"].(float64))})
		delete(c, "lat")
		delete(c, "lon")
		c["kind"] = "candidate"
		if k, ok := picked[c["name"].(string)]; ok {
			c["picked_step"] = k
		} else {
			c["picked_step"] = nil
		}
		ff.Properties = c
		fc.Append(ff)
	}
	return jsonDoc(fc, " ")
}

// coverageScene builds the map of a coverage run.
func coverageScene(run *coverageRun) *render.Scene {
	r := run.res
	s := &render.Scene{
		Title:      fmt.Sprintf("Field coverage at %s - %s", shortCoverageAlt(run), run.setup.Aircraft.Name),
		Terrain:    displayTerrain(r.Ground, run.ground),
		DataSource: "terrain: " + run.ground.Describe(),
		Caution:    reach.Caution,
		Coverage:   &render.Coverage{Area: run.zonePolygons(), Covered: run.covered, Uncovered: run.uncovered},
		FieldsFrom: "from the area",
	}
	s.WindLayers, s.WindSource = windMarks(run.setup)
	for i, f := range run.fields {
		s.Fields = append(s.Fields, render.FieldMark{Name: f.Name, Point: orb.Point{f.Lon, f.Lat}, Reachable: !r.Skipped[i], ArrivalAGL: math.NaN()})
	}
	if run.rank != nil {
		for k, st := range run.rank.Steps {
			c := run.cands[st.Candidate]
			s.Fields = append(s.Fields, render.FieldMark{Name: c.Name, Point: orb.Point{c.Lon, c.Lat}, Proposed: true,
				ArrivalAGL: math.NaN(), Note: fmt.Sprintf("proposed, pick %d", k+1)})
		}
	}
	zb := run.zone.Bounds()
	s.Bounds = zb.Pad(math.Max(zb.Max[0]-zb.Min[0], zb.Max[1]-zb.Min[1]) * 0.06)
	s.Inputs = []string{
		"Aircraft: " + run.setup.Aircraft.Name,
		"Altitude: " + shortCoverageAlt(run),
		"Wind: " + run.setup.WindText,
		fmt.Sprintf("Reserve: %.0f m, clearance %.0f m", run.setup.Reserve, run.setup.Clearance),
		fmt.Sprintf("Covered: %.1f %% of %.0f km²", pctDown(r.CoveredFraction), km2(run.zoneArea())),
	}
	return s
}

func shortCoverageAlt(run *coverageRun) string {
	if run.res.Opts.AGL {
		return fmt.Sprintf("%.0f m AGL", run.res.Opts.Alt)
	}
	return fmt.Sprintf("%.0f m MSL", run.res.Opts.Alt)
}

// drawCoverage writes the map and/or the report of a coverage run.
func drawCoverage(run *coverageRun, mapPath, reportPath string) error {
	scene := coverageScene(run)
	pngData, err := drawMap(scene, mapPath)
	if err != nil {
		return err
	}
	if reportPath == "" {
		return nil
	}
	r := run.res
	rep := &render.Report{
		Title:    scene.Title,
		Subtitle: fmt.Sprintf("%s - %s", run.zoneText, run.ground.Describe()),
		Scene:    scene,
		Caution:  reach.Caution,
		Summary: []string{
			fmt.Sprintf("A field is in reach with the %.0f m reserve from %.1f %% of the area (%.1f of %.1f km²).", run.setup.Reserve, pctDown(r.CoveredFraction),
				km2(r.CoveredArea), km2(run.zoneArea())),
			fmt.Sprintf("Uncovered parts: %d.", len(run.uncovered)),
		},
	}
	rep.Summary = append(rep.Summary, run.notes...)
	ft := render.Table{Title: "Landing fields", Header: []string{"Field", "Elevation (m)", "Covers (km²)", "Only it covers (km²)", "Note"}}
	for i, f := range run.fields {
		ft.Rows = append(ft.Rows, []string{f.Name, fmtM(f.Elev), fmt.Sprintf("%.1f", km2(r.Covers[i])), fmt.Sprintf("%.1f", km2(r.Exclusive[i])), f.Note})
	}
	rep.Tables = append(rep.Tables, ft)
	if rk := run.rank; rk != nil {
		ct := render.Table{Title: "Candidates by area added", Header: []string{"Rank", "Candidate", "Adds (km²)"}}
		for k, i := range rk.Order {
			ct.Rows = append(ct.Rows, []string{strconv.Itoa(k + 1), run.cands[i].Name, fmt.Sprintf("%.1f", km2(rk.Gain[i]))})
		}
		st := render.Table{Title: "Greedy choice", Header: []string{"Step", "Candidate", "Adds (km²)", "Covered after (%)"}}
		for k, s := range rk.Steps {
			st.Rows = append(st.Rows, []string{strconv.Itoa(k + 1), run.cands[s.Candidate].Name, fmt.Sprintf("%.1f", km2(s.Added)), fmt.Sprintf("%.1f", pctDown(s.CoveredFraction))})
		}
		rep.Tables = append(rep.Tables, ct, st)
	}
	rep.Tables = append(rep.Tables, render.Table{Title: "Assumptions", Header: []string{"Input"}, Rows: rowsOf(run.assumptions())})
	rep.MapPNG = pngData
	return writeFileAtomic(reportPath, func(f *os.File) error { return render.WriteReport(f, rep) })
}
