package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"testing"

	"glidereach/reach/geodesy"
)

// The coverage command's area of the zone agrees with the ellipsoidal area
// of the polygon (geodesy.PolygonArea, checked against the WGS84 surface
// area and Snyder's zone formula) within 0.5 %, and what one local plane
// cannot represent is refused: -180..180 × -80..80 (reported as 450 269
// km²) and 89..90° N (reported as 3 732 km², true 39 192 km²).
func TestCoverageAreaOnEllipsoid(t *testing.T) {
	dir := t.TempDir()
	fields := "../../testdata/fields/demo-fields.geojson"
	write := func(name string, w, s, e, n float64) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(fmt.Sprintf(`{"type":"Polygon","coordinates":[[[%g,%g],[%g,%g],[%g,%g],[%g,%g],[%g,%g]]]}`, w, s, e, s, e, n, w, n, w, s)), 0o644)
		return p
	}
	for _, c := range []struct {
		name       string
		w, s, e, n float64
	}{
		{"near the demo", -24.9, -0.8, -24.1, -0.1},
		{"60 N, 3 x 2 degrees", 10, 59, 13, 61},
		{"-70, 4 x 1 degrees", -60, -70.5, -56, -69.5},
	} {
		p := write("a.geojson", c.w, c.s, c.e, c.n)
		code, out, _ := runCLI(t, "coverage", "--fields", fields, "--area", p, "--alt", "1000m", "--format", "json")
		if code != 0 {
			t.Fatalf("%s: exit %d", c.name, code)
		}
		var doc map[string]any
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		got := findNumber(doc, "area_m2")
		want := geodesy.RingArea([][2]float64{{c.w, c.s}, {c.e, c.s}, {c.e, c.n}, {c.w, c.n}, {c.w, c.s}})
		t.Logf("%s: rel %.2g", c.name, (got-want)/want)
		if math.IsNaN(got) || math.Abs(got-want) > 0.001*want {
			t.Errorf("%s: area %.1f km², ellipsoid %.1f km²", c.name, got/1e6, want/1e6)
		}
	}
	for _, c := range []struct {
		name       string
		w, s, e, n float64
	}{
		{"whole band", -180, -80, 180, 80},
		{"polar cap", -180, 89, 180, 90},
		{"across 1000 km", 0, 0, 10, 10},
	} {
		p := write("b.geojson", c.w, c.s, c.e, c.n)
		if code, _, _ := runCLI(t, "coverage", "--fields", fields, "--area", p, "--alt", "1000m"); code != 2 {
			t.Errorf("%s: exit %d, want 2 (refused)", c.name, code)
		}
	}
}

// findNumber returns the first number under key anywhere in v, NaN if none.
func findNumber(v any, key string) float64 {
	switch v := v.(type) {
	case map[string]any:
		if x, ok := v[key].(float64); ok {
			return x
		}
		for _, x := range v {
			if r := findNumber(x, key); !math.IsNaN(r) {
				return r
			}
		}
	case []any:
		for _, x := range v {
			if r := findNumber(x, key); !math.IsNaN(r) {
				return r
			}
		}
	}
	return math.NaN()
}
