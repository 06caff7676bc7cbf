package main

import (
	"embed"
	"fmt"
	"sync"

	"glidereach/cmd/glidereach/input"
	"glidereach/terrain"
)

// demoData holds the demo's invented fields, route and area.
//
//go:embed demodata/*.geojson demodata/*.gpx
var demoData embed.FS

// The demo scenario: an invented landscape generated in code (terrain.Synthetic,
// seed 1, 1400 × 1400 cells of 2 arc-seconds ≈ 62 m, about 86 km square) over
// open ocean at 0.5° S, 24.5° W so nobody mistakes it for a real place;
// invented fields; a layered wind.
const (
	demoSeed     = 1
	demoCells    = 1400
	demoCellDeg  = 1.0 / 1800
	demoWindSpec = "0m:240/10kt,1500m:270/20kt,3000m:280/35kt"
)

// demoScene is the loaded scenario, built once per process.
type demoScene struct {
	src    terrain.Source
	fields []input.Field
	path   string // fields file name inside demoData, for messages
}

var (
	demoOnce  sync.Once
	demoValue *demoScene
	demoErr   error
)

func loadDemoScene() (*demoScene, error) {
	demoOnce.Do(func() {
		g := terrain.Synthetic(demoSeed, demoCells, demoCells, demoCellDeg)
		src := &terrain.GridSource{Grid: g, Desc: fmt.Sprintf("invented demo landscape (synthetic, seed %d, %d×%d cells of 2″)", demoSeed, demoCells, demoCells)}
		data, err := demoData.ReadFile("demodata/demo-fields.geojson")
		if err != nil {
			demoErr = err
			return
		}
		fields, err := input.ParseFields(data)
		if err != nil {
			demoErr = err
			return
		}
		demoValue = &demoScene{src: src, fields: fields, path: "demo-fields.geojson"}
	})
	return demoValue, demoErr
}
