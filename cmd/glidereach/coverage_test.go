package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	tgeo "github.com/tidwall/geojson"

	"glidereach/terrain"
)

func TestCoverageJSONDiscFlat(t *testing.T) {
	// Flat ground at 0 m, still air, the trainer (glide ratio 9) at 1500 m
	// with a 300 m reserve: one field covers the disc of radius
	// r = (1500 − 300)·9 = 10.8 km (glide cone, tan γ = 1/E; Anderson,
	// Introduction to Flight), so the covered share of a box holding the
	// disc is πr² over the box's area (common practice, no source), within
	// 0.5 %.
	fields := writeTestFields(t, -0.5, -24.5, []float64{0}, []float64{0})
	box := "-0.75,-24.75,-0.25,-24.25"
	code, out, stderr := runCLI(t, "coverage", "--fields", fields, "--box", box, "--alt", "1500m", "--aircraft", "trainer", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var res struct {
		Caution         string  `json:"caution"`
		CoveredFraction float64 `json:"covered_fraction"`
		AreaM2          float64 `json:"area_m2"`
		Fields          []struct {
			Covers    float64 `json:"covers_m2"`
			Exclusive float64 `json:"exclusive_m2"`
		} `json:"fields"`
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatalf("bad JSON: %v\n%s", err, out)
	}
	if res.Caution == "" {
		t.Error("no caution in the JSON")
	}
	r := 1200.0 * 9
	disc := math.Pi * r * r
	if want := disc / res.AreaM2; math.Abs(res.CoveredFraction-want) > 0.005*want {
		t.Errorf("covered_fraction %.4f, want %.4f", res.CoveredFraction, want)
	}
	if len(res.Fields) != 1 || math.Abs(res.Fields[0].Exclusive-disc) > 0.005*disc {
		t.Errorf("fields %+v, want one covering %.4g m² alone", res.Fields, disc)
	}
	// The box is 0.5° × 0.5° near the equator: about 55.3 km × 55.3 km
	// (WGS84 degree lengths at 0.5° S, from memory: 110.57 km per degree of
	// latitude, 111.32 km per degree of longitude); the cell count must be
	// within a cell row of it.
	if want := 0.5 * 110574 * 0.5 * 111316; math.Abs(res.AreaM2-want) > 0.01*want {
		t.Errorf("area %.4g m², want about %.4g m²", res.AreaM2, want)
	}
}

func TestCoverageGeoJSONRasterCandidates(t *testing.T) {
	// GeoJSON parses (tidwall/geojson, RFC 7946) with the covered and the
	// uncovered part; the raster is a GeoTIFF our reader opens (GDAL read the
	// demo's, see DEVELOPERS.md) with the least altitude at the field equal
	// to its elevation plus the reserve; candidates are ranked and picked.
	dir := t.TempDir()
	fields := writeTestFields(t, -0.5, -24.5, []float64{0, 20000}, []float64{0, 90})
	cands := writeTestFields(t, -0.5, -24.5, []float64{30000, 5000}, []float64{270, 180})
	gj, tif := filepath.Join(dir, "c.geojson"), filepath.Join(dir, "least.tif")
	code, text, stderr := runCLI(t, "coverage", "--fields", fields, "--box", "-0.8,-24.8,-0.2,-24.2", "--alt", "1500m",
		"--candidates", cands, "--pick", "2", "--ground", "100m", "--format", "geojson", "--out", gj, "--raster", tif,
		"--map", filepath.Join(dir, "c.png"), "--report", filepath.Join(dir, "c.html"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(text, "PLANNING AID ONLY") || !strings.Contains(text, "Greedy choice") {
		t.Errorf("text lacks the caution or the greedy choice:\n%s", text)
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
	var picked []any
	for _, f := range c.Features {
		k, _ := f.Properties["kind"].(string)
		kinds[k]++
		if k == "covered" && f.Properties["caution"] == nil {
			t.Error("covered feature lacks the caution")
		}
		if k == "candidate" {
			picked = append(picked, f.Properties["picked_step"])
		}
	}
	if kinds["covered"] != 1 || kinds["uncovered"] != 1 || kinds["area"] != 1 || kinds["field"] != 2 || kinds["candidate"] != 2 {
		t.Errorf("feature kinds %v", kinds)
	}
	// Candidate F0 (30 km west, clear of both fields) adds a whole disc and
	// is picked first; F1 (5 km south of a field) adds a crescent.
	if len(picked) != 2 || picked[0] != 1.0 || picked[1] != 2.0 {
		t.Errorf("picked steps %v, want [1 2]", picked)
	}
	src, err := terrain.Open(tif)
	if err != nil {
		t.Fatal(err)
	}
	g, err := src.Window(-24.501, -0.501, -24.499, -0.499)
	if err != nil {
		t.Fatal(err)
	}
	// Field at 100 m with a 300 m reserve: 400 m at the field, within the
	// rise of the glide cone over one cell of about 110 m (110/9 ≈ 12 m):
	// the raster is sampled bilinearly across the cone's apex.
	if v, ok := g.Elevation(-0.5, -24.5); !ok || v < 399 || v > 400+15 {
		t.Errorf("least altitude at the field %.1f m (ok %v), want 400 m", v, ok)
	}
}

func TestCoverageCorridorAGL(t *testing.T) {
	// A corridor along a route with --agl on flat ground is the same as
	// --alt at ground + AGL (common practice, no source).
	route := filepath.Join("..", "..", "testdata", "routes", "demo-route.gpx")
	fields := filepath.Join("..", "..", "testdata", "fields", "demo-fields.geojson")
	get := func(args ...string) float64 {
		code, out, stderr := runCLI(t, append([]string{"coverage", "--fields", fields, "--corridor", route + ",10km", "--ground", "200m", "--format", "json"}, args...)...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		var m map[string]any
		if err := json.Unmarshal([]byte(out), &m); err != nil {
			t.Fatal(err)
		}
		return m["covered_fraction"].(float64)
	}
	a, b := get("--agl", "1500m"), get("--alt", "1700m")
	if a != b || !(a > 0 && a < 1) {
		t.Errorf("--agl 1500m over 200 m ground covers %.4f, --alt 1700m %.4f", a, b)
	}
}

func TestCoverageBadInput(t *testing.T) {
	// Bad input exits 2 naming the flag or file.
	fields := filepath.Join("..", "..", "testdata", "fields", "demo-fields.geojson")
	box := "-0.8,-24.8,-0.2,-24.2"
	checkUsageErrors(t, []struct {
		args []string
		want string
	}{
		{[]string{"coverage", "--box", box, "--alt", "1500m"}, "--fields"},
		{[]string{"coverage", "--fields", fields, "--alt", "1500m"}, "--area"},
		{[]string{"coverage", "--fields", fields, "--box", box}, "--alt"},
		{[]string{"coverage", "--fields", fields, "--box", "-0.8,-24.8,-0.8,-24.9", "--alt", "1500m"}, "--box"},
		// The old lon-first box in --area fails loudly, pointing to --box.
		{[]string{"coverage", "--fields", fields, "--area", "-24.8,-0.8,-24.2,-0.2", "--alt", "1500m"}, "--box LAT,LON,LAT,LON"},
		{[]string{"coverage", "--fields", fields, "--area", "-0.8,-24.85,-0.15,-24.15", "--alt", "1500m"}, "--area takes a GeoJSON file only"},
		{[]string{"coverage", "--fields", fields, "--area", "x.geojson", "--box", "-0.8,-24.8,-0.2,-24.2", "--alt", "1500m"}, "area"},
		{[]string{"coverage", "--fields", fields, "--box", box, "--corridor", "x.gpx,5km", "--alt", "1500m"}, "area"},
		{[]string{"coverage", "--fields", fields, "--corridor", "x.gpx", "--alt", "1500m"}, "--corridor"},
		{[]string{"coverage", "--fields", fields, "--box", box, "--alt", "1500m", "--raster", "least.png"}, "--raster"},
		{[]string{"coverage", "--fields", fields, "--box", box, "--alt", "1500m", "--pick", "-1"}, "--pick"},
		{[]string{"coverage", "--fields", fields, "--box", box, "--agl", "0m"}, "--agl"},
		{[]string{"coverage", "--fields", fields, "--box", box, "--alt", "1500m", "--candidates", "none.geojson"}, "none.geojson"},
		{[]string{"coverage", "--fields", fields, "--box", box, "--alt", "1500m", "--format", "csv"}, "--format"},
		{[]string{"coverage", "--fields", fields, "--box", box, "--alt", "1500m", "--map", "coverage.jpg"}, "--map"},
		{[]string{"coverage", "--fields", fields, "--box", box, "--alt", "1500m", "--wind", "270/20kt", "--wind-error", "400deg,5kt"}, "--wind-error"},
	})
}

// readFixtureLattice reads the whole of a raster over the GeoTIFF
// fixture's extent with our reader (checked against GDAL in terrain's
// tests).
func readFixtureLattice(t *testing.T, path string) *terrain.Grid {
	t.Helper()
	src, err := terrain.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	g, err := src.Window(-25.05, -0.0375, -24.95, 0.0375)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

func TestCoverageOnGeoTIFFFixture(t *testing.T) {
	// The coverage command on a terrain fixture: the whole of
	// geo_int16_strip_none.tif with the two fields of
	// testdata/fields/fixture-fields.geojson (pixel centres, see ORIGIN.md),
	// the trainer in still air, reserve 300 m, clearance 100 m.
	fields := filepath.Join("..", "..", "testdata", "fields", "fixture-fields.geojson")
	box := "-0.0375,-25.05,0.0375,-24.95"
	dem := readFixtureLattice(t, fixtureDEM)
	gdal := map[string]float64{"Upland Test Strip": 1009, "Lowland Test Strip": -130}
	for _, mode := range []struct {
		flag, value string
		flown       func(elev float64) float64
	}{
		{"--alt", "1500m", func(float64) float64 { return 1500 }},
		// --agl: the altitude flown is the terrain at each cell plus the
		// height (DESIGN.md; common practice, no source).
		{"--agl", "400m", func(e float64) float64 { return e + 400 }},
	} {
		dir := t.TempDir()
		tif := filepath.Join(dir, "least.tif")
		code, out, stderr := runCLI(t, "coverage", "--fields", fields, "--box", box, mode.flag, mode.value,
			"--terrain", fixtureDEM, "--raster", tif, "--format", "json")
		if code != 0 {
			t.Fatalf("%s %s: exit %d: %s", mode.flag, mode.value, code, stderr)
		}
		var res struct {
			CoveredFraction float64 `json:"covered_fraction"`
			CoveredM2       float64 `json:"covered_m2"`
			AreaM2          float64 `json:"area_m2"`
			Fields          []struct {
				Name      string  `json:"name"`
				Elev      float64 `json:"elevation_m"`
				Lat       float64 `json:"lat"`
				Lon       float64 `json:"lon"`
				Covers    float64 `json:"covers_m2"`
				Exclusive float64 `json:"exclusive_m2"`
			} `json:"fields"`
		}
		if err := json.Unmarshal([]byte(out), &res); err != nil {
			t.Fatalf("bad JSON: %v", err)
		}
		// The fixture is 0.1° × 0.075° at the equator: about 11.13 km ×
		// 8.29 km (WGS84 degree lengths near 0°, from memory: 110.57 km per
		// degree of latitude, 111.32 km of longitude), within 1 %.
		if want := 0.1 * 111320 * 0.075 * 110574; math.Abs(res.AreaM2-want) > 0.01*want {
			t.Errorf("%s: area %.4g m², want about %.4g m²", mode.flag, res.AreaM2, want)
		}
		// Field elevations from the DEM: gdallocationinfo -valonly
		// (gdal-bin 3.6.2, testdata/geotiff/values.txt) printed px 31 16 =
		// 1009 and px 110 80 = -130.
		union := 0.0
		for _, f := range res.Fields {
			if math.Abs(f.Elev-gdal[f.Name]) > 1 {
				t.Errorf("%s: elevation %.1f m, GDAL printed %v m", f.Name, f.Elev, gdal[f.Name])
			}
			if !(f.Exclusive <= f.Covers) || f.Covers <= 0 {
				t.Errorf("%s %s: covers %.0f m², only it %.0f m²", mode.flag, f.Name, f.Covers, f.Exclusive)
			}
			union += f.Covers
		}
		if res.CoveredM2 > union+1 {
			t.Errorf("%s: covered %.0f m² is more than the fields cover together (%.0f m²)", mode.flag, res.CoveredM2, union)
		}
		// The raster is on the DEM's own lattice: 120 × 90 cells, north-west
		// corner -25.05, 0.0375, cells of 1/1200° (gdalinfo,
		// testdata/geotiff/values.txt).
		least := readFixtureLattice(t, tif)
		if least.Cols != 120 || least.Rows != 90 || math.Abs(least.DX-1.0/1200) > 1e-12 || math.Abs(least.X0-(-25.05+0.5/1200)) > 1e-9 || math.Abs(least.Y0-(0.0375-0.5/1200)) > 1e-9 {
			t.Fatalf("raster lattice %d×%d from %.7f, %.7f by %.9f°, want the DEM's", least.Cols, least.Rows, least.X0, least.Y0, least.DX)
		}
		// At each field's pixel: its elevation plus the reserve, within
		// the glide cone's rise over one solver cell (92 m / 9 ≈ 10 m; the
		// raster is interpolated from the solver grid).
		for _, f := range res.Fields {
			v, ok := least.Elevation(f.Lat, f.Lon)
			if !ok || v < f.Elev+300-0.5 || v > f.Elev+300+11 {
				t.Errorf("%s: least altitude at the field %.1f m (ok %v), want %.1f m + at most 11 m", f.Name, v, ok, f.Elev+300)
			}
		}
		// Covered share: the cells whose least altitude is at most the
		// altitude flown there. The command counts the cells of its solver
		// grid (92.1 m), the raster holds the DEM's lattice (92.6 m), so
		// the two shares agree to about the cells along the boundaries:
		// within 2 % of the area.
		cov, bad := 0, 0
		for i, v := range least.Elev {
			e := float64(dem.Elev[i])
			if v == v && float64(v) <= mode.flown(e) {
				cov++
			}
			// Least altitudes respect the clearance above the terrain
			// (common practice, no source), within the bilinear blending
			// of the two lattices: 5 m, except along the cliff.
			x, y := least.X0+float64(i%least.Cols)*least.DX, least.Y0-float64(i/least.Cols)*least.DY
			if v == v && float64(v) < e+100-5 && !nearFixtureCliff(y, x) {
				bad++
			}
		}
		share := float64(cov) / float64(len(least.Elev))
		if math.Abs(share-res.CoveredFraction) > 0.02 || res.CoveredFraction <= 0.05 || res.CoveredFraction >= 0.95 {
			t.Errorf("%s %s: covered_fraction %.4f, raster share %.4f", mode.flag, mode.value, res.CoveredFraction, share)
		}
		if bad > 0 {
			t.Errorf("%s: %d cells with a least altitude below terrain + clearance", mode.flag, bad)
		}
	}
}

func TestCoverageWindErrorHoldsInEveryWind(t *testing.T) {
	// With --wind-error a cell is covered only when a field is in reach in
	// every wind of the set (conservative for a forecast's uncertainty,
	// common practice, no source): the covered share is no larger than with
	// the nominal wind or with any single member of the set flown alone.
	fields := "../../testdata/fields/demo-fields.geojson"
	box := "-0.8,-24.8,-0.2,-24.2"
	share := func(extra ...string) float64 {
		args := append([]string{"coverage", "--fields", fields, "--box", box, "--alt", "1500m", "--format", "json"}, extra...)
		code, out, stderr := runCLI(t, args...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, stderr)
		}
		var r struct {
			Covered float64 `json:"covered_fraction"`
		}
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatal(err)
		}
		return r.Covered
	}
	withErr := share("--wind", "270/20kt", "--wind-error", "20deg,5kt")
	for _, w := range []string{"270/20kt", "250/15kt", "290/25kt", "250/25kt", "290/15kt"} {
		if s := share("--wind", w); withErr > s+1e-9 {
			t.Errorf("covered share with the wind set %.4f exceeds the share in %s alone, %.4f", withErr, w, s)
		}
	}
	if withErr <= 0 {
		t.Errorf("covered share %.4f: the set should still cover something", withErr)
	}
}
