package main

import (
	"bytes"
	"context"
	"fmt"
	"glidereach/reach/plan"
	"io"
	"path/filepath"
	"sync"

	"glidereach/reach/plan/demo"
)

func init() {
	registerDemoStep(20, "glide footprints over the invented landscape", demoFootprints)
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
	// The two footprints (demo.Footprints: the trainer from an engine
	// failure as reach --heading --speed does, the sailplane already
	// gliding) are independent: compute and write them side by side (each
	// into its own files, its summary into its own buffer), then list the
	// files and print the summaries in the runs' order.
	fps := demo.Footprints()
	outs := make([]*demoRun, len(fps))
	errs := make([]error, len(fps))
	var wg sync.WaitGroup
	for i, r := range fps {
		wg.Add(1)
		outs[i] = &demoRun{out: &bytes.Buffer{}, dir: d.dir}
		go func(i int, r demo.Footprint) {
			defer wg.Done()
			errs[i] = demoFootprintRun(ctx, outs[i], sc, r)
		}(i, r)
	}
	wg.Wait()
	for i := range fps {
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
func demoFootprintRun(ctx context.Context, d *demoRun, sc *demoScene, r demo.Footprint) error {
	g := newGlideFlags()
	g.aircraft = r.Aircraft
	g.wind = demoWindSpec()
	setup, err := g.resolve()
	if err != nil {
		return err
	}
	pos := newPositionFlags()
	pos.from.Lat, pos.from.Lon, pos.from.Given = r.Lat, r.Lon, true
	pos.agl.Value, pos.agl.Given = r.AGL, true
	var fs *failureState
	if r.IAS > 0 {
		ff := newFailureFlags()
		fs = &failureState{HeadingDeg: r.Heading, IAS: r.IAS,
			Reaction: ff.reaction, Efficiency: ff.efficiency, Bank: ff.bank.Value}
	}
	run, err := computeReachFrom(ctx, setup, plan.Ground{Src: sc.src}, pos, sc.fields, r.Levels, io.Discard, fs)
	if err != nil {
		return err
	}
	run.heading = r.Heading
	data, err := reachGeoJSON(run)
	if err != nil {
		return err
	}
	if err := d.writeBytes(r.Name+".geojson", data); err != nil {
		return err
	}
	if err := writeArrivalRaster(filepath.Join(d.dir, r.Name+"-arrival-agl.tif"), run); err != nil {
		return err
	}
	d.files = append(d.files, r.Name+"-arrival-agl.tif")
	if err := d.drawBoth(r.Name, func(m, rp string) error { return drawReach(run, m, rp) }); err != nil {
		return err
	}
	fmt.Fprintf(d.out, "-- %s, %s --\n", r.Aircraft, r.Name)
	writeReachText(d.out, run)
	fmt.Fprintln(d.out)
	return nil
}
