package reach_test

import (
	"context"
	"fmt"
	"math"

	"glidereach/reach"
	"glidereach/terrain"
)

// A footprint on flat ground in still air with a constant glide ratio of 10:
// from 1500 m with a 300 m reserve the reserve ring is a circle of radius
// (1500 − 300)·10 = 12 km, area π·12² ≈ 452 km².
func ExampleFootprint() {
	frame := terrain.NewFrame(-0.5, -24.5)
	n, cell := 601, 50.0
	half := float64(n-1) / 2 * cell
	ground := terrain.NewFlat(frame, -half, -half, cell, n, n, 0)
	res, err := reach.Footprint(context.Background(), ground, reach.Start{Lat: -0.5, Lon: -24.5, Alt: 1500},
		reach.ConstantLoss(10), reach.FootprintOptions{Reserve: 300, Clearance: 100})
	if err != nil {
		fmt.Println(err)
		return
	}
	ring := res.Rings([]float64{300})[0]
	fmt.Printf("reserve ring: %d polygon, %.0f km² (circle: %.0f km²)\n", len(ring.Polygons), ring.Area/1e6, math.Pi*144)
	// Output: reserve ring: 1 polygon, 452 km² (circle: 452 km²)
}

// The least altitude from which a field at sea level is reached with a
// 300 m reserve, 6 km away, at a glide ratio of 12: 300 + 6000/12 = 800 m.
func ExampleRequired() {
	frame := terrain.NewFrame(-0.5, -24.5)
	n, cell := 301, 50.0
	half := float64(n-1) / 2 * cell
	ground := terrain.NewFlat(frame, -half, -half, cell, n, n, 0)
	field := reach.Target{Name: "field", Lat: -0.5, Lon: -24.5, Elev: 0, Reserve: 300}
	res, err := reach.Required(context.Background(), ground, []reach.Target{field}, reach.ConstantLoss(12), reach.RequiredOptions{Clearance: 100, Ceiling: 3000})
	if err != nil {
		fmt.Println(err)
		return
	}
	lat, lon := frame.Inverse(6000, 0) // 6 km east
	alt, best, _ := res.RequiredAt(lat, lon)
	fmt.Printf("least altitude %.0f m MSL to reach %s\n", alt, res.Targets[best].Name)
	// Output: least altitude 800 m MSL to reach field
}
