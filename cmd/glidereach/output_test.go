package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"glidereach/terrain"
)

// reachArgs is a quick reach run on flat ground (well under a second).
var reachArgs = []string{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--aircraft", "trainer"}

func withArgs(base []string, more ...string) []string {
	return append(append([]string(nil), base...), more...)
}

// assertNoTemp fails when dir holds a temporary output file.
func assertNoTemp(t *testing.T, dir string) {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		if strings.Contains(e.Name(), ".tmp-") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
	}
}

// An existing 0600 output keeps its mode when replaced (it became 0644).
func TestOutputKeepsMode(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "r.geojson")
	if err := os.WriteFile(out, []byte("old"), 0o600); err != nil {
		t.Fatal(err)
	}
	os.Chmod(out, 0o600)
	if code, _, _ := runCLI(t, withArgs(reachArgs, "--out", out)...); code != 0 {
		t.Fatalf("exit %d", code)
	}
	st, err := os.Stat(out)
	if err != nil {
		t.Fatal(err)
	}
	if st.Mode().Perm() != 0o600 {
		t.Errorf("mode %v, want 0600 kept", st.Mode().Perm())
	}
	if b, _ := os.ReadFile(out); !bytes.Contains(b, []byte("FeatureCollection")) {
		t.Errorf("not replaced: %.40q", b)
	}
	assertNoTemp(t, dir)
}

// A symlinked output is written through: the link stays a link and its
// target gets the new content (the link was replaced by a regular file).
func TestOutputFollowsSymlink(t *testing.T) {
	dir := t.TempDir()
	sub := filepath.Join(dir, "real")
	os.Mkdir(sub, 0o755)
	target := filepath.Join(sub, "target.geojson")
	os.WriteFile(target, []byte("old"), 0o640)
	link := filepath.Join(dir, "link.geojson")
	if err := os.Symlink("real/target.geojson", link); err != nil {
		t.Fatal(err)
	}
	if code, _, _ := runCLI(t, withArgs(reachArgs, "--out", link)...); code != 0 {
		t.Fatalf("exit %d", code)
	}
	st, err := os.Lstat(link)
	if err != nil || st.Mode()&os.ModeSymlink == 0 {
		t.Fatalf("link no longer a symlink: %v %v", st.Mode(), err)
	}
	b, _ := os.ReadFile(target)
	if !bytes.Contains(b, []byte("FeatureCollection")) {
		t.Errorf("target not written: %.40q", b)
	}
	if st, _ := os.Stat(target); st.Mode().Perm() != 0o640 {
		t.Errorf("target mode %v, want 0640", st.Mode().Perm())
	}
	assertNoTemp(t, dir)
	assertNoTemp(t, sub)
	// A dangling link creates its target.
	dangling := filepath.Join(dir, "dangling.geojson")
	os.Symlink("real/new.geojson", dangling)
	if code, _, _ := runCLI(t, withArgs(reachArgs, "--out", dangling)...); code != 0 {
		t.Fatalf("dangling: exit %d", code)
	}
	if _, err := os.Stat(filepath.Join(sub, "new.geojson")); err != nil {
		t.Errorf("dangling link's target not created: %v", err)
	}
}

// /dev/null is written straight, not replaced by a regular file; a FIFO
// likewise (its reader gets the document).
func TestOutputNotRegularWrittenStraight(t *testing.T) {
	for _, flag := range []string{"--out", "--map"} {
		path := "/dev/null"
		if flag == "--map" {
			// --map wants a .png name: a link to /dev/null.
			path = filepath.Join(t.TempDir(), "m.png")
			os.Symlink("/dev/null", path)
		}
		if code, _, _ := runCLI(t, withArgs(reachArgs, flag, path)...); code != 0 {
			t.Fatalf("%s %s: exit %d", flag, path, code)
		}
		st, err := os.Stat("/dev/null")
		if err != nil || st.Mode()&os.ModeCharDevice == 0 {
			t.Fatalf("/dev/null is no longer a device: %v %v", st.Mode(), err)
		}
	}
	fifo := filepath.Join(t.TempDir(), "pipe.geojson")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skip("no FIFO:", err)
	}
	got := make(chan []byte)
	go func() {
		f, err := os.Open(fifo)
		if err != nil {
			got <- nil
			return
		}
		b, _ := io.ReadAll(f)
		f.Close()
		got <- b
	}()
	if code, _, _ := runCLI(t, withArgs(reachArgs, "--out", fifo)...); code != 0 {
		t.Fatalf("fifo: exit %d", code)
	}
	if b := <-got; !bytes.Contains(b, []byte("FeatureCollection")) {
		t.Errorf("FIFO reader got %.40q", b)
	}
	if st, _ := os.Lstat(fifo); st.Mode()&os.ModeNamedPipe == 0 {
		t.Errorf("FIFO replaced by %v", st.Mode())
	}
}

// A write error is a failure, exit 1: to a file (/dev/full "succeeded")
// and to a full standard output, on every command.
func TestWriteErrorsExit1(t *testing.T) {
	if _, err := os.Stat("/dev/full"); err != nil {
		t.Skip("no /dev/full")
	}
	if code, _, _ := runCLI(t, withArgs(reachArgs, "--out", "/dev/full")...); code != 1 {
		t.Errorf("--out /dev/full: exit %d, want 1", code)
	}
	for _, args := range [][]string{
		reachArgs,
		withArgs(reachArgs, "--format", "json"),
		{"polar", "--aircraft", "trainer"},
		{"final", "--from", "-0.5,-24.5", "--to", "-0.3,-24.3", "--alt", "1500m"},
		{"--help"},
		{"reach", "--help"},
		{"--version"},
	} {
		root := newRootCmd()
		root.SetArgs(args)
		root.SetErr(io.Discard)
		err := execute(context.Background(), root, fullWriter{})
		if code := exitCode(err); code != 1 {
			t.Errorf("%v to a full stdout: exit %d (%v), want 1", args, code, err)
		}
	}
}

// fullWriter fails every write as a full disk does.
type fullWriter struct{}

func (fullWriter) Write([]byte) (int, error) { return 0, syscall.ENOSPC }

// Two outputs naming one file, an output that is a directory and one in a
// directory that does not exist are usage errors before the computation.
func TestOutputPathsCheckedFirst(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "same.png")
	os.Symlink("same.png", filepath.Join(dir, "alias.png"))
	for _, c := range []struct {
		args []string
		want string
	}{
		{withArgs(reachArgs, "--out", p, "--map", p), "same file"},
		{withArgs(reachArgs, "--out", filepath.Join(dir, "alias.png"), "--map", p), "same file"},
		{withArgs(reachArgs, "--out", dir), "is a directory"},
		{withArgs(reachArgs, "--out", filepath.Join(dir, "none", "x.json")), "does not exist"},
		{withArgs(reachArgs, "--map", filepath.Join(dir, "x.txt")), "want a .png"},
	} {
		code, out, errOut := runCLI(t, c.args...)
		_ = errOut
		if code != 2 {
			t.Errorf("%v: exit %d, want 2\n%s", c.args, code, out)
		}
	}
	if err := checkOutputs(p, "", p, ""); err == nil || !strings.Contains(err.Error(), "same file") {
		t.Errorf("checkOutputs(same): %v", err)
	}
	if err := checkOutputs(dir, "", "", ""); err == nil || !strings.Contains(err.Error(), "directory") {
		t.Errorf("checkOutputs(dir): %v", err)
	}
	// Devices may be named twice.
	if err := checkOutputs("/dev/null", "", "", ""); err != nil {
		t.Errorf("/dev/null refused: %v", err)
	}
	assertNoTemp(t, dir)
}

// A run with several outputs replaces none until all are written: a failure
// or a signal (ctx cancelled) while the map is drawn leaves the old --out,
// --raster and --report files as they were and no temporary file.
func TestDeliverAllOrNothing(t *testing.T) {
	for _, how := range []string{"error", "signal"} {
		dir := t.TempDir()
		paths := map[string]string{}
		for _, n := range []string{"out.geojson", "ras.asc", "map.png", "rep.html"} {
			paths[n] = filepath.Join(dir, n)
			os.WriteFile(paths[n], []byte("old "+n), 0o644)
		}
		ctx, cancel := context.WithCancel(context.Background())
		r := results{out: paths["out.geojson"], format: "text", raster: paths["ras.asc"], mapPNG: paths["map.png"], report: paths["rep.html"],
			document:    func(string) ([]byte, error) { return []byte("new"), nil },
			writeRaster: func(p string) error { return writeBytesAtomic(p, []byte("new")) },
			draw: func(m, r string) error {
				if err := writeBytesAtomic(m, []byte("new")); err != nil {
					return err
				}
				if how == "signal" {
					cancel()
					return nil
				}
				return errors.New("drawing failed")
			},
			text: func(w io.Writer) {}}
		err := deliver(ctx, io.Discard, r)
		cancel()
		if err == nil {
			t.Fatalf("%s: deliver succeeded", how)
		}
		if how == "signal" && exitCode(err) != 130 {
			t.Errorf("signal: exit %d, want 130", exitCode(err))
		}
		for n, p := range paths {
			if b, _ := os.ReadFile(p); string(b) != "old "+n {
				t.Errorf("%s: %s became %q", how, n, b)
			}
		}
		assertNoTemp(t, dir)
	}
}

// When every output is written, all are replaced; the mode of each is kept.
func TestDeliverCommitsAll(t *testing.T) {
	dir := t.TempDir()
	old := filepath.Join(dir, "map.png")
	os.WriteFile(old, []byte("old"), 0o600)
	os.Chmod(old, 0o600)
	code, out, _ := runCLI(t, withArgs(reachArgs, "--out", filepath.Join(dir, "r.geojson"), "--raster", filepath.Join(dir, "r.asc"),
		"--map", old, "--report", filepath.Join(dir, "r.html"))...)
	if code != 0 {
		t.Fatalf("exit %d\n%s", code, out)
	}
	for _, n := range []string{"r.geojson", "r.asc", "map.png", "r.html"} {
		st, err := os.Stat(filepath.Join(dir, n))
		if err != nil || st.Size() < 100 {
			t.Errorf("%s: %v", n, err)
		}
	}
	if st, _ := os.Stat(old); st.Mode().Perm() != 0o600 {
		t.Errorf("map mode %v, want 0600", st.Mode().Perm())
	}
	assertNoTemp(t, dir)
}

// terrain --format json on a float GeoTIFF holding ±Inf samples exits 0
// with finite numbers (it exited 1 with "json: unsupported value: +Inf"):
// the infinite samples are read as voids.
func TestTerrainJSONNonFinite(t *testing.T) {
	g := &terrain.Grid{CRS: terrain.CRS{EPSG: 4326}, Cols: 3, Rows: 2, X0: -24.5, Y0: -0.5, DX: 0.01, DY: 0.01,
		Elev: []float32{10, float32(math.Inf(1)), 30, float32(math.Inf(-1)), 50, 60}}
	p := filepath.Join(t.TempDir(), "inf.tif")
	f, err := os.Create(p)
	if err != nil {
		t.Fatal(err)
	}
	if err := (terrain.GeoTIFFWriter{}).Write(f, g); err != nil {
		t.Fatal(err)
	}
	f.Close()
	code, out, _ := runCLI(t, "terrain", p, "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	var raw map[string]any
	if err := json.Unmarshal([]byte(out), &raw); err != nil {
		t.Fatal(err)
	}
	if raw["elevation_min_m"] != 10.0 || raw["elevation_max_m"] != 60.0 || raw["voids"] != 2.0 {
		t.Errorf("min %v max %v voids %v, want 10, 60, 2", raw["elevation_min_m"], raw["elevation_max_m"], raw["voids"])
	}
}
