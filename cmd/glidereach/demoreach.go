package main

import (
	"bytes"
	"context"
	"fmt"
	"glidereach/reach/plan"
	"io"
	"path/filepath"
	"sync"

	"glidereach/cmd/glidereach/input"
)

func init() {
	registerDemoStep(20, "glide footprints over the invented landscape", demoFootprints)
}

// demoFootprint is one footprint of the demo.
type demoFootprint struct {
	name     string // file stem
	aircraft string
	lat, lon float64
	agl      float64 // m above the ground at the start
	heading  float64 // degrees true
	// speedKt > 0 starts the footprint from an engine failure on heading
	// at that indicated airspeed (knots), as reach --heading --speed does;
	// 0 keeps the heading for drawing only (the sailplane has no engine
	// to lose: it is already gliding at its speed to fly).
	speedKt float64
}

var demoFootprintRuns = []demoFootprint{
	{name: "reach-trainer", aircraft: "trainer", lat: -0.5, lon: -24.5, agl: 1200, heading: 250, speedKt: 100},
	{name: "reach-sailplane", aircraft: "sailplane", lat: -0.42, lon: -24.62, agl: 900, heading: 100},
}

// demoFootprints computes a footprint for the trainer (from an engine
// failure in cruise) and the sailplane (already gliding) in
// the demo's layered wind, judges the invented fields and writes GeoJSON,
// an arrival-height raster, a map and a report for each.
func demoFootprints(ctx context.Context, d *demoRun) error {
	sc, err := loadDemoScene()
	if err != nil {
		return err
	}
	// The two footprints are independent: compute and write them side by
	// side (each into its own files, its summary into its own buffer), then
	// list the files and print the summaries in the runs' order.
	outs := make([]*demoRun, len(demoFootprintRuns))
	errs := make([]error, len(demoFootprintRuns))
	var wg sync.WaitGroup
	for i, r := range demoFootprintRuns {
		wg.Add(1)
		outs[i] = &demoRun{out: &bytes.Buffer{}, dir: d.dir}
		go func(i int, r demoFootprint) {
			defer wg.Done()
			errs[i] = demoFootprintRun(ctx, outs[i], sc, r)
		}(i, r)
	}
	wg.Wait()
	for i := range demoFootprintRuns {
		if errs[i] != nil {
			return errs[i]
		}
		d.files = append(d.files, outs[i].files...)
		if _, err := d.out.Write(outs[i].out.(*bytes.Buffer).Bytes()); err != nil {
			return err
		}
	}
	return nil
}

// demoFootprintRun computes one footprint of the demo and writes its
// GeoJSON, arrival-height raster, map and report, and its summary to d.out.
func demoFootprintRun(ctx context.Context, d *demoRun, sc *demoScene, r demoFootprint) error {
	g := newGlideFlags()
	g.aircraft = r.aircraft
	g.wind = demoWindSpec
	setup, err := g.resolve()
	if err != nil {
		return err
	}
	pos := newPositionFlags()
	pos.from.Lat, pos.from.Lon, pos.from.Given = r.lat, r.lon, true
	pos.agl.Value, pos.agl.Given = r.agl, true
	var fs *failureState
	if r.speedKt > 0 {
		ff := newFailureFlags()
		fs = &failureState{HeadingDeg: r.heading, IAS: r.speedKt * input.Knot,
			Reaction: ff.reaction, Efficiency: ff.efficiency, Bank: ff.bank.Value}
	}
	run, err := computeReachFrom(ctx, setup, plan.Ground{Src: sc.src}, pos, sc.fields, []float64{0, 150}, io.Discard, fs)
	if err != nil {
		return err
	}
	run.heading = r.heading
	data, err := reachGeoJSON(run)
	if err != nil {
		return err
	}
	if err := d.writeBytes(r.name+".geojson", data); err != nil {
		return err
	}
	if err := writeArrivalRaster(filepath.Join(d.dir, r.name+"-arrival-agl.tif"), run); err != nil {
		return err
	}
	d.files = append(d.files, r.name+"-arrival-agl.tif")
	if err := d.drawBoth(r.name, func(m, rp string) error { return drawReach(run, m, rp) }); err != nil {
		return err
	}
	fmt.Fprintf(d.out, "-- %s, %s --\n", r.aircraft, r.name)
	writeReachText(d.out, run)
	fmt.Fprintln(d.out)
	return nil
}
