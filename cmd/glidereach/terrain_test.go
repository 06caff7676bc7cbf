package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"glidereach/cmd/glidereach/input"
)

func runTerrain(t *testing.T, args ...string) (string, error) {
	t.Helper()
	root := newRootCmd()
	var out, errOut bytes.Buffer
	root.SetOut(&out)
	root.SetErr(&errOut)
	root.SetArgs(append([]string{"terrain"}, args...))
	err := root.Execute()
	return out.String(), err
}

// writeTile writes an SRTM3 tile N34W119 that is zero except for the
// sample at 34.25N 118.75W: row 900, column 300, byte offset 2,162,400,
// bytes 0x04 0xD3 = 1235 m (index check in REFERENCES 6a, from the SRTM
// documentation's layout), and a void (0x8000, JPL SRTM FAQ) at row 0,
// column 0.
func writeTile(t *testing.T, dir string) string {
	buf := make([]byte, 2*1201*1201)
	buf[2162400], buf[2162401] = 0x04, 0xD3
	buf[0], buf[1] = 0x80, 0x00
	p := filepath.Join(dir, "N34W119.hgt")
	if err := os.WriteFile(p, buf, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestTerrainCommandText(t *testing.T) {
	out, err := runTerrain(t, filepath.Join("..", "..", "testdata", "asc", "geo_corner.asc"))
	if err != nil {
		t.Fatal(err)
	}
	// Values from the hand-written fixture testdata/asc/geo_corner.asc.
	for _, want := range []string{"ESRI ASCII grid", "4 × 3 cells", "EPSG:4326", "-24.500000..-23.500000 E", "100.0 m to 330.0 m MSL", "voids:       1 cells", "obstacles", "NOT FOR NAVIGATION"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestTerrainCommandAtJSON(t *testing.T) {
	p := writeTile(t, t.TempDir())
	out, err := runTerrain(t, p, "--at", "34.25,-118.75", "--format", "json")
	if err != nil {
		t.Fatal(err)
	}
	var rep map[string]any
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if rep["elevation_m"] != 1235.0 {
		t.Errorf("elevation_m = %v, want 1235", rep["elevation_m"])
	}
	if rep["cols"] != 1201.0 || rep["crs"] != "EPSG:4326" || rep["voids"] != 1.0 || rep["caution"] == "" {
		t.Errorf("report %v", rep)
	}
	// Halfway to the next sample east (0 m): bilinear gives 617.5 (common
	// practice, no source).
	out, err = runTerrain(t, p, "--at", "34.25,-118.7495833333333333", "--format", "json")
	if err != nil {
		t.Fatal(err)
	}
	json.Unmarshal([]byte(out), &rep)
	if v, _ := rep["elevation_m"].(float64); v < 617.4 || v > 617.6 {
		t.Errorf("midway elevation_m = %v, want 617.5", rep["elevation_m"])
	}
	// --voids fill fills the single void and says so.
	out, err = runTerrain(t, p, "--voids", "fill", "--format", "json")
	if err != nil {
		t.Fatal(err)
	}
	json.Unmarshal([]byte(out), &rep)
	if rep["voids_filled"] != 1.0 || rep["voids"] != 0.0 {
		t.Errorf("fill: voids_filled %v voids %v", rep["voids_filled"], rep["voids"])
	}
}

func TestTerrainCommandBadInput(t *testing.T) {
	dir := t.TempDir()
	trunc := filepath.Join(dir, "N34W119.hgt")
	os.WriteFile(trunc, make([]byte, 2*1201*1201-2), 0o644)
	ascTrunc := filepath.Join("..", "..", "testdata", "asc", "truncated.asc")
	noPrj := filepath.Join("..", "..", "testdata", "asc", "noprj.asc")
	geo := filepath.Join("..", "..", "testdata", "asc", "geo_corner.asc")
	// A GDAL fixture cut short, and one with bytes 20000..20099 (inside the
	// deflate stream of its tile 5) flipped.
	tif, err := os.ReadFile(filepath.Join("..", "..", "testdata", "geotiff", "geo_float32_tiled_deflate_pred3.tif"))
	if err != nil {
		t.Fatal(err)
	}
	tifCut := filepath.Join(dir, "cut.tif")
	os.WriteFile(tifCut, tif[:len(tif)/2], 0o644)
	bad := bytes.Clone(tif)
	for i := 20000; i < 20100; i++ {
		bad[i] ^= 0x5a
	}
	tifBad := filepath.Join(dir, "corrupt.tif")
	os.WriteFile(tifBad, bad, 0o644)
	cases := []struct {
		args  []string
		where string
		msg   string
	}{
		{[]string{trunc}, trunc, "truncated"},
		{[]string{tifCut}, tifCut, "past the end of the file"},
		{[]string{tifBad}, tifBad, "invalid file: tile"},
		{[]string{ascTrunc, "--crs", "EPSG:4326"}, ascTrunc, "line 7"},
		{[]string{noPrj}, noPrj, "--crs"},
		{[]string{noPrj, "--crs", "EPSG:3857"}, "--crs", "not a supported CRS"},
		{[]string{noPrj, "--crs", "wgs84"}, "--crs", "not an EPSG code"},
		{[]string{geo, "--format", "xml"}, "--format", "want text or json"},
		{[]string{geo, "--voids", "ignore"}, "--voids", "obstacle or fill"},
		{[]string{geo, "--at", "10,10"}, "--at", "outside"},
		{[]string{filepath.Join(dir, "nothing.hgt")}, filepath.Join(dir, "nothing.hgt"), "no such file"},
	}
	for _, c := range cases {
		_, err := runTerrain(t, c.args...)
		var ue *input.UsageError
		if !errors.As(err, &ue) || ue.Where != c.where || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("%v: got %v (where %q), want usage error at %q containing %q", c.args, err, func() string {
				if ue != nil {
					return ue.Where
				}
				return ""
			}(), c.where, c.msg)
			continue
		}
		if code := exitCode(err); code != 2 {
			t.Errorf("%v: exit %d", c.args, code)
		}
	}
	if _, err := runTerrain(t); err == nil || exitCode(err) != 2 {
		t.Errorf("no file: %v", err)
	}
}

// gdalSummary is what GDAL 3.6.2 printed about one fixture.
type gdalSummary struct {
	name             string
	cols, rows       int
	nodata           bool
	wgs84            []float64 // west, south, east, north
	min, max         float64
	hasMinMax, inter bool // inter: pixel-interleaved bands (refused)
	rotated          bool
}

// readGDALSummaries parses testdata/geotiff/values.txt (written by
// make.sh from gdalinfo -json and gdalinfo -json -mm).
func readGDALSummaries(t *testing.T) []*gdalSummary {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "geotiff", "values.txt"))
	if err != nil {
		t.Fatal(err)
	}
	var out []*gdalSummary
	var cur *gdalSummary
	num := func(s string) float64 {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("values.txt: %q: %v", s, err)
		}
		return v
	}
	for _, line := range strings.Split(string(b), "\n") {
		fs := strings.Fields(line)
		if len(fs) < 2 || strings.HasPrefix(fs[0], "#") {
			continue
		}
		switch fs[0] {
		case "fixture":
			cur = &gdalSummary{name: fs[1]}
			out = append(out, cur)
		case "info":
			var info struct {
				Size       [2]int   `json:"size"`
				NoData     *float64 `json:"nodata"`
				Interleave string   `json:"interleave"`
				Bands      int      `json:"bands"`
			}
			if err := json.Unmarshal([]byte(strings.TrimPrefix(line, "info ")), &info); err != nil {
				t.Fatal(err)
			}
			cur.cols, cur.rows, cur.nodata = info.Size[0], info.Size[1], info.NoData != nil
			cur.inter = info.Interleave == "PIXEL" && info.Bands > 1
		case "wgs84":
			for _, f := range fs[1:] {
				cur.wgs84 = append(cur.wgs84, num(f))
			}
		case "minmax":
			cur.min, cur.max, cur.hasMinMax = num(fs[1]), num(fs[2]), true
		case "transform":
			cur.rotated = true
		}
	}
	return out
}

// TestTerrainCommandGeoTIFFFixtures runs `glidereach terrain --format json`
// on every GeoTIFF fixture (made with GDAL by testdata/geotiff/make.sh) and
// compares the summary with what gdalinfo printed: size, lon/lat extent
// (wgs84Extent), elevation range (gdalinfo -mm), voids; files GDAL reads
// but this tool refuses must exit 2 naming the file and the tag.
func TestTerrainCommandGeoTIFFFixtures(t *testing.T) {
	fixtures := readGDALSummaries(t)
	if len(fixtures) < 20 {
		t.Fatalf("values.txt lists %d fixtures", len(fixtures))
	}
	for _, fx := range fixtures {
		p := filepath.Join("..", "..", "testdata", "geotiff", fx.name)
		out, err := runTerrain(t, p, "--format", "json")
		if fx.rotated || fx.inter {
			tag := "ModelTransformation (34264)"
			if fx.inter {
				tag = "SamplesPerPixel (277)"
			}
			var ue *input.UsageError
			if !errors.As(err, &ue) || ue.Where != p || !strings.Contains(err.Error(), tag) || exitCode(err) != 2 {
				t.Errorf("%s: %v, want exit 2 naming the file and %s", fx.name, err, tag)
			}
			continue
		}
		if err != nil {
			t.Errorf("%s: %v", fx.name, err)
			continue
		}
		var rep terrainReport
		if err := json.Unmarshal([]byte(out), &rep); err != nil {
			t.Fatalf("%s: %v\n%s", fx.name, err, out)
		}
		if rep.Cols != fx.cols || rep.Rows != fx.rows {
			t.Errorf("%s: %d × %d, gdalinfo %d × %d", fx.name, rep.Cols, rep.Rows, fx.cols, fx.rows)
		}
		// The fixture name starts with the EPSG code make.sh gave it.
		wantCRS := "EPSG:4326"
		if strings.HasPrefix(fx.name, "utm") {
			wantCRS = "EPSG:" + fx.name[3:8]
		}
		if rep.CRS != wantCRS {
			t.Errorf("%s: crs %s, want %s", fx.name, rep.CRS, wantCRS)
		}
		// gdalinfo prints the wgs84Extent to 7 decimals; ours is the box of
		// the projected outline, the same to well under 1e-6°.
		got := []float64{rep.Extent.West, rep.Extent.South, rep.Extent.East, rep.Extent.North}
		for i := range got {
			if len(fx.wgs84) != 4 || math.Abs(got[i]-fx.wgs84[i]) > 1e-6 {
				t.Errorf("%s: extent %v, gdalinfo wgs84Extent %v", fx.name, got, fx.wgs84)
				break
			}
		}
		// gdalinfo -mm prints float32 extremes rounded to 3 decimals.
		if !fx.hasMinMax || rep.MinM == nil || math.Abs(*rep.MinM-fx.min) > 1e-3 || math.Abs(*rep.MaxM-fx.max) > 1e-3 {
			t.Errorf("%s: elevation %v..%v, gdalinfo -mm %g..%g", fx.name, rep.MinM, rep.MaxM, fx.min, fx.max)
		}
		// make.sh cuts a 12 × 6 cell no-data block into the _nodata surfaces.
		if wantVoids := map[bool]int{true: 72}[fx.nodata]; rep.Voids != wantVoids {
			t.Errorf("%s: %d voids, want %d", fx.name, rep.Voids, wantVoids)
		}
		if len(rep.Warnings) != 0 || rep.Caution == "" {
			t.Errorf("%s: warnings %q, caution %q", fx.name, rep.Warnings, rep.Caution)
		}
	}
}

// TestTerrainCommandASCUTM checks the summary of the centre-registered UTM
// grid testdata/asc/utm_center.asc against what gdalinfo -json -mm (GDAL
// 3.6.2) printed for it: wgs84Extent -21.0001348 -0.5067851 -20.999326
// -0.5062423, computed minimum -5 and maximum 3.5, no data -32768 (one
// cell).
func TestTerrainCommandASCUTM(t *testing.T) {
	out, err := runTerrain(t, filepath.Join("..", "..", "testdata", "asc", "utm_center.asc"), "--format", "json")
	if err != nil {
		t.Fatal(err)
	}
	var rep terrainReport
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	want := []float64{-21.0001348, -0.5067851, -20.999326, -0.5062423}
	got := []float64{rep.Extent.West, rep.Extent.South, rep.Extent.East, rep.Extent.North}
	for i := range got {
		if math.Abs(got[i]-want[i]) > 1e-6 {
			t.Errorf("extent %v, gdalinfo %v", got, want)
			break
		}
	}
	if rep.CRS != "EPSG:32727" || rep.Cols != 3 || rep.Rows != 2 || rep.Voids != 1 || rep.MinM == nil || *rep.MinM != -5 || *rep.MaxM != 3.5 {
		t.Errorf("report %+v", rep)
	}
}

// TestTerrainCommandWarnsImplausible: a grid whose cells hold -32768 that
// its header does not declare as no data is summarised with a warning, in
// text and JSON (land lies between about -430 m and 8849 m, from memory).
func TestTerrainCommandWarnsImplausible(t *testing.T) {
	p := filepath.Join(t.TempDir(), "undeclared.asc")
	grid := "ncols 3\nnrows 2\nxllcorner -24.5\nyllcorner -0.5\ncellsize 0.01\nNODATA_value -9999\n100 110 -32768\n120 130 140\n"
	if err := os.WriteFile(p, []byte(grid), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := runTerrain(t, p, "--crs", "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out, "warning:") || !strings.Contains(out, "-32768") {
		t.Errorf("no warning:\n%s", out)
	}
	out, err = runTerrain(t, p, "--crs", "EPSG:4326", "--format", "json")
	if err != nil {
		t.Fatal(err)
	}
	var rep terrainReport
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if len(rep.Warnings) != 1 || rep.Voids != 0 {
		t.Errorf("warnings %q, voids %d", rep.Warnings, rep.Voids)
	}
}

// TestTerrainCommandAtUTMEdges: in a UTM grid, a point of a no-data block
// is a void (JSON elevation_m null, at.void true), and a corner of the
// lon/lat box that lies outside the rotated outline is refused, not called
// a void. The void point is the centre of cell (45, 32) of
// utm25828_int16_strip_packbits_nodata.tif (inside make.sh's no-data
// block), converted by GDAL 3.6.2's gdaltransform -s_srs EPSG:25828
// -t_srs EPSG:4326; the other point lies just inside the south-east corner
// of the wgs84Extent gdalinfo printed for
// utm32725_float32_strip_deflate_pred3.tif, east of the raster's outline
// there (grid convergence turns the outline against the meridians).
func TestTerrainCommandAtUTMEdges(t *testing.T) {
	dir := filepath.Join("..", "..", "testdata", "geotiff")
	out, err := runTerrain(t, filepath.Join(dir, "utm25828_int16_strip_packbits_nodata.tif"), "--at", "44.9863800557064,-14.9855709404344", "--format", "json")
	if err != nil {
		t.Fatal(err)
	}
	var rep terrainReport
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if rep.ElevationM != nil || rep.At == nil || !rep.At.Void {
		t.Errorf("void point: elevation %v, at %+v", rep.ElevationM, rep.At)
	}
	_, err = runTerrain(t, filepath.Join(dir, "utm32725_float32_strip_deflate_pred3.tif"), "--at", "-35.06273,-32.96052")
	var ue *input.UsageError
	if !errors.As(err, &ue) || ue.Where != "--at" || !strings.Contains(err.Error(), "outside the terrain's cells") {
		t.Errorf("corner outside the outline: %v", err)
	}
}
