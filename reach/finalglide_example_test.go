package reach_test

import (
	"context"
	"fmt"
	"math"

	"glidereach/reach"
	"glidereach/reach/geodesy"
)

func ExampleFinalGlide() {
	// The generic trainer (glide ratio 9) in still air, ISA, from 1800 m MSL
	// to a field at 120 m, 12 km away along the equator, with a 300 m reserve.
	ac, _ := reach.Builtin("trainer")
	route := []geodesy.LatLon{{Lat: 0, Lon: -24.5}, {Lat: 0, Lon: -24.5 + 12000/geodesy.A*180/math.Pi}}
	res, err := reach.FinalGlide(context.Background(), route, 1800, reach.Performance{Aircraft: ac},
		reach.FinalGlideOptions{GoalElev: 120, Reserve: 300})
	if err != nil {
		fmt.Println(err)
		return
	}
	l := res.Legs[0]
	fmt.Printf("leg: %.1f km on %03.0f°, fly %.0f kt IAS, 1:%.1f, lose %.0f m in %.0f s\n",
		l.Distance/1000, l.TrackDeg, l.IAS/(1852.0/3600), l.GroundRatio, l.HeightLost, l.Time)
	fmt.Printf("required %.0f m MSL, arrive %.0f m above the field (%+.0f m over the reserve): %v\n",
		res.Required, res.ArrivalAGL, res.AboveReserve, res.Status)
	// Output:
	// leg: 12.0 km on 090°, fly 65 kt IAS, 1:9.0, lose 1333 m in 340 s
	// required 1753 m MSL, arrive 347 m above the field (+47 m over the reserve): ok
}
