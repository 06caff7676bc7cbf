package reach_test

import (
	"fmt"
	"math"

	"glidereach/reach"
)

func ExampleISA() {
	T, p, rho := reach.ISA(1524) // 5000 ft
	fmt.Printf("%.2f K %.0f Pa %.4f kg/m³\n", T, p, rho)
	// Output: 278.24 K 84307 Pa 1.0555 kg/m³
}

func ExampleAircraft_Figures() {
	ac, _ := reach.Builtin("trainer")
	rho := reach.Atmosphere{}.Density(1524)
	f := ac.Figures(rho, reach.Conditions{})
	const kt = 1852.0 / 3600
	fmt.Printf("best glide 1:%.1f at %.0f kt IAS (%.0f kt TAS)\n", f.BestGlideRatio, f.BestGlideIAS/kt, f.BestGlideTAS/kt)
	fmt.Printf("least sink %.2f m/s at %.1f kt IAS, clamped at the %s speed\n", f.LeastSink, f.LeastSinkIAS/kt, f.LeastSinkClamp)
	// Output:
	// best glide 1:9.0 at 65 kt IAS (70 kt TAS)
	// least sink 3.86 m/s at 62.4 kt IAS, clamped at the min speed
}

func ExampleAircraft_SpeedToFly() {
	ac, _ := reach.Builtin("sailplane")
	rho := reach.Atmosphere{}.Density(1000)
	// 5 m/s headwind, 3 m/s crosswind, MacCready 0.
	s := ac.SpeedToFly(rho, -5, 3, reach.Conditions{})
	fmt.Printf("fly %.0f km/h IAS, ground speed %.0f km/h, ground glide 1:%.1f\n", s.IAS*3.6, s.GroundSpeed*3.6, s.GroundRatio)
	// Output: fly 108 km/h IAS, ground speed 95 km/h, ground glide 1:33.6
}

func ExampleNewTable() {
	ac, _ := reach.Builtin("trainer")
	tab, err := reach.NewTable(ac, reach.Atmosphere{}, nil, reach.Conditions{}, 0, 3000)
	if err != nil {
		fmt.Println(err)
		return
	}
	// Height lost per metre over ground at 1500 m on track 045.
	fmt.Printf("loss %.4f, best ratio %.1f\n", tab.Loss(1500, 45*math.Pi/180), tab.BestDownwindRatio())
	// Output: loss 0.1111, best ratio 9.0
}
