package main

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"text/tabwriter"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"glidereach/cmd/glidereach/input"
	"glidereach/cmd/glidereach/render"
	"glidereach/reach"
	"glidereach/reach/plan"
	"glidereach/terrain"
)

// num turns NaN and infinities into JSON null and rounds to a sensible
// precision (0.1 m is far below what the inputs support).
func num(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return math.Round(v*10) / 10
}

func fieldProps(f fieldResult) map[string]any {
	p := map[string]any{
		"kind":                   "field",
		"name":                   f.Name,
		"reachable":              f.Reachable,
		"arrival_agl_m":          numDown(f.ArrivalAGLM),
		"required_msl_m":         numUp(f.RequiredMSL),
		"margin_above_reserve_m": numDown(f.MarginM),
		"distance_m":             num(f.DistanceM),
		"bearing_deg":            num(f.BearingDeg),
		"elevation_m":            num(f.ElevationM),
	}
	if f.LengthM > 0 {
		p["length_m"] = num(f.LengthM)
	}
	if f.Surface != "" {
		p["surface"] = f.Surface
	}
	if f.Note != "" {
		p["note"] = f.Note
	}
	return p
}

// levelGeometry returns a Polygon for one polygon, else a MultiPolygon (empty
// when nothing is reachable at that level).
func levelGeometry(mp orb.MultiPolygon) orb.Geometry {
	if len(mp) == 1 {
		return mp[0]
	}
	if mp == nil {
		return orb.MultiPolygon{}
	}
	return mp
}

// reachGeoJSON writes the RFC 7946 FeatureCollection of a reach run: one
// feature per level, the start (with the caution), one per field.
func reachGeoJSON(run *reachRun) ([]byte, error) {
	fc := geojson.NewFeatureCollection()
	for _, lv := range run.levels {
		f := geojson.NewFeature(levelGeometry(lv.Polygons))
		f.Properties["kind"] = "footprint"
		f.Properties["arrival_agl_m"] = lv.ArrivalAGL
		f.Properties["area_m2"] = math.Round(lv.Area)
		below, meaning := levelMeaning(lv.ArrivalAGL, run.setup.Reserve)
		f.Properties["is_reserve"] = lv.ArrivalAGL == run.setup.Reserve
		f.Properties["below_reserve"] = below
		f.Properties["meaning"] = meaning
		fc.Append(f)
	}
	st := geojson.NewFeature(orb.Point{round6(run.startLon), round6(run.startLat)})
	st.Properties = startProps(run)
	fc.Append(st)
	for _, f := range run.fields {
		ff := geojson.NewFeature(orb.Point{round6(f.Lon), round6(f.Lat)})
		ff.Properties = fieldProps(f)
		fc.Append(ff)
	}
	return jsonDoc(fc, " ")
}

func round6(v float64) float64 { return math.Round(v*1e6) / 1e6 }

// levelMeaning says what a footprint level at arrival height a (m AGL)
// means against the reserve: below the reserve it is a warning, never a
// landing option.
func levelMeaning(a, reserve float64) (below bool, meaning string) {
	switch {
	case a < reserve:
		return true, fmt.Sprintf("BELOW THE RESERVE: ground reached with at least %.0f m but less than the %.0f m reserve above it - not a safe landing margin", a, reserve)
	case a == reserve:
		return false, fmt.Sprintf("the reserve ring: ground reached with at least the %.0f m reserve above it", reserve)
	}
	return false, fmt.Sprintf("ground reached with at least %.0f m above it, more than the %.0f m reserve", a, reserve)
}

func startProps(run *reachRun) map[string]any {
	return map[string]any{
		"kind":                 "start",
		"caution":              reach.Caution,
		"alt_msl_m":            num(run.startAlt),
		"ground_m":             num(run.startElev),
		"agl_m":                num(run.startAlt - run.startElev),
		"aircraft":             run.setup.Aircraft.Name,
		"wind":                 run.setup.WindText,
		"reserve_m":            run.setup.Reserve,
		"clearance_m":          run.setup.Clearance,
		"terrain":              run.ground.Describe(),
		"farthest_m":           num(run.farthest),
		"farthest_bearing_deg": num(run.farBearing),
		"farthest_lat":         farCoord(run, 1),
		"farthest_lon":         farCoord(run, 0),
		"farthest_is":          farthestIs,
		"cut_by_terrain_edge":  run.edge != nil,
		"terrain_edge_note":    edgeNote(run.edge),
		"assumptions":          run.setup.assumptions(),
		"cell_size_m":          num(run.res.Ground.Cell),
		"planning_only":        true,
		"mac_cready_m_s":       run.setup.Cond.MacCready,
	}
}

// reachJSON is the machine-readable summary.
func reachJSON(run *reachRun) ([]byte, error) {
	type level struct {
		ArrivalAGL   float64 `json:"arrival_agl_m"`
		Area         float64 `json:"area_m2"`
		Polygons     int     `json:"polygons"`
		IsReserve    bool    `json:"is_reserve"`
		BelowReserve bool    `json:"below_reserve"`
		Meaning      string  `json:"meaning"`
	}
	var lv []level
	for _, l := range run.levels {
		below, meaning := levelMeaning(l.ArrivalAGL, run.setup.Reserve)
		lv = append(lv, level{l.ArrivalAGL, math.Round(l.Area), len(l.Polygons), l.ArrivalAGL == run.setup.Reserve, below, meaning})
	}
	fields := make([]map[string]any, 0, len(run.fields))
	for _, f := range run.fields {
		p := fieldProps(f)
		delete(p, "kind")
		p["lat"], p["lon"] = f.Lat, f.Lon
		fields = append(fields, p)
	}
	out := map[string]any{
		"caution": reach.Caution,
		"start": map[string]any{"lat": run.startLat, "lon": run.startLon, "alt_msl_m": num(run.startAlt),
			"ground_m": num(run.startElev), "agl_m": num(run.startAlt - run.startElev)},
		"aircraft":             run.setup.Aircraft.Name,
		"wind":                 run.setup.WindText,
		"reserve_m":            run.setup.Reserve,
		"clearance_m":          run.setup.Clearance,
		"terrain":              run.ground.Describe(),
		"levels":               lv,
		"farthest_m":           num(run.farthest),
		"farthest_bearing_deg": num(run.farBearing),
		"farthest_lat":         farCoord(run, 1),
		"farthest_lon":         farCoord(run, 0),
		"farthest_is":          farthestIs,
		"cut_by_terrain_edge":  run.edge != nil,
		"terrain_edge_note":    edgeNote(run.edge),
		"fields":               fields,
		"assumptions":          run.setup.assumptions(),
	}
	return jsonDoc(out, "  ")
}

// farthestIs says which point the farthest figures are.
const farthestIs = "the reserve ring's vertex farthest from the start"

// farCoord returns coordinate i (0 lon, 1 lat) of the farthest point, NaN
// (null) when nothing is reached.
func farCoord(run *reachRun, i int) any {
	if !(run.farthest > 0) {
		return num(math.NaN())
	}
	return run.farPoint[i]
}

func fmtM(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "-"
	}
	return fmt.Sprintf("%.0f", v)
}

// writeReachText prints the human summary.
func writeReachText(w io.Writer, run *reachRun) {
	fmt.Fprintf(w, "Reach from %.5f, %.5f at %.0f m MSL (%.0f m above the ground, %.0f ft)\n",
		run.startLat, run.startLon, run.startAlt, run.startAlt-run.startElev, run.startAlt/0.3048)
	fmt.Fprintf(w, "Aircraft: %s   Wind: %s\n", run.setup.Aircraft.Name, run.setup.WindText)
	fmt.Fprintf(w, "Terrain: %s\n\n", run.ground.Describe())
	for _, lv := range run.levels {
		tag := ""
		switch {
		case lv.ArrivalAGL == run.setup.Reserve:
			tag = " (reserve)"
		case lv.ArrivalAGL < run.setup.Reserve:
			tag = " (BELOW THE RESERVE: not a safe landing margin)"
		}
		fmt.Fprintf(w, "Arrive with >= %4.0f m above ground%s: %8.1f km², %d area(s)\n", lv.ArrivalAGL, tag, lv.Area/1e6, len(lv.Polygons))
	}
	if run.farthest > 0 {
		fmt.Fprintf(w, "Farthest reach with the reserve: %.1f km (%.1f nm) toward %03.0f° (%s, at %.5f, %.5f)\n", run.farthest/1000, run.farthest/1852, run.farBearing, farthestIs, run.farPoint[1], run.farPoint[0])
	} else {
		fmt.Fprintln(w, "No ground is reachable with the reserve from here.")
	}
	if run.edge != nil {
		fmt.Fprintln(w, "NOTE: "+edgeText(run.edge))
	}
	if len(run.fields) > 0 {
		fmt.Fprintln(w)
		tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
		fmt.Fprintln(tw, "FIELD\tREACH\tARRIVE AGL m\tMARGIN m\tNEEDS MSL m\tDIST km\tBRG°\tELEV m\t")
		for _, f := range run.fields {
			r := "no"
			if f.Reachable {
				r = "yes"
			}
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%.1f\t%03.0f\t%.0f\t%s\n", f.Name, r, fmtMDown(f.ArrivalAGLM), fmtMDown(f.MarginM), fmtMUp(f.RequiredMSL), f.DistanceM/1000, f.BearingDeg, f.ElevationM, f.Note)
		}
		tw.Flush()
	}
	fmt.Fprintln(w, "\nAssumptions:")
	for _, a := range run.setup.assumptions() {
		fmt.Fprintln(w, "  -", a)
	}
	fmt.Fprintf(w, "  - solver grid %d×%d cells of %.0f m\n", run.res.Ground.Cols, run.res.Ground.Rows, run.res.Ground.Cell)
	fmt.Fprintln(w, "\nCAUTION:", reach.Caution)
}

// arrivalAGL returns the arrival height above ground per cell (NaN where
// none or below the ground).
func arrivalAGL(res *reach.FootprintResult) []float32 {
	g := res.Ground
	out := make([]float32, len(res.Arrival))
	for i, a := range res.Arrival {
		v := a - g.Elev[i]
		if a != a || v < 0 {
			v = float32(math.NaN())
		}
		out[i] = v
	}
	return out
}

// writeArrivalRaster writes the arrival height above ground on the DEM's
// lattice (its CRS), or on a lon/lat lattice for flat ground.
func writeArrivalRaster(path string, run *reachRun) error {
	vals := arrivalAGL(run.res)
	var g *terrain.Grid
	if run.grid != nil {
		g = terrain.OntoGrid(run.res.Ground, vals, run.grid)
	} else {
		g = terrain.LatLonGrid(run.res.Ground, vals)
	}
	return writeRaster(path, g, "arrival height above ground (m); NaN where no glide arrives")
}

// writeRaster writes g as GeoTIFF or ESRI ASCII grid by the path's
// extension. A GeoTIFF carries what the values are and the caution in its
// ImageDescription. An ASCII grid has no place for text, so it gets two
// sidecars: NAME.prj with its CRS (without it the tool's own readers, and
// GDAL, do not know where the grid lies) and NAME.asc.aux.xml, GDAL's
// auxiliary metadata file (a PAMDataset), whose dataset metadata and band
// description GIS programs show: what the values are, their unit, and the
// caution. The sidecars are written first and removed again if the grid
// cannot be written, so a failure leaves nothing half-done.
func writeRaster(path string, g *terrain.Grid, what string) error {
	ext := strings.ToLower(filepath.Ext(path))
	if ext != ".asc" {
		return writeFileAtomic(path, func(f *os.File) error {
			return terrain.GeoTIFFWriter{Description: "glidereach: " + what + ". " + reach.Caution}.Write(f, g)
		})
	}
	prj, err := terrain.PRJ(g.CRS)
	if err != nil {
		return err
	}
	if st, err := os.Stat(path); err == nil && !st.Mode().IsRegular() {
		// A device or pipe (--raster /dev/stdout): no sidecars beside it.
		return writeFileAtomic(path, func(f *os.File) error { return terrain.WriteASC(f, g) })
	}
	prjPath, auxPath := ascSidecarNames(path)
	if err := writeFileAtomic(prjPath, func(f *os.File) error { _, err := f.WriteString(prj + "\n"); return err }); err != nil {
		return err
	}
	if err := writeFileAtomic(auxPath, func(f *os.File) error { _, err := f.WriteString(pamMetadata(what)); return err }); err != nil {
		os.Remove(prjPath)
		return err
	}
	if err := writeFileAtomic(path, func(f *os.File) error { return terrain.WriteASC(f, g) }); err != nil {
		os.Remove(prjPath)
		os.Remove(auxPath)
		return err
	}
	return nil
}

// ascSidecarNames are the files writeRaster writes beside an .asc grid:
// its CRS (NAME.prj, the grid's name without .asc) and GDAL's metadata
// (NAME.asc.aux.xml).
func ascSidecarNames(grid string) (prj, aux string) {
	return strings.TrimSuffix(grid, filepath.Ext(grid)) + ".prj", grid + ".aux.xml"
}

// pamMetadata is the GDAL auxiliary metadata (.aux.xml, a PAMDataset) of a
// raster the tool writes: the value's meaning as the band description and
// as dataset metadata, the unit (m), the no-data value WriteASC uses, and
// the caution.
func pamMetadata(what string) string {
	esc := func(s string) string {
		var b strings.Builder
		xml.EscapeText(&b, []byte(s))
		return b.String()
	}
	return "<PAMDataset>\n  <Metadata>\n" +
		"    <MDI key=\"DESCRIPTION\">glidereach: " + esc(what) + "</MDI>\n" +
		"    <MDI key=\"CAUTION\">" + esc(reach.Caution) + "</MDI>\n" +
		"  </Metadata>\n  <PAMRasterBand band=\"1\">\n" +
		"    <Description>" + esc(what) + "</Description>\n" +
		"    <NoDataValue>-9999</NoDataValue>\n" +
		"    <UnitType>m</UnitType>\n" +
		"  </PAMRasterBand>\n</PAMDataset>\n"
}

// reachScene builds the map scene of a reach run.
func reachScene(run *reachRun) *render.Scene {
	s := &render.Scene{
		Title:      fmt.Sprintf("Glide reach from %.0f m MSL - %s", run.startAlt, run.setup.Aircraft.Name),
		Terrain:    displayTerrain(run.res.Ground, run.ground),
		DataSource: "terrain: " + run.ground.Describe(),
		Caution:    reach.Caution,
		FieldsFrom: "from the start",
	}
	s.WindLayers, s.WindSource = windMarks(run.setup)
	if run.edge != nil {
		s.Warnings = append(s.Warnings, "Footprint cut off by the edge of the terrain data ("+edgeWhere(run.edge)+"): reach beyond not computed")
	}
	for _, lv := range run.levels {
		s.Levels = append(s.Levels, render.Level{ArrivalAGL: lv.ArrivalAGL, Polygons: lv.Polygons,
			IsReserve: lv.ArrivalAGL == run.setup.Reserve, BelowReserve: lv.ArrivalAGL < run.setup.Reserve})
	}
	s.Bounds = mapBounds(run.res.Ground, run.ground)
	m := render.NewMarker(orb.Point{run.startLon, run.startLat}, "Start")
	m.AltMSL = run.startAlt
	m.HeadingDeg = run.heading
	s.Start = m
	for _, f := range run.fields {
		fm := render.FieldMark{Name: f.Name, Point: orb.Point{f.Lon, f.Lat}, Reachable: f.Reachable, ArrivalAGL: f.ArrivalAGLM}
		if !f.Reachable && f.ArrivalAGLM >= 0 { // reached, but not with the reserve
			fm.Note = fmt.Sprintf("below the %.0f m reserve", run.setup.Reserve)
		}
		s.Fields = append(s.Fields, fm)
	}
	s.Inputs = []string{
		"Aircraft: " + run.setup.Aircraft.Name,
		fmt.Sprintf("Start: %.0f m MSL (%.0f m AGL)", run.startAlt, run.startAlt-run.startElev),
		"Wind: " + run.setup.WindText,
		fmt.Sprintf("Reserve: %.0f m, clearance %.0f m", run.setup.Reserve, run.setup.Clearance),
	}
	if run.fail != nil {
		sp := "at the speed to fly"
		if run.fail.IAS > 0 {
			sp = fmt.Sprintf("at %.0f kt IAS", run.fail.IAS/input.Knot)
		}
		s.Inputs = append(s.Inputs, fmt.Sprintf("Engine failure on heading %03.0f° %s: reach after the reaction, speed change and turn", run.fail.HeadingDeg, sp))
	}
	return s
}

// drawReach writes the map and/or the report of a reach run.
func drawReach(run *reachRun, mapPath, reportPath string) error {
	scene := reachScene(run)
	pngData, err := drawMap(scene, mapPath)
	if err != nil {
		return err
	}
	if reportPath != "" {
		rep := &render.Report{
			Title:    scene.Title,
			Subtitle: fmt.Sprintf("Start %.5f, %.5f - %s", run.startLat, run.startLon, run.ground.Describe()),
			Scene:    scene,
			MapPNG:   pngData,
			Caution:  reach.Caution,
		}
		for _, lv := range run.levels {
			_, meaning := levelMeaning(lv.ArrivalAGL, run.setup.Reserve)
			rep.Summary = append(rep.Summary, fmt.Sprintf("%.0f m level, %.1f km²: %s", lv.ArrivalAGL, lv.Area/1e6, meaning))
		}
		if run.farthest > 0 {
			rep.Summary = append(rep.Summary, fmt.Sprintf("Farthest reach with the reserve: %.1f km (%.1f nm) toward %03.0f°", run.farthest/1000, run.farthest/1852, run.farBearing))
		}
		if len(run.fields) > 0 {
			t := render.Table{Title: "Landing fields", Header: []string{"Field", "Reachable", "Arrival AGL (m)", "Margin (m)", "Needs MSL (m)", "Distance (km)", "Bearing (°)"}}
			for _, f := range run.fields {
				r := "no"
				if f.Reachable {
					r = "yes"
				}
				t.Rows = append(t.Rows, []string{f.Name, r, fmtMDown(f.ArrivalAGLM), fmtMDown(f.MarginM), fmtMUp(f.RequiredMSL), fmt.Sprintf("%.1f", f.DistanceM/1000), fmt.Sprintf("%03.0f", f.BearingDeg)})
			}
			rep.Tables = append(rep.Tables, t)
		}
		rep.Tables = append(rep.Tables, render.Table{Title: "Assumptions", Header: []string{"Input"}, Rows: rowsOf(run.setup.assumptions())})
		if err := writeFileAtomic(reportPath, func(f *os.File) error { return render.WriteReport(f, rep) }); err != nil {
			return err
		}
	}
	return nil
}

func rowsOf(lines []string) [][]string {
	out := make([][]string, len(lines))
	for i, l := range lines {
		out[i] = []string{l}
	}
	return out
}

// mapBounds is the part of the window that has terrain data: the map need
// not show the empty margin beyond a DEM's edge. Empty (the whole window)
// on flat ground.
func mapBounds(l *terrain.Local, gr plan.Ground) orb.Bound {
	if gr.Src == nil {
		return orb.Bound{}
	}
	w, s, e, n := terrain.LocalExtent(l.Frame, l.X0, l.Y0, l.Cell, l.Cols, l.Rows)
	dw, ds, de, dn := gr.Src.Extent()
	b := orb.Bound{Min: orb.Point{math.Max(w, dw), math.Max(s, ds)}, Max: orb.Point{math.Min(e, de), math.Min(n, dn)}}
	if b.Min[0] >= b.Max[0] || b.Min[1] >= b.Max[1] {
		return orb.Bound{}
	}
	return b
}

// renderPNGBytes draws a scene as PNG into memory, so that a map file and a
// report can share one drawing.
func renderPNGBytes(scene *render.Scene) ([]byte, error) {
	var buf bytes.Buffer
	if err := render.RenderPNG(&buf, scene, 0); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// drawMap draws scene once and writes it to mapPath when that is not
// empty; the report embeds the same PNG.
func drawMap(scene *render.Scene, mapPath string) ([]byte, error) {
	data, err := renderPNGBytes(scene)
	if err != nil {
		return nil, err
	}
	if mapPath != "" {
		if err := writeBytesAtomic(mapPath, data); err != nil {
			return nil, err
		}
	}
	return data, nil
}

// edgeNote is the JSON value of terrain_edge_note: the warning, or null.
func edgeNote(e *edgeCut) any {
	if e == nil {
		return nil
	}
	return edgeText(e)
}
