package input

import (
	"errors"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

const demoFields = "../../../testdata/fields/demo-fields.geojson"

func TestLoadFieldsDemo(t *testing.T) {
	fields, err := LoadFields(demoFields)
	if err != nil {
		t.Fatal(err)
	}
	if len(fields) != 7 {
		t.Fatalf("got %d fields, want 7", len(fields))
	}
	byName := map[string]Field{}
	for _, f := range fields {
		byName[f.Name] = f
		if f.HasElevation {
			t.Errorf("%s: the demo fields carry no elevation_m", f.Name)
		}
	}
	g := byName["Gannet Flats"]
	// RFC 7946 §3.1.1: positions are [longitude, latitude].
	if g.Lat != -0.42 || g.Lon != -24.71 || g.Length != 900 || g.Surface != "grass" || g.Polygon != nil {
		t.Errorf("Gannet Flats = %+v", g)
	}
	// The centroid of a rectangle is its centre (plane geometry; the demo
	// file's rectangles were built around these centres, see ORIGIN.md).
	th := byName["Tern Hollow"]
	if math.Abs(th.Lat+0.28) > 2e-6 || math.Abs(th.Lon+24.55) > 2e-6 || len(th.Polygon) != 1 {
		t.Errorf("Tern Hollow landing point %v, %v, polygon %v", th.Lat, th.Lon, th.Polygon)
	}
}

func TestParseFieldsProperties(t *testing.T) {
	src := `{"type":"FeatureCollection","features":[
{"type":"Feature","properties":{"name":" Sandbar ","elevation_m":12.5,"length_m":640,"surface":"sand","colour":"x"},"geometry":{"type":"Point","coordinates":[10,20,99]}},
{"type":"Feature","properties":{"name":"Null props","elevation_m":null,"surface":null},"geometry":{"type":"Point","coordinates":[-180,-90]}}
]}`
	fs, err := ParseFields([]byte(src))
	if err != nil {
		t.Fatal(err)
	}
	want := Field{Name: "Sandbar", Lat: 20, Lon: 10, Elevation: 12.5, HasElevation: true, Length: 640, Surface: "sand"}
	if got := fs[0]; got.Name != want.Name || got.Lat != want.Lat || got.Lon != want.Lon || got.Elevation != want.Elevation ||
		!got.HasElevation || got.Length != want.Length || got.Surface != want.Surface {
		t.Errorf("field 0 = %+v, want %+v", got, want)
	}
	// RFC 7946 §3.2: null property values; here null means "not given".
	if fs[1].HasElevation || fs[1].Surface != "" || fs[1].Lat != -90 || fs[1].Lon != -180 {
		t.Errorf("field 1 = %+v", fs[1])
	}
}

func TestParseFieldsPolygon(t *testing.T) {
	// A 4x4 square with a 1x1 hole at (1..2, 1..2), given clockwise (the
	// wrong winding: RFC 7946 §3.1.6 says parsers should not reject it).
	// Composite centroid (plane geometry, common practice): area 16 - 1,
	// x = (16*2 - 1*1.5)/15 = 2.0333…, likewise y.
	src := `{"type":"Feature","properties":{"name":"Square"},"geometry":{"type":"Polygon","coordinates":[
[[0,0],[0,4],[4,4],[4,0],[0,0]],[[1,1],[2,1],[2,2],[1,2],[1,1]]]}}`
	fs, err := ParseFields([]byte(src))
	if err != nil {
		t.Fatal(err)
	}
	f := fs[0]
	if want := 30.5 / 15; math.Abs(f.Lon-want) > 1e-12 || math.Abs(f.Lat-want) > 1e-12 {
		t.Errorf("centroid %v, %v; want %v", f.Lon, f.Lat, want)
	}
	// Rewound: exterior counter-clockwise, hole clockwise (RFC 7946 §3.1.6).
	if a := ringArea(f.Polygon[0]); a != 16 {
		t.Errorf("exterior signed area %v, want +16", a)
	}
	if a := ringArea(f.Polygon[1]); a != -1 {
		t.Errorf("hole signed area %v, want -1", a)
	}
}

func TestParseFieldsErrors(t *testing.T) {
	pt := func(props string, coords string) string {
		return `{"type":"Feature","properties":` + props + `,"geometry":{"type":"Point","coordinates":` + coords + `}}`
	}
	fc := func(feats ...string) string {
		return "{\"type\":\"FeatureCollection\",\"features\":[\n" + strings.Join(feats, ",\n") + "\n]}"
	}
	ok := pt(`{"name":"A"}`, `[1,2]`)
	cases := []struct {
		name, src, want string
	}{
		{"not json", `{"type":`, "invalid JSON"},
		{"not an object", `[1,2]`, "not a GeoJSON object"},
		{"empty", fc(), "no features"},
		// RFC 7946 §3.3: a FeatureCollection has a "features" member.
		{"no features member", `{"type":"FeatureCollection"}`, "without \"features\""},
		{"missing type", `{"features":[]}`, "missing \"type\""},
		{"missing name", fc(ok, pt(`{"surface":"grass"}`, `[1,2]`)), `features[1] (line 3): missing property "name"`},
		{"blank name", fc(pt(`{"name":"  "}`, `[1,2]`)), `features[0] (line 2): missing property "name"`},
		{"null properties", fc(pt(`null`, `[1,2]`)), `missing property "name"`},
		{"name not a string", fc(pt(`{"name":7}`, `[1,2]`)), `property "name" must be a string`},
		{"duplicate", fc(ok, pt(`{"name":" a "}`, `[3,4]`)), `features[1] (line 3): field name "a" is used twice (also features[0] (line 2))`},
		// RFC 7946 §4: [lon, lat] in WGS84 degrees.
		{"lon range", fc(pt(`{"name":"A"}`, `[181,2]`)), "longitude 181 out of range"},
		{"lat range", fc(pt(`{"name":"A"}`, `[1,-91]`)), "latitude -91 out of range"},
		{"one coordinate", fc(pt(`{"name":"A"}`, `[1]`)), "features[0] (line 2): invalid coordinates"},
		{"elevation string", fc(pt(`{"name":"A","elevation_m":"350ft"}`, `[1,2]`)), `property "elevation_m" must be a number of metres, not "350ft"`},
		{"elevation range", fc(pt(`{"name":"A","elevation_m":12000}`, `[1,2]`)), "elevation_m 12000 outside"},
		{"length negative", fc(pt(`{"name":"A","length_m":-5}`, `[1,2]`)), "length_m -5 outside"},
		{"long strip", fc(`{"type":"Feature","properties":{"name":"L"},"geometry":{"type":"LineString","coordinates":[[1,2],[3,4]]}}`), "the strip is 313588 m long"},
		{"zero-length strip", fc(`{"type":"Feature","properties":{"name":"Z"},"geometry":{"type":"LineString","coordinates":[[1,2],[1,2]]}}`), "the strip has zero length"},
		{"direction out of range", fc(`{"type":"Feature","properties":{"name":"D","landing_directions":[90,400]},"geometry":{"type":"Point","coordinates":[1,2]}}`), "landing_directions[1] = 400 is outside 0..360"},
		{"directions not numbers", fc(`{"type":"Feature","properties":{"name":"D","landing_directions":"27"},"geometry":{"type":"Point","coordinates":[1,2]}}`), "must be a non-empty array"},
		{"bad side", fc(`{"type":"Feature","properties":{"name":"S","pattern_side":"up"},"geometry":{"type":"Point","coordinates":[1,2]}}`), "want left or right"},
		{"multilinestring", fc(`{"type":"Feature","properties":{"name":"M"},"geometry":{"type":"MultiLineString","coordinates":[[[1,2],[1,2.01]]]}}`), "geometry MultiLineString not supported"},
		{"null geometry", fc(`{"type":"Feature","properties":{"name":"N"},"geometry":null}`), "feature has no geometry"},
		// RFC 7946 §3.1.6: a linear ring is closed and has >= 4 positions.
		{"open ring", fc(`{"type":"Feature","properties":{"name":"P"},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1]]]}}`), "invalid coordinates"},
		{"flat ring", fc(`{"type":"Feature","properties":{"name":"P"},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[2,0],[0,0]]]}}`), "ring 0 has no area"},
		{"L shape", fc(`{"type":"Feature","properties":{"name":"Ell"},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,0.1],[0.1,0.1],[0.1,1],[0,1],[0,0]]]}}`), "centroid of its polygon lies outside"},
		{"bare point", `{"type":"Point","coordinates":[1,2]}`, `line 1: missing property "name"`},
		{"trailing data", ok + ` {}`, "unexpected data after"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseFields([]byte(c.src))
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("err = %v\nwant it to contain %q", err, c.want)
			}
		})
	}
}

func TestLoadFieldsErrorsNameFile(t *testing.T) {
	_, err := LoadFields(filepath.Join(t.TempDir(), "nope.geojson"))
	var ue *UsageError
	if !errors.As(err, &ue) || !strings.HasSuffix(ue.Where, "nope.geojson") {
		t.Errorf("missing file: %#v", err)
	}
	path := writeTemp(t, "f.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[1,2]}}]}`)
	_, err = LoadFields(path)
	if !errors.As(err, &ue) || ue.Where != path || !strings.Contains(err.Error(), "features[0]") {
		t.Errorf("bad file: %v", err)
	}
}

func TestFindField(t *testing.T) {
	fs := []Field{{Name: "Gannet Flats"}, {Name: "Tern Hollow"}}
	if f, err := FindField(fs, " tern hollow", "--field"); err != nil || f.Name != "Tern Hollow" {
		t.Errorf("FindField = %v, %v", f, err)
	}
	_, err := FindField(fs, "Nowhere", "--field")
	var ue *UsageError
	if !errors.As(err, &ue) || ue.Where != "--field" || !strings.Contains(err.Error(), `"Gannet Flats", "Tern Hollow"`) {
		t.Errorf("FindField error = %v", err)
	}
}
