package reach

import (
	"math"
	"testing"

	"glidereach/reach/geodesy"
	"glidereach/terrain"
)

// TestFinalGlideHeadlineClearsTerrain: when a ridge, not the reserve, sets
// the altitude a final glide needs, every headline figure is the one that
// clears it. Still air over a ridge across a northbound 15 km line: the
// straight figure is base + reserve + D/E and the clearing one crest +
// clearance + (distance to crest)/E (tan γ = 1/E; Anderson, Introduction to
// Flight, ch. 6), both within 1 m.
func TestFinalGlideHeadlineClearsTerrain(t *testing.T) {
	ac := testGlider(25, 30)
	const cell, yc, crest, base, clearance, reserve, dist = 50.0, 8000.0, 1400.0, 100.0, 100.0, 200.0, 15000.0
	start := geodesy.LatLon{Lat: -0.5, Lon: -24.5}
	frame := terrain.NewFrame(start.Lat, start.Lon)
	l := ridgeLocal(frame, cell, yc, 600, base, crest)
	sampler := func(lat, lon float64) (float64, bool) { return l.Sample(frame.Forward(lat, lon)) }
	goal, _, _ := geodesy.Direct(start, 0, dist)
	route := []geodesy.LatLon{start, goal}
	opts := FinalGlideOptions{GoalElev: base, Reserve: reserve, Clearance: clearance, Terrain: sampler, Step: cell}
	straight := base + reserve + dist/30
	clearing := crest + clearance + yc/30

	// Below the clearing altitude: blocked, Required is the clearing one,
	// the margin is against it, there is no arrival and no affordable
	// MacCready setting.
	res := mustFinal(t, route, 1500, Performance{Aircraft: ac}, opts)
	if res.Status != FinalBlocked {
		t.Fatalf("status %v, want blocked", res.Status)
	}
	if math.Abs(res.Required-clearing) > 1 || math.Abs(res.RequiredStraight-straight) > 1 {
		t.Errorf("required %.1f m (want %.1f), without the terrain %.1f m (want %.1f)", res.Required, clearing, res.RequiredStraight, straight)
	}
	if math.Abs(res.Margin-(1500-res.Required)) > 1e-9 || res.Margin >= 0 {
		t.Errorf("margin %+.1f m, want start − required %+.1f m", res.Margin, 1500-res.Required)
	}
	if !math.IsNaN(res.ArrivalAGL) || !math.IsNaN(res.AboveReserve) {
		t.Errorf("a blocked glide headlines an arrival: %.1f m AGL, %+.1f m against the reserve", res.ArrivalAGL, res.AboveReserve)
	}
	if want := 1500 - dist/30; math.Abs(res.LineArrival-want) > 1 {
		t.Errorf("line arrival without the terrain %.1f m, want %.1f m", res.LineArrival, want)
	}
	if !math.IsNaN(res.MacCready.Affordable) {
		t.Errorf("blocked glide: affordable MacCready %.2f m/s, want none", res.MacCready.Affordable)
	}
	// The Clear profile is the glide from Required: it passes the crest at
	// the clearance and reaches the goal at clearing − D/E.
	last := res.Profile[len(res.Profile)-1]
	if math.Abs(res.Profile[0].Clear-res.Required) > 1e-6 || math.Abs(last.Clear-(res.Required-dist/30)) > 1 {
		t.Errorf("clear profile from %.1f m to %.1f m, want %.1f → %.1f m", res.Profile[0].Clear, last.Clear, res.Required, res.Required-dist/30)
	}
	for _, p := range res.Profile {
		if !math.IsNaN(p.Floor) && p.Clear < p.Floor-0.05 {
			t.Fatalf("clear profile %.1f m below the floor %.1f m at %.0f m", p.Clear, p.Floor, p.Dist)
		}
	}

	// No start altitude: the glide starts at the clearing altitude, clear.
	res = mustFinal(t, route, math.NaN(), Performance{Aircraft: ac}, opts)
	if res.Status != FinalOK || math.Abs(res.StartAlt-clearing) > 1 || res.Margin < -1e-9 || res.Terrain.Blocked {
		t.Errorf("no start altitude: status %v, start %.1f m (want %.1f), margin %+.2f m", res.Status, res.StartAlt, clearing, res.Margin)
	}
	if want := clearing - dist/30 - base; math.Abs(res.ArrivalAGL-want) > 1 {
		t.Errorf("arrival from the clearing altitude %.1f m AGL, want %.1f m", res.ArrivalAGL, want)
	}

	// High enough to clear at setting 0 with plenty of reserve to spare: a
	// faster setting that would cut into the ridge is not affordable. The
	// setting offered, flown, keeps the floor; without the terrain far
	// more would be offered.
	const h0 = 1850.0
	res = mustFinal(t, route, h0, Performance{Aircraft: ac}, opts)
	mc := res.MacCready.Affordable
	if res.Status != FinalOK || math.IsNaN(mc) {
		t.Fatalf("start %.0f m: status %v, affordable %v", h0, res.Status, mc)
	}
	flown := mustFinal(t, route, h0, Performance{Aircraft: ac, Cond: Conditions{MacCready: mc}}, opts)
	if flown.Terrain.Blocked || flown.Status != FinalOK {
		t.Errorf("affordable MacCready %.2f m/s, flown: status %v, blocked %v", mc, flown.Status, flown.Terrain.Blocked)
	}
	noTerrain := opts
	noTerrain.Terrain = nil
	free := mustFinal(t, route, h0, Performance{Aircraft: ac}, noTerrain)
	if !(free.MacCready.Affordable > mc+0.1) {
		t.Errorf("the ridge should lower the affordable setting: %.2f m/s with it, %.2f m/s without", mc, free.MacCready.Affordable)
	}
	if math.Abs(res.MacCready.ArrivalAGL-flown.ArrivalAGL) > 0.5 {
		t.Errorf("affordable arrival %.1f m AGL, flown %.1f m AGL", res.MacCready.ArrivalAGL, flown.ArrivalAGL)
	}
}
