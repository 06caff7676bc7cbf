package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"glidereach/terrain"
)

// writeRidgeDEM writes a GeoTIFF (EPSG:4326, 0.001° cells, flat at 0 m)
// around lat0, lon0 with one east–west ridge of the given height (m), three
// cells thick, centred dLat degrees north of lat0 and reaching halfLon
// degrees either side of lon0, open at both ends. It returns the path.
func writeRidgeDEM(t *testing.T, lat0, lon0, dLat, halfLon, height float64) string {
	t.Helper()
	const cell, half = 0.001, 0.25
	n := int(2*half/cell) + 1
	g := &terrain.Grid{CRS: terrain.CRS{EPSG: 4326}, Cols: n, Rows: n, X0: lon0 - half, Y0: lat0 + half, DX: cell, DY: cell, Elev: make([]float32, n*n)}
	for r := 0; r < n; r++ {
		lat := g.Y0 - float64(r)*cell
		for c := 0; c < n; c++ {
			lon := g.X0 + float64(c)*cell
			if math.Abs(lat-(lat0+dLat)) <= 1.5*cell && math.Abs(lon-lon0) <= halfLon {
				g.Elev[r*n+c] = float32(height)
			}
		}
	}
	path := filepath.Join(t.TempDir(), "ridge.tif")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := terrain.WriteGeoTIFF(f, g); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	return path
}

// reachField runs reach with one field and returns its figures.
func reachField(t *testing.T, args ...string) (reachable bool, arrival, required float64) {
	t.Helper()
	code, out, stderr := runCLI(t, append([]string{"reach", "--format", "json"}, args...)...)
	if code != 0 {
		t.Fatalf("reach %v: exit %d: %s", args, code, stderr)
	}
	var r struct {
		Fields []struct {
			Reachable bool     `json:"reachable"`
			Arrival   *float64 `json:"arrival_agl_m"`
			Required  *float64 `json:"required_msl_m"`
		} `json:"fields"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if len(r.Fields) != 1 {
		t.Fatalf("%d fields in the output", len(r.Fields))
	}
	f := r.Fields[0]
	arrival, required = math.NaN(), math.NaN()
	if f.Arrival != nil {
		arrival = *f.Arrival
	}
	if f.Required != nil {
		required = *f.Required
	}
	return f.Reachable, arrival, required
}

func TestReachFieldTableAgreesAroundARidge(t *testing.T) {
	// Regression (issue 11, defect 3): over a ridge with open ends the field
	// table read "reachable, arrive 931 m" and "needs 2890 m MSL" from a
	// 2000 m start — the backward search for the required altitude was
	// confined to a box around start and field and missed the way around.
	// The figures must agree (consistency of the two solvers, common
	// practice, no source): at every start the table is self-consistent
	// (reachable exactly when the start is at or above the required
	// altitude), and from the required altitude the field is reached with
	// the reserve, never below it and at most the solvers' stated tolerance
	// above it (1 % of the height lost + 1 m, README "Tolerances").
	const lat0, lon0 = -0.5, -24.5
	dem := writeRidgeDEM(t, lat0, lon0, 0.045, 0.09, 3000)
	fields := filepath.Join(t.TempDir(), "fields.geojson")
	if err := os.WriteFile(fields, []byte(fmt.Sprintf(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"name":"Beyond"},"geometry":{"type":"Point","coordinates":[%v,%v]}}]}`, lon0, lat0+0.09)), 0o644); err != nil {
		t.Fatal(err)
	}
	common := []string{"--from", fmt.Sprintf("%v,%v", lat0, lon0), "--aircraft", "sailplane", "--terrain", dem, "--fields", fields}
	ok, arr, req := reachField(t, append(common, "--alt", "2000m")...)
	t.Logf("from 2000 m: reachable %v, arrival %.1f m, required %.1f m", ok, arr, req)
	if !ok || !(req <= 2000) {
		t.Fatalf("from 2000 m: reachable %v (arrival %.1f m) but the required altitude is %.1f m MSL", ok, arr, req)
	}
	tol := 0.01*(req-200) + 1
	ok, arr, _ = reachField(t, append(common, "--alt", strconv.FormatFloat(req+0.1, 'f', 1, 64)+"m")...)
	if !ok || arr < 200 || arr > 200+tol {
		t.Errorf("from the required %.1f m: reachable %v, arrival %.1f m, want 200 m .. %.1f m", req, ok, arr, 200+tol)
	}
	for _, alt := range []float64{req + 0.1, req - 1, req - tol, req - tol - 1, req - 20, 1500} {
		ok, arr, r := reachField(t, append(common, "--alt", strconv.FormatFloat(alt, 'f', 1, 64)+"m")...)
		if ok != (alt >= r) {
			t.Errorf("from %.1f m: reachable %v (arrival %.1f m) but the required altitude is %.1f m", alt, ok, arr, r)
		}
		if alt < req-tol-0.5 && ok {
			t.Errorf("from %.1f m, more than the tolerance below the required %.1f m: reachable (arrival %.1f m)", alt, req, arr)
		}
	}
}
