package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	tgeo "github.com/tidwall/geojson"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach/geodesy"
)

// writeStraightRoute writes a two-point GeoJSON LineString from lat0, lon0
// over length m on bearing brg (degrees), without elevations.
func writeStraightRoute(t *testing.T, lat0, lon0, brg, length float64) (string, geodesy.LatLon) {
	t.Helper()
	end, _, err := geodesy.Direct(geodesy.LatLon{Lat: lat0, Lon: lon0}, brg, length)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "route.geojson")
	js := fmt.Sprintf(`{"type":"Feature","properties":{"name":"Test line"},"geometry":{"type":"LineString","coordinates":[[%.7f,%.7f],[%.7f,%.7f]]}}`, lon0, lat0, end.Lon, end.Lat)
	if err := os.WriteFile(path, []byte(js), 0o644); err != nil {
		t.Fatal(err)
	}
	return path, end
}

// abeamFields writes fields at along-route distance s (m) and offset b (m,
// to the left) of a straight route from lat0, lon0 on bearing 90°.
func abeamFields(t *testing.T, lat0, lon0 float64, s, b []float64) string {
	t.Helper()
	var feats []string
	for i := range s {
		p, az, err := geodesy.Direct(geodesy.LatLon{Lat: lat0, Lon: lon0}, 90, s[i])
		if err != nil {
			t.Fatal(err)
		}
		q, _, err := geodesy.Direct(p, az-90, b[i])
		if err != nil {
			t.Fatal(err)
		}
		feats = append(feats, fmt.Sprintf(`{"type":"Feature","properties":{"name":"F%d"},"geometry":{"type":"Point","coordinates":[%.7f,%.7f]}}`, i, q.Lon, q.Lat))
	}
	path := filepath.Join(t.TempDir(), "fields.geojson")
	if err := os.WriteFile(path, []byte(`{"type":"FeatureCollection","features":[`+strings.Join(feats, ",")+`]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func TestRouteJSONGapsFlat(t *testing.T) {
	// Flat ground at 0 m, still air, the trainer (glide ratio 9 at every
	// altitude) at 1500 m with a 300 m reserve: a field b metres abeam the
	// route is in reach along |s − s_f| ≤ √(r² − b²), r = (1500 − 300)·9
	// (glide cone, tan γ = 1/E, Anderson, Introduction to Flight; circle–line
	// intersection, common practice, no source). The gap ends in the JSON
	// (DESIGN.md keys covered_fraction, gaps[].start_m/end_m) must be within
	// one sample step of those distances.
	const lat0, lon0, L, step = -0.5, -24.8, 70000.0, 250.0
	route, _ := writeStraightRoute(t, lat0, lon0, 90, L)
	sf, bf := []float64{15000, 48000}, []float64{5000, -7000}
	fields := abeamFields(t, lat0, lon0, sf, bf)
	code, out, stderr := runCLI(t, "route", "--route", route, "--fields", fields, "--alt", "1500m", "--aircraft", "trainer", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var res struct {
		Caution         string  `json:"caution"`
		CoveredFraction float64 `json:"covered_fraction"`
		Gaps            []struct {
			StartM float64 `json:"start_m"`
			EndM   float64 `json:"end_m"`
			Close  float64 `json:"close_msl_m"`
		} `json:"gaps"`
		Samples []map[string]any `json:"samples"`
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatalf("bad JSON: %v\n%s", err, out)
	}
	if res.Caution == "" {
		t.Error("JSON has no caution")
	}
	r := (1500.0 - 300) * 9
	var cov [][2]float64
	for i := range sf {
		h := math.Sqrt(r*r - bf[i]*bf[i])
		cov = append(cov, [2]float64{sf[i] - h, sf[i] + h})
	}
	want := [][2]float64{{0, cov[0][0]}, {cov[0][1], cov[1][0]}, {cov[1][1], L}}
	if len(res.Gaps) != 3 {
		t.Fatalf("%d gaps, want 3: %+v", len(res.Gaps), res.Gaps)
	}
	for i, w := range want {
		g := res.Gaps[i]
		if math.Abs(g.StartM-w[0]) > step || math.Abs(g.EndM-w[1]) > step {
			t.Errorf("gap %d: %.0f..%.0f m, want %.0f..%.0f ± %.0f m", i, g.StartM, g.EndM, w[0], w[1], step)
		}
		if !(g.Close > 1500) {
			t.Errorf("gap %d closes from %.0f m, want above the planned 1500 m", i, g.Close)
		}
	}
	wantFrac := (cov[0][1] - cov[0][0] + cov[1][1] - cov[1][0]) / L
	if math.Abs(res.CoveredFraction-wantFrac) > 2*step/L {
		t.Errorf("covered_fraction %.4f, want %.4f", res.CoveredFraction, wantFrac)
	}
	if len(res.Samples) < int(L/step) {
		t.Errorf("%d samples, want at least %d", len(res.Samples), int(L/step))
	}
	for _, k := range []string{"distance_m", "planned_msl_m", "terrain_m", "least_msl_m", "margin_above_reserve_m", "best_field", "covered"} {
		if _, ok := res.Samples[0][k]; !ok {
			t.Errorf("sample lacks %q", k)
		}
	}
}

func TestRouteOutputsAndCaution(t *testing.T) {
	// Every format carries the caution; GeoJSON parses with tidwall/geojson
	// (RFC 7946) and splits the route into covered and uncovered pieces
	// whose lengths add up to the route; CSV has one row per sample.
	dir := t.TempDir()
	route := filepath.Join("..", "..", "testdata", "routes", "demo-route.gpx")
	fields := filepath.Join("..", "..", "testdata", "fields", "demo-fields.geojson")
	base := []string{"route", "--route", route, "--fields", fields, "--alt", "7500ft", "--wind", "270/15kt"}
	gj := filepath.Join(dir, "r.geojson")
	code, text, stderr := runCLI(t, append(base, "--format", "geojson", "--out", gj, "--map", filepath.Join(dir, "r.png"), "--report", filepath.Join(dir, "r.html"))...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(text, "PLANNING AID ONLY") || !strings.Contains(text, "gap") {
		t.Errorf("text summary lacks the caution or the gaps:\n%s", text)
	}
	data, err := os.ReadFile(gj)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := tgeo.Parse(string(data), nil); err != nil {
		t.Fatalf("GeoJSON does not parse: %v", err)
	}
	var c fc
	if err := json.Unmarshal(data, &c); err != nil {
		t.Fatal(err)
	}
	kinds := map[string]int{}
	pieces := 0.0
	for _, f := range c.Features {
		k, _ := f.Properties["kind"].(string)
		kinds[k]++
		if k == "route_start" && f.Properties["caution"] == nil {
			t.Error("route start feature lacks the caution")
		}
		if k == "route_piece" {
			pieces += f.Properties["length_m"].(float64)
		}
	}
	if kinds["route_start"] != 1 || kinds["route_piece"] < 2 || kinds["gap"] < 1 || kinds["field"] != 7 {
		t.Errorf("feature kinds %v", kinds)
	}
	// 58.1 km (testdata/routes/ORIGIN.md).
	if math.Abs(pieces-58100) > 100 {
		t.Errorf("route pieces add up to %.0f m, want about 58100 m", pieces)
	}
	for _, f := range []string{"r.png", "r.html"} {
		if st, err := os.Stat(filepath.Join(dir, f)); err != nil || st.Size() == 0 {
			t.Errorf("%s not written", f)
		}
	}
	code, out, _ := runCLI(t, append(base, "--format", "csv")...)
	if code != 0 {
		t.Fatalf("csv exit %d", code)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if rows[0][0] != "distance_m" || !strings.Contains(rows[1][len(rows[1])-1], "PLANNING AID ONLY") {
		t.Errorf("CSV header %v, first notes %q", rows[0], rows[1][len(rows[1])-1])
	}
	if len(rows) < 230 {
		t.Errorf("CSV has %d rows, want one per 250 m sample (about 234)", len(rows))
	}
	// Per-point elevations of the GPX as the planned altitude (1200–1400 m).
	code, out, _ = runCLI(t, "route", "--route", route, "--fields", fields, "--format", "json")
	if code != 0 || !strings.Contains(out, `"planned_msl_m": 1200`) || !strings.Contains(out, "route file") {
		t.Errorf("GPX elevations not used as the planned altitude (exit %d)", code)
	}
}

func TestRouteBadInput(t *testing.T) {
	// Bad input exits 2 naming the flag or file, and leaves no file behind.
	route := filepath.Join("..", "..", "testdata", "routes", "demo-route.gpx")
	fields := filepath.Join("..", "..", "testdata", "fields", "demo-fields.geojson")
	noEle, _ := writeStraightRoute(t, -0.5, -24.6, 45, 20000)
	anti, _ := writeStraightRoute(t, -0.5, 179.95, 90, 20000)
	dir := t.TempDir()
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"route", "--fields", fields, "--alt", "1500m"}, "--route"},
		{[]string{"route", "--route", route, "--alt", "1500m"}, "--fields"},
		{[]string{"route", "--route", route, "--fields", fields, "--alt", "1500m", "--step", "1m"}, "--step"},
		{[]string{"route", "--route", route, "--fields", fields, "--alt", "1500 parsecs"}, "--alt"},
		{[]string{"route", "--route", route, "--fields", fields, "--alt", "1500m", "--agl", "300m"}, "alt"},
		{[]string{"route", "--route", route, "--fields", fields, "--alt", "1500m", "--format", "xml"}, "--format"},
		{[]string{"route", "--route", noEle, "--fields", fields}, "--alt"},
		{[]string{"route", "--route", route, "--fields", fields, "--agl", "-5m"}, "--agl"},
		{[]string{"route", "--route", "missing.gpx", "--fields", fields, "--alt", "1500m"}, "missing.gpx"},
		{[]string{"route", "--route", fields, "--fields", fields, "--alt", "1500m"}, "demo-fields.geojson"},
		{[]string{"route", "--route", route, "--fields", fields, "--alt", "1500m", "--out", filepath.Join(dir, "no", "r.json")}, "--out"},
		{[]string{"route", "--route", route, "--fields", fields, "--alt", "1500m", "--map", filepath.Join(dir, "r.jpg")}, "--map"},
		{[]string{"route", "--route", anti, "--fields", fields, "--alt", "1500m"}, "antimeridian"},
	}
	checkUsageErrors(t, cases)
	ents, _ := os.ReadDir(dir)
	if len(ents) != 0 {
		t.Errorf("files left behind: %v", ents)
	}
}

// checkUsageErrors runs each command line and wants a usage error (exit 2)
// whose message names want.
func checkUsageErrors(t *testing.T, cases []struct {
	args []string
	want string
}) {
	t.Helper()
	for _, tc := range cases {
		root := newRootCmd()
		root.SetArgs(tc.args)
		var out strings.Builder
		root.SetOut(&out)
		root.SetErr(&out)
		err := root.Execute()
		if err == nil {
			t.Errorf("%v: no error", tc.args)
			continue
		}
		var ue *input.UsageError
		if !errors.As(err, &ue) && !isFlagError(err) {
			t.Errorf("%v: %v is not a usage error (exit 2)", tc.args, err)
		}
		if !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%v: error %q does not name %q", tc.args, err, tc.want)
		}
	}
}

func TestDemoRouteAndCoverageSteps(t *testing.T) {
	// The demo's route and coverage steps run on the embedded scenario and
	// write JSON with the contract keys.
	if testing.Short() {
		t.Skip("runs the demo steps")
	}
	dir := t.TempDir()
	var b strings.Builder
	d := &demoRun{out: &b, dir: dir}
	if err := demoRoute(context.Background(), d); err != nil {
		t.Fatal(err)
	}
	if err := demoCoverage(context.Background(), d); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{"route.json", "coverage.json"} {
		data, err := os.ReadFile(filepath.Join(dir, f))
		if err != nil {
			t.Fatal(err)
		}
		var m map[string]any
		if err := json.Unmarshal(data, &m); err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		if _, ok := m["covered_fraction"]; !ok || m["caution"] == nil {
			t.Errorf("%s lacks covered_fraction or caution", f)
		}
	}
	for _, f := range []string{"route.geojson", "route-profile.csv", "route.png", "route.html", "coverage.geojson", "coverage-least-msl.tif", "coverage.png", "coverage.html"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Errorf("demo did not write %s", f)
		}
	}
	if !strings.Contains(b.String(), "gap") || !strings.Contains(b.String(), "Greedy choice") {
		t.Errorf("demo summaries lack the gaps or the greedy choice:\n%s", b.String())
	}
}

// fixtureDEM is the GeoTIFF test fixture the route and coverage tests run
// on: 120 × 90 cells of 1/1200° from -25.05 E, 0.0375 N (gdalinfo,
// testdata/geotiff/values.txt), an invented surface with a low block in
// the south-east corner (cells i > 100, j > 70 of make.sh) behind a cliff.
const fixtureDEM = "../../testdata/geotiff/geo_int16_strip_none.tif"

// nearFixtureCliff reports whether lat, lon lies within two cells of the
// fixture's cliff (the edge of the low block), where two bilinear
// resamplings of a 1.5 km step in one cell may differ by hundreds of
// metres.
func nearFixtureCliff(lat, lon float64) bool {
	c, r := (lon+25.05)*1200, (0.0375-lat)*1200
	return (math.Abs(c-101) <= 2 && r >= 68) || (math.Abs(r-71) <= 2 && c >= 98)
}

// routeDoc is the part of route --format json the tests read.
type routeDoc struct {
	CoveredFraction float64 `json:"covered_fraction"`
	Gaps            []struct {
		StartM float64 `json:"start_m"`
		EndM   float64 `json:"end_m"`
		LenM   float64 `json:"length_m"`
	} `json:"gaps"`
	Fields []struct {
		Name string   `json:"name"`
		Lat  float64  `json:"lat"`
		Lon  float64  `json:"lon"`
		Elev *float64 `json:"elevation_m"`
	} `json:"fields"`
	Samples []struct {
		Dist    float64  `json:"distance_m"`
		Lat     float64  `json:"lat"`
		Lon     float64  `json:"lon"`
		Planned float64  `json:"planned_msl_m"`
		Terrain float64  `json:"terrain_m"`
		Least   *float64 `json:"least_msl_m"`
		Margin  *float64 `json:"margin_above_reserve_m"`
		Covered bool     `json:"covered"`
	} `json:"samples"`
}

func routeJSONDoc(t *testing.T, args ...string) routeDoc {
	t.Helper()
	code, out, stderr := runCLI(t, append(append([]string{"route"}, args...), "--format", "json")...)
	if code != 0 {
		t.Fatalf("route %v: exit %d: %s", args, code, stderr)
	}
	var d routeDoc
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatalf("bad JSON: %v", err)
	}
	return d
}

func TestRouteOnGeoTIFFFixture(t *testing.T) {
	// The route command on a terrain fixture: the GPX 1.1 track
	// testdata/routes/fixture-route.gpx over geo_int16_strip_none.tif with
	// the two fields of testdata/fields/fixture-fields.geojson (both at
	// pixel centres, see their ORIGIN.md), the trainer (1:9 at every
	// density) in still air, reserve 300 m, clearance 100 m.
	route := filepath.Join("..", "..", "testdata", "routes", "fixture-route.gpx")
	fields := filepath.Join("..", "..", "testdata", "fields", "fixture-fields.geojson")
	base := []string{"--route", route, "--fields", fields, "--terrain", fixtureDEM, "--step", "100m"}
	d := routeJSONDoc(t, base...)

	// Field elevations from the DEM: gdallocationinfo -valonly (gdal-bin
	// 3.6.2, testdata/geotiff/values.txt) printed px 31 16 = 1009 and
	// px 110 80 = -130 at these pixels.
	gdal := map[string]float64{"Upland Test Strip": 1009, "Lowland Test Strip": -130}
	if len(d.Fields) != 2 {
		t.Fatalf("%d fields", len(d.Fields))
	}
	for _, f := range d.Fields {
		if f.Elev == nil || math.Abs(*f.Elev-gdal[f.Name]) > 1 {
			t.Errorf("%s: elevation %v, GDAL printed %v m", f.Name, f.Elev, gdal[f.Name])
		}
	}
	const reserve, clearance, E = 300.0, 100.0, 9.0
	atField, raised := 0, 0
	for _, s := range d.Samples {
		if s.Least == nil {
			t.Fatalf("no least altitude at %.0f m: every point of the fixture route has a field in reach below the search ceiling", s.Dist)
		}
		least := *s.Least
		// The glide keeps the clearance above the terrain, so the least
		// altitude is never below terrain + clearance (common practice, no
		// source; 0.5 m for the rounding of the JSON).
		if least < s.Terrain+clearance-0.5 {
			t.Errorf("%.0f m: least %.1f m is below terrain %.1f m + clearance", s.Dist, least, s.Terrain)
		}
		// The straight line is the shortest glide: least ≥ elevation +
		// reserve + d/E over the fields (tan γ = 1/E;
		// Anderson, Introduction to Flight, gliding flight), within 0.5 %
		// of the glide part for the grid's discretisation.
		cone, bound := math.Inf(1), math.Inf(1)
		for _, f := range d.Fields {
			dist, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: s.Lat, Lon: s.Lon}, geodesy.LatLon{Lat: f.Lat, Lon: f.Lon})
			if err != nil {
				t.Fatal(err)
			}
			cone = math.Min(cone, *f.Elev+reserve+dist/E)
			bound = math.Min(bound, *f.Elev+reserve+0.995*dist/E)
			if dist < 1 {
				atField++
				// Over the field itself: its elevation plus the reserve,
				// within the cone's rise over one cell (92.6 m / 9 ≈ 10 m).
				if least < *f.Elev+reserve-0.5 || least > *f.Elev+reserve+11 {
					t.Errorf("over %s: least %.1f m, want %.1f m + at most 11 m", f.Name, least, *f.Elev+reserve)
				}
				// The sample's terrain is the DEM's there (GDAL's value).
				if math.Abs(s.Terrain-gdal[f.Name]) > 1 {
					t.Errorf("terrain over %s %.1f m, GDAL printed %v m", f.Name, s.Terrain, gdal[f.Name])
				}
			}
		}
		if least < bound-0.5 {
			t.Errorf("%.0f m: least %.1f m is below the straight-glide bound %.1f m", s.Dist, least, bound)
		}
		if least > cone+50 {
			raised++
		}
		if math.Abs(*s.Margin-(s.Planned-least)) > 0.11 {
			t.Errorf("%.0f m: margin %.1f, want planned − least = %.1f", s.Dist, *s.Margin, s.Planned-least)
		}
	}
	if atField != 2 {
		t.Errorf("%d samples over a field, want 2 (the route passes over both)", atField)
	}
	// The fixture's ridges and cliff must matter: somewhere the least
	// altitude is well above the straight-glide bound.
	if raised < len(d.Samples)/4 {
		t.Errorf("terrain raised the least altitude at only %d of %d samples", raised, len(d.Samples))
	}
	// Planned altitude from the track's <ele> (1900 m rising to 2000 m,
	// testdata/routes/ORIGIN.md), interpolated along the track.
	if p0, p1 := d.Samples[0].Planned, d.Samples[len(d.Samples)-1].Planned; p0 != 1900 || p1 != 2000 {
		t.Errorf("planned altitude %v .. %v m, want 1900 .. 2000 m from the GPX <ele>", p0, p1)
	}

	// --alt 1500 m: gaps. Each sample inside a gap is uncovered and each
	// outside covered, and the covered fraction is 1 − (sum of the gap
	// lengths)/length (definitions of DESIGN.md).
	d = routeJSONDoc(t, append(base, "--alt", "1500m")...)
	if len(d.Gaps) == 0 {
		t.Fatal("no gaps at 1500 m over the fixture")
	}
	L := d.Samples[len(d.Samples)-1].Dist
	sum := 0.0
	for _, g := range d.Gaps {
		if !(g.StartM <= g.EndM) || g.StartM < 0 || g.EndM > L+0.1 || math.Abs(g.EndM-g.StartM-g.LenM) > 0.2 {
			t.Errorf("gap %+v on a route of %.0f m", g, L)
		}
		sum += g.LenM
	}
	if want := 1 - sum/L; math.Abs(d.CoveredFraction-want) > 1e-3 {
		t.Errorf("covered_fraction %.4f, gaps leave %.4f", d.CoveredFraction, want)
	}
	for _, s := range d.Samples {
		in := false
		for _, g := range d.Gaps {
			if s.Dist > g.StartM+0.1 && s.Dist < g.EndM-0.1 {
				in = true
			}
		}
		if in && s.Covered || !in && !s.Covered && !nearGapEnd(s.Dist, d) {
			t.Errorf("%.0f m: covered %v, inside a gap %v", s.Dist, s.Covered, in)
		}
		if s.Covered != (s.Margin != nil && *s.Margin >= 0) {
			t.Errorf("%.0f m: covered %v with margin %v", s.Dist, s.Covered, s.Margin)
		}
	}

	// --agl 500 m: the planned altitude is the terrain under each point
	// plus 500 m (DESIGN.md, common practice), away from the cliff where
	// the DEM and the solver's resampled grid differ.
	d = routeJSONDoc(t, append(base, "--agl", "500m")...)
	for _, s := range d.Samples {
		if !nearFixtureCliff(s.Lat, s.Lon) && math.Abs(s.Planned-s.Terrain-500) > 2 {
			t.Errorf("%.0f m: planned %.1f m over terrain %.1f m, want 500 m above it", s.Dist, s.Planned, s.Terrain)
		}
	}
}

// nearGapEnd reports whether a route distance is at a gap's end (within
// 0.1 m), where a sample may be either side.
func nearGapEnd(dist float64, d routeDoc) bool {
	for _, g := range d.Gaps {
		if math.Abs(dist-g.StartM) <= 0.1 || math.Abs(dist-g.EndM) <= 0.1 {
			return true
		}
	}
	return false
}

func TestRouteWindError(t *testing.T) {
	// --wind-error 30deg,10kt on a uniform 270/20kt: the least altitude at
	// every sample is that from which ONE field is in reach in every one of
	// the nine winds 240°, 270°, 300° × 10, 20, 30 kt (wind.Perturb), the
	// rule coverage uses too (DEVELOPERS.md, "Wind uncertainty"). It is
	// never below the highest of the nine winds each flown alone (some
	// field in each wind, maybe a different one), and the route is never
	// more covered than in the nominal wind (conservative by construction,
	// common practice, no source).
	route := filepath.Join("..", "..", "testdata", "routes", "demo-route.gpx")
	fields := filepath.Join("..", "..", "testdata", "fields", "demo-fields.geojson")
	base := []string{"--route", route, "--fields", fields, "--alt", "2000m", "--step", "1km"}
	worst := routeJSONDoc(t, append(base, "--wind", "270/20kt", "--wind-error", "30deg,10kt")...)
	nominal := routeJSONDoc(t, append(base, "--wind", "270/20kt")...)
	want := make([]float64, len(worst.Samples))
	for _, dir := range []string{"240", "270", "300"} {
		for _, sp := range []string{"10", "20", "30"} {
			d := routeJSONDoc(t, append(base, "--wind", dir+"/"+sp+"kt")...)
			for i, s := range d.Samples {
				v := math.NaN()
				if s.Least != nil {
					v = *s.Least
				}
				switch {
				case dir == "240" && sp == "10", math.IsNaN(want[i]):
					if dir == "240" && sp == "10" {
						want[i] = v
					}
				case math.IsNaN(v) || v > want[i]:
					want[i] = v
				}
			}
		}
	}
	for i, s := range worst.Samples {
		got := math.NaN()
		if s.Least != nil {
			got = *s.Least
		}
		// 0.2 %: each wind flown alone gets its own solver window (sized by
		// its own glide range), so the grids differ slightly. NaN (no one
		// field below the ceiling in every wind) is allowed where a single
		// wind has a value; never the other way.
		if math.IsNaN(want[i]) && !math.IsNaN(got) || got < want[i]-0.002*want[i]-0.11 {
			t.Errorf("%.0f m: least %.1f m with --wind-error, below the highest of the nine winds %.1f m", s.Dist, got, want[i])
		}
	}
	if !(worst.CoveredFraction < nominal.CoveredFraction) {
		t.Errorf("covered %.3f with --wind-error, %.3f in the nominal wind", worst.CoveredFraction, nominal.CoveredFraction)
	}
}
