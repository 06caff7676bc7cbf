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

// reachFields runs reach --format json and returns arrival and required
// altitude per field name, and the assumptions.
func reachFields(t *testing.T, args ...string) (map[string][2]float64, []string) {
	t.Helper()
	code, out, errs := runCLI(t, append([]string{"reach", "--format", "json"}, args...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Fields []struct {
			Name        string   `json:"name"`
			ArrivalAGL  *float64 `json:"arrival_agl_m"`
			RequiredMSL *float64 `json:"required_msl_m"`
		} `json:"fields"`
		Assumptions []string `json:"assumptions"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	m := map[string][2]float64{}
	for _, f := range doc.Fields {
		v := [2]float64{math.NaN(), math.NaN()}
		if f.ArrivalAGL != nil {
			v[0] = *f.ArrivalAGL
		}
		if f.RequiredMSL != nil {
			v[1] = *f.RequiredMSL
		}
		m[f.Name] = v
	}
	return m, doc.Assumptions
}

// reach from a failure state: heading north in calm air over flat ground,
// a field 4 km behind arrives lower and needs more altitude than today, a
// field 4 km ahead arrives higher (the energy credit and the ground covered
// before the turn); without --heading the result is today's and the
// assumptions say so.
func TestReachFromFailureState(t *testing.T) {
	dir := t.TempDir()
	fields := filepath.Join(dir, "f.geojson")
	// 4 km is 0.03597° of latitude near the equator (1° ≈ 110.57 km on
	// WGS84 there; REFERENCES.md §5).
	if err := os.WriteFile(fields, []byte(`{"type":"FeatureCollection","features":[
	 {"type":"Feature","properties":{"name":"Behind"},"geometry":{"type":"Point","coordinates":[-24.5,-0.53618]}},
	 {"type":"Feature","properties":{"name":"Ahead"},"geometry":{"type":"Point","coordinates":[-24.5,-0.46382]}}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	base := []string{"--from", "-0.5,-24.5", "--alt", "1200m", "--fields", fields}
	today, as := reachFields(t, base...)
	if !strings.Contains(strings.Join(as, "\n"), "no failure state given") {
		t.Errorf("assumptions do not say there is no failure state: %v", as)
	}
	st, as := reachFields(t, append(base, "--heading", "0", "--speed", "100kt")...)
	if !strings.Contains(strings.Join(as, "\n"), "engine failure on heading 000°") {
		t.Errorf("assumptions: %v", as)
	}
	b0, b1 := today["Behind"], st["Behind"]
	a0, a1 := today["Ahead"], st["Ahead"]
	// The half turn of the trainer costs about 100 m, the ground flown
	// north first about 1.2 km (≈ 130 m at 1:9): behind loses > 150 m.
	if !(b1[0] < b0[0]-150) || !(b1[1] > b0[1]+150) {
		t.Errorf("behind: arrival %.0f → %.0f m, required %.0f → %.0f m", b0[0], b1[0], b0[1], b1[1])
	}
	if !(a1[0] > a0[0]) || !(a1[1] < a0[1]) {
		t.Errorf("ahead: arrival %.0f → %.0f m, required %.0f → %.0f m", a0[0], a1[0], a0[1], a1[1])
	}
	// The required altitude from the state agrees with the arrival: the
	// margin is the start altitude less the required one (within the
	// solver's 1 % and a cell).
	for name, v := range st {
		if margin := 1200 - v[1]; math.Abs((v[0]-300)-margin) > 25 {
			t.Errorf("%s: arrival %.0f m above the reserve, but 1200 m less the required %.0f m is %.0f m", name, v[0]-300, v[1], margin)
		}
	}
}

// Bad failure states exit 2 naming the flag: --speed without --heading, a
// speed below the stall (48 kt for the trainer) or far above its maximum,
// a bank out of range, final's state without the altitude at the failure.
func TestFailureStateBadInput(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"reach", "--from", "-0.5,-24.5", "--alt", "1200m", "--speed", "100kt"}, "--speed"},
		{[]string{"reach", "--from", "-0.5,-24.5", "--alt", "1200m", "--heading", "10", "--speed", "30kt"}, "--speed"},
		{[]string{"reach", "--from", "-0.5,-24.5", "--alt", "1200m", "--heading", "10", "--speed", "250kt"}, "--speed"},
		{[]string{"reach", "--from", "-0.5,-24.5", "--alt", "1200m", "--heading", "10", "--bank", "75"}, "--bank"},
		{[]string{"reach", "--from", "-0.5,-24.5", "--alt", "1200m", "--heading", "10", "--reaction-time", "-1"}, "--reaction-time"},
		{[]string{"final", "--from", "-0.5,-24.5", "--to", "-0.55,-24.5", "--heading", "10"}, "--heading"},
		{[]string{"final", "--from", "-0.5,-24.5", "--alt", "1200m", "--to", "-0.55,-24.5", "--heading", "10", "--energy-efficiency", "2"}, "--energy-efficiency"},
	} {
		r, w, _ := os.Pipe()
		saved := os.Stderr
		os.Stderr = w
		code, _, _ := runCLI(t, c.args...)
		w.Close()
		os.Stderr = saved
		var msg bytes.Buffer
		msg.ReadFrom(r)
		if code != 2 || !strings.Contains(msg.String(), c.want) {
			t.Errorf("%v: exit %d, %q; want 2 naming %s", c.args, code, msg.String(), c.want)
		}
	}
}

// final --heading/--speed: the goal behind needs more than today by at
// least the half turn's loss, the goal ahead less; and reach from the
// same state agrees with final on the field's required altitude (the two
// compute it independently: sectors and a backward raster against the
// exact turn and a line integration).
func TestFinalFromFailureStateAgreesWithReach(t *testing.T) {
	req := func(args ...string) float64 {
		code, out, errs := runCLI(t, append([]string{"final", "--from", "-0.5,-24.5", "--alt", "1200m", "--format", "json"}, args...)...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errs)
		}
		var doc map[string]any
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		return doc["required_msl_m"].(float64)
	}
	behind := []string{"--to", "-0.53618,-24.5"}
	today := req(behind...)
	fromState := req(append(behind, "--heading", "0", "--speed", "100kt")...)
	// The half turn alone costs about 100 m for the trainer (transition
	// tests), the ground flown north first more.
	if !(fromState > today+100) {
		t.Errorf("behind: required %.0f m from the state, %.0f m today", fromState, today)
	}
	ahead := req("--to", "-0.46382,-24.5", "--heading", "0", "--speed", "100kt")
	if !(ahead < today) {
		t.Errorf("ahead: required %.0f m from the state, %.0f m behind today", ahead, today)
	}
	dir := t.TempDir()
	fields := filepath.Join(dir, "f.geojson")
	if err := os.WriteFile(fields, []byte(`{"type":"FeatureCollection","features":[
	 {"type":"Feature","properties":{"name":"Behind","elevation_m":0},"geometry":{"type":"Point","coordinates":[-24.5,-0.53618]}}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	r, _ := reachFields(t, "--from", "-0.5,-24.5", "--alt", "1200m", "--fields", fields, "--heading", "0", "--speed", "100kt")
	got := r["Behind"][1]
	// reach charges each sector one spacing (15°) more turn and works on a
	// grid: it may need up to a few tens of metres more, never much less.
	if !(got >= fromState-10 && got <= fromState+40) {
		t.Errorf("reach needs %.0f m, final %.0f m", got, fromState)
	}
}

// route --speed: on a route flying north, with a field behind the start
// and one ahead of the end, the least altitude from the failure state is
// higher than today's at the start (the half turn back) and lower at the
// end (the field ahead, the energy credit); --heading is not a route flag.
func TestRouteFromFailureState(t *testing.T) {
	dir := t.TempDir()
	fields := filepath.Join(dir, "f.geojson")
	route := filepath.Join(dir, "r.geojson")
	if err := os.WriteFile(fields, []byte(`{"type":"FeatureCollection","features":[
	 {"type":"Feature","properties":{"name":"South","elevation_m":0},"geometry":{"type":"Point","coordinates":[-24.5,-0.53]}},
	 {"type":"Feature","properties":{"name":"North","elevation_m":0},"geometry":{"type":"Point","coordinates":[-24.5,-0.39]}}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(route, []byte(`{"type":"Feature","properties":{"name":"north"},"geometry":{"type":"LineString","coordinates":[[-24.5,-0.5],[-24.5,-0.42]]}}`), 0o644); err != nil {
		t.Fatal(err)
	}
	least := func(args ...string) []float64 {
		code, out, errs := runCLI(t, append([]string{"route", "--route", route, "--fields", fields, "--alt", "1500m", "--format", "json", "--step", "1km"}, args...)...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errs)
		}
		var doc struct {
			Samples []struct {
				Least *float64 `json:"least_msl_m"`
			} `json:"samples"`
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		var v []float64
		for _, s := range doc.Samples {
			if s.Least == nil {
				v = append(v, math.NaN())
			} else {
				v = append(v, *s.Least)
			}
		}
		return v
	}
	today, st := least(), least("--speed", "100kt")
	if len(today) != len(st) || len(today) < 5 {
		t.Fatalf("%d and %d samples", len(today), len(st))
	}
	// At the start the nearest field (3.3 km) is behind: the half turn
	// costs about 100 m (transition tests).
	if !(st[0] > today[0]+80) {
		t.Errorf("start: least %.0f m from the state, %.0f m today", st[0], today[0])
	}
	// At the end the field 3.3 km ahead is flown straight at, faster.
	last := len(st) - 1
	if !(st[last] < today[last]) {
		t.Errorf("end: least %.0f m from the state, %.0f m today", st[last], today[last])
	}
	code, _, _ := runCLI(t, "route", "--route", route, "--fields", fields, "--alt", "1500m", "--heading", "90")
	if code != 2 {
		t.Errorf("route --heading: exit %d, want 2 (unknown flag)", code)
	}
}
