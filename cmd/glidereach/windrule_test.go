package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"glidereach/reach/geodesy"
)

func coveredFraction(t *testing.T, args ...string) float64 {
	t.Helper()
	code, out, errs := cliWithStderr(t, append(args, "--format", "json")...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, errs)
	}
	var doc struct {
		Covered *float64 `json:"covered_fraction"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || doc.Covered == nil {
		t.Fatalf("%v: no covered_fraction (%v)\n%s", args, err, out)
	}
	return *doc.Covered
}

func TestRouteAndCoverageShareTheWindRule(t *testing.T) {
	// Two fields 9.7 km east and west of a short north-south route at
	// 1500 m over flat sea-level ground (trainer, glide ratio 9, reserve
	// 300 m: about 10.8 km in still air). A 15 kt north wind with a 90°
	// direction error gives the winds 360, 270 and 090: in each wind alone
	// some field is in reach (the crosswind costs little, the tailwind
	// helps), but a west wind puts West out of reach and an east wind East.
	// No single field holds in every wind, so under the same-field rule
	// (DEVELOPERS.md, "Wind uncertainty") route and coverage both find the
	// route uncovered; the rule "some field in every wind" would call it
	// covered. Each wind alone covers it in both commands.
	dir := t.TempDir()
	c := geodesy.LatLon{Lat: -0.5, Lon: -24.5}
	var feats string
	for i, b := range []float64{90, 270} {
		p, _, _ := geodesy.Direct(c, b, 9700)
		if i > 0 {
			feats += ","
		}
		feats += fmt.Sprintf(`{"type":"Feature","properties":{"name":"F%v"},"geometry":{"type":"Point","coordinates":[%.7f,%.7f]}}`, b, p.Lon, p.Lat)
	}
	fields, route := filepath.Join(dir, "f.geojson"), filepath.Join(dir, "r.geojson")
	os.WriteFile(fields, []byte(`{"type":"FeatureCollection","features":[`+feats+`]}`), 0o644)
	os.WriteFile(route, []byte(`{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[-24.5,-0.505],[-24.5,-0.495]]}}`), 0o644)
	routeArgs := []string{"route", "--route", route, "--fields", fields, "--alt", "1500m"}
	covArgs := []string{"coverage", "--box", "-0.505,-24.5005,-0.495,-24.4995", "--fields", fields, "--alt", "1500m"}
	for _, w := range []string{"360/15kt", "270/15kt", "090/15kt"} {
		r := coveredFraction(t, append(routeArgs, "--wind", w)...)
		cv := coveredFraction(t, append(covArgs, "--wind", w)...)
		if r != 1 || cv != 1 {
			t.Errorf("wind %s alone: route covers %.2f, coverage %.2f; want 1 and 1", w, r, cv)
		}
	}
	werr := []string{"--wind", "360/15kt", "--wind-error", "90deg,0kt"}
	r := coveredFraction(t, append(routeArgs, werr...)...)
	cv := coveredFraction(t, append(covArgs, werr...)...)
	if r != 0 || cv != 0 {
		t.Errorf("with --wind-error: route covers %.2f, coverage %.2f; want 0 for both (no field holds in every wind)", r, cv)
	}
}
