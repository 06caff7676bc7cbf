package terrain_test

import (
	"fmt"
	"path/filepath"

	"glidereach/terrain"
)

// Open a DEM, read the window around a point and sample it.
func ExampleOpen() {
	src, err := terrain.Open(filepath.Join("..", "testdata", "asc", "geo_corner.asc"))
	if err != nil {
		fmt.Println(err)
		return
	}
	g, err := src.Window(-24.4, -0.4, -24.2, 0.2)
	if err != nil {
		fmt.Println(err)
		return
	}
	v, ok := g.Elevation(0.125, -24.25) // between the 100 m and 110 m cells
	fmt.Printf("%s: %.1f m %v\n", src.Describe(), v, ok)
	// Output: ESRI ASCII grid geo_corner.asc (4×3, EPSG:4326 (WGS84 geographic)): 105.0 m true
}

// Resample the synthetic terrain into a 1 km square Local of 10 m cells
// around its centre, the form the solvers read.
func ExampleResample() {
	g := terrain.Synthetic(1, 600, 600, 1.0/3600)
	f := terrain.NewFrame(terrain.SyntheticLat, terrain.SyntheticLon)
	l := terrain.Resample(g, f, -495, -495, 10, 100, 100)
	fmt.Println(l.Cols, l.Rows, l.Cell, l.Source)
	// Output: 100 100 10 synthetic terrain (fictional, open Atlantic)
}
