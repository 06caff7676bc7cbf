package input

import (
	"errors"
	"math"
	"strings"
	"testing"

	"glidereach/reach/geodesy"
)

const (
	demoRouteGPX     = "../../../testdata/routes/demo-route.gpx"
	demoRouteGeoJSON = "../../../testdata/routes/demo-route.geojson"
)

func TestLoadRouteDemo(t *testing.T) {
	g, err := LoadRoute(demoRouteGPX)
	if err != nil {
		t.Fatal(err)
	}
	j, err := LoadRoute(demoRouteGeoJSON)
	if err != nil {
		t.Fatal(err)
	}
	if g.Name != "Demo ferry line" || j.Name != g.Name || len(g.Points) != 5 || len(j.Points) != 5 {
		t.Fatalf("gpx %+v\ngeojson %+v", g, j)
	}
	// The two files hold the same invented route (testdata/routes/ORIGIN.md):
	// GPX ele and the GeoJSON third coordinate are both metres
	// (GPX 1.1 schema; RFC 7946 §3.1.1).
	for i := range g.Points {
		if g.Points[i] != j.Points[i] || !g.Points[i].HasEle {
			t.Errorf("point %d: gpx %+v geojson %+v", i, g.Points[i], j.Points[i])
		}
	}
	if g.Points[0] != (RoutePoint{Lat: -0.68, Lon: -24.72, Ele: 1200, HasEle: true}) {
		t.Errorf("first point %+v", g.Points[0])
	}
	n, err := g.Length()
	if err != nil || n < 55e3 || n > 65e3 {
		t.Errorf("demo route length %v m (%v), want about 60 km", n, err)
	}
	if !g.HasElevations() {
		t.Error("HasElevations false")
	}
}

func TestRouteSamplesInterpolateElevation(t *testing.T) {
	// Linear interpolation in distance between the vertices' elevations
	// (common practice, no source); distances along the equator are a·Δλ.
	r := &Route{Points: []RoutePoint{{Lat: 0, Lon: 0, Ele: 1000, HasEle: true}, {Lat: 0, Lon: 0.1, Ele: 2000, HasEle: true}, {Lat: 0, Lon: 0.2}}}
	s, err := r.Samples(2500)
	if err != nil {
		t.Fatal(err)
	}
	seg := geodesy.A * 0.1 * math.Pi / 180
	for _, p := range s {
		if p.Seg == 0 {
			want := 1000 + 1000*p.Dist/seg
			if !p.HasEle || math.Abs(p.Ele-want) > 1e-6 {
				t.Errorf("at %v m: ele %v (%v), want %v", p.Dist, p.Ele, p.HasEle, want)
			}
		} else if p.Seg == 1 && p.SegDist == 0 {
			if !p.HasEle || p.Ele != 2000 {
				t.Errorf("vertex 1: %+v", p)
			}
		} else if p.HasEle {
			t.Errorf("at %v m: elevation without both vertex elevations", p.Dist)
		}
	}
}

func TestParseGPXStructure(t *testing.T) {
	const head = `<?xml version="1.0"?>` + "\n" + `<gpx version="1.1" creator="test" xmlns="http://www.topografix.com/GPX/1/1" xmlns:x="urn:example:ext">` + "\n"
	// GPX 1.1 schema (topografix.com/GPX/1/1/gpx.xsd): trk > trkseg > trkpt
	// with lat/lon attributes and an optional ele child; segments of one
	// track are joined (the loader's documented choice).
	track := head + `<wpt lat="5" lon="5"/>
<trk><name>Two pieces</name>
 <trkseg><trkpt lat="1" lon="2"><ele>100</ele><extensions><x:ele>7</x:ele></extensions></trkpt><trkpt lat="1.1" lon="2.1"/></trkseg>
 <trkseg><trkpt lat="1.2" lon="2.2"><ele> 300.5 </ele></trkpt></trkseg>
</trk></gpx>`
	r, err := ParseGPX([]byte(track), "")
	if err != nil {
		t.Fatal(err)
	}
	want := []RoutePoint{{1, 2, 100, true}, {1.1, 2.1, 0, false}, {1.2, 2.2, 300.5, true}}
	if r.Name != "Two pieces" || len(r.Points) != 3 {
		t.Fatalf("route %+v", r)
	}
	for i := range want {
		if r.Points[i] != want[i] {
			t.Errorf("point %d = %+v, want %+v", i, r.Points[i], want[i])
		}
	}
	// GPX 1.0 (topografix.com/GPX/1/0) has the same rte/rtept structure.
	v10 := `<gpx version="1.0" xmlns="http://www.topografix.com/GPX/1/0"><rte><rtept lat="0" lon="0"/><rtept lat="0" lon="1"/></rte></gpx>`
	if r, err := ParseGPX([]byte(v10), ""); err != nil || len(r.Points) != 2 {
		t.Errorf("GPX 1.0: %v %v", r, err)
	}
	two := head + `<rte><name>North</name><rtept lat="0" lon="0"/><rtept lat="1" lon="0"/></rte>
<trk><name>East</name><trkseg><trkpt lat="0" lon="0"/><trkpt lat="0" lon="1"/></trkseg></trk></gpx>`
	if _, err := ParseGPX([]byte(two), ""); err == nil || !strings.Contains(err.Error(), `2 <rte> or <trk> elements ("North", "East"); choose one by name`) {
		t.Errorf("two routes: %v", err)
	}
	if r, err := ParseGPX([]byte(two), "east"); err != nil || r.Name != "East" || r.Points[1].Lon != 1 {
		t.Errorf("pick East: %+v %v", r, err)
	}
	if _, err := ParseGPX([]byte(two), "West"); err == nil || !strings.Contains(err.Error(), `no route named "West"`) {
		t.Errorf("pick West: %v", err)
	}
}

func TestParseGPXErrors(t *testing.T) {
	const head = `<?xml version="1.0"?>
<gpx version="1.1" xmlns="http://www.topografix.com/GPX/1/1">
<rte>
`
	cases := []struct {
		name, src string
		line      int // 0: no line expected
		want      string
	}{
		{"missing lon", head + `<rtept lat="1"/>` + "\n</rte></gpx>", 4, "needs both lat and lon"},
		{"bad lat", head + `<rtept lat="1" lon="2"/>` + "\n" + `<rtept lat="north" lon="2"/></rte></gpx>`, 5, `lat="north" is not a number`},
		{"lat range", head + `<rtept lat="91" lon="2"/></rte></gpx>`, 4, "lat=\"91\" out of range"},
		{"lon range", head + `<rtept lat="1" lon="-180.5"/></rte></gpx>`, 4, "out of range -180..180"},
		{"bad ele", head + `<rtept lat="1" lon="2"><ele>1200ft</ele></rtept></rte></gpx>`, 4, "<ele>1200ft</ele> is not a number of metres"},
		{"ele range", head + `<rtept lat="1" lon="2"/>` + "\n" + `<rtept lat="1" lon="3"><ele>99999</ele></rtept></rte></gpx>`, 5, "point 1: elevation 99999 m outside"},
		{"one point", head + `<rtept lat="1" lon="2"/></rte></gpx>`, 3, "route has 1 point(s)"},
		{"same point", head + `<rtept lat="1" lon="2"/><rtept lat="1" lon="2"/></rte></gpx>`, 3, "all points of the route are the same position"},
		// Karney (2013): Vincenty's inverse fails for this nearly antipodal pair (from memory).
		{"antipodal", head + `<rtept lat="0" lon="0"/>` + "\n" + `<rtept lat="0.5" lon="179.7"/></rte></gpx>`, 5, "nearly antipodal"},
		{"syntax", head + `<rtept lat="1" lon="2">` + "\n\n</rte></gpx>", 6, "invalid XML"},
		{"unclosed", head + `<rtept lat="1" lon="2"/>`, 4, "invalid XML"},
		{"root", `<kml><rte/></kml>`, 1, "root element is <kml>, not <gpx>"},
		{"foreign root", `<kml xmlns="http://www.opengis.net/kml/2.2"/>`, 1, "is not GPX"},
		{"waypoints only", `<gpx><wpt lat="1" lon="2"/><wpt lat="1" lon="3"/></gpx>`, 0, "only 2 <wpt> waypoints"},
		{"empty", ``, 0, "not GPX"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseGPX([]byte(c.src), "")
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("err = %v\nwant it to contain %q", err, c.want)
			}
			var le *lineError
			if c.line > 0 && (!errors.As(err, &le) || le.line != c.line) {
				t.Errorf("err = %v; want line %d", err, c.line)
			}
		})
	}
}

func TestLoadRouteErrorNamesFileAndLine(t *testing.T) {
	p := writeTemp(t, "r.gpx", "<gpx>\n<rte>\n<rtept lat=\"x\" lon=\"1\"/>\n</rte></gpx>\n")
	_, err := LoadRoute(p)
	var ue *UsageError
	if !errors.As(err, &ue) || ue.Where != p+":3" {
		t.Errorf("err = %v, want Where %s:3", err, p)
	}
	p = writeTemp(t, "r.txt", "hello")
	if _, err := LoadRoute(p); !errors.As(err, &ue) || !strings.Contains(err.Error(), "not a route file") {
		t.Errorf("text file: %v", err)
	}
}

func TestParseRouteGeoJSON(t *testing.T) {
	// RFC 7946 §3.1.4: a LineString has two or more positions; §3.1.1: the
	// optional third element is the elevation.
	// (tidwall/geojson refuses a 2-D first position followed by 3-D ones, so
	// the mixed case tested is 3-D first.)
	bare := `{"type":"LineString","coordinates":[[1,2,500],[3,4]]}`
	r, err := ParseRoute([]byte(bare), "")
	if err != nil {
		t.Fatal(err)
	}
	if r.Points[0] != (RoutePoint{Lat: 2, Lon: 1, Ele: 500, HasEle: true}) || r.Points[1] != (RoutePoint{Lat: 4, Lon: 3}) {
		t.Errorf("points %+v", r.Points)
	}
	fc := `{"type":"FeatureCollection","features":[
{"type":"Feature","properties":{"name":"Marker"},"geometry":{"type":"Point","coordinates":[0,0]}},
{"type":"Feature","properties":{"name":"A"},"geometry":{"type":"LineString","coordinates":[[0,0],[0,1]]}},
{"type":"Feature","properties":{"name":"B"},"geometry":{"type":"LineString","coordinates":[[0,0],[1,0]]}}]}`
	if _, err := ParseRoute([]byte(fc), ""); err == nil || !strings.Contains(err.Error(), `2 LineString features ("A", "B")`) {
		t.Errorf("two lines: %v", err)
	}
	if r, err := ParseRoute([]byte(fc), "b"); err != nil || r.Name != "B" || r.Points[1].Lon != 1 {
		t.Errorf("pick B: %+v %v", r, err)
	}
	bad := []struct{ src, want string }{
		{`{"type":"LineString","coordinates":[[1,2]]}`, "a LineString has at least 2"},
		{`{"type":"LineString","coordinates":[[1,2],[200,2]]}`, "position 1: longitude 200 out of range"},
		{`{"type":"LineString","coordinates":[[1,2],[3,4,"high"]]}`, "invalid coordinates"},
		{`{"type":"MultiLineString","coordinates":[[[1,2],[3,4]]]}`, "join its parts into one LineString"},
		{`{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,0]]]}`, "geometry Polygon not supported for a route"},
		{`{"type":"FeatureCollection","features":[]}`, "no route: the file holds no LineString features"},
	}
	for _, b := range bad {
		if _, err := ParseRoute([]byte(b.src), ""); err == nil || !strings.Contains(err.Error(), b.want) {
			t.Errorf("%s: err = %v, want %q", b.src, err, b.want)
		}
	}
}
