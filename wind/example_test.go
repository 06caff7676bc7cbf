package wind_test

import (
	"fmt"

	"glidereach/wind"
)

// The wind at an altitude between two layers, and its components on a track.
func ExampleProfile_Components() {
	const kt = 1852.0 / 3600
	p, err := wind.NewProfile([]wind.Layer{
		{Alt: 0, Dir: 240, Speed: 10 * kt},
		{Alt: 3000, Dir: 280, Speed: 35 * kt},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	east, north := p.At(1828.8) // 6000 ft
	along, cross := p.Components(1828.8, 90)
	fmt.Printf("air moves east %.2f m/s, north %.2f m/s\n", east, north)
	fmt.Printf("on track 090: tailwind %.2f m/s, from the left %.2f m/s\n", along, cross)
	// Output:
	// air moves east 12.55 m/s, north -0.90 m/s
	// on track 090: tailwind 12.55 m/s, from the left 0.90 m/s
}

// Layer temperatures override the standard atmosphere.
func ExampleProfile_Temperature() {
	p, _ := wind.NewProfile([]wind.Layer{
		{Alt: 0, Dir: 270, Speed: 5},
		{Alt: 3000, Dir: 270, Speed: 15, Temp: 273.15 - 8, HasTemp: true},
	})
	T, fromLayers := p.Temperature(3000, 0)
	fmt.Printf("%.2f K from layers: %v\n", T, fromLayers)
	T, fromLayers = wind.Calm().Temperature(3000, 0)
	fmt.Printf("%.2f K from layers: %v\n", T, fromLayers)
	// Output:
	// 265.15 K from layers: true
	// 268.65 K from layers: false
}

// The scenario set for a wind known to ±20° and ±5 kt.
func ExamplePerturb() {
	p, _ := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 270, Speed: 10}})
	for _, q := range wind.Perturb(p, 20, 5*1852.0/3600) {
		fmt.Println(q)
	}
	// Output:
	// from 270° at 10.0 m/s
	// from 270° at 7.4 m/s
	// from 270° at 12.6 m/s
	// from 250° at 10.0 m/s
	// from 250° at 7.4 m/s
	// from 250° at 12.6 m/s
	// from 290° at 10.0 m/s
	// from 290° at 7.4 m/s
	// from 290° at 12.6 m/s
}
