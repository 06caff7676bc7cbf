package tiling_test

import (
	"context"
	"fmt"
	"os"

	"glidereach/reach"
	"glidereach/reach/tiling"
	"glidereach/terrain"
)

// A field on flat ground at 100 m in still air with a glide ratio of 10,
// flown over at 1100 m: it covers the disc of radius (1100 − 100 − 300)·10
// = 7 km (glide cone, tan γ = 1/E), π·7² = 153.9 km², less about a cell's
// width of the edge for the conservative read.
func ExampleRun() {
	lg, _ := tiling.SampleLoss(reach.ConstantLoss(10), 0, 1500)
	f := terrain.NewFrame(-30.5, -20.5)
	lat, lon := f.Inverse(0, 0)
	south, west := f.Inverse(-9000, -9000)
	north, east := f.Inverse(9000, 9000)
	lattice, _ := tiling.LatticeFor(nil, west, south, east, north, 30)
	p := &tiling.Plan{Lattice: lattice, Tile: 256, Models: []tiling.LossGrid{lg}, Clearance: 100, Alt: 1100, Ceiling: 1400, Cell: 30, Flat: 100,
		Fields: []reach.Target{{Name: "Invented Flat", Lat: lat, Lon: lon, Elev: 100, Reserve: 300}}}
	dir, _ := os.MkdirTemp("", "tiling-example-*")
	defer os.RemoveAll(dir)
	res, err := tiling.Run(context.Background(), nil, p, tiling.RunOptions{WorkDir: dir, Workers: 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("covered %.0f km² in %d tiles\n", res.Totals.CoveredArea/1e6, len(p.Tiles()))
	// Output:
	// covered 153 km² in 9 tiles
}
