package approach_test

import (
	"context"
	"fmt"
	"math"

	"glidereach/reach"
	"glidereach/reach/approach"
)

// The pattern of the built-in trainer to an invented field on open ocean,
// landing 090 in calm air, from 1200 m MSL 5 km north-west of it.
func ExamplePlan() {
	ac, _ := reach.Builtin("trainer")
	res, err := approach.Plan(context.Background(), approach.Request{
		Field:    approach.Field{Name: "Example field", Lat: -0.5, Lon: -24.5, Elev: 100},
		Aircraft: ac, Clearance: 100, Lat: -0.47, Lon: -24.53, Alt: 1200, LandingDir: 90, Side: "left",
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(res.Feasible, res.Variant, math.Round(res.LandingDir))
	for _, g := range res.Gates {
		fmt.Printf("%-9s %4.0f m above the field\n", g.Name, g.HeightAboveField)
	}
	// Output:
	// true full pattern 90
	// entry      488 m above the field
	// base       327 m above the field
	// final      194 m above the field
	// touchdown    0 m above the field
}
