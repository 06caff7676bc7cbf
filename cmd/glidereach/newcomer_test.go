package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
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
