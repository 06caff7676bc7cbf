package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCLI runs the command line in-process on a fresh root and returns the
// exit status and the output; a panic fails the test.
func runCLI(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	root := newRootCmd()
	root.SetArgs(args)
	root.SetErr(&errb)
	func() {
		defer func() {
			if r := recover(); r != nil {
				t.Fatalf("glidereach %s panicked: %v", strings.Join(args, " "), r)
			}
		}()
		code = exitCode(execute(context.Background(), root, &out))
	}()
	return code, out.String(), errb.String()
}

func TestPolarTrainerTable(t *testing.T) {
	code, out, _ := runCLI(t, "polar", "--aircraft", "trainer", "--alt", "5000ft")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	// 5000 ft: σ = 0.8617 (ICAO standard atmosphere table in feet), so the
	// 65 kt IAS best glide is 65/√0.8617 = 70.0 kt TAS; the best_glide form
	// keeps its 1:9 ratio, sink = 70.0 kt / 9 = 4.00 m/s.
	for _, want := range []string{
		"sigma 0.8617",
		"Best glide    1:9.0 at 65.0 kt IAS (70.0 kt TAS), sink 4.00 m/s",
		"clamped: the polar's least-sink speed is below the usable minimum",
		"Usable speeds 62.4 kt to 120.0 kt IAS",
		"PLANNING AID ONLY",
		"best glide, speed to fly",
		"Wind: calm",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestPolarJSONAndWind(t *testing.T) {
	code, out, _ := runCLI(t, "polar", "--aircraft", "trainer", "--alt", "1000m", "--wind", "270/20kt", "--track", "090", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	var r map[string]any
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"alt_msl_m", "mac_cready_m_s", "density_kg_m3", "rows", "best_glide", "least_sink", "speed_to_fly", "caution", "wind", "min_ias_m_s"} {
		if _, ok := r[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	stf := r["speed_to_fly"].(map[string]any)
	bg := r["best_glide"].(map[string]any)
	// Tailwind → a larger ground ratio than the air ratio and a slower speed
	// (REFERENCES.md §3, tangent from (−W_t, 0)).
	if !(stf["ground_ratio"].(float64) > bg["glide_ratio"].(float64)) {
		t.Errorf("tailwind ground ratio %v not above %v", stf["ground_ratio"], bg["glide_ratio"])
	}
	// A headwind at least the maximum speed: no headway, reported, exit 0.
	code, out, _ = runCLI(t, "polar", "--aircraft", "trainer", "--wind", "090/130kt", "--track", "090")
	if code != 0 || !strings.Contains(out, "no headway") {
		t.Errorf("no headway case: exit %d\n%s", code, out)
	}
}

func TestPolarOutFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "p.json")
	if code, _, _ := runCLI(t, "polar", "--aircraft", "sailplane", "--format", "json", "--out", path); code != 0 {
		t.Fatalf("exit %d", code)
	}
	b, err := os.ReadFile(path)
	if err != nil || !json.Valid(b) {
		t.Fatalf("out file: %v", err)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("left behind: %v", ents)
	}
}

func TestPolarMassAndMacCready(t *testing.T) {
	get := func(args ...string) (ias, ratio float64) {
		code, out, _ := runCLI(t, append([]string{"polar", "--format", "json"}, args...)...)
		if code != 0 {
			t.Fatalf("%v: exit %d", args, code)
		}
		var r struct {
			SpeedToFly struct {
				IAS   float64 `json:"ias_m_s"`
				Ratio float64 `json:"ground_ratio"`
			} `json:"speed_to_fly"`
		}
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatal(err)
		}
		return r.SpeedToFly.IAS, r.SpeedToFly.Ratio
	}
	v0, e0 := get("--aircraft", "sailplane")
	// FAA Glider Flying Handbook ch. 5 (ballast): more mass, same best ratio
	// at a speed √(m/m₀) higher.
	v1, e1 := get("--aircraft", "sailplane", "--mass", "475kg")
	if math.Abs(e1-e0) > 1e-6*e0 || math.Abs(v1/v0-math.Sqrt(475.0/380)) > 1e-4 {
		t.Errorf("mass: %v at %v vs %v at %v", e1, v1, e0, v0)
	}
	// MacCready > 0 → faster (REFERENCES.md §3).
	if v2, _ := get("--aircraft", "sailplane", "--mc", "2m/s"); !(v2 > v0) {
		t.Errorf("MC 2 speed %v not above %v", v2, v0)
	}
}

func TestPolarBadInputExit2(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	stallAboveMax := write("stall.yaml", "reference_mass: 750kg\nstall_speed: 130kt\nmax_speed: 120kt\npolar:\n  form: best_glide\n  best_glide_speed: 65kt\n  glide_ratio: 9\n")
	badJSON := write("bad.json", "{\"reference_mass\": 750,\n\"polar\": [}")
	twoPoints := write("two.yaml", "reference_mass: 400\nstall_speed: 18\nmax_speed: 60\npolar:\n  form: points\n  points: [[20, 0.7], [30, 0.8]]\n")
	cases := []struct {
		args []string
		want string // part of the message on stderr (printed by exitCode)
	}{
		{[]string{"polar"}, "aircraft"},
		{[]string{"polar", "--aircraft", "no-such-plane"}, "--aircraft"},
		{[]string{"polar", "--aircraft", stallAboveMax}, "stall"},
		{[]string{"polar", "--aircraft", badJSON}, "JSON"},
		{[]string{"polar", "--aircraft", twoPoints}, "at least 3"},
		{[]string{"polar", "--aircraft", dir}, "regular file"},
		{[]string{"polar", "--aircraft", "trainer", "--alt", "5000furlongs"}, "--alt"},
		{[]string{"polar", "--aircraft", "trainer", "--alt", "high"}, "--alt"},
		{[]string{"polar", "--aircraft", "trainer", "--alt", "30000m"}, "--alt"},
		{[]string{"polar", "--aircraft", "trainer", "--mass", "-5kg"}, "--mass"},
		{[]string{"polar", "--aircraft", "trainer", "--mass", "5000kg"}, "--mass"},
		{[]string{"polar", "--aircraft", "trainer", "--mass", "750stone"}, "--mass"},
		{[]string{"polar", "--aircraft", "trainer", "--bugs", "-0.1"}, "--bugs"},
		{[]string{"polar", "--aircraft", "trainer", "--bugs", "500%"}, "--bugs"},
		{[]string{"polar", "--aircraft", "trainer", "--bugs", "10kt"}, "--bugs"},
		{[]string{"polar", "--aircraft", "trainer", "--isa-dev", "100K"}, "--isa-dev"},
		{[]string{"polar", "--aircraft", "trainer", "--isa-dev", "10F"}, "--isa-dev"},
		{[]string{"polar", "--aircraft", "trainer", "--wind", "270/20kt"}, "--track"},
		{[]string{"polar", "--aircraft", "trainer", "--wind", "westerly", "--track", "090"}, "--wind"},
		{[]string{"polar", "--aircraft", "trainer", "--wind", "missing-winds.yaml", "--track", "090"}, "not found"},
		{[]string{"polar", "--aircraft", "trainer", "--track", "400"}, "--track"},
		{[]string{"polar", "--aircraft", "trainer", "--track", "east"}, "--track"},
		{[]string{"polar", "--aircraft", "trainer", "--mc", "-1"}, "--mc"},
		{[]string{"polar", "--aircraft", "trainer", "--mc", "3ft"}, "--mc"},
		{[]string{"polar", "--aircraft", "trainer", "--air-sink", "-1m/s"}, "--air-sink"},
		{[]string{"polar", "--aircraft", "trainer", "--format", "xml"}, "--format"},
		{[]string{"polar", "--aircraft", "trainer", "--units", "furlongs"}, "--units"},
		{[]string{"polar", "--aircraft", "trainer", "extra"}, "unknown command"},
		{[]string{"polar", "--aircraft", "trainer", "--wingspan", "15m"}, "unknown flag"},
	}
	if len(cases) < 20 {
		t.Fatal("need at least 20 cases")
	}
	for _, c := range cases {
		// exitCode writes the message to os.Stderr; capture it.
		r, w, _ := os.Pipe()
		saved := os.Stderr
		os.Stderr = w
		code, _, _ := runCLI(t, c.args...)
		w.Close()
		os.Stderr = saved
		var msg bytes.Buffer
		msg.ReadFrom(r)
		if code != 2 || !strings.Contains(msg.String(), c.want) {
			t.Errorf("%v: exit %d, message %q; want exit 2 and %q", c.args[1:], code, msg.String(), c.want)
		}
	}
}

func TestPolarWindAndTemperatureLines(t *testing.T) {
	// Layers 0 ft (no temperature) and 1524 m (5000 ft) −5 °C: at 6000 ft the layer
	// temperature is carried up with the ISA lapse, −5 − 0.0065·304.8 =
	// −6.98 °C, and ISA there is 288.15 − 0.0065·1828.8 = 276.26 K (ICAO
	// standard atmosphere), so the air is ISA −10.094 K, not the --isa-dev 0.
	code, out, _ := runCLI(t, "polar", "--aircraft", "trainer", "--alt", "6000ft",
		"--wind", "0ft:240/10kt,5000ft:270/20kt@-5C", "--track", "180")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	for _, want := range []string{
		"Air: -7.0 °C (ISA -10.1 K, from the wind layers' temperatures)",
		// Layers described in knots, like every other command, at the
		// altitudes in the feet they were typed in (metres beside).
		"Wind: 0 ft (0 m) 240°/10 kt, 5000 ft (1524 m) 270°/20 kt -5 °C",
		// A west wind on a southbound track comes from the right (wind
		// package sign convention: cross > 0 from the left).
		"crosswind 20.0 kt from the right",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	code, out, _ = runCLI(t, "polar", "--aircraft", "trainer", "--alt", "6000ft",
		"--wind", "0ft:240/10kt,5000ft:270/20kt@-5C", "--track", "180", "--format", "json")
	var r struct {
		Dev    float64 `json:"isa_dev_k"`
		Source string  `json:"temperature_source"`
	}
	if code != 0 || json.Unmarshal([]byte(out), &r) != nil || r.Source != "wind_layers" || math.Abs(r.Dev-(-10.094)) > 0.001 {
		t.Errorf("JSON temperature: exit %d, %+v", code, r)
	}
	// Wind from the north on track 090 is a crosswind from the left
	// (wind package convention); 9900 (light and variable) at the flight
	// level decodes as calm and is printed as calm, not as a direction.
	_, out, _ = runCLI(t, "polar", "--aircraft", "trainer", "--alt", "1000m", "--wind", "360/15kt", "--track", "090")
	if !strings.Contains(out, "crosswind 15.0 kt from the left") {
		t.Errorf("north wind on track 090:\n%s", out)
	}
	_, out, _ = runCLI(t, "polar", "--aircraft", "trainer", "--alt", "6000ft", "--wind-aloft", "3000:9900 6000:9900+02 9000:1908-04", "--track", "090")
	if !strings.Contains(out, "Wind at 1829 m: calm") {
		t.Errorf("light and variable at the altitude:\n%s", out)
	}
}
