package main

import (
	"context"
	"fmt"
	"glidereach/reach/plan"
	"math"

	"glidereach/reach/geodesy"
	"glidereach/reach/plan/demo"
)

func init() {
	registerDemoStep(35, "engine failure in cruise: the approach to the best field", demoApproach)
}

// demoApproach plans the approach to every demo field from the failure and
// writes the plan to the best one: the plan that holds with the most height
// in hand at its entry.
func demoApproach(ctx context.Context, d *demoRun) error {
	sc, err := loadDemoScene()
	if err != nil {
		return err
	}
	df := demo.Failure() // the trainer in cruise along the demo route, heading north-east
	g := newGlideFlags()
	g.aircraft = df.Aircraft
	g.wind = demoWindSpec()
	setup, err := g.resolve()
	if err != nil {
		return err
	}
	ff := newFailureFlags()
	fs := &failureState{HeadingDeg: df.Heading, IAS: df.IAS,
		Reaction: ff.reaction, Efficiency: ff.efficiency, Bank: ff.bank.Value}
	run := &approachRun{setup: setup, ground: plan.Ground{Src: sc.src}, fail: fs, startLat: df.Lat, startLon: df.Lon,
		startAlt: df.Alt, variation: math.NaN(), units: unitSets["m-kt"]}
	var best *approachRun
	for _, f := range sc.fields {
		r := *run
		r.field = f
		sampler, err := plan.ReadApproachTerrain(r.ground, r.startLat, r.startLon, plan.Field(f), nil)
		if err != nil {
			return usage(err)
		}
		r.sampler = sampler
		if _, ok := sampler.Elevation(r.startLat, r.startLon); !ok {
			return fmt.Errorf("demo approach: no terrain at the failure point")
		}
		fe, ok := sampler.Elevation(f.Lat, f.Lon)
		if !ok {
			continue
		}
		// The demo takes every field's elevation from its terrain.
		r.field.Elevation, r.field.HasElevation, r.fieldFrom = fe, true, "terrain"
		if s, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: r.startLat, Lon: r.startLon}, geodesy.LatLon{Lat: f.Lat, Lon: f.Lon}); err != nil || s > df.MaxDistance {
			continue
		}
		req := plan.ApproachRequest{Setup: &setup.Setup, Terrain: sampler, Lat: r.startLat, Lon: r.startLon, Alt: r.startAlt,
			Field: plan.Field(r.field), LandingDir: math.NaN(), Failure: fs}
		if err := planApproach(ctx, &r, req, "demo"); err != nil {
			return err
		}
		res := r.res
		status := "no plan holds"
		if res.Feasible {
			status = fmt.Sprintf("%s landing %03.0f°, %.0f m in hand", res.Variant, res.LandingDir, res.Excess)
		}
		fmt.Fprintf(d.out, "  %-20s %s\n", f.Name, status)
		if res.Feasible && (best == nil || res.Excess > best.res.Excess) {
			rr := r
			best = &rr
		}
	}
	if best == nil {
		return fmt.Errorf("demo approach: no field gives a plan (the scenario needs adjusting)")
	}
	fmt.Fprintf(d.out, "Best field: %s\n\n", best.field.Name)
	for _, out := range []struct{ name, format string }{{"approach-trainer.geojson", "geojson"}, {"approach-trainer.json", "json"}} {
		var data []byte
		if out.format == "json" {
			data, err = approachJSON(best)
		} else {
			data, err = approachGeoJSON(best)
		}
		if err != nil {
			return err
		}
		if err := d.writeBytes(out.name, data); err != nil {
			return err
		}
	}
	if err := d.drawBoth("approach-trainer", func(m, r string) error { return drawApproach(best, m, r) }); err != nil {
		return err
	}
	writeApproachText(d.out, best)
	return nil
}
