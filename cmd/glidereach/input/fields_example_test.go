package input_test

import (
	"fmt"

	"glidereach/cmd/glidereach/input"
)

func ExampleLoadFields() {
	fields, err := input.LoadFields("../../../testdata/fields/demo-fields.geojson")
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range fields[:3] {
		fmt.Printf("%-18s %.4f, %.4f  %4.0f m  %s\n", f.Name, f.Lat, f.Lon, f.Length, f.Surface)
	}
	// Output:
	// Gannet Flats       -0.4200, -24.7100   900 m  grass
	// Kelp Meadow Strip  -0.6300, -24.3800   700 m  sand
	// Tern Hollow        -0.2800, -24.5500   650 m  grass
}

func ExampleLoadRoute() {
	r, err := input.LoadRoute("../../../testdata/routes/demo-route.gpx")
	if err != nil {
		fmt.Println(err)
		return
	}
	samples, err := r.Samples(20000) // every 20 km and at each vertex
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range samples {
		fmt.Printf("%6.0f m  %.4f, %.4f  track %3.0f°  planned %4.0f m\n", s.Dist, s.Lat, s.Lon, s.Bearing, s.Ele)
	}
	// Output:
	//      0 m  -0.6800, -24.7200  track  45°  planned 1200 m
	//  12552 m  -0.6000, -24.6400  track  45°  planned 1250 m
	//  20000 m  -0.5525, -24.5925  track  45°  planned 1270 m
	//  31380 m  -0.4800, -24.5200  track  41°  planned 1300 m
	//  40000 m  -0.4215, -24.4688  track  41°  planned 1337 m
	//  43168 m  -0.4000, -24.4500  track  42°  planned 1350 m
	//  58089 m  -0.3000, -24.3600  track  42°  planned 1400 m
}

func ExampleParseBox() {
	a, err := input.ParseBox("-0.8,-24.8,-0.2,-24.2")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(a.Contains(-0.5, -24.5), a.Contains(-0.1, -24.5))
	_, err = input.ParseArea("-24.8,-0.8,-24.2,-0.2")
	fmt.Println(err)
	// Output:
	// true false
	// --area: "-24.8,-0.8,-24.2,-0.2" is a typed box, but --area takes a GeoJSON file only; type a box as --box LAT,LON,LAT,LON (two opposite corners, latitude first, like --from), e.g. --box -0.8,-24.8,-0.2,-24.2 if you meant the old minlon,minlat,maxlon,maxlat order
}
