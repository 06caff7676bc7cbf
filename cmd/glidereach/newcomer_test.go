package main

import (
	"context"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"glidereach/reach/plan"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/spf13/pflag"
)

// TestFarFromFieldsWarns checks that a start, route or area far from every
// field (here: latitude and longitude swapped; from -24.5,-0.5 to the demo
// fields near -0.5,-24.5 the spherical law of cosines gives about 3700 km,
// about 3690 km to the nearest) or outside the terrain given draws a
// warning on standard error naming the distance and the LAT,LON order, and
// that a plan near its fields draws none.
func TestFarFromFieldsWarns(t *testing.T) {
	td := filepath.Join("..", "..", "testdata")
	fields := filepath.Join(td, "fields", "demo-fields.geojson")
	cases := []struct {
		args []string
		want string // "" for no warning
	}{
		{[]string{"reach", "--from", "-24.5,-0.5", "--alt", "1500m", "--fields", fields}, "the start lies 36"},
		{[]string{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--fields", fields}, ""},
		{[]string{"coverage", "--fields", fields, "--box", "-24.85,-0.8,-24.15,-0.15", "--alt", "1500m"}, "the box lies 36"},
		{[]string{"coverage", "--fields", fields, "--box", "-0.8,-24.85,-0.15,-24.15", "--alt", "1500m"}, ""},
		{[]string{"route", "--route", filepath.Join(td, "routes", "demo-route.gpx"), "--fields", filepath.Join(td, "fields", "fixture-fields.geojson"), "--alt", "2000m",
			"--terrain", filepath.Join(td, "geotiff", "geo_int16_strip_none.tif")}, "outside the terrain given"},
	}
	for _, c := range cases {
		_, _, stderr := runCLI(t, c.args...)
		if c.want == "" {
			if strings.Contains(stderr, "warning: the") {
				t.Errorf("%q: unexpected warning:\n%s", c.args, stderr)
			}
			continue
		}
		if !strings.Contains(stderr, c.want) || !strings.Contains(stderr, "LAT,LON (latitude first)") {
			t.Errorf("%q: stderr lacks %q and the LAT,LON hint:\n%s", c.args, c.want, stderr)
		}
	}
}

// TestConservativeRounding checks the rounding rule for figures that could
// mislead (common practice, no source: round toward the safe side):
// required altitudes up, arrival heights and margins down, in JSON to 0.1 m
// and in text to 1 m; and that the reach text and JSON then agree in that
// direction for every field.
func TestConservativeRounding(t *testing.T) {
	for _, c := range []struct {
		v        float64
		up, down float64
		upT, dnT string
	}{
		{1084.01, 1084.1, 1084.0, "1085", "1084"},
		{449.99, 450.0, 449.9, "450", "449"},
		{-259.2, -259.2, -259.2, "-259", "-260"},
		{300, 300, 300, "300", "300"},
		{300.0000000001, 300, 300, "300", "300"},
	} {
		if got := numUp(c.v); got != c.up {
			t.Errorf("numUp(%v) = %v, want %v", c.v, got, c.up)
		}
		if got := numDown(c.v); got != c.down {
			t.Errorf("numDown(%v) = %v, want %v", c.v, got, c.down)
		}
		if got := fmtMUp(c.v); got != c.upT {
			t.Errorf("fmtMUp(%v) = %v, want %v", c.v, got, c.upT)
		}
		if got := fmtMDown(c.v); got != c.dnT {
			t.Errorf("fmtMDown(%v) = %v, want %v", c.v, got, c.dnT)
		}
	}
	if numUp(math.NaN()) != nil || fmtMDown(math.Inf(1)) != "-" {
		t.Error("NaN or Inf not turned into null / -")
	}
	fields := filepath.Join("..", "..", "testdata", "fields", "demo-fields.geojson")
	args := []string{"reach", "--from", "-0.5,-24.5", "--alt", "2500m", "--aircraft", "trainer", "--wind", "0m:240/10kt,1500m:270/20kt", "--fields", fields}
	_, text, _ := runCLI(t, args...)
	_, js, _ := runCLI(t, append(args, "--format", "json")...)
	var doc struct {
		Fields []struct {
			Name     string   `json:"name"`
			Arrival  *float64 `json:"arrival_agl_m"`
			Required *float64 `json:"required_msl_m"`
			Margin   *float64 `json:"margin_above_reserve_m"`
		} `json:"fields"`
	}
	if err := json.Unmarshal([]byte(js), &doc); err != nil {
		t.Fatal(err)
	}
	reached := 0
	for _, f := range doc.Fields {
		var line []string
		for _, l := range strings.Split(text, "\n") {
			if strings.HasPrefix(l, f.Name+" ") {
				line = strings.Fields(strings.TrimPrefix(l, f.Name))
			}
		}
		if len(line) < 4 || f.Required == nil {
			t.Fatalf("%s: no text row or required altitude", f.Name)
		}
		need, _ := strconv.ParseFloat(line[3], 64)
		if need < *f.Required || need-*f.Required >= 1 {
			t.Errorf("%s: text needs %v m, JSON %v m: the text must round up", f.Name, need, *f.Required)
		}
		if f.Arrival != nil {
			reached++
			arr, _ := strconv.ParseFloat(line[1], 64)
			mar, _ := strconv.ParseFloat(line[2], 64)
			if arr > *f.Arrival || *f.Arrival-arr >= 1 || mar > *f.Margin || *f.Margin-mar >= 1 {
				t.Errorf("%s: text arrival %v margin %v, JSON %v %v: the text must round down", f.Name, arr, mar, *f.Arrival, *f.Margin)
			}
		}
	}
	if reached == 0 {
		t.Error("no field in reach: the arrival rounding was not checked")
	}
}

// TestUserFilesReferToShippedDocs checks that the files a user reads —
// README.md and everything in testdata/ — refer only to documents the
// project ships: a newcomer cannot follow "see DESIGN.md" to a file that is
// not in the repository.
func TestUserFilesReferToShippedDocs(t *testing.T) {
	root := filepath.Join("..", "..")
	var paths []string
	paths = append(paths, filepath.Join(root, "README.md"))
	filepath.WalkDir(filepath.Join(root, "testdata"), func(p string, d os.DirEntry, err error) error {
		if err == nil && !d.IsDir() && (strings.HasSuffix(p, ".md") || strings.HasSuffix(p, ".yaml") || strings.HasSuffix(p, ".json") || strings.HasSuffix(p, ".txt")) {
			paths = append(paths, p)
		}
		return nil
	})
	docRef := regexp.MustCompile(`\b[A-Z][A-Z_]+\.md\b`)
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		for _, ref := range docRef.FindAllString(string(b), -1) {
			if _, err := os.Stat(filepath.Join(root, ref)); err != nil {
				if _, err2 := os.Stat(filepath.Join(filepath.Dir(p), ref)); err2 != nil {
					t.Errorf("%s refers to %s, which the project does not have", p, ref)
				}
			}
		}
	}
}

// TestWindEchoedInUsersTerms checks that a wind is echoed as it was given:
// levels of a coded forecast (feet MSL, the published coding) in feet with
// metres beside, a 9900 group as "light and variable" (its published
// meaning) rather than "000°/0 kt", and layers typed in feet in feet.
func TestWindEchoedInUsersTerms(t *testing.T) {
	_, out, _ := runCLI(t, "polar", "--aircraft", "trainer", "--alt", "9000ft", "--wind-aloft", "3000:9900 6000:2725+05 9000:2830-02", "--track", "090")
	want := "Wind: 3000 ft (914 m) light and variable, 6000 ft (1829 m) 270°/25 kt +5 °C, 9000 ft (2743 m) 280°/30 kt -2 °C"
	if !strings.Contains(out, want) {
		t.Errorf("polar --wind-aloft: want %q in\n%s", want, out)
	}
	_, out, _ = runCLI(t, "reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--wind", "0ft:240/10kt,5000ft:270/20kt")
	if !strings.Contains(out, "Wind: 0 ft (0 m) 240°/10 kt, 5000 ft (1524 m) 270°/20 kt") {
		t.Errorf("reach --wind in ft: not echoed in feet:\n%s", out)
	}
	_, out, _ = runCLI(t, "reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--wind", "0m:240/10kt,1500m:270/20kt")
	if !strings.Contains(out, "Wind: 0 m 240°/10 kt, 1500 m 270°/20 kt") || strings.Contains(out, " ft (") {
		t.Errorf("reach --wind in m: echoed differently:\n%s", out)
	}
}

// TestHelpShowsNoNaN checks that no --help shows a default a user cannot
// read, such as "(default NaN)" for an optional --heading.
func TestHelpShowsNoNaN(t *testing.T) {
	for _, c := range allCommands(newRootCmd()) {
		args := append(strings.Fields(strings.TrimPrefix(c.CommandPath(), "glidereach")), "--help")
		_, out, _ := runCLI(t, args...)
		if strings.Contains(out, "NaN") || strings.Contains(out, "Inf)") {
			t.Errorf("%s --help shows NaN or Inf:\n%s", c.CommandPath(), out)
		}
	}
	if code, _, _ := runCLI(t, "reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--heading", "400"); code != 2 {
		t.Errorf("--heading 400: exit %d, want 2", code)
	}
}

// TestAssumptionsSaySinkingAir checks that the assumptions say whether a
// sinking-air allowance was applied — a glide in sinking air falls short of
// a still-air figure (common practice, no source) — in text and JSON.
func TestAssumptionsSaySinkingAir(t *testing.T) {
	for _, extra := range [][]string{nil, {"--format", "json"}} {
		_, out, _ := runCLI(t, append([]string{"reach", "--from", "-0.5,-24.5", "--alt", "1500m"}, extra...)...)
		if !strings.Contains(out, "no sinking-air allowance") {
			t.Errorf("reach %v: assumptions do not say no sinking-air allowance was applied:\n%s", extra, out)
		}
	}
	_, out, _ := runCLI(t, "reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--air-sink", "0.5m/s")
	if !strings.Contains(out, "sinking air allowance 0.5 m/s") || strings.Contains(out, "no sinking-air allowance") {
		t.Errorf("reach --air-sink 0.5m/s: assumptions wrong:\n%s", out)
	}
}

// TestRouteFieldTableSaysWhatBestMeans checks that the route's field table
// names its column for what it is (the length of route along which the
// field is the best one) and shows "-" rather than "0.0" for a field that
// is never the best, which read as "best at km 0".
func TestRouteFieldTableSaysWhatBestMeans(t *testing.T) {
	td := filepath.Join("..", "..", "testdata")
	_, out, _ := runCLI(t, "route", "--route", filepath.Join(td, "routes", "demo-route.gpx"), "--fields", filepath.Join(td, "fields", "demo-fields.geojson"), "--alt", "7500ft")
	if !strings.Contains(out, "BEST FOR km OF ROUTE") || !strings.Contains(out, "the length of route along which the field is the best one") {
		t.Errorf("route text lacks the explained column:\n%s", out)
	}
	for _, l := range strings.Split(out, "\n") {
		if strings.HasPrefix(l, "Gannet Flats ") && !strings.Contains(l, " - ") {
			t.Errorf("a field never the best shows a number: %q", l)
		}
	}
}

// TestFinalTextForNewcomers checks three things a first reader of the final
// glide's text tripped over: a glide far short showed legs with negative
// mean altitudes (the line continued below the ground) and two different
// "more altitude" figures; and a powered trainer was offered a MacCready
// line, a setting that means something only for sailplanes and motorgliders
// (common practice, no source) or when --mc is given.
func TestFinalTextForNewcomers(t *testing.T) {
	_, out, _ := runCLI(t, "final", "--from", "-0.5,-24.5", "--alt", "500m", "--to", "-0.9,-24.1", "--aircraft", "trainer")
	if !strings.Contains(out, "Legs as flown from the required") {
		t.Errorf("short glide: the table does not say it shows the glide from the required altitude:\n%s", out)
	}
	for _, l := range strings.Split(out, "\n") {
		if f := strings.Fields(l); len(f) > 7 && f[1] == "goal" {
			if alt, err := strconv.ParseFloat(f[6], 64); err != nil || alt < 0 {
				t.Errorf("short glide: leg mean altitude %q below sea level over ground at 0 m", f[6])
			}
		}
	}
	// One figure for how much more altitude is needed.
	if strings.Contains(out, "at the start clears it") || strings.Count(out, "more altitude") != 1 {
		t.Errorf("short glide: more than one 'more altitude' figure:\n%s", out)
	}
	for _, c := range []struct {
		args []string
		want bool
	}{
		{[]string{"--aircraft", "trainer"}, false},
		{[]string{"--aircraft", "tourer"}, false},
		{[]string{"--aircraft", "trainer", "--mc", "1m/s"}, true},
		{[]string{"--aircraft", "sailplane"}, true},
		{[]string{"--aircraft", "motorglider"}, true},
	} {
		args := append([]string{"final", "--from", "-0.5,-24.5", "--alt", "1500m", "--to", "-0.45,-24.45"}, c.args...)
		_, out, _ := runCLI(t, args...)
		if got := strings.Contains(out, "MacCready: highest affordable"); got != c.want {
			t.Errorf("%v: MacCready line shown %v, want %v", c.args, got, c.want)
		}
	}
}

// TestRasterASCSidecars checks that --raster x.asc writes x.prj, so the
// tool's own terrain command reads the grid back without --crs (it refuses
// an ASCII grid without a CRS), and x.asc.aux.xml, GDAL's auxiliary metadata
// (PAMDataset, from memory of GDAL's PAM format), carrying the value's
// meaning, its unit and the caution; for reach and for coverage.
func TestRasterASCSidecars(t *testing.T) {
	dir := t.TempDir()
	fields := filepath.Join("..", "..", "testdata", "fields", "demo-fields.geojson")
	for _, c := range []struct {
		args []string
		what string
	}{
		{[]string{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--raster", filepath.Join(dir, "reach.asc")}, "arrival height above ground (m)"},
		{[]string{"coverage", "--fields", fields, "--box", "-0.8,-24.8,-0.2,-24.2", "--alt", "1500m", "--raster", filepath.Join(dir, "coverage.asc")}, "least altitude (m MSL)"},
	} {
		path := c.args[len(c.args)-1]
		if code, _, errOut := runCLI(t, c.args...); code != 0 {
			t.Fatalf("%v: exit %d: %s", c.args, code, errOut)
		}
		code, out, errOut := runCLI(t, "terrain", path, "--format", "json")
		if code != 0 || !strings.Contains(out, `"crs": "EPSG:4326"`) {
			t.Errorf("terrain %s: exit %d %s\n%s", path, code, errOut, out)
		}
		aux, err := os.ReadFile(path + ".aux.xml")
		if err != nil {
			t.Fatal(err)
		}
		var pam struct {
			MDI []struct {
				Key  string `xml:"key,attr"`
				Text string `xml:",chardata"`
			} `xml:"Metadata>MDI"`
			Band struct {
				Description string `xml:"Description"`
				UnitType    string `xml:"UnitType"`
				NoData      string `xml:"NoDataValue"`
			} `xml:"PAMRasterBand"`
		}
		if err := xml.Unmarshal(aux, &pam); err != nil {
			t.Fatalf("%s.aux.xml: %v", path, err)
		}
		caution := false
		for _, m := range pam.MDI {
			caution = caution || (m.Key == "CAUTION" && strings.Contains(m.Text, "PLANNING AID ONLY"))
		}
		if !caution || !strings.Contains(pam.Band.Description, c.what) || pam.Band.UnitType != "m" || pam.Band.NoData != "-9999" {
			t.Errorf("%s.aux.xml lacks the caution, meaning, unit or no-data value:\n%s", path, aux)
		}
	}
}

// TestFootprintCutByTerrainEdge checks that a footprint running into the
// edge of the terrain data says so in the text, the JSON, the GeoJSON and
// on the map (as a warning), and that one ending inside the data does not:
// the fixture geo_int16_strip_none.tif covers only 11 × 8 km, less than the
// trainer's 1:9 glide from 914 m above it (common practice, no source:
// glide distance = height × glide ratio).
func TestFootprintCutByTerrainEdge(t *testing.T) {
	dem := filepath.Join("..", "..", "testdata", "geotiff", "geo_int16_strip_none.tif")
	cut := []string{"reach", "--from", "0.0,-25.0", "--agl", "3000ft", "--terrain", dem}
	_, text, _ := runCLI(t, cut...)
	if !strings.Contains(text, "NOTE: the footprint is cut off by the edge of the terrain data") {
		t.Errorf("text does not say the footprint is cut off:\n%s", text)
	}
	_, js, _ := runCLI(t, append(cut, "--format", "json")...)
	var doc map[string]any
	if err := json.Unmarshal([]byte(js), &doc); err != nil {
		t.Fatal(err)
	}
	if doc["cut_by_terrain_edge"] != true || !strings.Contains(fmt.Sprint(doc["terrain_edge_note"]), "edge of the terrain data") {
		t.Errorf("JSON: cut_by_terrain_edge %v, note %v", doc["cut_by_terrain_edge"], doc["terrain_edge_note"])
	}
	_, gj, _ := runCLI(t, append(cut, "--format", "geojson")...)
	if !strings.Contains(gj, `"cut_by_terrain_edge": true`) {
		t.Errorf("GeoJSON start lacks cut_by_terrain_edge: true")
	}
	run, err := computeReachForTest(cut)
	if err != nil {
		t.Fatal(err)
	}
	if s := reachScene(run); len(s.Warnings) == 0 || !strings.Contains(s.Warnings[0], "edge of the terrain data") {
		t.Errorf("map scene carries no warning: %q", s.Warnings)
	}
	inside := []string{"reach", "--from", "0.01,-25.02", "--agl", "50m", "--reserve", "0m", "--terrain", dem, "--format", "json"}
	_, js, _ = runCLI(t, inside...)
	if !strings.Contains(js, `"cut_by_terrain_edge": false`) || strings.Contains(js, "NOTE:") {
		t.Errorf("a footprint inside the data is reported cut:\n%.400s", js)
	}
}

// computeReachForTest runs the reach command's computation for a command
// line, for tests that look at the map scene.
func computeReachForTest(args []string) (*reachRun, error) {
	o := &reachOptions{pos: newPositionFlags(), glide: newGlideFlags(), terr: newTerrainFlags()}
	fs := pflag.NewFlagSet("reach", pflag.ContinueOnError)
	o.pos.register(fs)
	o.glide.register(fs)
	o.terr.register(fs)
	if err := fs.Parse(args[1:]); err != nil {
		return nil, err
	}
	setup, err := o.glide.resolve()
	if err != nil {
		return nil, err
	}
	src, err := o.terr.open()
	if err != nil {
		return nil, err
	}
	return computeReach(context.Background(), setup, plan.Ground{Src: src, Flat: o.terr.ground.Value}, o.pos, nil, nil, io.Discard)
}

// TestMapTerrainIsTheDEM checks that maps are drawn over the DEM resampled
// bilinearly (terrain.Resample, whose values the terrain tests check
// against GDAL), not over the solver's surface of the highest sample per
// cell, whose alternating 2- and 3-sample maxima drew a lattice of squares.
func TestMapTerrainIsTheDEM(t *testing.T) {
	dem := filepath.Join("..", "..", "testdata", "geotiff", "geo_int16_strip_none.tif")
	run, err := computeReachForTest([]string{"reach", "--from", "0.01,-25.02", "--agl", "50m", "--reserve", "0m", "--terrain", dem})
	if err != nil {
		t.Fatal(err)
	}
	d := reachScene(run).Terrain
	if d == run.res.Ground {
		t.Fatal("the map is drawn over the solver's window")
	}
	checked, higher := 0, 0
	for r := 0; r < d.Rows; r += 7 {
		for c := 0; c < d.Cols; c += 7 {
			x, y := d.XY(c, r)
			lat, lon := d.Frame.Inverse(x, y)
			want, ok := run.grid.Elevation(lat, lon)
			got := float64(d.Elev[r*d.Cols+c])
			if !ok || got != got {
				continue
			}
			checked++
			if math.Abs(got-want) > 0.05 {
				t.Fatalf("display cell (%d, %d): %.2f m, DEM bilinear %.2f m", c, r, got, want)
			}
			if hi, ok := run.res.Ground.Sample(x, y); ok && hi > want+1 {
				higher++
			}
		}
	}
	if checked < 50 || higher == 0 {
		t.Errorf("checked %d cells, %d where the solver surface is higher: the test proves nothing", checked, higher)
	}
}

// TestFinalRoundsConservatively checks the final glide's text and JSON
// round the required altitude up and the arrival and margins down, and
// agree in that direction (common practice, no source).
func TestFinalRoundsConservatively(t *testing.T) {
	args := []string{"final", "--from", "-0.5,-24.5", "--alt", "1500m", "--to", "-0.45,-24.39", "--to", "-0.55,-24.3@150m",
		"--aircraft", "sailplane", "--wind", "0m:240/10kt,1500m:270/20kt,3000m:280/35kt", "--mc", "1.5m/s"}
	_, text, _ := runCLI(t, args...)
	_, js, _ := runCLI(t, append(args, "--format", "json")...)
	var doc struct {
		Required float64 `json:"required_msl_m"`
		Arrival  float64 `json:"arrival_agl_m"`
		Margin   float64 `json:"margin_m"`
	}
	if err := json.Unmarshal([]byte(js), &doc); err != nil {
		t.Fatal(err)
	}
	var req, arr, mar float64
	for _, l := range strings.Split(text, "\n") {
		fmt.Sscanf(l, "Required at the start: %f m MSL", &req)
		if strings.HasPrefix(l, "Arrival: ") {
			fmt.Sscanf(l, "Arrival: %f m above the goal", &arr)
			if i := strings.Index(l, "start margin "); i >= 0 {
				fmt.Sscanf(l[i:], "start margin %f m", &mar)
			}
		}
	}
	if req < doc.Required || req-doc.Required >= 1 {
		t.Errorf("required: text %v, JSON %v: text must be JSON rounded up", req, doc.Required)
	}
	if arr > doc.Arrival || doc.Arrival-arr >= 1 || mar > doc.Margin || doc.Margin-mar >= 1 {
		t.Errorf("arrival %v / margin %v in text, %v / %v in JSON: text must be JSON rounded down", arr, mar, doc.Arrival, doc.Margin)
	}
	for _, v := range []float64{doc.Required, doc.Arrival, doc.Margin} {
		if math.Abs(v*10-math.Round(v*10)) > 1e-6 {
			t.Errorf("JSON value %v is not rounded to 0.1 m", v)
		}
	}
}

// TestCoveredSharesRoundDown checks that covered shares are rounded down
// (a share of the route or area with a field in reach must not read larger
// than it is; common practice, no source) in JSON and text, and that the
// text's per cent is not above the JSON fraction.
func TestCoveredSharesRoundDown(t *testing.T) {
	if fractionDown(0.54998) != 0.5499 || pctDown(0.54998) != 54.9 || pctDown(0.5) != 50 || fractionDown(1) != 1 {
		t.Errorf("fractionDown/pctDown: %v %v %v %v", fractionDown(0.54998), pctDown(0.54998), pctDown(0.5), fractionDown(1))
	}
	td := filepath.Join("..", "..", "testdata")
	args := []string{"route", "--route", filepath.Join(td, "routes", "demo-route.gpx"), "--fields", filepath.Join(td, "fields", "demo-fields.geojson"),
		"--alt", "7500ft", "--wind", "0m:240/10kt,1500m:270/20kt,3000m:280/35kt"}
	_, text, _ := runCLI(t, args...)
	_, js, _ := runCLI(t, append(args, "--format", "json")...)
	var doc struct {
		Fraction float64 `json:"covered_fraction"`
		Samples  []struct {
			Covered bool `json:"covered"`
		} `json:"samples"`
	}
	if err := json.Unmarshal([]byte(js), &doc); err != nil {
		t.Fatal(err)
	}
	var pct float64
	for _, l := range strings.Split(text, "\n") {
		if i := strings.Index(l, "reserve along "); i >= 0 {
			fmt.Sscanf(l[i:], "reserve along %f", &pct)
		}
	}
	if pct == 0 || pct > doc.Fraction*100+1e-9 || doc.Fraction*100-pct >= 0.1+1e-9 {
		t.Errorf("text %.1f %% against JSON fraction %v: the text must be the fraction rounded down to 0.1 %%", pct, doc.Fraction)
	}
}
