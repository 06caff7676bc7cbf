package main

import (
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestMain runs the command itself when GLIDEREACH_TEST_MAIN is set, so a
// test can start the real process and send it signals.
func TestMain(m *testing.M) {
	if os.Getenv("GLIDEREACH_TEST_MAIN") == "1" {
		main()
		return
	}
	os.Exit(m.Run())
}

// A signal during the computation stops a coverage run with four outputs:
// exit 130, the existing outputs untouched, no temporary file left.
func TestSignalStopsRun(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a process")
	}
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM} {
		dir := t.TempDir()
		var b strings.Builder
		b.WriteString(`{"type":"FeatureCollection","features":[`)
		for i := 0; i < 400; i++ {
			if i > 0 {
				b.WriteString(",")
			}
			fmt.Fprintf(&b, `{"type":"Feature","properties":{"name":"F%d"},"geometry":{"type":"Point","coordinates":[%g,%g]}}`, i, -26+float64(i%20)*0.2, -3+float64(i/20)*0.2)
		}
		b.WriteString("]}")
		fields := filepath.Join(dir, "fields.geojson")
		os.WriteFile(fields, []byte(b.String()), 0o644)
		area := filepath.Join(dir, "area.geojson")
		os.WriteFile(area, []byte(`{"type":"Polygon","coordinates":[[[-26,-3],[-22,-3],[-22,1],[-26,1],[-26,-3]]]}`), 0o644)
		outs := []string{"c.geojson", "c.png", "c.html", "c.tif"}
		for _, n := range outs {
			os.WriteFile(filepath.Join(dir, n), []byte("old"), 0o644)
		}
		// (--wind-error: nine winds, some 20 s of work, so the signal
		// comes mid-run however fast the solvers get; 400 fields in one
		// wind finished within the 700 ms below once they got faster.)
		cmd := exec.Command(os.Args[0], "coverage", "--fields", fields, "--area", area, "--alt", "3000m",
			"--wind-error", "20deg,5kt",
			"--out", filepath.Join(dir, "c.geojson"), "--map", filepath.Join(dir, "c.png"),
			"--report", filepath.Join(dir, "c.html"), "--raster", filepath.Join(dir, "c.tif"))
		cmd.Env = append(os.Environ(), "GLIDEREACH_TEST_MAIN=1")
		var stderr strings.Builder
		cmd.Stderr = &stderr
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(700 * time.Millisecond)
		cmd.Process.Signal(sig)
		start := time.Now()
		err := cmd.Wait()
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.ExitCode() != 130 {
			t.Errorf("%v: %v, want exit 130; stderr:\n%s", sig, err, stderr.String())
		}
		if d := time.Since(start); d > 3*time.Second {
			t.Errorf("%v: took %v to stop", sig, d)
		}
		for _, n := range outs {
			if b, _ := os.ReadFile(filepath.Join(dir, n)); string(b) != "old" {
				t.Errorf("%v: %s was replaced", sig, n)
			}
		}
		assertNoTemp(t, dir)
	}
}
