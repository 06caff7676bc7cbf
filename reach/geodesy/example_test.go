package geodesy_test

import (
	"fmt"

	"glidereach/reach/geodesy"
)

func ExampleInverse() {
	flinders := geodesy.LatLon{Lat: -37.951033417, Lon: 144.424867889}
	buninyong := geodesy.LatLon{Lat: -37.652821139, Lon: 143.926495528}
	s, az1, az2, err := geodesy.Inverse(flinders, buninyong)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.3f m, initial %.5f°, final %.5f°\n", s, az1, az2)
	// Output: 54972.271 m, initial 306.86816°, final 307.17363°
}

func ExampleSample() {
	line := []geodesy.LatLon{{Lat: 0, Lon: 0}, {Lat: 0, Lon: 0.02}}
	pts, _ := geodesy.Sample(line, 1000)
	for _, p := range pts {
		fmt.Printf("%7.1f m  %.5f,%.5f  %.0f°\n", p.Dist, p.Lat, p.Lon, p.Bearing)
	}
	// Output:
	//     0.0 m  0.00000,0.00000  90°
	//  1000.0 m  0.00000,0.00898  90°
	//  2000.0 m  0.00000,0.01797  90°
	//  2226.4 m  0.00000,0.02000  90°
}
