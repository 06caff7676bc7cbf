package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	tgeo "github.com/tidwall/geojson"
)

// The JSON contract of DESIGN.md: top-level feasible, landing_direction_deg
// and gates, each with name, lat, lon, alt_msl_m, height_above_field_m.
func TestApproachJSONContract(t *testing.T) {
	code, out, errs := runCLI(t, "approach", "--from", "-0.45,-24.6", "--alt", "2000m", "--to", "-0.5,-24.5@100m",
		"--wind", "240/12kt", "--heading", "90", "--speed", "100kt", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if f, ok := doc["feasible"].(bool); !ok || !f {
		t.Fatalf("feasible = %v: %v", doc["feasible"], doc["reason"])
	}
	// Into a uniform wind from 240 the final track is 240 (common practice).
	if d, ok := doc["landing_direction_deg"].(float64); !ok || math.Abs(d-240) > 0.05 {
		t.Errorf("landing_direction_deg = %v", doc["landing_direction_deg"])
	}
	gates, ok := doc["gates"].([]any)
	if !ok || len(gates) < 2 {
		t.Fatalf("gates = %v", doc["gates"])
	}
	prev := math.Inf(1)
	for _, g := range gates {
		m := g.(map[string]any)
		for _, k := range []string{"lat", "lon", "alt_msl_m", "height_above_field_m"} {
			if _, ok := m[k].(float64); !ok {
				t.Errorf("gate %v: %s = %v", m["name"], k, m[k])
			}
		}
		if _, ok := m["name"].(string); !ok {
			t.Errorf("gate without name: %v", m)
		}
		// Heights above the field are MSL minus the field's 100 m.
		if a, h := m["alt_msl_m"].(float64), m["height_above_field_m"].(float64); math.Abs(a-h-100) > 0.11 {
			t.Errorf("gate %v: %v MSL, %v above a 100 m field", m["name"], a, h)
		}
		if h := m["height_above_field_m"].(float64); h > prev {
			t.Errorf("gate %v higher than the one before", m["name"])
		} else {
			prev = h
		}
	}
	if last := gates[len(gates)-1].(map[string]any); last["name"] != "touchdown" || last["height_above_field_m"].(float64) != 0 {
		t.Errorf("last gate %v", last)
	}
	if !strings.Contains(doc["caution"].(string), "PLANNING AID") {
		t.Error("no caution")
	}
}

// GeoJSON: valid (tidwall/geojson parses it), the path a 2-D LineString with
// its altitudes in properties, gates as points, the caution on features.
func TestApproachGeoJSON(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "plan.geojson")
	code, stdout, errs := runCLI(t, "approach", "--from", "-0.45,-24.6", "--alt", "2000m", "--to", "-0.5,-24.5",
		"--wind", "240/12kt", "--out", out, "--units", "ft-kt", "--variation", "7W")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(stdout, "PLAN HOLDS") || !strings.Contains(stdout, "MH") || !strings.Contains(stdout, "heights in ft") {
		t.Errorf("text: %s", stdout)
	}
	data, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := tgeo.Parse(string(data), nil); err != nil {
		t.Fatal(err)
	}
	var fc struct {
		Features []struct {
			Geometry struct {
				Type        string          `json:"type"`
				Coordinates json.RawMessage `json:"coordinates"`
			} `json:"geometry"`
			Properties map[string]any `json:"properties"`
		} `json:"features"`
	}
	if err := json.Unmarshal(data, &fc); err != nil {
		t.Fatal(err)
	}
	var path, gates int
	for _, f := range fc.Features {
		switch f.Properties["kind"] {
		case "approach_path":
			path++
			var c [][]float64
			if err := json.Unmarshal(f.Geometry.Coordinates, &c); err != nil {
				t.Fatal(err)
			}
			for _, p := range c {
				if len(p) != 2 {
					t.Fatalf("position %v has a third coordinate", p)
				}
			}
			if alts, ok := f.Properties["profile_alt_msl_m"].([]any); !ok || len(alts) != len(c) {
				t.Errorf("profile_alt_msl_m has %d values for %d positions", len(alts), len(c))
			}
		case "gate":
			gates++
			if f.Geometry.Type != "Point" || f.Properties["caution"] == nil {
				t.Errorf("gate %v", f.Properties)
			}
		}
	}
	if path != 1 || gates < 2 {
		t.Errorf("%d paths, %d gates", path, gates)
	}
}

// Bad input exits 2 naming the input: a landing direction out of range, a
// strip of zero length, an approach speed below the stall, --speed alone.
func TestApproachBadInput(t *testing.T) {
	dir := t.TempDir()
	zero := filepath.Join(dir, "zero.geojson")
	if err := os.WriteFile(zero, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"name":"Nil Strip"},
		"geometry":{"type":"LineString","coordinates":[[-24.5,-0.5],[-24.5,-0.5]]}}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	base := []string{"approach", "--from", "-0.45,-24.6", "--alt", "1500m"}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--to", "-0.5,-24.5", "--landing-dir", "400"}, "--landing-dir"},
		{[]string{"--fields", zero, "--field", "Nil Strip"}, "zero length"},
		// The trainer stalls at 48 kt (reach/builtin.go).
		{[]string{"--to", "-0.5,-24.5", "--approach-speed", "45kt"}, "--approach-speed"},
		{[]string{"--to", "-0.5,-24.5", "--speed", "90kt"}, "--speed"},
		{[]string{"--to", "-0.5,-24.5", "--heading", "400"}, "--heading"},
		{[]string{"--to", "-0.5,-24.5", "--heading", "90", "--bank", "80"}, "--bank"},
		{[]string{"--to", "-0.5,-24.5", "--heading", "90", "--speed", "30kt"}, "--speed"},
		{[]string{"--to", "-0.5,-24.5", "--variation", "12X"}, "--variation"},
		{[]string{"--to", "-0.5,-24.5", "--units", "furlongs"}, "--units"},
		{[]string{}, "--field"},
	} {
		// exitCode writes the message to os.Stderr; capture it.
		r, w, _ := os.Pipe()
		saved := os.Stderr
		os.Stderr = w
		code, _, _ := runCLI(t, append(append([]string{}, base...), c.args...)...)
		w.Close()
		os.Stderr = saved
		var msg bytes.Buffer
		msg.ReadFrom(r)
		if errs := msg.String(); code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q; want 2 naming %s", c.args, code, errs, c.want)
		}
	}
}

// A field out of reach names the next field of the file that works.
func TestApproachNextField(t *testing.T) {
	fields := filepath.Join("..", "..", "testdata", "fields", "demo-fields.geojson")
	// Low over Shoalwater Field's west, far from Cinder Terrace.
	code, out, errs := runCLI(t, "approach", "--from", "-0.56,-24.76", "--alt", "700m", "--fields", fields, "--field", "Cinder Terrace")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "NO PLAN HOLDS") || !strings.Contains(out, "Next field that works: Shoalwater Field") {
		t.Errorf("%s", out)
	}
}

// Over a DEM (the GeoTIFF fixture; its values printed by GDAL are in
// testdata/geotiff/values.txt) the field's elevation comes from the
// terrain and the plan keeps the pattern's clearance over it.
func TestApproachOverTerrain(t *testing.T) {
	dem := filepath.Join("..", "..", "testdata", "geotiff", "geo_int16_strip_none.tif")
	code, out, errs := runCLI(t, "approach", "--terrain", dem, "--from", "0.02,-25.03", "--alt", "2800m",
		"--to", "-0.02,-24.97", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	f := doc["field"].(map[string]any)
	if f["elevation_from"] != "terrain" || !(f["elevation_m"].(float64) > 0) {
		t.Errorf("field %v", f)
	}
	if doc["feasible"] != true {
		t.Fatalf("not feasible: %v", doc["reason"])
	}
	for _, l := range doc["legs"].([]any) {
		m := l.(map[string]any)
		c, ok := m["lowest_clearance_m"].(float64)
		// The pattern keeps 50 m tapering to half the height above the
		// field; the glide 100 m tapering likewise: never below 0.
		if ok && c < 0 {
			t.Errorf("leg %v passes %v m below the terrain", m["name"], c)
		}
	}
}
