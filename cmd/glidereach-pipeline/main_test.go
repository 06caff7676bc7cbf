package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"glidereach/reach"
)

// Fixtures of the repository (testdata/ORIGIN.md, testdata/geotiff/README.md).
const (
	fixtureDEM    = "../../testdata/geotiff/geo_int16_strip_none.tif"
	fixtureFields = "../../testdata/fields/fixture-fields.geojson"
	// Invented candidates: two in the box, one off the DEM
	// (testdata/fields/ORIGIN.md).
	fixtureCands = "../../testdata/fields/fixture-candidates.geojson"
	// A box inside the DEM's extent (-25.05..-24.95 E, -0.0375..0.0375 N,
	// printed by gdalinfo for the fixture: testdata/geotiff/values.txt).
	fixtureBox = "-0.03,-25.04,0.03,-24.96"
)

// runCLI runs the command in process with args and returns its exit
// status, standard output and standard error.
func runCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	root := newRootCmd()
	var out, errb bytes.Buffer
	root.SetOut(&out)
	root.SetErr(&errb)
	root.SetArgs(args)
	ctx := context.Background()
	err := root.ExecuteContext(ctx)
	code := exitCode(ctx, err, &errb)
	return code, out.String(), errb.String()
}

func TestCLIUsageErrors(t *testing.T) {
	// The command-line contract (glidereach's README "Exit status", common
	// to both commands): a usage or input error exits 2 and names the
	// flag or file at fault, and writes nothing.
	dir := t.TempDir()
	work := filepath.Join(dir, "work")
	base := []string{"--fields", fixtureFields, "--box", fixtureBox, "--terrain", fixtureDEM}
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"no fields", []string{"--box", fixtureBox, "--alt", "1500m", "--work-dir", work}, "--fields"},
		{"no zone", []string{"--fields", fixtureFields, "--alt", "1500m", "--work-dir", work}, "--area"},
		{"two zones", append(base, "--area", "x.geojson", "--alt", "1500m", "--work-dir", work), "--area"},
		{"alt and agl", append(base, "--alt", "1500m", "--agl", "600m", "--work-dir", work), "--alt"},
		{"no altitude", append(base, "--work-dir", work), "--alt"},
		{"no work dir", append(base, "--alt", "1500m"), "--work-dir"},
		{"bad unit", append(base, "--alt", "1500 parsecs", "--work-dir", work), "--alt"},
		{"unknown flag", append(base, "--alt", "1500m", "--work-dir", work, "--no-such-flag"), "no-such-flag"},
		{"tile", append(base, "--alt", "1500m", "--work-dir", work, "--tile", "100"), "--tile"},
		{"cog name", append(base, "--alt", "1500m", "--work-dir", work, "--cog", filepath.Join(dir, "least.png")), "--cog"},
		{"cell finer than the DEM", append(base, "--alt", "1500m", "--work-dir", work, "--cell", "5m"), "--cell"},
		{"fields file", []string{"--fields", filepath.Join(dir, "missing.geojson"), "--box", fixtureBox, "--alt", "1500m", "--work-dir", work}, "missing.geojson"},
		{"terrain file", []string{"--fields", fixtureFields, "--box", fixtureBox, "--terrain", filepath.Join(dir, "missing.tif"), "--alt", "1500m", "--work-dir", work}, "--terrain"},
		{"aircraft", append(base, "--alt", "1500m", "--work-dir", work, "--aircraft", "no-such-profile"), "no-such-profile"},
		{"log level", append(base, "--alt", "1500m", "--work-dir", work, "--beam-log-level", "loud"), "--beam-log-level"},
		{"alt below the ground", append(base, "--alt", "-300m", "--work-dir", work), "--alt"},
		{"pick", append(base, "--alt", "1500m", "--work-dir", work, "--pick", "101"), "--pick"},
		{"pick negative", append(base, "--alt", "1500m", "--work-dir", work, "--pick", "-1"), "--pick"},
		{"fgb name", append(base, "--alt", "1500m", "--work-dir", work, "--fgb", filepath.Join(dir, "cover.geojson")), "--fgb"},
		{"candidates file", append(base, "--alt", "1500m", "--work-dir", work, "--candidates", filepath.Join(dir, "no-cands.geojson")), "no-cands.geojson"},
		{"alt-indicated without its source", append(base, "--alt-indicated", "1500m", "--work-dir", work), "--alt-indicated"},
		{"alt-indicated and agl", append(base, "--alt-indicated", "1500m", "--station-elev", "300m", "--station-temp", "-20C", "--agl", "600m", "--work-dir", work), "--agl"},
		{"alt-indicated and alt", append(base, "--alt-indicated", "1500m", "--station-elev", "300m", "--station-temp", "-20C", "--alt", "1500m", "--work-dir", work), "--alt"},
		{"station without alt-indicated", append(base, "--alt", "1500m", "--station-elev", "300m", "--work-dir", work), "--station-elev"},
		{"station temperature", append(base, "--alt-indicated", "1500m", "--station-elev", "300m", "--station-temp", "-120C", "--work-dir", work), "--station-temp"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, stderr := runCLI(t, c.args...)
			if code != exitUsage {
				t.Fatalf("exit %d, want %d; stderr: %s", code, exitUsage, stderr)
			}
			if !strings.Contains(stderr, c.want) {
				t.Errorf("stderr does not name %s: %s", c.want, stderr)
			}
			if _, err := os.Stat(work); err == nil {
				t.Errorf("the work directory was created by a refused run")
			}
		})
	}
}

func TestCLIRunAndResume(t *testing.T) {
	// A run as a user types it, on the repository's fixture DEM, then the
	// same command again on the same work directory: nothing is left to
	// do, and the outputs are the same bytes.
	dir := t.TempDir()
	work := filepath.Join(dir, "work")
	cog, sum := filepath.Join(dir, "least.tif"), filepath.Join(dir, "summary.json")
	args := []string{"--fields", fixtureFields, "--box", fixtureBox, "--agl", "600m", "--terrain", fixtureDEM,
		"--tile", "64", "--work-dir", work, "--cog", cog, "--summary", sum}
	code, stdout, stderr := runCLI(t, args...)
	if code != exitOK {
		t.Fatalf("exit %d; stderr: %s", code, stderr)
	}
	if !strings.Contains(stdout, "covered:") || !strings.Contains(stdout, reach.Caution) {
		t.Errorf("stdout lacks the covered share or the caution:\n%s", stdout)
	}
	var s summary
	data, err := os.ReadFile(sum)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &s); err != nil {
		t.Fatal(err)
	}
	if s.Caution != reach.Caution || len(s.Fields) != 2 || !(s.CoveredFraction > 0 && s.CoveredFraction <= 1) || s.Tiles < 2 {
		t.Errorf("summary %+v", s)
	}
	first, err := os.ReadFile(cog)
	if err != nil {
		t.Fatal(err)
	}
	// TIFF 6.0 §2 (Image File Header): "II" then 42 little-endian, or
	// BigTIFF's 43; the COG layout itself is the library's (checked there
	// against GDAL).
	if len(first) < 8 || string(first[:2]) != "II" || (first[2] != 42 && first[2] != 43) {
		t.Fatalf("the COG does not start with a TIFF header: % x", first[:min(8, len(first))])
	}
	code, stdout, stderr = runCLI(t, args...)
	if code != exitOK {
		t.Fatalf("second run: exit %d; stderr: %s", code, stderr)
	}
	if !strings.Contains(stdout, "found finished in the work directory") {
		t.Errorf("the second run did not resume:\n%s", stdout)
	}
	again, err := os.ReadFile(cog)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(first, again) {
		t.Error("the resumed run wrote a different COG")
	}
	// A work file damaged outside the run is an input error on --work-dir
	// (exit 2, the file named), as for glidereach coverage --tiled.
	tiles, err := filepath.Glob(filepath.Join(work, "tiles", "*.gob"))
	if err != nil || len(tiles) == 0 {
		t.Fatalf("no tile files: %v", err)
	}
	good, err := os.ReadFile(tiles[0])
	if err != nil {
		t.Fatal(err)
	}
	bad := bytes.Clone(good)
	bad[len(bad)/2] ^= 0x40
	if err := os.WriteFile(tiles[0], bad, 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, stderr = runCLI(t, args...)
	if code != exitUsage || !strings.Contains(stderr, "--work-dir") || !strings.Contains(stderr, filepath.Base(tiles[0])) {
		t.Errorf("a damaged tile: exit %d, stderr %s", code, stderr)
	}
	if err := os.WriteFile(tiles[0], good, 0o644); err != nil {
		t.Fatal(err)
	}
	// Another plan in the same work directory is refused (exit 2).
	code, _, stderr = runCLI(t, append(args[:len(args):len(args)], "--reserve", "400m")...)
	if code != exitUsage || !strings.Contains(stderr, "--work-dir") {
		t.Errorf("another plan in the work directory: exit %d, stderr %s", code, stderr)
	}
	left, err := filepath.Glob(filepath.Join(dir, ".tmp-*"))
	if err != nil || len(left) > 0 {
		t.Errorf("temporary files left: %v", left)
	}
}

func TestREADMEExample(t *testing.T) {
	// The README's local example of this command (section "Coverage on a
	// cluster"), run from the repository's root with its outputs sent to
	// a temporary directory, prints what the README shows.
	data, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(data), "\n")
	var cmd []string
	var want []string
	for i := 0; i < len(lines); i++ {
		l := strings.TrimSpace(lines[i])
		if !strings.HasPrefix(l, "./glidereach-pipeline ") || strings.Contains(l, "/shared/") {
			continue
		}
		joined := ""
		for ; i < len(lines); i++ {
			l := strings.TrimSpace(lines[i])
			joined += " " + strings.TrimSuffix(l, "\\")
			if !strings.HasSuffix(l, "\\") {
				break
			}
		}
		cmd = strings.Fields(joined)[1:]
		for i++; i < len(lines) && lines[i] != "```"; i++ {
		}
		for i++; i < len(lines) && lines[i] != "```"; i++ {
			want = append(want, lines[i])
		}
		break
	}
	if len(cmd) == 0 || len(want) == 0 {
		t.Fatal("the README has no local glidereach-pipeline example followed by its output")
	}
	tmp := t.TempDir()
	for i := 0; i+1 < len(cmd); i++ {
		switch cmd[i] {
		case "--work-dir", "--cog", "--fgb", "--summary":
			cmd[i+1] = filepath.Join(tmp, cmd[i+1])
		}
	}
	t.Chdir("../..")
	code, stdout, stderr := runCLI(t, cmd...)
	if code != exitOK {
		t.Fatalf("%v: exit %d; stderr: %s", cmd, code, stderr)
	}
	if got := strings.TrimRight(stdout, "\n"); got != strings.Join(want, "\n") {
		t.Errorf("the README's example prints\n%s\nthe README shows\n%s", got, strings.Join(want, "\n"))
	}
}

// sameAsCoverageTiled runs glidereach coverage --tiled (built from the
// repository) and the pipeline with the same inputs, checks that they write
// the same plan, tile files, COG and FlatGeobuf, byte for byte, and returns
// glidereach's JSON output and the pipeline's summary (paths).
func sameAsCoverageTiled(t *testing.T, inputs []string) (mainJSON, summaryJSON string) {
	t.Helper()
	if _, err := exec.LookPath("go"); err != nil {
		t.Skip("go tool not on PATH")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "glidereach")
	build := exec.Command("go", "build", "-o", bin, "./cmd/glidereach")
	build.Dir = "../.."
	if out, err := build.CombinedOutput(); err != nil {
		t.Fatalf("go build ./cmd/glidereach: %v\n%s", err, out)
	}
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	main := exec.Command(bin, append([]string{"coverage", "--tiled", "--work-dir", a, "--cog", a + ".tif", "--fgb", a + ".fgb", "--format", "json", "--out", a + ".json"}, inputs...)...)
	if out, err := main.CombinedOutput(); err != nil {
		t.Fatalf("glidereach coverage --tiled: %v\n%s", err, out)
	}
	if code, _, stderr := runCLI(t, append([]string{"--work-dir", b, "--cog", b + ".tif", "--fgb", b + ".fgb", "--summary", b + ".json"}, inputs...)...); code != exitOK {
		t.Fatalf("exit %d; stderr: %s", code, stderr)
	}
	files := [][2]string{{filepath.Join(a, "plan.gob"), filepath.Join(b, "plan.gob")}, {a + ".tif", b + ".tif"}, {a + ".fgb", b + ".fgb"}}
	tiles, err := filepath.Glob(filepath.Join(a, "tiles", "*.gob"))
	if err != nil || len(tiles) < 2 {
		t.Fatalf("glidereach wrote tiles %v (%v)", tiles, err)
	}
	for _, tf := range tiles {
		files = append(files, [2]string{tf, filepath.Join(b, "tiles", filepath.Base(tf))})
	}
	for _, f := range files {
		x, err := os.ReadFile(f[0])
		if err != nil {
			t.Fatal(err)
		}
		y, err := os.ReadFile(f[1])
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(x, y) {
			t.Errorf("%s differs between glidereach coverage --tiled (%d bytes) and the pipeline (%d bytes)", filepath.Base(f[0]), len(x), len(y))
		}
	}
	return a + ".json", b + ".json"
}

func TestSameAsGlidereachCoverageTiled(t *testing.T) {
	// The other path to the same quantities, as a user runs it: glidereach
	// coverage --tiled (the library's local tiled path behind the main
	// command) with the same inputs must build the same plan (plan.gob,
	// byte for byte: both commands turn the flags into a tiling.Plan by the
	// same rules), write the same tile files, COG and FlatGeobuf bytes and
	// the same covered share, and give the same candidate ranking and
	// greedy picks (the JSON arrays "candidates" and "picks", byte for byte
	// once compacted).
	inputs := []string{"--fields", fixtureFields, "--box", fixtureBox, "--agl", "600m", "--terrain", fixtureDEM,
		"--tile", "64", "--wind", "0m:240/10kt,1500m:270/20kt", "--wind-error", "20deg,5kt",
		"--candidates", fixtureCands, "--pick", "2"}
	a, b := sameAsCoverageTiled(t, inputs)
	var ja struct {
		CoveredFraction float64         `json:"covered_fraction"`
		Candidates      json.RawMessage `json:"candidates"`
		Picks           json.RawMessage `json:"picks"`
	}
	var jb summary
	var rb struct {
		Candidates json.RawMessage `json:"candidates"`
		Picks      json.RawMessage `json:"picks"`
	}
	for _, c := range []struct {
		path string
		v    any
	}{{a, &ja}, {b, &jb}, {b, &rb}} {
		data, err := os.ReadFile(c.path)
		if err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(data, c.v); err != nil {
			t.Fatal(err)
		}
	}
	// glidereach's JSON rounds the share down (its conservative rounding,
	// DEVELOPERS.md) to 4 decimals at most; the summary keeps every digit.
	if !(ja.CoveredFraction <= jb.CoveredFraction && jb.CoveredFraction-ja.CoveredFraction < 1e-3) || jb.CoveredFraction == 0 {
		t.Errorf("covered share: glidereach %v, the pipeline %v", ja.CoveredFraction, jb.CoveredFraction)
	}
	for _, c := range []struct {
		key  string
		x, y json.RawMessage
	}{{"candidates", ja.Candidates, rb.Candidates}, {"picks", ja.Picks, rb.Picks}} {
		var x, y bytes.Buffer
		if err := json.Compact(&x, c.x); err != nil {
			t.Fatalf("glidereach's %s: %v", c.key, err)
		}
		if err := json.Compact(&y, c.y); err != nil {
			t.Fatalf("the summary's %s: %v", c.key, err)
		}
		if !bytes.Equal(x.Bytes(), y.Bytes()) {
			t.Errorf("%s: glidereach coverage --tiled\n%s\nthe pipeline\n%s", c.key, x.Bytes(), y.Bytes())
		}
	}
	// The case checks something: a candidate adds area, one is noted off
	// the data, and the greedy choice took one.
	if jb.Candidates == nil || len(*jb.Candidates) != 3 || (*jb.Candidates)[0].AddsM2 <= 0 || (*jb.Candidates)[2].Note == "" ||
		jb.Picks == nil || len(*jb.Picks) == 0 || (*jb.Picks)[0].CoveredFraction <= ja.CoveredFraction {
		t.Errorf("the ranking checks nothing: %s %s", rb.Candidates, rb.Picks)
	}
}

func TestAltIndicatedSameAsGlidereachCoverageTiled(t *testing.T) {
	// --alt-indicated (the altimeter reading, corrected for cold air by
	// the ICAO rule of Doc 8168, reach.ColdCorrection) gives the pipeline
	// the true altitude glidereach coverage --tiled works out: the same
	// plan, tiles, COG and FlatGeobuf bytes (whose description carries the
	// correction's note), and the same covered share.
	inputs := []string{"--fields", fixtureFields, "--box", fixtureBox, "--terrain", fixtureDEM, "--tile", "64",
		"--alt-indicated", "2000m", "--station-elev", "300m", "--station-temp", "-25C", "--wind", "0m:240/10kt,1500m:270/20kt"}
	a, b := sameAsCoverageTiled(t, inputs)
	var ja struct {
		CoveredFraction float64  `json:"covered_fraction"`
		Assumptions     []string `json:"assumptions"`
	}
	var jb summary
	for _, c := range []struct {
		path string
		v    any
	}{{a, &ja}, {b, &jb}} {
		data, err := os.ReadFile(c.path)
		if err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(data, c.v); err != nil {
			t.Fatal(err)
		}
	}
	if !(ja.CoveredFraction <= jb.CoveredFraction && jb.CoveredFraction-ja.CoveredFraction < 1e-3) || jb.CoveredFraction == 0 {
		t.Errorf("covered share: glidereach %v, the pipeline %v", ja.CoveredFraction, jb.CoveredFraction)
	}
	// The correction is said: 2000 m read at -25 °C over a source at 300 m
	// is a lower true altitude (ICAO Doc 8168: a cold day's altimeter
	// over-reads).
	corr, err := reach.ColdCorrection(2000, 300, 248.15)
	if err != nil || !(corr > 50) {
		t.Fatalf("ColdCorrection(2000 m, 300 m, -25 °C) = %v, %v", corr, err)
	}
	fgb, err := os.ReadFile(strings.TrimSuffix(b, ".json") + ".fgb")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(fgb, []byte("cold-temperature correction")) {
		t.Error("the pipeline's FlatGeobuf does not say the altitude was corrected for the cold")
	}
	said := false
	for _, x := range ja.Assumptions {
		said = said || strings.Contains(x, "cold-temperature correction")
	}
	if !said {
		t.Errorf("glidereach's assumptions do not say the correction: %q", ja.Assumptions)
	}
}
