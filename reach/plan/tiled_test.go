package plan_test

import (
	"errors"
	"math"
	"testing"

	"glidereach/reach"
	"glidereach/reach/plan"
	"glidereach/terrain"
)

// PlanTiled on flat ground: the solver cell is the flat default, the
// ceiling the altitude flown plus the margin, a field without an elevation
// takes the ground's; on a DEM a cell finer than the DEM's is refused, and
// an altitude not above the lowest ground is refused naming Alt.
func TestPlanTiled(t *testing.T) {
	s := trainer(t, nil)
	req := plan.TiledRequest{Setup: s, Ground: plan.Ground{Flat: 120}, West: -0.1, South: -0.1, East: 0.1, North: 0.1,
		ZoneName: "box", Alt: 1500, Fields: []reach.Target{{Name: "F", Lat: 0, Lon: 0, Elev: math.NaN(), Reserve: s.Reserve}}}
	tp, err := plan.PlanTiled(req)
	if err != nil {
		t.Fatal(err)
	}
	p := tp.Plan
	if p.Cell != plan.TiledFlatCell || p.Ceiling != 1500+plan.TiledCeilingMargin || tp.Top != 1500 {
		t.Errorf("cell %v, ceiling %v, top %v", p.Cell, p.Ceiling, tp.Top)
	}
	if len(p.Fields) != 1 || p.Fields[0].Elev != 120 {
		t.Errorf("fields %+v: want the flat ground's 120 m", p.Fields)
	}
	if len(p.Models) != len(s.Winds) {
		t.Errorf("%d loss models for %d winds", len(p.Models), len(s.Winds))
	}
	// AGL: the highest altitude flown is the highest ground plus the height.
	agl := req
	agl.AGL, agl.Alt = true, 600
	if tp, err := plan.PlanTiled(agl); err != nil || tp.Top != 720 {
		t.Errorf("AGL: top %v (%v), want 720 m", tp.Top, err)
	}
	low := req
	low.Alt = 100
	var ie *plan.InputError
	if _, err := plan.PlanTiled(low); !errors.As(err, &ie) || ie.Field != "Alt" {
		t.Errorf("altitude below the ground: %v, want an InputError for Alt", err)
	}

	src, err := terrain.Open("../../testdata/geotiff/geo_int16_strip_none.tif")
	if err != nil {
		t.Fatal(err)
	}
	w, so, e, n := src.Extent()
	dem := req
	dem.Ground = plan.Ground{Src: src}
	dem.West, dem.South, dem.East, dem.North = w, so, e, n
	dem.Fields = nil
	dem.Alt = 5000
	dem.Cell = src.Resolution() / 2
	if _, err := plan.PlanTiled(dem); !errors.As(err, &ie) || ie.Field != "Cell" {
		t.Errorf("cell finer than the DEM: %v, want an InputError for Cell", err)
	}
	dem.Cell = 0
	tp, err = plan.PlanTiled(dem)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(tp.Plan.Cell-src.Resolution()) > 1e-9 || len(tp.Plan.Notes) != 0 {
		t.Errorf("cell %v (DEM %v), notes %q", tp.Plan.Cell, src.Resolution(), tp.Plan.Notes)
	}
	dem.Cell = 2 * src.Resolution()
	if tp, err = plan.PlanTiled(dem); err != nil || len(tp.Plan.Notes) != 1 {
		t.Errorf("a coarser cell must be noted: %v, %q", err, tp.Plan.Notes)
	}
}
