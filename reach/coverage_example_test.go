package reach_test

import (
	"context"
	"fmt"

	"glidereach/reach"
	"glidereach/terrain"
)

// A route flown at 1200 m MSL over flat ground at 0 m in still air (glide
// ratio 10, reserve 300 m), passing 3 km abeam one field: the field is in
// reach while it is within (1200 − 300)·10 = 9 km.
func ExampleRequiredResult_Route() {
	f := terrain.NewFrame(-0.5, -24.5)
	g := terrain.NewFlat(f, -25000, -12000, 100, 501, 241, 0)
	flat, flon := f.Inverse(0, 3000)
	res, err := reach.Required(context.Background(), g, []reach.Target{{Name: "Alpha", Lat: flat, Lon: flon, Reserve: 300}},
		reach.ConstantLoss(10), reach.RequiredOptions{Clearance: 100, Ceiling: 2500})
	if err != nil {
		fmt.Println(err)
		return
	}
	var pts []reach.RoutePoint
	for d := 0.0; d <= 40000; d += 250 {
		lat, lon := f.Inverse(-20000+d, 0)
		pts = append(pts, reach.RoutePoint{Lat: lat, Lon: lon, Dist: d, Alt: 1200})
	}
	p, err := res.Route(pts, 2500)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("covered %.0f %%\n", p.CoveredFraction*100)
	for _, gp := range p.Gaps {
		fmt.Printf("gap %.1f-%.1f km, closed from %.0f m\n", gp.Start/1000, gp.End/1000, gp.CloseAlt)
	}
	// Output:
	// covered 42 %
	// gap 0.0-11.5 km, closed from 2322 m
	// gap 28.5-40.0 km, closed from 2322 m
}

// Two fields on flat ground far apart, flown over at 1300 m MSL with a glide
// ratio of 10 and a 300 m reserve: each covers a disc of 10 km radius.
func ExampleCoverage() {
	f := terrain.NewFrame(-0.5, -24.5)
	g := terrain.NewFlat(f, -40000, -20000, 100, 801, 401, 0)
	var ts []reach.Target
	for _, x := range []float64{-20000, 20000} {
		lat, lon := f.Inverse(x, 0)
		ts = append(ts, reach.Target{Lat: lat, Lon: lon, Reserve: 300})
	}
	c, err := reach.Coverage(context.Background(), g, ts, reach.ConstantLoss(10), reach.CoverageOptions{Alt: 1300, Clearance: 100})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("covered %.1f %% of %.0f km²; field 0 alone %.0f km²\n", c.CoveredFraction*100, float64(c.ZoneCells)*c.CellArea/1e6, c.Exclusive[0]/1e6)
	// Output:
	// covered 19.6 % of 3212 km²; field 0 alone 314 km²
}
