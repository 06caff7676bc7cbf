package main

import (
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
	// gliding) are independent: compute them side by side.
	fps := demo.Footprints()
	runs := make([]*reachRun, len(fps))
	errs := make([]error, len(fps))
	var wg sync.WaitGroup
	for i, r := range fps {
		wg.Add(1)
		go func(i int, r demo.Footprint) {
			defer wg.Done()
			g := newGlideFlags()
			g.aircraft = r.Aircraft
			g.wind = demoWindSpec()
			setup, err := g.resolve()
			if err != nil {
				errs[i] = err
				return
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
			runs[i], errs[i] = computeReachFrom(ctx, setup, plan.Ground{Src: sc.src}, pos, sc.fields, r.Levels, io.Discard, fs)
		}(i, r)
	}
	wg.Wait()
	for i, r := range fps {
		if errs[i] != nil {
			return errs[i]
		}
		run := runs[i]
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
	}
	return nil
}
