package input

import (
	"os"
	"testing"
)

// FuzzParseGPX: ParseGPX never panics; an accepted route has at least two
// points, all in range, with finite plausible elevations.
func FuzzParseGPX(f *testing.F) {
	if b, err := os.ReadFile(demoRouteGPX); err == nil {
		f.Add(b, "")
	}
	f.Add([]byte(`<gpx><trk><name>T</name><trkseg><trkpt lat="1" lon="2"><ele>3</ele></trkpt></trkseg><trkseg><trkpt lat="1" lon="3"/></trkseg></trk></gpx>`), "t")
	f.Add([]byte(`<gpx xmlns="http://www.topografix.com/GPX/1/1" xmlns:x="urn:x"><rte><rtept lat="0" lon="0"><extensions><x:a/></extensions></rtept><rtept lat="0" lon="1"/></rte><rte><name>b</name></rte></gpx>`), "b")
	f.Add([]byte(`<gpx><trkseg><trkpt lat="1" lon="2"/></trkseg><rte><trk></trk></rte></gpx>`), "")
	f.Fuzz(func(t *testing.T, data []byte, name string) {
		if len(data) > 1<<16 {
			return
		}
		r, err := ParseGPX(data, name)
		if err != nil {
			return
		}
		checkFuzzedRoute(t, r)
	})
}

func checkFuzzedRoute(t *testing.T, r *Route) {
	t.Helper()
	if len(r.Points) < 2 {
		t.Fatalf("route of %d points accepted", len(r.Points))
	}
	for _, p := range r.Points {
		if !(p.Lat >= -90 && p.Lat <= 90 && p.Lon >= -180 && p.Lon <= 180) {
			t.Fatalf("point %+v out of range", p)
		}
		if p.HasEle && !(p.Ele >= minRouteEle && p.Ele <= maxRouteEle) {
			t.Fatalf("elevation %v accepted", p.Ele)
		}
	}
	if _, err := r.Length(); err != nil {
		t.Fatalf("accepted route has no length: %v", err)
	}
}
