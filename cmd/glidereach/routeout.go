package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"text/tabwriter"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"glidereach/cmd/glidereach/render"
	"glidereach/reach"
)

// marginNote says what the margin means, in every output of route.
const marginNote = "margin_above_reserve_m = planned altitude - least altitude. The least altitude already " +
	"includes the reserve: 0 arrives over the best field with exactly the reserve, +200 m with about reserve + 200 m."

// bestName is the name of the field a sample's least altitude leads to.
func (run *routeRun) bestName(best int) string {
	if best < 0 || best >= len(run.targets) {
		return ""
	}
	return run.targets[best].Name
}

func (run *routeRun) assumptions() []string {
	a := run.setup.assumptions()
	a = append(a, "planned altitude: "+run.altMode,
		fmt.Sprintf("route sampled every %.0f m; gap ends interpolated between samples where the margin changes sign", run.step),
		fmt.Sprintf("least altitudes searched up to %.0f m MSL; a gap not closed below that shows no closing altitude", run.ceiling),
		fmt.Sprintf("solver grid %d×%d cells of %.0f m", run.res.Ground.Cols, run.res.Ground.Rows, run.res.Ground.Cell),
		"terrain: "+run.ground.Describe())
	return a
}

// gapClose formats the altitude that closes a gap.
func (run *routeRun) gapClose(g reach.RouteGap) string {
	if math.IsNaN(g.CloseAlt) {
		return fmt.Sprintf("not below %.0f m", run.ceiling)
	}
	return fmt.Sprintf("%s m (%s ft)", fmtMUp(g.CloseAlt), fmtMUp(g.CloseAlt/0.3048))
}

// writeRouteText prints the human summary.
func writeRouteText(w io.Writer, run *routeRun) {
	p := run.prof
	name := run.name
	if name == "" {
		name = "(unnamed)"
	}
	fmt.Fprintf(w, "Route %q (%s): %.1f km (%.1f nm), %d points every %.0f m\n", name, run.file, p.Length/1000, p.Length/1852, len(p.Samples), run.step)
	fmt.Fprintf(w, "Planned altitude: %s\n", run.altMode)
	fmt.Fprintf(w, "Aircraft: %s   Wind: %s\n", run.setup.Aircraft.Name, run.setup.WindText)
	fmt.Fprintf(w, "Terrain: %s\n\n", run.ground.Describe())
	fmt.Fprintf(w, "A field is in reach with the %.0f m reserve along %.1f %% of the route (%.1f of %.1f km).\n",
		run.setup.Reserve, pctDown(p.CoveredFraction), math.Floor(p.CoveredFraction*p.Length/100+1e-9)/10, p.Length/1000)
	if len(p.Gaps) == 0 {
		fmt.Fprintln(w, "No gaps: some field stays in reach everywhere along the route.")
	} else {
		fmt.Fprintf(w, "%d gap(s) with no field in reach:\n", len(p.Gaps))
		tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
		fmt.Fprintln(tw, "GAP\tFROM km\tTO km\tLENGTH km\tSTART LAT,LON\tEND LAT,LON\tCLOSED FROM\t")
		for i, g := range p.Gaps {
			fmt.Fprintf(tw, "%d\t%.1f\t%.1f\t%.1f\t%.5f,%.5f\t%.5f,%.5f\t%s\t\n", i+1, g.Start/1000, g.End/1000, g.Length()/1000,
				g.StartLat, g.StartLon, g.EndLat, g.EndLon, run.gapClose(g))
		}
		tw.Flush()
	}
	// The tightest covered point.
	worst := -1
	for i, s := range p.Samples {
		if s.Covered && (worst < 0 || s.Margin < p.Samples[worst].Margin) {
			worst = i
		}
	}
	if worst >= 0 {
		s := p.Samples[worst]
		fmt.Fprintf(w, "Smallest margin while covered: %s m at %.1f km (best field %s)\n", fmtMDown(s.Margin), s.Dist/1000, run.bestName(s.Best))
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "FIELD\tELEV m\tBEST FOR km OF ROUTE\tNOTE\t")
	for _, f := range run.fields {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t\n", f.Name, fmtM(f.Elev), bestForKm(f.BestM), f.Note)
	}
	tw.Flush()
	fmt.Fprintln(w, "BEST FOR km OF ROUTE: the length of route along which the field is the best one (reached from the lowest altitude); - where it never is.")
	// A short profile: about 12 rows.
	fmt.Fprintln(w)
	every := max(1, len(p.Samples)/12)
	tw = tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "AT km\tPLANNED m\tTERRAIN m\tLEAST m\tMARGIN m\tBEST FIELD\tCOVERED\t")
	for i, s := range p.Samples {
		if i%every != 0 && i != len(p.Samples)-1 {
			continue
		}
		c := "no"
		if s.Covered {
			c = "yes"
		}
		fmt.Fprintf(tw, "%.1f\t%.0f\t%s\t%s\t%s\t%s\t%s\t\n", s.Dist/1000, s.Alt, fmtM(s.Terrain), fmtMUp(s.Least), fmtMDown(s.Margin), run.bestName(s.Best), c)
	}
	tw.Flush()
	fmt.Fprintln(w, "\nMARGIN = planned - least altitude; the least altitude includes the reserve (0 = arrive with exactly the reserve).")
	for _, n := range run.notes {
		fmt.Fprintln(w, "NOTE:", n)
	}
	fmt.Fprintln(w, "\nAssumptions:")
	for _, a := range run.assumptions() {
		fmt.Fprintln(w, "  -", a)
	}
	fmt.Fprintln(w, "\nCAUTION:", reach.Caution)
}

func gapJSON(run *routeRun, g reach.RouteGap) map[string]any {
	return map[string]any{
		"start_m": num(g.Start), "end_m": num(g.End), "length_m": num(g.Length()),
		"start_lat": round6(g.StartLat), "start_lon": round6(g.StartLon), "end_lat": round6(g.EndLat), "end_lon": round6(g.EndLon),
		"close_msl_m": numUp(g.CloseAlt), "searched_to_msl_m": num(run.ceiling),
	}
}

func sampleJSON(run *routeRun, s reach.RouteSample) map[string]any {
	m := map[string]any{
		"distance_m": num(s.Dist), "lat": round6(s.Lat), "lon": round6(s.Lon), "planned_msl_m": num(s.Alt),
		"terrain_m": num(s.Terrain), "least_msl_m": numUp(s.Least), "margin_above_reserve_m": numDown(s.Margin), "covered": s.Covered,
	}
	if n := run.bestName(s.Best); n != "" {
		m["best_field"] = n
	} else {
		m["best_field"] = nil
	}
	return m
}

// routeJSON is the machine-readable result: top-level covered_fraction and
// gaps (DESIGN.md contract), the samples, fields and assumptions.
func routeJSON(run *routeRun) ([]byte, error) {
	p := run.prof
	gaps := make([]map[string]any, 0, len(p.Gaps))
	for _, g := range p.Gaps {
		gaps = append(gaps, gapJSON(run, g))
	}
	samples := make([]map[string]any, 0, len(p.Samples))
	for _, s := range p.Samples {
		samples = append(samples, sampleJSON(run, s))
	}
	fields := make([]map[string]any, 0, len(run.fields))
	for _, f := range run.fields {
		m := map[string]any{"name": f.Name, "lat": f.Lat, "lon": f.Lon, "elevation_m": num(f.Elev), "best_along_m": num(f.BestM)}
		if f.Note != "" {
			m["note"] = f.Note
		}
		fields = append(fields, m)
	}
	out := map[string]any{
		"caution":           reach.Caution,
		"route":             map[string]any{"file": run.file, "name": run.name, "length_m": num(p.Length), "step_m": run.step, "samples": len(p.Samples)},
		"planned_altitude":  run.altMode,
		"aircraft":          run.setup.Aircraft.Name,
		"wind":              run.setup.WindText,
		"reserve_m":         run.setup.Reserve,
		"clearance_m":       run.setup.Clearance,
		"terrain":           run.ground.Describe(),
		"searched_to_msl_m": num(run.ceiling),
		"covered_fraction":  fractionDown(p.CoveredFraction),
		"gaps":              gaps,
		"fields":            fields,
		"samples":           samples,
		"margin_note":       marginNote,
		"notes":             append([]string{}, run.notes...),
		"assumptions":       run.assumptions(),
	}
	return jsonDoc(out, "  ")
}

// routeCSV is the profile, one row per sample, with a plain header row so
// spreadsheets and GDAL read it as a table. The caution, the meaning of the
// margin and the assumptions are in the last column, "notes", one per row
// from the first row on (comment lines would be read as data by most CSV
// readers).
func routeCSV(run *routeRun) []byte {
	var b bytes.Buffer
	notes := append([]string{"CAUTION: " + reach.Caution, marginNote}, run.assumptions()...)
	notes = append(notes, run.notes...)
	w := csv.NewWriter(&b)
	w.Write([]string{"distance_m", "lat", "lon", "planned_msl_m", "terrain_m", "least_msl_m", "margin_above_reserve_m", "best_field", "covered", "notes"})
	f := func(v float64) string {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return ""
		}
		return strconv.FormatFloat(math.Round(v*10)/10, 'f', -1, 64)
	}
	// Required altitudes up, margins down (see numUp).
	fRound := func(v float64, r func(float64) any) string {
		x, ok := r(v).(float64)
		if !ok {
			return ""
		}
		return strconv.FormatFloat(x, 'f', -1, 64)
	}
	for i, s := range run.prof.Samples {
		note := ""
		if i < len(notes) {
			note = notes[i]
		}
		w.Write([]string{f(s.Dist), strconv.FormatFloat(round6(s.Lat), 'f', -1, 64), strconv.FormatFloat(round6(s.Lon), 'f', -1, 64),
			f(s.Alt), f(s.Terrain), fRound(s.Least, numUp), fRound(s.Margin, numDown), run.bestName(s.Best), strconv.FormatBool(s.Covered), note})
	}
	// A route shorter than its notes: the rest on rows of their own.
	for i := len(run.prof.Samples); i < len(notes); i++ {
		w.Write([]string{"", "", "", "", "", "", "", "", "", notes[i]})
	}
	w.Flush()
	return b.Bytes()
}

// routePiece is a stretch of the route that is covered or not throughout.
type routePiece struct {
	covered    bool
	start, end float64 // m along the route
	line       orb.LineString
	minMargin  float64
}

// routePieces splits the route at the gap ends into covered and uncovered
// pieces.
func routePieces(p *reach.RouteProfile) []routePiece {
	var out []routePiece
	s := p.Samples
	pos := func(d float64) orb.Point {
		for i := 1; i < len(s); i++ {
			if s[i].Dist >= d {
				t := 0.0
				if s[i].Dist > s[i-1].Dist {
					t = (d - s[i-1].Dist) / (s[i].Dist - s[i-1].Dist)
				}
				return orb.Point{round6(s[i-1].Lon + (s[i].Lon-s[i-1].Lon)*t), round6(s[i-1].Lat + (s[i].Lat-s[i-1].Lat)*t)}
			}
		}
		return orb.Point{round6(s[len(s)-1].Lon), round6(s[len(s)-1].Lat)}
	}
	piece := func(covered bool, a, b float64) {
		if b <= a && len(s) > 1 {
			return
		}
		pc := routePiece{covered: covered, start: a, end: b, minMargin: math.Inf(1)}
		pc.line = append(pc.line, pos(a))
		for _, x := range s {
			if x.Dist > a && x.Dist < b {
				pc.line = append(pc.line, orb.Point{round6(x.Lon), round6(x.Lat)})
			}
			if x.Dist >= a && x.Dist <= b && !math.IsNaN(x.Margin) {
				pc.minMargin = math.Min(pc.minMargin, x.Margin)
			}
		}
		pc.line = append(pc.line, pos(b))
		out = append(out, pc)
	}
	at := s[0].Dist
	for _, g := range p.Gaps {
		piece(true, at, g.Start)
		piece(false, g.Start, g.End)
		at = g.End
	}
	piece(true, at, s[len(s)-1].Dist)
	return out
}

// routeGeoJSON is the RFC 7946 FeatureCollection: the route split into
// covered and uncovered pieces, the gaps, the fields and the route start
// carrying the caution and the summary.
func routeGeoJSON(run *routeRun) ([]byte, error) {
	p := run.prof
	fc := geojson.NewFeatureCollection()
	fc.ExtraMembers = geojson.Properties{"caution": reach.Caution}
	st := geojson.NewFeature(orb.Point{round6(p.Samples[0].Lon), round6(p.Samples[0].Lat)})
	st.Properties = map[string]any{
		"kind": "route_start", "caution": reach.Caution, "name": run.name, "covered_fraction": fractionDown(p.CoveredFraction),
		"length_m": num(p.Length), "gaps": len(p.Gaps), "aircraft": run.setup.Aircraft.Name, "wind": run.setup.WindText,
		"reserve_m": run.setup.Reserve, "clearance_m": run.setup.Clearance, "terrain": run.ground.Describe(),
		"planned_altitude": run.altMode, "margin_note": marginNote, "assumptions": run.assumptions(), "planning_only": true,
	}
	fc.Append(st)
	for _, pc := range routePieces(p) {
		f := geojson.NewFeature(pc.line)
		f.Properties = map[string]any{"kind": "route_piece", "covered": pc.covered, "start_m": num(pc.start), "end_m": num(pc.end),
			"length_m": num(pc.end - pc.start), "min_margin_above_reserve_m": numDown(pc.minMargin)}
		fc.Append(f)
	}
	for i, g := range p.Gaps {
		var line orb.LineString
		line = append(line, orb.Point{round6(g.StartLon), round6(g.StartLat)})
		for _, s := range p.Samples[g.First : g.Last+1] {
			if s.Dist > g.Start && s.Dist < g.End {
				line = append(line, orb.Point{round6(s.Lon), round6(s.Lat)})
			}
		}
		line = append(line, orb.Point{round6(g.EndLon), round6(g.EndLat)})
		if len(line) < 2 || g.Length() == 0 {
			line = append(line[:1], line[0])
		}
		f := geojson.NewFeature(line)
		f.Properties = gapJSON(run, g)
		f.Properties["kind"] = "gap"
		f.Properties["gap"] = i + 1
		fc.Append(f)
	}
	for _, fl := range run.fields {
		f := geojson.NewFeature(orb.Point{round6(fl.Lon), round6(fl.Lat)})
		f.Properties = map[string]any{"kind": "field", "name": fl.Name, "elevation_m": num(fl.Elev), "best_along_m": num(fl.BestM)}
		if fl.Note != "" {
			f.Properties["note"] = fl.Note
		}
		fc.Append(f)
	}
	return jsonDoc(fc, " ")
}

// routeScene builds the map of a route run.
func routeScene(run *routeRun) *render.Scene {
	p := run.prof
	s := &render.Scene{
		Title:      fmt.Sprintf("Landing options along %s - %s", orDefault(run.name, "the route"), run.setup.Aircraft.Name),
		Terrain:    displayTerrain(run.res.Ground, run.ground),
		DataSource: "terrain: " + run.ground.Describe(),
		Caution:    reach.Caution,
		FieldsFrom: "from the route (planned altitude)",
	}
	s.WindLayers, s.WindSource = windMarks(run.setup)
	for _, pc := range routePieces(p) {
		s.Route = append(s.Route, render.RoutePiece{Line: pc.line, Covered: pc.covered})
	}
	for _, g := range p.Gaps {
		line := orb.LineString{{g.StartLon, g.StartLat}}
		for _, x := range p.Samples[g.First : g.Last+1] {
			line = append(line, orb.Point{x.Lon, x.Lat})
		}
		line = append(line, orb.Point{g.EndLon, g.EndLat})
		s.Gaps = append(s.Gaps, render.Gap{Line: line})
	}
	for _, f := range run.fields {
		s.Fields = append(s.Fields, render.FieldMark{Name: f.Name, Point: orb.Point{f.Lon, f.Lat}, Reachable: f.BestM > 0, ArrivalAGL: math.NaN()})
	}
	s.Bounds = routeBounds(run)
	s.Inputs = []string{
		"Aircraft: " + run.setup.Aircraft.Name,
		"Planned: " + shortAltMode(run),
		"Wind: " + run.setup.WindText,
		fmt.Sprintf("Reserve: %.0f m, clearance %.0f m", run.setup.Reserve, run.setup.Clearance),
		fmt.Sprintf("Covered: %.1f %% of %.1f km", pctDown(p.CoveredFraction), p.Length/1000),
	}
	return s
}

// routeBounds is the route's and fields' box with some room, so the map
// is not mostly empty window.
func routeBounds(run *routeRun) orb.Bound {
	b := orb.Bound{Min: orb.Point{math.Inf(1), math.Inf(1)}, Max: orb.Point{math.Inf(-1), math.Inf(-1)}}
	for _, s := range run.prof.Samples {
		b = b.Extend(orb.Point{s.Lon, s.Lat})
	}
	for _, f := range run.fields {
		if f.Target >= 0 {
			b = b.Extend(orb.Point{f.Lon, f.Lat})
		}
	}
	return b.Pad(math.Max(b.Max[0]-b.Min[0], b.Max[1]-b.Min[1]) * 0.08)
}

func orDefault(s, def string) string {
	if s == "" {
		return def
	}
	return s
}

func shortAltMode(run *routeRun) string {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, s := range run.prof.Samples {
		lo, hi = math.Min(lo, s.Alt), math.Max(hi, s.Alt)
	}
	if hi-lo < 0.5 {
		return fmt.Sprintf("%.0f m MSL", lo)
	}
	return fmt.Sprintf("%.0f-%.0f m MSL", lo, hi)
}

// drawRoute writes the map and/or the report of a route run.
func drawRoute(run *routeRun, mapPath, reportPath string) error {
	scene := routeScene(run)
	pngData, err := drawMap(scene, mapPath)
	if err != nil {
		return err
	}
	if reportPath == "" {
		return nil
	}
	p := run.prof
	rep := &render.Report{
		Title:    scene.Title,
		Subtitle: fmt.Sprintf("%s - %.1f km, planned %s - %s", run.file, p.Length/1000, shortAltMode(run), run.ground.Describe()),
		Scene:    scene,
		Caution:  reach.Caution,
		Summary: []string{
			fmt.Sprintf("A field is in reach with the %.0f m reserve along %.1f %% of the route.", run.setup.Reserve, pctDown(p.CoveredFraction)),
			fmt.Sprintf("%d gap(s) with no field in reach.", len(p.Gaps)),
			"Margin = planned - least altitude; the least altitude includes the reserve.",
		},
	}
	rep.Summary = append(rep.Summary, run.notes...)
	prof := &render.Profile{Title: "Planned and least altitude along the route"}
	var dist, terr, plan, least []float64
	for _, s := range p.Samples {
		dist = append(dist, s.Dist)
		terr = append(terr, s.Terrain)
		plan = append(plan, s.Alt)
		least = append(least, s.Least)
	}
	prof.Series = []render.Series{
		{Name: "terrain", Kind: render.SeriesTerrain, DistM: dist, AltMSL: terr},
		{Name: "planned altitude", Kind: render.SeriesGlide, DistM: dist, AltMSL: plan},
		{Name: "least altitude keeping a field in reach", Kind: render.SeriesLeast, DistM: dist, AltMSL: least},
	}
	for i, g := range p.Gaps {
		prof.Marks = append(prof.Marks, render.ProfileMark{DistM: (g.Start + g.End) / 2, AltMSL: p.Samples[(g.First+g.Last)/2].Alt, Label: fmt.Sprintf("gap %d", i+1)})
		prof.Bands = append(prof.Bands, render.ProfileBand{FromM: g.Start, ToM: g.End, Label: "gap: no field in reach"})
	}
	rep.Profile = prof
	gt := render.Table{Title: "Gaps", Header: []string{"Gap", "From (km)", "To (km)", "Length (km)", "Start", "End", "Closed from"}}
	for i, g := range p.Gaps {
		gt.Rows = append(gt.Rows, []string{strconv.Itoa(i + 1), fmt.Sprintf("%.1f", g.Start/1000), fmt.Sprintf("%.1f", g.End/1000), fmt.Sprintf("%.1f", g.Length()/1000),
			fmt.Sprintf("%.5f, %.5f", g.StartLat, g.StartLon), fmt.Sprintf("%.5f, %.5f", g.EndLat, g.EndLon), run.gapClose(g)})
	}
	if len(gt.Rows) == 0 {
		gt.Note = "No gaps."
	}
	ft := render.Table{Title: "Landing fields", Header: []string{"Field", "Elevation (m)", "Best field for (km of route)", "Note"}}
	for _, f := range run.fields {
		ft.Rows = append(ft.Rows, []string{f.Name, fmtM(f.Elev), bestForKm(f.BestM), f.Note})
	}
	rep.Tables = append(rep.Tables, gt, ft, render.Table{Title: "Assumptions", Header: []string{"Input"}, Rows: rowsOf(run.assumptions())})
	rep.MapPNG = pngData
	return writeFileAtomic(reportPath, func(f *os.File) error { return render.WriteReport(f, rep) })
}

// bestForKm prints the length of route (m) along which a field is the best
// one, in km, or "-" when it never is: "0.0" read as "best at km 0".
func bestForKm(m float64) string {
	if !(m > 0) {
		return "-"
	}
	return fmt.Sprintf("%.1f", m/1000)
}
