package input

import (
	"os"
	"testing"
)

// FuzzParseRoute: the format-sniffing route parser (GPX or GeoJSON) never
// panics and accepts only consistent routes.
func FuzzParseRoute(f *testing.F) {
	for _, p := range []string{demoRouteGPX, demoRouteGeoJSON} {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b, "")
		}
	}
	f.Add([]byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"name":"A"},"geometry":{"type":"LineString","coordinates":[[0,0,1],[0,1]]}},{"type":"Feature","properties":null,"geometry":{"type":"Point","coordinates":[0,0]}}]}`), "a")
	f.Fuzz(func(t *testing.T, data []byte, name string) {
		if len(data) > 1<<16 {
			return
		}
		r, err := ParseRoute(data, name)
		if err != nil {
			return
		}
		checkFuzzedRoute(t, r)
	})
}
