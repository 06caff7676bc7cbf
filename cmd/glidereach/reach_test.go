package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	tgeo "github.com/tidwall/geojson"
	"github.com/tidwall/geojson/geometry"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach/geodesy"
	"glidereach/terrain"
)

// writeTestFields writes a GeoJSON of point fields at the given distances
// (m) and bearings (degrees) from lat0, lon0 and returns its path.
func writeTestFields(t *testing.T, lat0, lon0 float64, dist, brg []float64) string {
	t.Helper()
	var feats []string
	for i := range dist {
		p, _, err := geodesy.Direct(geodesy.LatLon{Lat: lat0, Lon: lon0}, brg[i], dist[i])
		if err != nil {
			t.Fatal(err)
		}
		feats = append(feats, fmt.Sprintf(`{"type":"Feature","properties":{"name":"F%d"},"geometry":{"type":"Point","coordinates":[%.7f,%.7f]}}`, i, p.Lon, p.Lat))
	}
	path := filepath.Join(t.TempDir(), "fields.geojson")
	if err := os.WriteFile(path, []byte(`{"type":"FeatureCollection","features":[`+strings.Join(feats, ",")+`]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

type fc struct {
	Type     string `json:"type"`
	Features []struct {
		Geometry   json.RawMessage `json:"geometry"`
		Properties map[string]any  `json:"properties"`
	} `json:"features"`
}

func TestReachGeoJSONContract(t *testing.T) {
	// Flat ground, still air, trainer from 1500 m with a 300 m reserve. The
	// output must follow RFC 7946 (closed rings, exterior counter-clockwise,
	// §3.1.6) and the contract of DESIGN.md; each field is reachable exactly
	// when it lies inside the reserve ring (tested with tidwall/geojson's
	// predicates), and its required start altitude, fed back as the start
	// altitude, arrives with the reserve within 1 m.
	lat0, lon0 := -0.5, -24.5
	dist := []float64{4000, 8000, 10400, 10900, 11500, 15000}
	brg := []float64{10, 100, 200, 290, 45, 160}
	fields := writeTestFields(t, lat0, lon0, dist, brg)
	out := filepath.Join(t.TempDir(), "reach.geojson")
	code, stdout, stderr := runCLI(t, "reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--aircraft", "trainer", "--fields", fields, "--levels", "0m,150m", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(stdout, "PLANNING AID ONLY") {
		t.Error("text summary lacks the caution")
	}
	data, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	var doc fc
	if err := json.Unmarshal(data, &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Type != "FeatureCollection" {
		t.Fatalf("type %q", doc.Type)
	}
	var reserveRing tgeo.Object
	var levels []float64
	var sawStart bool
	type fieldOut struct {
		name      string
		pt        geometry.Point
		reachable bool
		required  float64
		arrival   float64
	}
	var fieldsOut []fieldOut
	for _, f := range doc.Features {
		obj, err := tgeo.Parse(string(f.Geometry), nil)
		if err != nil {
			t.Fatalf("feature geometry does not parse: %v", err)
		}
		switch f.Properties["kind"] {
		case "footprint":
			lv := f.Properties["arrival_agl_m"].(float64)
			levels = append(levels, lv)
			checkRings(t, f.Geometry)
			if lv == 300 {
				reserveRing = obj
			}
		case "start":
			sawStart = true
			if c, _ := f.Properties["caution"].(string); !strings.Contains(c, "PLANNING AID ONLY") {
				t.Error("start feature lacks the caution")
			}
		case "field":
			p := obj.Center()
			fo := fieldOut{name: f.Properties["name"].(string), pt: geometry.Point{X: p.X, Y: p.Y}, reachable: f.Properties["reachable"].(bool)}
			fo.required, _ = f.Properties["required_msl_m"].(float64)
			fo.arrival, _ = f.Properties["arrival_agl_m"].(float64)
			for _, k := range []string{"name", "reachable", "arrival_agl_m", "required_msl_m", "distance_m", "bearing_deg"} {
				if _, ok := f.Properties[k]; !ok {
					t.Errorf("field %s lacks property %s", fo.name, k)
				}
			}
			fieldsOut = append(fieldsOut, fo)
		}
	}
	if !sawStart || reserveRing == nil || len(levels) != 3 || len(fieldsOut) != len(dist) {
		t.Fatalf("start %v, reserve ring %v, levels %v, fields %d", sawStart, reserveRing != nil, levels, len(fieldsOut))
	}
	nIn, nOut := 0, 0
	for _, f := range fieldsOut {
		inside := reserveRing.Contains(tgeo.NewPoint(f.pt))
		if inside != f.reachable {
			t.Errorf("field %s: reachable %v but inside the reserve ring %v (arrival %.1f m)", f.name, f.reachable, inside, f.arrival)
		}
		if inside {
			nIn++
		} else {
			nOut++
		}
		// Feed the required altitude back.
		fields1 := writeTestFields(t, lat0, lon0, nil, nil)
		_ = fields1
		code, out, stderr := runCLI(t, "reach", "--from", "-0.5,-24.5", "--alt", strconv.FormatFloat(f.required, 'f', 1, 64)+"m", "--aircraft", "trainer", "--fields", fields, "--format", "json")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		var r struct {
			Fields []map[string]any `json:"fields"`
		}
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatal(err)
		}
		for _, g := range r.Fields {
			if g["name"] == f.name {
				a, _ := g["arrival_agl_m"].(float64)
				// required_msl_m is rounded to 0.1 m in the output.
				if math.Abs(a-300) > 1 {
					t.Errorf("field %s: from the required %.1f m the arrival is %.2f m, want 300 ± 1", f.name, f.required, a)
				}
			}
		}
	}
	if nIn == 0 || nOut == 0 {
		t.Errorf("test fields should lie both inside (%d) and outside (%d) the ring", nIn, nOut)
	}
}

// checkRings asserts RFC 7946 §3.1.6 on a Polygon or MultiPolygon: closed
// rings of at least four positions, exterior counter-clockwise, holes
// clockwise, coordinates with at most 6 decimals.
func checkRings(t *testing.T, raw json.RawMessage) {
	t.Helper()
	var g struct {
		Type        string          `json:"type"`
		Coordinates json.RawMessage `json:"coordinates"`
	}
	if err := json.Unmarshal(raw, &g); err != nil {
		t.Fatal(err)
	}
	var polys [][][][2]float64
	switch g.Type {
	case "Polygon":
		var p [][][2]float64
		json.Unmarshal(g.Coordinates, &p)
		polys = [][][][2]float64{p}
	case "MultiPolygon":
		json.Unmarshal(g.Coordinates, &polys)
	default:
		t.Fatalf("footprint geometry %s", g.Type)
	}
	for _, p := range polys {
		for i, r := range p {
			if len(r) < 4 || r[0] != r[len(r)-1] {
				t.Fatalf("ring not closed or too short (%d positions)", len(r))
			}
			a := 0.0
			for j := 1; j < len(r); j++ {
				a += r[j-1][0]*r[j][1] - r[j][0]*r[j-1][1]
			}
			if (i == 0) != (a > 0) {
				t.Errorf("ring %d wound wrongly (signed area %g)", i, a)
			}
			for _, pt := range r {
				for _, v := range pt {
					if math.Abs(v*1e6-math.Round(v*1e6)) > 1e-6 {
						t.Fatalf("coordinate %v has more than 6 decimals", v)
					}
				}
			}
		}
	}
}

func TestReachBadInput(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "r.geojson")
	cases := [][]string{
		{"reach", "--alt", "1500m"},                                              // no --from
		{"reach", "--from", "-0.5,-24.5"},                                        // no altitude
		{"reach", "--from", "-0.5", "--alt", "1500m"},                            // bad position
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500furlongs"},               // bad unit
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--agl", "300m"},     // both
		{"reach", "--from", "-0.5,-24.5", "--alt", "-10m"},                       // below the ground
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--format", "xml"},   // format
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--raster", "a.png"}, // raster type
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--out", "/nonexistent/dir/x.geojson"},
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--aircraft", "nosuch"},
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--fields", filepath.Join(dir, "missing.geojson"), "--out", out},
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--terrain", filepath.Join(dir, "missing.tif"), "--out", out},
		{"reach", "--from", "10,10", "--alt", "1500m", "--terrain", "../../testdata/geotiff/geo_int16_strip_none.tif", "--out", out},
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--levels", "abc"},
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--wind", "270/500kt"},
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--reserve", "-5m"},
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--map", filepath.Join(dir, "m.jpg")},
		{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--report", filepath.Join(dir, "r.pdf")},
	}
	for _, args := range cases {
		code, _, stderr := runCLI(t, args...)
		if code != 2 {
			t.Errorf("%v: exit %d, want 2 (%s)", args, code, stderr)
		}
	}
	for flag, value := range map[string]string{"--bugs": "5", "--mc": "-1m/s", "--air-sink": "30m/s", "--mass": "-3kg"} {
		root := newRootCmd()
		root.SetArgs([]string{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", flag, value})
		root.SetOut(io.Discard)
		root.SetErr(io.Discard)
		err := root.Execute()
		var ue *input.UsageError
		if !errors.As(err, &ue) || !strings.Contains(err.Error(), flag) {
			t.Errorf("%s %s: error %v; want a usage error naming the flag", flag, value, err)
		}
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("a failed run left an output file behind")
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("temporary file %s left behind", e.Name())
		}
	}
}

func TestReachWindErrorIsConservative(t *testing.T) {
	// With --wind-error the footprint must hold for every wind of the set
	// (common practice for a forecast's uncertainty, no source): its area is
	// no larger than the nominal one and a field needs no less altitude.
	fields := writeTestFields(t, -0.5, -24.5, []float64{9000}, []float64{200})
	get := func(extra ...string) (area, required float64) {
		args := append([]string{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--wind", "270/20kt", "--fields", fields, "--format", "json"}, extra...)
		code, out, stderr := runCLI(t, args...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		var r struct {
			Levels []struct {
				Area float64 `json:"area_m2"`
			} `json:"levels"`
			Fields []map[string]any `json:"fields"`
		}
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatal(err)
		}
		return r.Levels[0].Area, r.Fields[0]["required_msl_m"].(float64)
	}
	a0, r0 := get()
	a1, r1 := get("--wind-error", "20deg,5kt")
	if !(a1 < a0) || !(r1 > r0) {
		t.Errorf("with wind error: area %.0f (nominal %.0f), required %.1f (nominal %.1f)", a1, a0, r1, r0)
	}
	if code, _, _ := runCLI(t, "reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--wind-error", "400deg,5kt"); code != 2 {
		t.Errorf("bad --wind-error: exit %d, want 2", code)
	}
}

func TestReachRasterRoundTrip(t *testing.T) {
	// --raster writes the arrival height above ground; read back with the
	// project's own readers (whose GeoTIFF and ASCII-grid decoding is checked
	// against GDAL-made fixtures), it must give at the start the start height
	// above the ground and, on flat ground in still air with the trainer's
	// glide ratio of 9, 1500 − d/9 at distance d (tan γ = 1/E).
	dir := t.TempDir()
	for _, name := range []string{"agl.tif", "agl.asc"} {
		path := filepath.Join(dir, name)
		code, _, stderr := runCLI(t, "reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--aircraft", "trainer", "--raster", path)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		src, err := terrain.OpenWith(terrain.OpenOptions{CRS: terrain.CRS{EPSG: 4326}}, path)
		if err != nil {
			t.Fatal(err)
		}
		g, err := src.Window(-24.6, -0.6, -24.4, -0.4)
		if err != nil {
			t.Fatal(err)
		}
		// The apex of the cone is sampled between cells ≈ 44 m apart:
		// within a cell of it the height is 1500 − 44/9 ≈ 1495 m at worst.
		if v, ok := g.Elevation(-0.5, -24.5); !ok || math.Abs(v-1500) > 5 {
			t.Errorf("%s: %.1f m at the start, want 1500", name, v)
		}
		p, _, _ := geodesy.Direct(geodesy.LatLon{Lat: -0.5, Lon: -24.5}, 60, 6000)
		if v, ok := g.Elevation(p.Lat, p.Lon); !ok || math.Abs(v-(1500-6000.0/9)) > 5 {
			t.Errorf("%s: %.1f m 6 km out, want %.1f", name, v, 1500-6000.0/9)
		}
	}
}

func TestReachOnGeoTIFFFixture(t *testing.T) {
	// reach over a DEM: the UTM GeoTIFF fixture made with GDAL (see
	// testdata/geotiff/make.sh; our reader matches the values GDAL printed).
	// The start height above the ground must be measured from the DEM's
	// value there, the footprint must not be empty, and the output must
	// name the terrain file.
	const dem = "../../testdata/geotiff/utm32626_int16_tiled_deflate.tif"
	src, err := terrain.Open(dem)
	if err != nil {
		t.Fatal(err)
	}
	lat, lon := 4.988, -27.164
	g, err := src.Window(lon-0.01, lat-0.01, lon+0.01, lat+0.01)
	if err != nil {
		t.Fatal(err)
	}
	ground, ok := g.Elevation(lat, lon)
	if !ok {
		t.Fatal("fixture has no ground at the start")
	}
	code, out, stderr := runCLI(t, "reach", "--from", "4.988,-27.164", "--agl", "300m", "--terrain", dem, "--reserve", "100m", "--clearance", "50m", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var r struct {
		Start struct {
			Alt    float64 `json:"alt_msl_m"`
			Ground float64 `json:"ground_m"`
		} `json:"start"`
		Levels []struct {
			Area float64 `json:"area_m2"`
		} `json:"levels"`
		Terrain string `json:"terrain"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Start.Ground-ground) > 0.1 || math.Abs(r.Start.Alt-(ground+300)) > 0.1 {
		t.Errorf("start ground %.1f m, alt %.1f m; want %.1f and %.1f", r.Start.Ground, r.Start.Alt, ground, ground+300)
	}
	if len(r.Levels) == 0 || r.Levels[0].Area <= 0 {
		t.Errorf("empty footprint over the fixture: %+v", r.Levels)
	}
	if !strings.Contains(r.Terrain, "utm32626_int16_tiled_deflate.tif") {
		t.Errorf("terrain named %q", r.Terrain)
	}
}

func TestOutputNamesCheckedByEveryCommand(t *testing.T) {
	// A --report that is not .html and a --map that is not .png are
	// refused (exit 2) by every command that writes them, before computing.
	dir := t.TempDir()
	fields := "../../testdata/fields/demo-fields.geojson"
	base := map[string][]string{
		"reach":    {"reach", "--from", "-0.5,-24.5", "--alt", "1500m"},
		"final":    {"final", "--from", "-0.5,-24.5", "--alt", "1500m", "--to", "-0.45,-24.6"},
		"route":    {"route", "--route", "../../testdata/routes/demo-route.gpx", "--fields", fields, "--alt", "1500m"},
		"coverage": {"coverage", "--fields", fields, "--box", "-0.8,-24.8,-0.2,-24.2", "--alt", "1500m"},
	}
	for name, args := range base {
		for _, bad := range [][]string{{"--report", filepath.Join(dir, "r.pdf")}, {"--map", filepath.Join(dir, "m.jpg")}} {
			if code, _, _ := runCLI(t, append(append([]string{}, args...), bad...)...); code != 2 {
				t.Errorf("%s %v: exit %d, want 2", name, bad, code)
			}
		}
	}
}

func TestReachFieldsOnTheCardinalLines(t *testing.T) {
	// Regression (issue 11, defect 1): a field due north of the start (same
	// longitude) got an arrival of 1845 m above the field from a 1500 m
	// start and a required altitude of 583 m, because the direction blend of
	// the descent tables wrapped wrongly at bearing 0/360. Every field on or
	// a hair beside the start's meridian and parallel must agree with the
	// final glide to the same point (the final glide integrates the speed-to-
	// fly table on the geodesic's own track, independently of the footprint;
	// the two commands compute the same quantity, so they must agree) within
	// 1.5 m (outputs are rounded to 0.1 m or 1 m, and the footprint's
	// straight frame line is within a metre of the geodesic over 10 km).
	const lat0, lon0 = 50.0, -1.0
	const dLat, dLon = 0.088846475148735, 0.138
	pts := [][2]float64{
		{lat0 + dLat, lon0}, {lat0 + dLat, lon0 + 1e-9}, {lat0 + dLat, lon0 - 1e-9}, {lat0 + dLat, lon0 + 1e-7},
		{lat0 - dLat, lon0}, {lat0 - dLat, lon0 - 1e-9},
		{lat0, lon0 + dLon}, {lat0 + 1e-9, lon0 - dLon}, {lat0 - 1e-9, lon0 - dLon},
	}
	var feats []string
	for i, p := range pts {
		feats = append(feats, fmt.Sprintf(`{"type":"Feature","properties":{"name":"F%d"},"geometry":{"type":"Point","coordinates":[%.15f,%.15f]}}`, i, p[1], p[0]))
	}
	fields := filepath.Join(t.TempDir(), "fields.geojson")
	if err := os.WriteFile(fields, []byte(`{"type":"FeatureCollection","features":[`+strings.Join(feats, ",")+`]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	common := []string{"--aircraft", "trainer", "--wind", "250/15kt", "--format", "json"}
	code, out, stderr := runCLI(t, append([]string{"reach", "--from", "50,-1", "--alt", "1500m", "--fields", fields}, common...)...)
	if code != 0 {
		t.Fatalf("reach: exit %d: %s", code, stderr)
	}
	var r struct {
		Fields []struct {
			Name     string  `json:"name"`
			Arrival  float64 `json:"arrival_agl_m"`
			Required float64 `json:"required_msl_m"`
		} `json:"fields"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if len(r.Fields) != len(pts) {
		t.Fatalf("%d fields in the output, want %d", len(r.Fields), len(pts))
	}
	for _, f := range r.Fields {
		i, err := strconv.Atoi(strings.TrimPrefix(f.Name, "F"))
		if err != nil || i < 0 || i >= len(pts) {
			t.Fatalf("unexpected field %q", f.Name)
		}
		p := pts[i]
		to := strconv.FormatFloat(p[0], 'f', 15, 64) + "," + strconv.FormatFloat(p[1], 'f', 15, 64)
		code, out, stderr := runCLI(t, append([]string{"final", "--from", "50,-1", "--alt", "1500m", "--to", to}, common...)...)
		if code != 0 {
			t.Fatalf("final to %s: exit %d: %s", to, code, stderr)
		}
		var g struct {
			Arrival  float64 `json:"arrival_agl_m"`
			Required float64 `json:"required_msl_m"`
		}
		if err := json.Unmarshal([]byte(out), &g); err != nil {
			t.Fatal(err)
		}
		if f.Arrival >= 1500 || math.Abs(f.Arrival-g.Arrival) > 1.5 {
			t.Errorf("%s at %s: reach arrives %.1f m above the field, the final glide %.1f m", f.Name, to, f.Arrival, g.Arrival)
		}
		if math.Abs(f.Required-g.Required) > 1.5 {
			t.Errorf("%s at %s: reach needs %.1f m MSL, the final glide %.1f m", f.Name, to, f.Required, g.Required)
		}
	}
}

func TestReachFarthestIsTheRingVertex(t *testing.T) {
	// Regression (issue 11, defect 5): the farthest point was reported 4°
	// and 19 m off the raster's own farthest cell. It is now the reserve
	// ring's vertex farthest from the start, and says so: the geodesic
	// distance from the start to every outer-ring vertex of the reserve
	// polygon in the GeoJSON (Vincenty on WGS84, checked against published
	// values in reach/geodesy) is at most the reported one, and the reported
	// point is one of them (0.5 m, 0.05°: coordinates are rounded to 1e-6°).
	code, out, stderr := runCLI(t, "reach", "--from", "10,10", "--alt", "1500m", "--aircraft", "trainer", "--wind", "270/30kt", "--format", "geojson")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc fc
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	var far, farDeg, farLat, farLon float64
	var rings [][][2]float64
	for _, f := range doc.Features {
		switch f.Properties["kind"] {
		case "start":
			far, _ = f.Properties["farthest_m"].(float64)
			farDeg, _ = f.Properties["farthest_bearing_deg"].(float64)
			farLat, _ = f.Properties["farthest_lat"].(float64)
			farLon, _ = f.Properties["farthest_lon"].(float64)
			if s, _ := f.Properties["farthest_is"].(string); !strings.Contains(s, "ring") {
				t.Errorf("farthest_is = %q, want it to name the ring vertex", s)
			}
		case "footprint":
			if lv, _ := f.Properties["arrival_agl_m"].(float64); lv != 300 {
				continue
			}
			var g struct {
				Type        string          `json:"type"`
				Coordinates json.RawMessage `json:"coordinates"`
			}
			if err := json.Unmarshal(f.Geometry, &g); err != nil {
				t.Fatal(err)
			}
			var polys [][][][2]float64
			if g.Type == "Polygon" {
				var p [][][2]float64
				if err := json.Unmarshal(g.Coordinates, &p); err != nil {
					t.Fatal(err)
				}
				polys = append(polys, p)
			} else if err := json.Unmarshal(g.Coordinates, &polys); err != nil {
				t.Fatal(err)
			}
			for _, p := range polys {
				rings = append(rings, p[0])
			}
		}
	}
	if far <= 0 || len(rings) == 0 {
		t.Fatalf("farthest %v m, %d reserve rings", far, len(rings))
	}
	best, bestDeg := 0.0, 0.0
	for _, r := range rings {
		for _, v := range r {
			s, az, _, err := geodesy.Inverse(geodesy.LatLon{Lat: 10, Lon: 10}, geodesy.LatLon{Lat: v[1], Lon: v[0]})
			if err != nil {
				t.Fatal(err)
			}
			if s > best {
				best, bestDeg = s, math.Mod(az+360, 360)
			}
		}
	}
	if math.Abs(best-far) > 0.5 || math.Abs(bestDeg-farDeg) > 0.05 {
		t.Errorf("reported farthest %.1f m toward %.2f°, the ring's farthest vertex is %.1f m toward %.2f°", far, farDeg, best, bestDeg)
	}
	s, _, _, _ := geodesy.Inverse(geodesy.LatLon{Lat: 10, Lon: 10}, geodesy.LatLon{Lat: farLat, Lon: farLon})
	if math.Abs(s-far) > 0.5 {
		t.Errorf("the reported point %.6f, %.6f is %.1f m from the start, reported %.1f m", farLat, farLon, s, far)
	}
}
