package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
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
	cases := []struct {
		args  []string
		where string
		msg   string
	}{
		{[]string{trunc}, trunc, "truncated"},
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
