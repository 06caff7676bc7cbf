package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"glidereach/terrain"
)

func TestDemoWritesFiles(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	code, out, _ := runCLI(t, "demo", "--out", dir)
	if code != 0 {
		t.Fatalf("demo exit %d\n%s", code, out)
	}
	if !strings.Contains(out, "PLANNING AID ONLY") || !strings.Contains(out, "trainer") {
		t.Errorf("summary lacks the caution or the trainer:\n%s", out)
	}
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	for _, e := range ents {
		seen[e.Name()] = true
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
		if strings.HasSuffix(e.Name(), ".json") {
			b, _ := os.ReadFile(filepath.Join(dir, e.Name()))
			if !json.Valid(b) {
				t.Errorf("%s is not valid JSON", e.Name())
			}
		}
	}
	checkKeysListed(t, dir)
	// The trainer's footprint starts from an engine failure in cruise
	// (issue 12: reach from the aircraft's state), the sailplane's from a
	// glide already on its way (it has no engine to lose).
	tr, _ := os.ReadFile(filepath.Join(dir, "reach-trainer.geojson"))
	sp, _ := os.ReadFile(filepath.Join(dir, "reach-sailplane.geojson"))
	if !strings.Contains(string(tr), "engine failure on heading 250° at 100 kt IAS") {
		t.Errorf("the demo trainer's footprint is not from the failure state")
	}
	if strings.Contains(string(sp), "engine failure on heading") {
		t.Errorf("the demo sailplane's footprint claims an engine failure")
	}
	for _, want := range []string{"polar-trainer.txt", "polar-trainer.json", "polar-sailplane.txt"} {
		if !seen[want] {
			t.Errorf("demo did not write %s", want)
		}
	}
}

// TestDemoWriteTerrainReadsBack writes the demo landscape with
// --write-terrain and reads it back with the tool's own GeoTIFF reader: every
// cell, the lattice and the CRS must be those the demo computes on (a
// round trip, no outside source needed), and the terrain command must sample
// it at a point as the demo's own grid does.
func TestDemoWriteTerrainReadsBack(t *testing.T) {
	path := filepath.Join(t.TempDir(), "demo-terrain.tif")
	code, out, errOut := runCLI(t, "demo", "--write-terrain", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "invented landscape (seed 1)") {
		t.Errorf("summary does not say what it wrote:\n%s", out)
	}
	src, err := terrain.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	scene, err := loadDemoScene()
	if err != nil {
		t.Fatal(err)
	}
	want := scene.src.(*terrain.GridSource).Grid
	got, err := src.Window(want.Extent())
	if err != nil {
		t.Fatal(err)
	}
	if got.Cols != want.Cols || got.Rows != want.Rows || got.CRS.EPSG != 4326 ||
		math.Abs(got.X0-want.X0) > 1e-9 || math.Abs(got.Y0-want.Y0) > 1e-9 ||
		math.Abs(got.DX-want.DX) > 1e-12 || math.Abs(got.DY-want.DY) > 1e-12 {
		t.Fatalf("lattice read back %d×%d EPSG:%d X0 %v Y0 %v DX %v DY %v, want %d×%d X0 %v Y0 %v DX %v DY %v",
			got.Cols, got.Rows, got.CRS.EPSG, got.X0, got.Y0, got.DX, got.DY, want.Cols, want.Rows, want.X0, want.Y0, want.DX, want.DY)
	}
	for i := range want.Elev {
		if got.Elev[i] != want.Elev[i] {
			t.Fatalf("cell %d read back %v, wrote %v", i, got.Elev[i], want.Elev[i])
		}
	}
	lat, lon := -0.4321, -24.6543
	e, _ := want.Elevation(lat, lon)
	code, js, errOut := runCLI(t, "terrain", path, "--at", fmt.Sprintf("%v,%v", lat, lon), "--format", "json")
	var rep struct {
		ElevationM *float64 `json:"elevation_m"`
	}
	if err := json.Unmarshal([]byte(js), &rep); err != nil {
		t.Fatal(err)
	}
	// The JSON rounds to 0.1 m.
	if code != 0 || rep.ElevationM == nil || math.Abs(*rep.ElevationM-e) > 0.05+1e-9 {
		t.Errorf("terrain --at on the written file (exit %d, %s) does not give the demo grid's %.1f m:\n%s", code, errOut, e, js)
	}
	// Another seed is another landscape; a non-GeoTIFF name and --out are refused.
	other := filepath.Join(t.TempDir(), "seed7.tif")
	if code, _, errOut := runCLI(t, "demo", "--write-terrain", other, "--seed", "7"); code != 0 {
		t.Fatalf("--seed 7: exit %d: %s", code, errOut)
	}
	s7, err := terrain.Open(other)
	if err != nil {
		t.Fatal(err)
	}
	g7, _ := s7.Window(want.Extent())
	if e7, _ := g7.Elevation(lat, lon); e7 == e {
		t.Errorf("seed 7 gives the same elevation %v as seed 1", e7)
	}
	for _, args := range [][]string{
		{"demo", "--write-terrain", filepath.Join(t.TempDir(), "x.asc")},
		{"demo", "--write-terrain", path, "--out", t.TempDir()},
		{"demo", "--seed", "3"},
	} {
		if code, _, _ := runCLI(t, args...); code != 2 {
			t.Errorf("%q: exit %d, want 2", args, code)
		}
	}
}

// checkKeysListed checks that every key of every JSON and GeoJSON file the
// demo wrote (which runs every command), and of terrain --format json, is
// listed in the README's "Output keys" section, and that the synonyms the
// vocabulary replaced are gone: one name for one quantity across commands
// (common practice, no source).
func checkKeysListed(t *testing.T, dir string) {
	t.Helper()
	readme, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	sec := string(readme)
	i := strings.Index(sec, "## Output keys")
	if i < 0 {
		t.Fatal("README has no Output keys section")
	}
	sec = sec[i+3:]
	if j := strings.Index(sec, "\n## "); j >= 0 {
		sec = sec[:j]
	}
	listed := map[string]bool{}
	for _, part := range strings.Split(sec, "`")[1:] {
		listed[part] = true
	}
	geo := map[string]bool{"type": true, "features": true, "geometry": true, "coordinates": true, "properties": true, "bbox": true}
	old := map[string]bool{"farthest_deg": true, "mc_m_s": true, "altitude_m": true, "dist_m": true}
	docs := map[string][]byte{}
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if strings.HasSuffix(e.Name(), "json") {
			b, _ := os.ReadFile(filepath.Join(dir, e.Name()))
			docs[e.Name()] = b
		}
	}
	_, tj, _ := runCLI(t, "terrain", filepath.Join("..", "..", "testdata", "asc", "geo_corner.asc"), "--at", "-0.1,-24.2", "--format", "json")
	docs["terrain --format json"] = []byte(tj)
	var walk func(name string, v any)
	walk = func(name string, v any) {
		switch x := v.(type) {
		case map[string]any:
			for k, sub := range x {
				if old[k] {
					t.Errorf("%s: key %q is the old synonym; one vocabulary across commands", name, k)
				}
				if !geo[k] && !listed[k] {
					t.Errorf("%s: key %q is not listed in the README's Output keys", name, k)
				}
				walk(name, sub)
			}
		case []any:
			for _, sub := range x {
				walk(name, sub)
			}
		}
	}
	for name, b := range docs {
		var v any
		if err := json.Unmarshal(b, &v); err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		walk(name, v)
	}
	if len(docs) < 8 {
		t.Errorf("only %d JSON documents checked", len(docs))
	}
}
