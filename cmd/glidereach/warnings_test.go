package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// cliWithStderr runs glidereach in-process and returns the exit code,
// stdout and stderr.
func cliWithStderr(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	root := newRootCmd()
	root.SetArgs(args)
	root.SetOut(&out)
	root.SetErr(&errb)
	err := root.ExecuteContext(context.Background())
	if err != nil {
		errb.WriteString(err.Error())
	}
	return exitCode(err), out.String(), errb.String()
}

// writeProfile writes a trainer-like profile with extra top-level lines.
func writeProfile(t *testing.T, extra string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "ac.yaml")
	body := "name: Test trainer\nreference_mass: 750kg\nstall_speed: 48kt\nmax_speed: 120kt\n" + extra +
		"polar:\n  form: best_glide\n  best_glide_speed: 65kt\n  glide_ratio: 9\n"
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// finalAssumptionsOf runs final --format json and returns its assumptions
// and stderr.
func finalAssumptionsOf(t *testing.T, args ...string) ([]string, string) {
	t.Helper()
	code, out, errs := cliWithStderr(t, append([]string{"final", "--from", "-0.5,-24.5", "--to", "-0.45,-24.45", "--ground", "100m", "--format", "json"}, args...)...)
	if code != 0 {
		t.Fatalf("final %v: exit %d: %s", args, code, errs)
	}
	var doc struct {
		Assumptions []string `json:"assumptions"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	return doc.Assumptions, errs
}

func hasWarning(list []string, sub string) bool {
	for _, a := range list {
		if strings.HasPrefix(a, "WARNING: ") && strings.Contains(a, sub) {
			return true
		}
	}
	return false
}

func TestReserveZeroSameFromProfileAndFlag(t *testing.T) {
	// A reserve of 0 is a planner's "touch the ground" setting: allowed
	// from a profile and from --reserve alike, and warned about loudly on
	// stderr and in the assumptions (common practice, no source).
	prof := writeProfile(t, "reserve: 0m\n")
	for _, args := range [][]string{{"--aircraft", prof, "--alt", "1500m"}, {"--reserve", "0m", "--alt", "1500m"}} {
		a, errs := finalAssumptionsOf(t, args...)
		if !hasWarning(a, "RESERVE 0 m") || !strings.Contains(errs, "WARNING: RESERVE 0 m") {
			t.Errorf("%v: no loud warning; stderr %q, assumptions %q", args, errs, a)
		}
		if !strings.Contains(strings.Join(a, "|"), "reserve 0 m above the field") {
			t.Errorf("%v: the reserve 0 was not used: %q", args, a)
		}
	}
	// Below common practice but not zero: a warning; the default: none.
	if a, _ := finalAssumptionsOf(t, "--reserve", "100m", "--alt", "1500m"); !hasWarning(a, "reserve 100 m (from --reserve) is below") {
		t.Errorf("reserve 100 m: %q", a)
	}
	if a, errs := finalAssumptionsOf(t, "--alt", "1500m"); hasWarning(a, "") || strings.Contains(errs, "WARNING") {
		t.Errorf("defaults warn: %q %q", a, errs)
	}
	// Clearance 0 likewise.
	if a, errs := finalAssumptionsOf(t, "--clearance", "0m", "--alt", "1500m"); !hasWarning(a, "CLEARANCE 0 m") || !strings.Contains(errs, "CLEARANCE 0 m") {
		t.Errorf("clearance 0: %q %q", a, errs)
	}
	// Not physical: refused, exit 2, from either source.
	if code, _, errs := cliWithStderr(t, "final", "--from", "-0.5,-24.5", "--to", "-0.45,-24.45", "--reserve", "-10m"); code != 2 || !strings.Contains(errs, "--reserve") {
		t.Errorf("--reserve -10m: exit %d: %s", code, errs)
	}
	neg := writeProfile(t, "reserve: -10m\n")
	if code, _, errs := cliWithStderr(t, "final", "--from", "-0.5,-24.5", "--to", "-0.45,-24.45", "--aircraft", neg); code != 2 || !strings.Contains(errs, "reserve") {
		t.Errorf("profile reserve -10m: exit %d: %s", code, errs)
	}
}

func TestMinSpeedNearStallWarns(t *testing.T) {
	// min_speed 48.5 kt on a 48 kt stall (1.01 ×) is below the 1.3 × stall
	// margin common practice keeps (no source): warned; at the stall:
	// refused.
	a, errs := finalAssumptionsOf(t, "--aircraft", writeProfile(t, "min_speed: 48.5kt\n"), "--alt", "1500m")
	if !hasWarning(a, "min_speed 48 kt is only 1.01 × its stall speed") || !strings.Contains(errs, "WARNING: the profile's min_speed") {
		t.Errorf("min_speed 1.01 × stall: %q %q", a, errs)
	}
	if _, _, errs := cliWithStderr(t, "polar", "--aircraft", writeProfile(t, "min_speed: 48.5kt\n")); !strings.Contains(errs, "WARNING: the profile's min_speed") {
		t.Errorf("polar with min_speed 1.01 × stall: stderr %q", errs)
	}
	if a, _ := finalAssumptionsOf(t, "--aircraft", writeProfile(t, "min_speed: 63kt\n"), "--alt", "1500m"); hasWarning(a, "min_speed") {
		t.Errorf("min_speed 1.31 × stall warns: %q", a)
	}
	if code, _, errs := cliWithStderr(t, "final", "--from", "-0.5,-24.5", "--to", "-0.45,-24.45", "--aircraft", writeProfile(t, "min_speed: 48kt\n")); code != 2 || !strings.Contains(errs, "minimum speed") {
		t.Errorf("min_speed at the stall: exit %d: %s", code, errs)
	}
}

func TestStartBelowClearanceWarns(t *testing.T) {
	// 68 m above flat ground with the default 100 m clearance.
	a, errs := finalAssumptionsOf(t, "--agl", "68m")
	if !hasWarning(a, "only 68 m above the terrain") || !strings.Contains(errs, "WARNING: the start is only 68 m") {
		t.Errorf("final --agl 68m: %q %q", a, errs)
	}
	code, out, errs := cliWithStderr(t, "reach", "--from", "-0.5,-24.5", "--agl", "68m", "--ground", "100m", "--format", "json")
	if code != 0 || !strings.Contains(errs, "WARNING: the start is only 68 m") || !strings.Contains(out, "WARNING: the start is only 68 m") {
		t.Errorf("reach --agl 68m: exit %d, stderr %q", code, errs)
	}
}

func TestReserveHelpTellsTheDefault(t *testing.T) {
	// The built-in sailplane's reserve is 200 m: --help must not claim a
	// single 300 m default.
	_, out, _ := cliWithStderr(t, "final", "--help")
	var line string
	for _, l := range strings.Split(out, "\n") {
		if strings.Contains(l, "--reserve") {
			line = l
		}
	}
	if strings.Contains(line, "(default 300m)") || !strings.Contains(line, "sailplane 200 m") || !strings.Contains(line, "else 300 m") {
		t.Errorf("--reserve help: %q", line)
	}
	// And the sailplane really flies with 200 m.
	if a, _ := finalAssumptionsOf(t, "--aircraft", "sailplane", "--alt", "1500m"); !strings.Contains(strings.Join(a, "|"), "reserve 200 m") {
		t.Errorf("sailplane assumptions: %q", a)
	}
}

func TestRouteCoarseStepWarns(t *testing.T) {
	// A 5 km step on a ~100 m solver grid can step over a short gap: the
	// route's notes say so; the default 250 m step does not warn.
	route := filepath.Join("..", "..", "testdata", "routes", "demo-route.gpx")
	fields := filepath.Join("..", "..", "testdata", "fields", "demo-fields.geojson")
	for _, c := range []struct {
		step string
		warn bool
	}{{"5km", true}, {"250m", false}} {
		code, out, errs := cliWithStderr(t, "route", "--route", route, "--fields", fields, "--alt", "2000m", "--step", c.step, "--format", "json")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errs)
		}
		var doc struct {
			Notes []string `json:"notes"`
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		if got := hasWarning(doc.Notes, "can fall between two samples"); got != c.warn {
			t.Errorf("--step %s: warning %v, want %v (%q)", c.step, got, c.warn, doc.Notes)
		}
	}
}
