package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

type coverageDoc struct {
	Caution         string  `json:"caution"`
	CoveredFraction float64 `json:"covered_fraction"`
	AreaM2          float64 `json:"area_m2"`
	CoveredM2       float64 `json:"covered_m2"`
	Fields          []struct {
		Name      string  `json:"name"`
		Covers    float64 `json:"covers_m2"`
		Exclusive float64 `json:"exclusive_m2"`
	} `json:"fields"`
	Tiled *struct {
		Tiles        int `json:"tiles"`
		TilesResumed int `json:"tiles_resumed"`
	} `json:"tiled"`
}

func coverageJSONOf(t *testing.T, args ...string) coverageDoc {
	t.Helper()
	code, out, stderr := runCLI(t, append([]string{"coverage", "--format", "json"}, args...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var d coverageDoc
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatalf("bad JSON: %v\n%s", err, out)
	}
	if d.Caution == "" {
		t.Error("no caution in the JSON")
	}
	return d
}

func TestCoverageTiledMatchesSingleGrid(t *testing.T) {
	// Two paths to the same figures on an area one grid holds at 30 m:
	// flat ground, a layered wind, three fields. The tiled path reads each
	// cell conservatively (the highest of four solver cells), so its
	// covered share may be lower by up to about a cell's width of the
	// boundary, and never higher by more than rounding: tolerance 1
	// percentage point, per-field areas within 2 %.
	fields := writeTestFields(t, -0.5, -24.5, []float64{0, 9000, 14000}, []float64{0, 60, 230})
	args := []string{"--fields", fields, "--box", "-0.65,-24.65,-0.35,-24.35", "--alt", "1200m", "--aircraft", "trainer", "--wind", "0m:240/10kt,1500m:270/20kt"}
	single := coverageJSONOf(t, args...)
	tiled := coverageJSONOf(t, append(args, "--tiled", "--tile", "256", "--workers", "2")...)
	if tiled.Tiled == nil || tiled.Tiled.Tiles < 4 {
		t.Fatalf("tiled run reports %+v, want several tiles", tiled.Tiled)
	}
	t.Logf("covered fraction single %.4f, tiled %.4f", single.CoveredFraction, tiled.CoveredFraction)
	if d := tiled.CoveredFraction - single.CoveredFraction; d > 0.002 || d < -0.01 {
		t.Errorf("covered fraction tiled %.4f, single grid %.4f", tiled.CoveredFraction, single.CoveredFraction)
	}
	for i := range single.Fields {
		a, b := tiled.Fields[i].Covers, single.Fields[i].Covers
		if math.Abs(a-b) > 0.02*b {
			t.Errorf("field %s covers %.4g m² tiled, %.4g m² single", single.Fields[i].Name, a, b)
		}
	}
	// The zone's area: the same box counted on two lattices, within 0.5 %.
	if math.Abs(tiled.AreaM2-single.AreaM2) > 0.005*single.AreaM2 {
		t.Errorf("area %.6g m² tiled, %.6g m² single", tiled.AreaM2, single.AreaM2)
	}
}

func TestCoverageTiledResumeAndOutputs(t *testing.T) {
	dir := t.TempDir()
	work := filepath.Join(dir, "work")
	fields := writeTestFields(t, -0.5, -24.5, []float64{0, 12000}, []float64{0, 90})
	cog1, cog2 := filepath.Join(dir, "a.tif"), filepath.Join(dir, "b.tif")
	fgb1, fgb2 := filepath.Join(dir, "a.fgb"), filepath.Join(dir, "b.fgb")
	args := []string{"--fields", fields, "--box", "-0.6,-24.6,-0.4,-24.3", "--alt", "1000m", "--aircraft", "trainer", "--tile", "128", "--work-dir", work}
	first := coverageJSONOf(t, append(args, "--cog", cog1, "--fgb", fgb1)...)
	again := coverageJSONOf(t, append(args, "--cog", cog2, "--fgb", fgb2, "--workers", "1")...)
	if again.Tiled.TilesResumed != again.Tiled.Tiles {
		t.Errorf("second run took %d of %d tiles from the work directory", again.Tiled.TilesResumed, again.Tiled.Tiles)
	}
	if first.CoveredM2 != again.CoveredM2 {
		t.Errorf("covered %v m², then %v m² from the work files", first.CoveredM2, again.CoveredM2)
	}
	for _, p := range [][2]string{{cog1, cog2}, {fgb1, fgb2}} {
		a, err := os.ReadFile(p[0])
		if err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(p[1])
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(a, b) {
			t.Errorf("%s and %s differ", p[0], p[1])
		}
	}
	// Another plan in the same work directory: exit 2 naming --work-dir.
	code, msg := runCorpusEntry(t, []string{"coverage", "--fields", fields, "--box", "-0.6,-24.6,-0.4,-24.3", "--alt", "1100m", "--aircraft", "trainer", "--tile", "128", "--work-dir", work}, false)
	if code != 2 || !strings.Contains(msg, "--work-dir") {
		t.Errorf("another plan in the work directory: exit %d, %q", code, msg)
	}
	// A tile file damaged after the run (one byte flipped): exit 2 naming
	// --work-dir and the file, not a runtime failure, and no COG written.
	tiles, err := filepath.Glob(filepath.Join(work, "tiles", "*"))
	if err != nil || len(tiles) == 0 {
		t.Fatalf("no tile files in %s (%v)", work, err)
	}
	b, err := os.ReadFile(tiles[0])
	if err != nil {
		t.Fatal(err)
	}
	b[len(b)/2] ^= 0xff
	if err := os.WriteFile(tiles[0], b, 0o644); err != nil {
		t.Fatal(err)
	}
	cog3 := filepath.Join(dir, "c.tif")
	code, msg = runCorpusEntry(t, append(append([]string{"coverage"}, args...), "--cog", cog3), false)
	if code != 2 || !strings.Contains(msg, "--work-dir") || !strings.Contains(msg, filepath.Base(tiles[0])) {
		t.Errorf("damaged tile file: exit %d, %q; want 2 naming --work-dir and %s", code, msg, filepath.Base(tiles[0]))
	}
	if _, err := os.Stat(cog3); err == nil {
		t.Errorf("%s written from a damaged work directory", cog3)
	}
}

func TestCoverageTiledBadValues(t *testing.T) {
	dir := t.TempDir()
	fields := writeTestFields(t, -0.5, -24.5, []float64{0}, []float64{0})
	base := []string{"coverage", "--fields", fields, "--box", "-0.6,-24.6,-0.4,-24.4", "--alt", "1000m", "--aircraft", "trainer"}
	notDir := filepath.Join(dir, "file")
	os.WriteFile(notDir, []byte("x"), 0o644)
	for _, c := range []struct {
		args []string
		flag string
	}{
		{[]string{"--tiled", "--workers", "-1"}, "--workers"},
		{[]string{"--tiled", "--tile", "100"}, "--tile"},
		{[]string{"--tiled", "--tile", "16"}, "--tile"},
		{[]string{"--cell", "0.5m"}, "--cell"},
		{[]string{"--tiled", "--map", filepath.Join(dir, "m.png")}, "--map"},
		{[]string{"--cog", filepath.Join(dir, "x.asc")}, "--cog"},
		{[]string{"--fgb", filepath.Join(dir, "x.geojson")}, "--fgb"},
		{[]string{"--work-dir", notDir}, "--work-dir"},
		{[]string{"--tiled", "--terrain", "../../testdata/geotiff/geo_int16_strip_none.tif", "--cell", "1m"}, "--cell"},
	} {
		code, msg := runCorpusEntry(t, append(base, c.args...), false)
		if code != 2 || !strings.Contains(msg, c.flag) {
			t.Errorf("%v: exit %d, %q; want 2 naming %s", c.args, code, msg, c.flag)
		}
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("files left behind: %v", ents)
	}
}

func TestCoverageTiledCandidatesAndWindError(t *testing.T) {
	// Candidates: the tiled ranking and greedy choice agree with the single
	// grid's (two paths to the same figures): the same order, gains within
	// 3 % (the conservative read takes about a cell's width off each
	// boundary). --wind-error: every wind of the set must hold, so the
	// covered share can only fall (never optimistic).
	fields := writeTestFields(t, -0.5, -24.5, []float64{0}, []float64{0})
	cands := writeTestFields(t, -0.5, -24.5, []float64{9000, 16000}, []float64{90, 270})
	args := []string{"--fields", fields, "--candidates", cands, "--pick", "2", "--box", "-0.62,-24.66,-0.38,-24.34", "--alt", "1000m", "--aircraft", "trainer", "--wind", "270/15kt"}
	type doc struct {
		CoveredFraction float64 `json:"covered_fraction"`
		Candidates      []struct {
			Name string  `json:"name"`
			Adds float64 `json:"adds_m2"`
		} `json:"candidates"`
		Picks []struct {
			Name string  `json:"name"`
			Adds float64 `json:"adds_m2"`
		} `json:"picks"`
	}
	get := func(extra ...string) doc {
		code, out, stderr := runCLI(t, append(append([]string{"coverage", "--format", "json"}, args...), extra...)...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		var d doc
		if err := json.Unmarshal([]byte(out), &d); err != nil {
			t.Fatal(err)
		}
		return d
	}
	single, tiled := get(), get("--tiled", "--tile", "128")
	if len(single.Candidates) != 2 || len(tiled.Candidates) != 2 || len(tiled.Picks) != len(single.Picks) {
		t.Fatalf("single %+v, tiled %+v", single, tiled)
	}
	for i := range single.Candidates {
		a, b := tiled.Candidates[i], single.Candidates[i]
		if a.Name != b.Name || math.Abs(a.Adds-b.Adds) > 0.03*b.Adds {
			t.Errorf("rank %d: tiled %s adds %.4g m², single %s adds %.4g m²", i+1, a.Name, a.Adds, b.Name, b.Adds)
		}
	}
	for i := range single.Picks {
		if tiled.Picks[i].Name != single.Picks[i].Name {
			t.Errorf("pick %d: tiled %s, single %s", i+1, tiled.Picks[i].Name, single.Picks[i].Name)
		}
	}
	werr := get("--tiled", "--tile", "128", "--wind-error", "20deg,5kt")
	if werr.CoveredFraction > tiled.CoveredFraction {
		t.Errorf("covered %.4f with --wind-error, %.4f without", werr.CoveredFraction, tiled.CoveredFraction)
	}
	t.Logf("covered: single %.4f, tiled %.4f, tiled with --wind-error %.4f", single.CoveredFraction, tiled.CoveredFraction, werr.CoveredFraction)
}

func TestCoverageTiledAGLOnDEM(t *testing.T) {
	// --agl over a DEM (the GDAL-made fixture of 3 arc-seconds, about 92 m,
	// the corridor reaching off its edge): both paths fly 600 m above the
	// DEM at each cell. The tiled path's conservative read (the highest of
	// four solver cells) costs more where the terrain is steep at 92 m
	// cells: its covered share may be lower by up to 3 points, never higher
	// by more than rounding.
	args := []string{"--fields", "../../testdata/fields/fixture-fields.geojson", "--corridor", "../../testdata/routes/fixture-route.gpx,2km",
		"--agl", "600m", "--terrain", "../../testdata/geotiff/geo_int16_strip_none.tif"}
	single := coverageJSONOf(t, args...)
	tiled := coverageJSONOf(t, append(args, "--tiled", "--tile", "64")...)
	t.Logf("covered fraction single %.4f, tiled %.4f", single.CoveredFraction, tiled.CoveredFraction)
	if d := tiled.CoveredFraction - single.CoveredFraction; d > 0.002 || d < -0.03 {
		t.Errorf("covered fraction tiled %.4f, single grid %.4f", tiled.CoveredFraction, single.CoveredFraction)
	}
}

// TestCoverageTiledKeysListed checks that every key of the tiled JSON and
// GeoJSON is listed in the README's Output keys (as checkKeysListed does
// for the demo's files, which have no tiled run).
func TestCoverageTiledKeysListed(t *testing.T) {
	readme, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	sec := string(readme)
	sec = sec[strings.Index(sec, "## Output keys")+3:]
	sec = sec[:strings.Index(sec, "\n## ")]
	listed := map[string]bool{"type": true, "features": true, "geometry": true, "coordinates": true, "properties": true, "bbox": true}
	for _, part := range strings.Split(sec, "`")[1:] {
		listed[part] = true
	}
	fields := writeTestFields(t, -0.5, -24.5, []float64{0}, []float64{0})
	cands := writeTestFields(t, -0.5, -24.5, []float64{9000}, []float64{90})
	for _, format := range []string{"json", "geojson"} {
		code, out, stderr := runCLI(t, "coverage", "--fields", fields, "--candidates", cands, "--box", "-0.6,-24.6,-0.4,-24.4", "--alt", "900m",
			"--aircraft", "trainer", "--tiled", "--format", format)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		var v any
		if err := json.Unmarshal([]byte(out), &v); err != nil {
			t.Fatal(err)
		}
		var walk func(v any)
		walk = func(v any) {
			switch x := v.(type) {
			case map[string]any:
				for k, sub := range x {
					if !listed[k] {
						t.Errorf("%s: key %q is not listed in the README's Output keys", format, k)
					}
					walk(sub)
				}
			case []any:
				for _, sub := range x {
					walk(sub)
				}
			}
		}
		walk(v)
	}
}
