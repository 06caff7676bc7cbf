package main

import (
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach/plan/demo"
	"glidereach/wind"
)

// readTestdata reads a file of the repository's testdata/.
func readTestdata(t *testing.T, parts ...string) []byte {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(append([]string{"..", "..", "testdata"}, parts...)...))
	if err != nil {
		t.Fatal(err)
	}
	return data
}

// The demo scenario of package reach/plan/demo and the invented files in
// testdata/ (which users pass to the commands: demo-fields.geojson,
// demo-candidates.geojson, demo-route.gpx and .geojson, demo-area.geojson;
// see their ORIGIN.md) are the same scenario: each file parsed by the input
// layer equals the library's values, to the last bit.
func TestDemoScenarioMatchesFiles(t *testing.T) {
	fields, err := input.ParseFields(readTestdata(t, "fields", "demo-fields.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	sc, _ := loadDemoScene()
	if !reflect.DeepEqual(fields, sc.fields) {
		t.Errorf("demo-fields.geojson parses to\n%#v\nthe library has\n%#v", fields, sc.fields)
	}
	cands, err := input.ParseFields(readTestdata(t, "fields", "demo-candidates.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	if got := demoCandidates(); !reflect.DeepEqual(cands, got) {
		t.Errorf("demo-candidates.geojson parses to\n%#v\nthe library has\n%#v", cands, got)
	}
	for _, name := range []string{"demo-route.gpx", "demo-route.geojson"} {
		rt, err := input.ParseRoute(readTestdata(t, "routes", name), "")
		if err != nil {
			t.Fatal(err)
		}
		if want := demoRouteInput(); !reflect.DeepEqual(rt, want) {
			t.Errorf("%s parses to\n%#v\nthe library has\n%#v", name, rt, want)
		}
	}
	reg, err := input.ParseAreaGeoJSON(readTestdata(t, "areas", "demo-area.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	if lib := input.NewRegion(demo.Coverage().Area); !reflect.DeepEqual(reg, lib) {
		t.Errorf("demo-area.geojson parses to\n%#v\nthe library has\n%#v", reg.Polygons, lib.Polygons)
	}
	// The library's own zone agrees with the input layer's region on a
	// lattice of points over the area's box (hole included).
	z := demo.Zone(demo.Coverage().Area)
	b := reg.Bounds()
	for i := range 60 {
		for j := range 60 {
			lat := b.Min[1] + (float64(i)+0.5)/60*(b.Max[1]-b.Min[1])
			lon := b.Min[0] + (float64(j)+0.5)/60*(b.Max[0]-b.Min[0])
			if z.Contains(lat, lon) != reg.Contains(lat, lon) {
				t.Fatalf("(%v, %v): demo.Zone %v, input.Region %v", lat, lon, z.Contains(lat, lon), reg.Contains(lat, lon))
			}
		}
	}
	if z.Bounds() != reg.Bounds() {
		t.Errorf("zone bounds %v, region %v", z.Bounds(), reg.Bounds())
	}
}

// The --wind text the demo's steps are given parses back to the library's
// layers exactly (the knots of the text are the m/s of demo.Wind).
func TestDemoWindSpec(t *testing.T) {
	spec := demoWindSpec()
	// The demo's figures and files were made with this text (kept so the
	// outputs stay the same bytes).
	if spec != "0m:240/10kt,1500m:270/20kt,3000m:280/35kt" {
		t.Errorf("wind spec %q", spec)
	}
	got, err := input.ParseWind(spec)
	if err != nil {
		t.Fatal(err)
	}
	want, err := wind.NewProfile(demo.Wind())
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("--wind %s parses to %#v, demo.Wind gives %#v", spec, got, want)
	}
}
