package plan_test

import (
	"context"
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/reach/plan"
	"glidereach/wind"
)

// exampleSetup is the built-in trainer (glide ratio 9, reserve 300 m) in
// wind w (nil: calm).
func exampleSetup(w *wind.Profile) *plan.Setup {
	ac, _ := reach.Builtin("trainer")
	s, err := plan.NewSetup(ac, reach.Conditions{}, 0, w, math.NaN(), math.NaN())
	if err != nil {
		panic(err)
	}
	return s
}

// The footprint of the trainer from 1500 m over flat sea-level ground in
// still air reaches (1500 − 300)·9 = 10.8 km with the 300 m reserve; a
// field 9 km east is reached with about 500 m above it.
func ExampleReach() {
	field, _, _ := geodesy.Direct(geodesy.LatLon{Lat: -0.5, Lon: -24.5}, 90, 9000)
	res, err := plan.Reach(context.Background(), plan.ReachRequest{
		Setup: exampleSetup(nil), Ground: plan.Ground{Flat: 0},
		Lat: -0.5, Lon: -24.5, Alt: 1500,
		Fields: []plan.Field{{Name: "East", Lat: field.Lat, Lon: field.Lon}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	f := res.Fields[0]
	fmt.Printf("farthest with the reserve: %.1f km\n", res.Farthest/1000)
	fmt.Printf("%s: reachable %v, arrival %.0f m above it, needs %.0f m MSL\n", f.Name, f.Reachable, math.Round(f.ArrivalAGLM/10)*10, math.Round(f.RequiredMSL/10)*10)
	// Output:
	// farthest with the reserve: 10.8 km
	// East: reachable true, arrival 500 m above it, needs 1300 m MSL
}

// A final glide of 15 km to a goal at 150 m in still air needs the goal's
// elevation, the reserve and 15 km / 9 of height: 150 + 300 + 1667 m;
// from 2500 m it arrives 2500 − 1667 − 150 = 683 m above the goal.
func ExampleFinalGlide() {
	goal, _, _ := geodesy.Direct(geodesy.LatLon{Lat: 0, Lon: -24.5}, 90, 15000)
	res, err := plan.FinalGlide(context.Background(), plan.FinalRequest{
		Setup: exampleSetup(nil), Ground: plan.Ground{Flat: 0},
		Route: []geodesy.LatLon{{Lat: 0, Lon: -24.5}, goal}, Alt: 2500, GoalElev: 150,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("required %.0f m MSL, arrival %.0f m above the goal (%v)\n", res.Glide.Required, res.Glide.Arrival-150, res.Glide.Status)
	// Output:
	// required 2117 m MSL, arrival 683 m above the goal (ok)
}

// Along a 60 km route flown at 1500 m with one field on it at 20 km, the
// field is in reach 10.8 km either side: 36 % of the route is covered.
func ExampleRoute() {
	var pts []reach.RoutePoint
	for d := 0.0; d <= 60000; d += 500 {
		p, _, _ := geodesy.Direct(geodesy.LatLon{Lat: -0.5, Lon: -24.8}, 90, d)
		pts = append(pts, reach.RoutePoint{Lat: p.Lat, Lon: p.Lon, Dist: d, Alt: 1500})
	}
	f, _, _ := geodesy.Direct(geodesy.LatLon{Lat: -0.5, Lon: -24.8}, 90, 20000)
	res, err := plan.Route(context.Background(), plan.RouteRequest{
		Setup: exampleSetup(nil), Ground: plan.Ground{}, Points: pts, Step: 500,
		Fields: []plan.Field{{Name: "Midway", Lat: f.Lat, Lon: f.Lon}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("covered %.0f %% of the route, %d gaps\n", res.Profile.CoveredFraction*100, len(res.Profile.Gaps))
	for _, g := range res.Profile.Gaps {
		fmt.Printf("gap %.1f to %.1f km\n", g.Start/1000, g.End/1000)
	}
	// Output:
	// covered 36 % of the route, 2 gaps
	// gap 0.0 to 9.2 km
	// gap 30.8 to 60.0 km
}

// One field in the middle of a 55 km box, flown over at 1500 m: it covers
// the disc of 10.8 km radius, π·10.8² ≈ 366 km².
func ExampleCoverage() {
	zone := box{Min: orb.Point{-24.75, -0.75}, Max: orb.Point{-24.25, -0.25}}
	res, err := plan.Coverage(context.Background(), plan.CoverageRequest{
		Setup: exampleSetup(nil), Ground: plan.Ground{}, Zone: zone, Alt: 1500,
		Fields: []plan.Field{{Name: "Centre", Lat: -0.5, Lon: -24.5}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("covered %.0f km², %.0f %% of the box\n", res.Coverage.CoveredArea/1e6, res.Coverage.CoveredFraction*100)
	// Output:
	// covered 366 km², 12 % of the box
}

// The approach to a field 3 km east from 900 m above it, in a wind from
// 240°: the plan lands into the wind.
func ExampleApproach() {
	w, _ := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 240, Speed: 5}})
	g := plan.Ground{Flat: 100}
	p, _, _ := geodesy.Direct(geodesy.LatLon{Lat: -0.5, Lon: -24.5}, 90, 3000)
	field := plan.Field{Name: "Strip", Lat: p.Lat, Lon: p.Lon}
	ter, err := plan.ReadApproachTerrain(g, -0.5, -24.5, field, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := plan.Approach(context.Background(), plan.ApproachRequest{
		Setup: exampleSetup(w), Terrain: ter, Lat: -0.5, Lon: -24.5, Alt: 1000, Field: field, LandingDir: math.NaN(),
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("feasible %v, landing %03.0f°, %d gates\n", res.Plan.Feasible, res.Plan.LandingDir, len(res.Plan.Gates))
	// Output:
	// feasible true, landing 240°, 4 gates
}
