package main

import (
	"encoding/json"
	"math"
	"testing"
)

// Fields beyond any glide from the search ceiling (start + 4000 m) are
// decided without a solver run, and the ones short of that bound still get
// their figure: on flat ground in still air the trainer's 1:9 glide (its
// profile's best-glide ratio) needs distance/9 + the reserve. Before, every
// field cost a backward run on a window around it, even 2000 km away.
func TestReachFarFieldsDecidedWithoutRun(t *testing.T) {
	lat0, lon0 := -0.5, -24.5
	// 30 km and 45 km need about 3633 m and 5300 m (below the 5500 m
	// ceiling); 2000 km is beyond any glide from it.
	fields := writeTestFields(t, lat0, lon0, []float64{30000, 45000, 2000000}, []float64{80, 200, 300})
	code, out, errs := runCLI(t, "reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--aircraft", "trainer",
		"--reserve", "300m", "--fields", fields, "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Fields []struct {
			Name     string   `json:"name"`
			Required *float64 `json:"required_msl_m"`
			Dist     float64  `json:"distance_m"`
			Note     string   `json:"note"`
		} `json:"fields"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Fields) != 3 {
		t.Fatalf("want 3 fields, got %d", len(doc.Fields))
	}
	for _, f := range doc.Fields {
		switch f.Name {
		case "F0", "F1":
			if f.Required == nil {
				t.Fatalf("%s at %.0f m: no required altitude (%s)", f.Name, f.Dist, f.Note)
			}
			// 1:9 in still air, flat ground (the profile's glide ratio;
			// within 2 % for the grid's any-angle paths).
			want := f.Dist/9 + 300
			if math.Abs(*f.Required-want) > 0.02*want {
				t.Fatalf("%s: required %.0f m, want about %.0f m", f.Name, *f.Required, want)
			}
		case "F2":
			if f.Required != nil || f.Note != "beyond the computed window: out of reach" {
				t.Fatalf("far field: required %v, note %q", f.Required, f.Note)
			}
		}
	}
}
