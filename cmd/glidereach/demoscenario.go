package main

import (
	"fmt"
	"math"
	"strings"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach/plan/demo"
	"glidereach/terrain"
)

// The demo scenario is package reach/plan/demo's (an invented landscape
// over open ocean at 0.5° S, 24.5° W, invented fields, a layered wind, the
// steps' start points and altitudes); this file only turns it into the
// command's input values. testdata/ holds the same fields, route and area
// as files (demoscenario_test.go parses them and compares).

// The landscape's seed and lattice, for demo --write-terrain.
const (
	demoSeed    = demo.Seed
	demoCells   = demo.Cells
	demoCellDeg = demo.CellDeg
)

// demoScene is the loaded scenario.
type demoScene struct {
	src    terrain.Source
	fields []input.Field
	path   string // the fields file's name, for messages
}

// loadDemoScene returns the scenario: the shared landscape and a new copy
// of the fields.
func loadDemoScene() (*demoScene, error) {
	fs := demo.Fields()
	fields := make([]input.Field, len(fs))
	for i, f := range fs {
		fields[i] = input.Field(f)
	}
	return &demoScene{src: demo.Terrain(), fields: fields, path: "demo-fields.geojson"}, nil
}

// demoWindSpec is the scenario's wind (demo.Wind, m/s) as a --wind spec,
// speeds in whole knots (each round trips: TestDemoWindSpec).
func demoWindSpec() string {
	var parts []string
	for _, l := range demo.Wind() {
		parts = append(parts, fmt.Sprintf("%gm:%g/%gkt", l.Alt, l.Dir, math.Round(l.Speed/input.Knot)))
	}
	return strings.Join(parts, ",")
}

// demoRoute returns the scenario's route as the route file would give it.
func demoRouteInput() *input.Route {
	r := demo.Route()
	rt := &input.Route{Name: r.Name}
	for _, p := range r.Points {
		rt.Points = append(rt.Points, input.RoutePoint{Lat: p.Lat, Lon: p.Lon, Ele: p.Ele, HasEle: true})
	}
	return rt
}

// demoCandidates returns the scenario's candidate fields for coverage.
func demoCandidates() []input.Field {
	cs := demo.Coverage().Candidates
	out := make([]input.Field, len(cs))
	for i, c := range cs {
		out[i] = input.Field(c)
	}
	return out
}
