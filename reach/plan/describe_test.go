package plan_test

import (
	"bytes"
	"fmt"
	"math"
	"strings"
	"testing"

	"glidereach/reach"
	"glidereach/reach/plan"
	"glidereach/reach/tiling"
	"glidereach/wind"
)

// One knot is 1852 m per hour (international definition, exact).
const kt = 1852.0 / 3600

func TestWindText(t *testing.T) {
	one, _ := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 270, Speed: 14 * kt}})
	layered, _ := wind.NewProfile([]wind.Layer{
		{Alt: 914.4, Dir: 5, Speed: 10 * kt},                               // 3000 ft (0.3048 m per ft, exact)
		{Alt: 1828.8, Dir: 0, Speed: 0},                                    // a calm layer
		{Alt: 3048, Dir: 280, Speed: 25 * kt, Temp: 268.15, HasTemp: true}, // −5 °C
	})
	calmLayers, _ := wind.NewProfile([]wind.Layer{{Alt: 0}, {Alt: 1000}})
	for _, c := range []struct {
		name string
		p    *wind.Profile
		st   plan.WindStyle
		want string
	}{
		{"nil", nil, plan.WindStyle{}, "calm"},
		{"calm", wind.Calm(), plan.WindStyle{}, "calm"},
		{"forecast calm layers", calmLayers, plan.WindStyle{Feet: true, Forecast: true}, "light and variable at every level"},
		{"one layer", one, plan.WindStyle{}, "270°/14 kt"},
		{"layers in m", layered, plan.WindStyle{}, "914 m 005°/10 kt, 1829 m calm, 3048 m 280°/25 kt -5 °C"},
		{"layers in ft", layered, plan.WindStyle{Feet: true}, "3000 ft (914 m) 005°/10 kt, 6000 ft (1829 m) calm, 10000 ft (3048 m) 280°/25 kt -5 °C"},
		{"forecast", layered, plan.WindStyle{Feet: true, Forecast: true}, "3000 ft (914 m) 005°/10 kt, 6000 ft (1829 m) light and variable, 10000 ft (3048 m) 280°/25 kt -5 °C"},
	} {
		if got := plan.WindText(c.p, c.st); got != c.want {
			t.Errorf("%s: %q, want %q", c.name, got, c.want)
		}
	}
	if got, want := plan.WindErrorText(20, 5*kt, 9), " (±20°, ±5 kt: worst of 9 winds)"; got != want {
		t.Errorf("WindErrorText %q, want %q", got, want)
	}
}

// The warning thresholds: 150 m reserve, 50 m clearance, 1.3 × stall
// (common practice, no source).
func TestSetupWarnings(t *testing.T) {
	ac, err := reach.Builtin("trainer")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		reserve, clearance float64
		want               []string // a word of each warning, in order
	}{
		{300, 100, nil},
		{150, 50, nil},
		{149, 49, []string{"reserve 149 m (from --reserve)", "clearance 49 m (from the default)"}},
		{0, 0, []string{"RESERVE 0 m (from --reserve)", "CLEARANCE 0 m (from the default)"}},
	} {
		s, err := plan.NewSetup(ac, reach.Conditions{}, 0, nil, c.reserve, c.clearance)
		if err != nil {
			t.Fatal(err)
		}
		ws := plan.SetupWarnings(s, "--reserve", "the default")
		if len(ws) != len(c.want) {
			t.Fatalf("reserve %v, clearance %v: %q", c.reserve, c.clearance, ws)
		}
		for i, w := range c.want {
			if !strings.HasPrefix(ws[i], w) {
				t.Errorf("warning %d %q, want it to begin %q", i, ws[i], w)
			}
		}
	}
	slow := *ac
	slow.MinIAS = 1.2 * slow.StallIAS
	if w := plan.MinSpeedWarning(&slow); !strings.Contains(w, "only 1.20 × its stall speed") {
		t.Errorf("min speed 1.2 × stall: %q", w)
	}
	slow.MinIAS = 1.3 * slow.StallIAS
	if w := plan.MinSpeedWarning(&slow); w != "" {
		t.Errorf("min speed 1.3 × stall warned: %q", w)
	}
}

func TestZoneAndAltitudeTexts(t *testing.T) {
	for _, c := range []struct{ got, want string }{
		{plan.AreaText("zone.geojson"), "area zone.geojson"},
		{plan.BoxText(-0.8, -24.85, -0.15, -24.15), "box -24.85000,-0.80000 to -24.15000,-0.15000 (south-west to north-east corner, lat,lon)"},
		{plan.CorridorText(8000, "route.gpx"), "corridor 8.0 km wide along route.gpx"},
		{plan.AltFlownText(false, 1524), "1524 m MSL (5000 ft) everywhere (--alt)"},
		{plan.AltFlownText(true, 304.8), "305 m (1000 ft) above the terrain at each cell (--agl)"},
	} {
		if c.got != c.want {
			t.Errorf("%q, want %q", c.got, c.want)
		}
	}
	if !strings.HasSuffix(plan.TiledCOGDescription, reach.Caution) {
		t.Error("the COG description lacks the caution")
	}
	if plan.FractionDown(0.54998) != 0.5499 || plan.FractionDown(1) != 1 {
		t.Error("FractionDown does not round down to 1e-4")
	}
}

// The tiled assumptions end with the run's own lines, and the FlatGeobuf
// header carries them and the caution.
func TestTiledAssumptionsAndFGB(t *testing.T) {
	ac, _ := reach.Builtin("trainer")
	s, err := plan.NewSetup(ac, reach.Conditions{}, 0, nil, math.NaN(), math.NaN())
	if err != nil {
		t.Fatal(err)
	}
	tp, err := plan.PlanTiled(plan.TiledRequest{Setup: s, Ground: plan.Ground{Flat: 200}, West: 10, South: 45, East: 10.05, North: 45.05,
		ZoneName: "box", Alt: 1200, Fields: []reach.Target{{Name: "Alder Strip", Lat: 45.02, Lon: 10.02, Elev: math.NaN(), Reserve: s.Reserve}}})
	if err != nil {
		t.Fatal(err)
	}
	p := tp.Plan
	zone := plan.BoxText(10, 45, 10.05, 45.05)
	a := plan.TiledAssumptions(s.Assumptions("calm", nil), p,
		plan.TiledText{AltFlown: plan.AltFlownText(false, 1200), Zone: zone, Terrain: "flat", Flat: true})
	n := len(a)
	if a[0] != "aircraft: "+ac.Name || a[1] != "wind: calm" || a[n-2] != "analysed: "+zone || a[n-1] != "terrain: flat" ||
		!strings.Contains(a[n-3], fmt.Sprintf("%.1f m cells on flat ground", plan.TiledFlatCell)) {
		t.Errorf("assumptions %q", a)
	}
	res := &tiling.Result{Plan: p, Totals: tiling.NewTotals(p)}
	var b bytes.Buffer
	if err := plan.WriteTiledFGB(&b, p, res.Totals, nil, nil, zone, a); err != nil {
		t.Fatal(err)
	}
	// FlatGeobuf keeps strings as UTF-8 bytes (flatbuffers): the header's
	// title and description are in the file as written.
	for _, want := range []string{"glidereach coverage of the " + zone, strings.Join(a, "; ") + ". " + reach.Caution, "Alder Strip"} {
		if !bytes.Contains(b.Bytes(), []byte(want)) {
			t.Errorf("the FlatGeobuf lacks %q", want)
		}
	}
}
