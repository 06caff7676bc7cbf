package main

import (
	"context"
	"encoding/json"
	"glidereach/reach/plan"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"glidereach/reach/geodesy"
)

// The blocked glide of the GeoTIFF fixture: from 1800 m the straight line
// needs 1218 m with the reserve but runs into the high ground 8.6 km out;
// the terrain sets the altitude (about 2445 m). Every headline figure of
// every output must be the clearing one (DESIGN.md: a headline figure
// satisfies every constraint the command checks).
var blockedFinal = []string{"--from", "0.0,-25.04", "--alt", "1800m", "--to", "-0.03,-24.96",
	"--terrain", "../../testdata/geotiff/geo_int16_strip_none.tif"}

func TestFinalBlockedHeadlineJSON(t *testing.T) {
	doc := finalDoc(t, blockedFinal...)
	tc := doc["terrain_check"].(map[string]any)
	clear := numField(t, tc, "least_clear_msl_m")
	req := numField(t, doc, "required_msl_m")
	straight := numField(t, doc, "required_without_terrain_msl_m")
	if doc["status"] != "blocked" || doc["required_set_by"] != "terrain" {
		t.Fatalf("status %v, set by %v", doc["status"], doc["required_set_by"])
	}
	if math.Abs(req-clear) > 0.1 || !(req > straight+500) {
		t.Errorf("required_msl_m %.1f, least clearing %.1f, without the terrain %.1f", req, clear, straight)
	}
	if m := numField(t, doc, "margin_m"); math.Abs(m-(1800-req)) > 0.1 {
		t.Errorf("margin_m %+.1f, want start − required %+.1f", m, 1800-req)
	}
	for _, k := range []string{"arrival_agl_m", "arrival_msl_m", "arrival_above_reserve_m", "affordable_mac_cready_m_s"} {
		if doc[k] != nil {
			t.Errorf("%s = %v on a blocked glide, want null", k, doc[k])
		}
	}
	if a := numField(t, doc, "arrival_without_terrain_agl_m"); !(a > 800) {
		t.Errorf("arrival_without_terrain_agl_m %.1f", a)
	}
	// The clearing figure, flown through the command, clears and arrives.
	up := finalDoc(t, append(blockedFinal[:2:2], "--alt", ftoa(req+0.05)+"m", "--to", "-0.03,-24.96", "--terrain", blockedFinal[7])...)
	if up["status"] != "ok" || numField(t, up, "margin_m") < -0.01 || numField(t, up, "arrival_above_reserve_m") < 0 {
		t.Errorf("from the required %.1f m: status %v, margin %v, above the reserve %v", req, up["status"], up["margin_m"], up["arrival_above_reserve_m"])
	}
	// Without a start altitude the glide starts at the clearing one.
	noAlt := finalDoc(t, "--from", "0.0,-25.04", "--to", "-0.03,-24.96", "--terrain", blockedFinal[7])
	if noAlt["status"] != "ok" || math.Abs(numField(t, noAlt, "start_msl_m")-req) > 1 {
		t.Errorf("no --alt: status %v, start %v, want about %.1f", noAlt["status"], noAlt["start_msl_m"], req)
	}
}

func TestFinalBlockedHeadlineText(t *testing.T) {
	code, out, msg := finalCLI(t, append([]string{"final"}, blockedFinal...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, msg)
	}
	head := out[:strings.Index(out, "Status:")]
	for _, bad := range []string{"Required at the start: 1218", "Required at the start: 1219", "start margin +", "882 m above", "highest affordable"} {
		if strings.Contains(head, bad) {
			t.Errorf("text headlines %q on a blocked glide:\n%s", bad, head)
		}
	}
	for _, want := range []string{"Required at the start: 2445 m MSL", "set by the terrain", "would need 1219 m", "Arrival: NONE from 1800 m", "start margin -645 m"} {
		if !strings.Contains(head, want) {
			t.Errorf("text lacks %q:\n%s", want, head)
		}
	}
	// The trainer gets no MacCready line unless a setting is given (a
	// powered aircraft has no use for it); given one, the blocked glide has
	// none affordable.
	if strings.Contains(head, "MacCready:") {
		t.Errorf("a trainer without --mc is offered a MacCready line:\n%s", head)
	}
	_, out, _ = finalCLI(t, append(append([]string{"final"}, blockedFinal...), "--mc", "0.5m/s")...)
	if !strings.Contains(out, "no setting affordable") {
		t.Errorf("with --mc: the blocked glide's MacCready line lacks \"no setting affordable\":\n%s", out)
	}
}

func TestFinalBlockedHeadlineGeoJSON(t *testing.T) {
	code, out, msg := finalCLI(t, append(append([]string{"final"}, blockedFinal...), "--format", "geojson")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, msg)
	}
	var g fc
	if err := json.Unmarshal([]byte(out), &g); err != nil {
		t.Fatal(err)
	}
	for _, f := range g.Features {
		p := f.Properties
		switch p["kind"] {
		case "glide_line", "start":
			if r := p["required_msl_m"].(float64); r < 2440 {
				t.Errorf("%v: required_msl_m %.1f ignores the terrain", p["kind"], r)
			}
			if m := p["margin_m"].(float64); m > -640 {
				t.Errorf("%v: margin_m %+.1f ignores the terrain", p["kind"], m)
			}
		case "goal":
			if p["arrival_agl_m"] != nil || p["reachable"] != false || p["required_msl_m"].(float64) < 2440 {
				t.Errorf("goal: arrival %v, reachable %v, required %v", p["arrival_agl_m"], p["reachable"], p["required_msl_m"])
			}
		}
	}
}

func TestFinalBlockedHeadlineMapAndReport(t *testing.T) {
	// The map's scene (labels) and the report's summary and profile.
	g := newGlideFlags()
	g.aircraft = "trainer"
	setup, err := g.resolve()
	if err != nil {
		t.Fatal(err)
	}
	tf := newTerrainFlags()
	tf.paths = []string{blockedFinal[7]}
	src, err := tf.open()
	if err != nil {
		t.Fatal(err)
	}
	run := &finalRun{setup: setup, ground: plan.Ground{Src: src}, startLat: 0, startLon: -25.04, altGiven: true, goalName: "goal", goalFrom: "terrain"}
	run.startElev, _, _ = run.ground.ElevationAt(0, -25.04)
	goalElev, _, _ := run.ground.ElevationAt(-0.03, -24.96)
	route := []geodesy.LatLon{{Lat: 0, Lon: -25.04}, {Lat: -0.03, Lon: -24.96}}
	run.res, err = computeFinal(context.Background(), run, route, 1800, goalElev, newTerrainFlags().ground)
	if err != nil {
		t.Fatal(err)
	}
	sc, err := finalScene(run)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(strings.Join(sc.Inputs, "\n"), "required 2445 m") {
		t.Errorf("map inputs %q", sc.Inputs)
	}
	goal := sc.Fields[0]
	if goal.Reachable || !math.IsNaN(goal.ArrivalAGL) || !strings.Contains(goal.Note, "needs 2445 m") {
		t.Errorf("goal label: reachable %v, arrive %v, note %q", goal.Reachable, goal.ArrivalAGL, goal.Note)
	}
	prof := finalProfile(run)
	var glide, blocked bool
	for _, s := range prof.Series {
		switch {
		case strings.HasPrefix(s.Name, "glide from 2445 m"):
			glide = true
			if math.Abs(s.AltMSL[0]-run.res.Required) > 1e-6 {
				t.Errorf("profile glide starts at %.1f m, want the required %.1f m", s.AltMSL[0], run.res.Required)
			}
		case strings.HasPrefix(s.Name, "glide from 1800 m"):
			blocked = true
			if !math.IsNaN(s.AltMSL[len(s.AltMSL)-1]) {
				t.Error("the blocked line is drawn through the ridge to the goal")
			}
		}
	}
	if !glide || !blocked {
		t.Errorf("profile series: %+v", prof.Series)
	}
	for _, m := range prof.Marks {
		if strings.Contains(m.Label, "arrive") && !strings.Contains(m.Label, "from 2445 m") {
			t.Errorf("profile mark %q", m.Label)
		}
	}
	dir := t.TempDir()
	html := filepath.Join(dir, "f.html")
	if err := drawFinal(run, "", html); err != nil {
		t.Fatal(err)
	}
	h, err := os.ReadFile(html)
	if err != nil {
		t.Fatal(err)
	}
	if s := string(h); strings.Contains(s, "Required at the start: 1218") || strings.Contains(s, "Required at the start: 1219") || !strings.Contains(s, "Required at the start: 2445 m MSL, set by the terrain") {
		t.Error("report summary does not headline the clearing altitude")
	}
}
