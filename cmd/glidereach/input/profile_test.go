package input

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"glidereach/reach"
)

const kt = 1852.0 / 3600

func TestLoadAircraftFiles(t *testing.T) {
	dir := filepath.Join("..", "..", "..", "testdata", "aircraft")
	// testdata/aircraft/trainer.yaml is the README's sample profile.
	ac, err := LoadAircraft(filepath.Join(dir, "trainer.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if ac.Name != "Demo two-seat trainer" || ac.RefMass != 750 || ac.Mass != 720 ||
		math.Abs(ac.StallIAS-48*kt) > 1e-12 || math.Abs(ac.MinIAS-55*kt) > 1e-12 ||
		ac.Reserve != 300 || ac.Clearance != 100 || ac.Polar.Form() != "best_glide" {
		t.Errorf("trainer.yaml: %+v", ac)
	}
	// The YAML points and the JSON drag profiles carry the same figures as
	// the built-ins of the same kind, so their polars must agree.
	for file, builtin := range map[string]string{"sailplane-points.yaml": "sailplane", "tourer-drag.json": "tourer"} {
		got, err := LoadAircraft(filepath.Join(dir, file))
		if err != nil {
			t.Fatalf("%s: %v", file, err)
		}
		want, _ := reach.Builtin(builtin)
		for v := 20.0; v < 60; v += 5 {
			if a, b := got.Polar.Sink(v), want.Polar.Sink(v); math.Abs(a-b) > 1e-9 {
				t.Errorf("%s: sink at %v m/s %v, built-in %v", file, v, a, b)
			}
		}
	}
	mg, err := LoadAircraft(filepath.Join(dir, "motorglider.json"))
	if err != nil {
		t.Fatal(err)
	}
	// 1 lb = 0.45359237 kg exactly (1959 agreement).
	if math.Abs(mg.Mass-1700*0.45359237) > 1e-9 || mg.RefMass != 800 {
		t.Errorf("motorglider.json masses %v %v", mg.Mass, mg.RefMass)
	}
}

func TestLoadAircraftBuiltin(t *testing.T) {
	for _, n := range append(reach.BuiltinNames(), "Trainer", " sailplane ") {
		if _, err := LoadAircraft(n); err != nil {
			t.Errorf("%q: %v", n, err)
		}
	}
	_, err := LoadAircraft("no-such-plane")
	var ue *UsageError
	if !errors.As(err, &ue) || ue.Where != "--aircraft" || !strings.Contains(err.Error(), "trainer") {
		t.Errorf("unknown name: %v", err)
	}
}

// badProfiles are profile texts that must be refused with a message
// containing want (and, for YAML, the line).
var badProfiles = []struct {
	name, text, want string
}{
	{"empty", "", "empty"},
	{"not a mapping", "- 1\n- 2\n", "mapping"},
	{"bad yaml", "name: [unclosed\n", "not valid YAML"},
	{"bad json", "{\"name\": \"x\",\n \"polar\": }", "p.json:2"},
	{"unknown key", okHead + "wingspan: 15m\n" + bgPolar, "unknown key \"wingspan\""},
	{"duplicate key", okHead + "max_speed: 130kt\n" + bgPolar, "given twice"},
	{"missing stall", "reference_mass: 750kg\nmax_speed: 120kt\n" + bgPolar, "missing key \"stall_speed\""},
	{"missing polar", okHead, "missing key \"polar\""},
	{"bad unit", "reference_mass: 750stone\nstall_speed: 48kt\nmax_speed: 120kt\n" + bgPolar, "p.yaml:1: reference_mass"},
	{"speed as length", "reference_mass: 750kg\nstall_speed: 48ft\nmax_speed: 120kt\n" + bgPolar, "unknown speed unit"},
	{"negative mass", "reference_mass: -750kg\nstall_speed: 48kt\nmax_speed: 120kt\n" + bgPolar, "must be positive"},
	// Errors found by reach after parsing still point at the key's line.
	{"stall above max", "reference_mass: 750kg\nstall_speed: 130kt\nmax_speed: 120kt\n" + bgPolar, "p.yaml:2: reach: p: stall speed 66.9 m/s (130.0 kt) is not below"},
	{"min below stall", okHead + "min_speed: 40kt\n" + bgPolar, "p.yaml:5: reach: t: minimum speed 20.6 m/s (40.0 kt) is not above the stall"},
	{"mass far off", okHead + "mass: 5000kg\n" + bgPolar, "p.yaml:5: reach: t: mass 5000 kg is far from"},
	// Sink falling with speed all the way to 120 km/h: positive, but a glide
	// ratio of about 190 at 190 km/h, which no aircraft has.
	{"glide ratio beyond any aircraft", "name: t\nreference_mass: 380kg\nstall_speed: 65km/h\nmax_speed: 250km/h\npolar:\n  form: points\n  points: [[80km/h, 0.9m/s], [120km/h, 0.5m/s], [160km/h, 0.3m/s]]\n", "p.yaml:5: reach: t: points polar gives a glide ratio of"},
	{"unknown form", okHead + "polar:\n  form: spline\n", "unknown form"},
	{"no form", okHead + "polar:\n  glide_ratio: 9\n", "missing key \"form\""},
	{"key of other form", okHead + "polar:\n  form: best_glide\n  best_glide_speed: 65kt\n  glide_ratio: 9\n  cd0: 0.02\n", "does not belong"},
	{"glide ratio unit", okHead + "polar:\n  form: best_glide\n  best_glide_speed: 65kt\n  glide_ratio: 9kt\n", "not a number"},
	{"glide ratio 0", okHead + "polar:\n  form: best_glide\n  best_glide_speed: 65kt\n  glide_ratio: 0\n", "glide_ratio"},
	{"two points", okHead + "polar:\n  form: points\n  points: [[60kt, 3m/s], [80kt, 4m/s]]\n", "at least 3"},
	{"points not increasing", okHead + "polar:\n  form: points\n  points: [[60kt, 3m/s], [80kt, 4m/s], [70kt, 5m/s]]\n", "increase"},
	{"point not a pair", okHead + "polar:\n  form: points\n  points: [[60kt, 3m/s], [80kt], [90kt, 5m/s]]\n", "point 2"},
	{"points not a list", okHead + "polar:\n  form: points\n  points: 60kt\n", "list"},
	{"sink negative in range", okHead + "polar:\n  form: points\n  points: [[30, 1.35], [37.5, 1.35], [45, 12.6]]\n", "sink must be positive"},
	{"bending down", okHead + "polar:\n  form: points\n  points: [[60kt, 3m/s], [80kt, 5m/s], [100kt, 6m/s]]\n", "bend"},
	{"drag missing key", okHead + "polar:\n  form: drag\n  cd0: 0.03\n  aspect_ratio: 8\n  oswald: 0.8\n", "needs key \"wing_area\""},
	{"drag oswald", okHead + "polar:\n  form: drag\n  cd0: 0.03\n  aspect_ratio: 8\n  oswald: 3\n  wing_area: 15m2\n", "oswald"},
	{"null value", "reference_mass:\nstall_speed: 48kt\nmax_speed: 120kt\n" + bgPolar, "single value"},
	{"nested value", "reference_mass: {a: 1}\nstall_speed: 48kt\nmax_speed: 120kt\n" + bgPolar, "single value"},
	{"NaN mass", "reference_mass: .nan\nstall_speed: 48kt\nmax_speed: 120kt\n" + bgPolar, "reference_mass"},
}

const okHead = "name: t\nreference_mass: 750kg\nstall_speed: 48kt\nmax_speed: 120kt\n"
const bgPolar = "polar:\n  form: best_glide\n  best_glide_speed: 65kt\n  glide_ratio: 9\n"

func TestParseAircraftBad(t *testing.T) {
	if len(badProfiles) < 20 {
		t.Fatal("need at least 20 bad profiles")
	}
	for _, c := range badProfiles {
		file := "p.yaml"
		if strings.HasPrefix(c.text, "{") {
			file = "p.json"
		}
		ac, err := ParseAircraft(file, []byte(c.text))
		var ue *UsageError
		if err == nil || !errors.As(err, &ue) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, %v; want a *UsageError containing %q", c.name, ac, err, c.want)
		}
	}
	// The good texts the bad ones are built from do parse.
	if _, err := ParseAircraft("p.yaml", []byte(okHead+bgPolar)); err != nil {
		t.Error(err)
	}
}

// FuzzParseAircraft: never panics; a profile that parses is valid.
func FuzzParseAircraft(f *testing.F) {
	dir := filepath.Join("..", "..", "..", "testdata", "aircraft")
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if b, err := os.ReadFile(filepath.Join(dir, e.Name())); err == nil {
			f.Add(b)
		}
	}
	for _, c := range badProfiles {
		f.Add([]byte(c.text))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		ac, err := ParseAircraft("fuzz.yaml", data)
		if err != nil {
			var ue *UsageError
			if !errors.As(err, &ue) {
				t.Fatalf("error is not a *UsageError: %v", err)
			}
			return
		}
		if err := ac.Validate(); err != nil {
			t.Fatalf("accepted an invalid profile: %v", err)
		}
	})
}
