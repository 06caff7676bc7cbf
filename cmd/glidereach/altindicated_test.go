package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"glidereach/reach"
)

func TestAltIndicatedColdCorrection(t *testing.T) {
	// Altimeter 3000 m on the QNH of a source at 300 m reporting -20 °C:
	// ICAO Doc 8168 (PANS-OPS) Vol I cold-temperature correction,
	// H = 2700 m, t0 = -20 + 0.0065·300 = -18.05 °C,
	// 2700·33.05/(273 − 18.05 − 0.5·0.0065·3000) = 363.9 m low, so the
	// glide starts at 2636.1 m true (hand computation of the published
	// formula).
	for _, cmd := range []string{"final", "reach"} {
		args := []string{cmd, "--from", "-0.5,-24.5", "--ground", "100m", "--alt-indicated", "3000m",
			"--station-elev", "300m", "--station-temp", "-20C", "--format", "json"}
		if cmd == "final" {
			args = append(args, "--to", "-0.45,-24.45")
		}
		code, out, errs := cliWithStderr(t, args...)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", cmd, code, errs)
		}
		var doc struct {
			StartMSL float64 `json:"start_msl_m"`
			Start    struct {
				AltMSL float64 `json:"alt_msl_m"`
			} `json:"start"`
			Assumptions []string `json:"assumptions"`
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		if math.Abs(doc.Start.AltMSL-2636.1) > 0.15 {
			t.Errorf("%s: start %.2f m MSL, want 2636.1 m true", cmd, doc.Start.AltMSL)
		}
		all := strings.Join(doc.Assumptions, "|")
		if !strings.Contains(all, "Doc 8168") || !strings.Contains(all, "altimeter reads 3000 m") || !strings.Contains(all, "364 m lower") {
			t.Errorf("%s: assumptions do not say which correction was used: %q", cmd, doc.Assumptions)
		}
	}
	// --alt says it is the true altitude, in the assumptions.
	a, _ := finalAssumptionsOf(t, "--alt", "1500m")
	if !strings.Contains(strings.Join(a, "|"), "--alt taken as true altitude MSL") {
		t.Errorf("--alt assumptions: %q", a)
	}
	// Warmer than ISA: the reading is kept (the extra height is not credited).
	code, out, _ := cliWithStderr(t, "final", "--from", "-0.5,-24.5", "--to", "-0.45,-24.45", "--ground", "100m",
		"--alt-indicated", "2000m", "--station-elev", "0m", "--station-temp", "30C", "--format", "json")
	var warm struct {
		Start float64 `json:"start_msl_m"`
	}
	if json.Unmarshal([]byte(out), &warm); code != 0 || warm.Start != 2000 {
		t.Errorf("warm day: exit %d, start %v, want 2000", code, warm.Start)
	}
}

func TestAltIndicatedBadInput(t *testing.T) {
	base := []string{"final", "--from", "-0.5,-24.5", "--to", "-0.45,-24.45"}
	for _, c := range []struct {
		args []string
		flag string
	}{
		{[]string{"--alt-indicated", "2000m"}, "--alt-indicated"},
		{[]string{"--alt-indicated", "2000m", "--station-elev", "0m"}, "--alt-indicated"},
		{[]string{"--alt-indicated", "2000m", "--alt", "2000m", "--station-elev", "0m", "--station-temp", "-5C"}, "--alt"},
		{[]string{"--alt-indicated", "2000m", "--station-elev", "0m", "--station-temp", "-200C"}, "--station-temp"},
		{[]string{"--alt-indicated", "2000m", "--station-elev", "0m", "--station-temp", "cold"}, "--station-temp"},
		{[]string{"--alt", "2000m", "--station-temp", "-5C"}, "--station-elev"},
	} {
		code, _, errs := cliWithStderr(t, append(base, c.args...)...)
		if code != 2 || !strings.Contains(errs, c.flag) {
			t.Errorf("%v: exit %d, %q (want 2 naming %s)", c.args, code, errs, c.flag)
		}
	}
}

func TestAltIndicatedRouteAndCoverage(t *testing.T) {
	// The same reading on route and coverage: 1500 m on the QNH of a
	// sea-level source at -25 °C is 1500·40/(273 − 25 − 0.5·0.0065·1500)
	// = 246.8 m low (ICAO Doc 8168 formula, hand computation): both fly
	// 1253.2 m true, and give the same answer as --alt 1253.2m.
	dir := t.TempDir()
	fields := writeTestFields(t, -0.5, -24.5, []float64{9000}, []float64{90})
	route := filepath.Join(dir, "r.geojson")
	if err := os.WriteFile(route, []byte(`{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[-24.5,-0.505],[-24.5,-0.495]]}}`), 0o644); err != nil {
		t.Fatal(err)
	}
	cold := []string{"--alt-indicated", "1500m", "--station-elev", "0m", "--station-temp", "-25C"}
	for _, cmd := range [][]string{
		{"route", "--route", route, "--fields", fields},
		{"coverage", "--box", "-0.505,-24.5005,-0.495,-24.4995", "--fields", fields},
	} {
		code, out, errs := cliWithStderr(t, append(append(cmd, cold...), "--format", "json")...)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", cmd[0], code, errs)
		}
		var doc struct {
			Covered     float64  `json:"covered_fraction"`
			Assumptions []string `json:"assumptions"`
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(strings.Join(doc.Assumptions, "|"), "true altitude 1253 m, 247 m lower") {
			t.Errorf("%s: assumptions %q", cmd[0], doc.Assumptions)
		}
		want := coveredFraction(t, append(cmd, "--alt", "1253.2m")...)
		if doc.Covered != want {
			t.Errorf("%s: covered %.3f from the reading, %.3f from --alt 1253.2m", cmd[0], doc.Covered, want)
		}
		// The field 9 km away is in reach from 1500 m true (trainer, 9:1,
		// 300 m reserve: 10.8 km) but not from 1253 m (8.6 km): taking the
		// reading as true altitude would be optimistic.
		if uncorrected := coveredFraction(t, append(cmd, "--alt", "1500m")...); !(uncorrected == 1 && doc.Covered == 0) {
			t.Errorf("%s: covered %.2f at the reading taken as true, %.2f corrected; want 1 and 0", cmd[0], uncorrected, doc.Covered)
		}
	}
}

func TestFinalRequiredAsAltimeterReading(t *testing.T) {
	// With --alt-indicated the required altitude is also given as the
	// reading on the same source: corrected by the ICAO Doc 8168 formula it
	// gives back required_msl_m (within 0.1 m, the output's rounding), and
	// it is above it on a cold day.
	doc := finalDoc(t, "--from", "0,-25.04", "--alt-indicated", "2600m", "--station-elev", "300m", "--station-temp", "-20C",
		"--to", "-0.03,-24.96", "--terrain", "../../testdata/geotiff/geo_int16_strip_none.tif")
	req, ind := numField(t, doc, "required_msl_m"), numField(t, doc, "required_indicated_m")
	corr, err := reach.ColdCorrection(ind, 300, 253.15)
	if err != nil || math.Abs(ind-corr-req) > 0.1 || !(ind > req+100) {
		t.Errorf("required %.1f m true, reading %.1f m, corrected back %.1f m", req, ind, ind-corr)
	}
	// 2600 m on the altimeter is about 2292 m true there: blocked, though
	// the reading alone would look clear of the 2445 m needed.
	if doc["status"] != "blocked" {
		t.Errorf("status %v, want blocked", doc["status"])
	}
	if plain := finalDoc(t, "--from", "0,-25.04", "--alt", "1500m", "--to", "-0.03,-24.96"); plain["required_indicated_m"] != nil {
		t.Error("required_indicated_m without --alt-indicated")
	}
}
