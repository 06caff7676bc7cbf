package demo_test

import (
	"context"
	"fmt"
	"math"

	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/reach/plan"
	"glidereach/reach/plan/demo"
)

// The demo's final glide through reach/plan alone: the sailplane from
// 2800 m MSL by the turn point to Tern Hollow in the layered wind, with
// MacCready 1 m/s, over the invented landscape, the goal's elevation from
// the terrain. The figures are those `glidereach demo` writes to
// final-sailplane.json (required_msl_m 2592.2, arrival_agl_m 350.6,
// distance_m 54929.1, goal_elevation_m 420.1): the command adds only text.
func Example_finalGlide() {
	fr := demo.Final()
	ac, err := reach.Builtin(fr.Aircraft)
	if err != nil {
		fmt.Println(err)
		return
	}
	w, err := demo.WindProfile()
	if err != nil {
		fmt.Println(err)
		return
	}
	setup, err := plan.NewSetup(ac, reach.Conditions{MacCready: fr.MacCready}, 0, w, math.NaN(), math.NaN())
	if err != nil {
		fmt.Println(err)
		return
	}
	ground := plan.Ground{Src: demo.Terrain()}
	var goal plan.Field
	for _, f := range demo.Fields() {
		if f.Name == fr.Field {
			goal = f
		}
	}
	elev, ok, err := ground.ElevationAt(goal.Lat, goal.Lon)
	if err != nil || !ok {
		fmt.Println("no terrain at the goal", err)
		return
	}
	res, err := plan.FinalGlide(context.Background(), plan.FinalRequest{
		Setup: setup, Ground: ground, Alt: fr.Alt, GoalElev: elev,
		Route: []geodesy.LatLon{{Lat: fr.Lat, Lon: fr.Lon}, {Lat: fr.TurnLat, Lon: fr.TurnLon}, {Lat: goal.Lat, Lon: goal.Lon}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	g := res.Glide
	fmt.Printf("%s at %.1f m MSL, %.1f km away\n", goal.Name, elev, g.Distance/1000)
	fmt.Printf("required %.1f m MSL; from %.0f m arrives %.1f m above the field (%v)\n", g.Required, fr.Alt, g.Arrival-elev, g.Status)
	// Output:
	// Tern Hollow at 420.1 m MSL, 54.9 km away
	// required 2592.2 m MSL; from 2800 m arrives 350.6 m above the field (ok)
}
