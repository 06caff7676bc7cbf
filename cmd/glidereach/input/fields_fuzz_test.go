package input

import (
	"os"
	"strings"
	"testing"
)

// FuzzLoadFields fuzzes the byte-level parser behind LoadFields: it never
// panics, and what it accepts is consistent (names present and unique,
// positions in range, polygons closed).
func FuzzLoadFields(f *testing.F) {
	for _, p := range []string{demoFields, demoArea, demoRouteGeoJSON} {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	f.Add([]byte(`{"type":"Feature","properties":{"name":"A","elevation_m":1,"length_m":2,"surface":"s"},"geometry":{"type":"Point","coordinates":[1,2,3]}}`))
	f.Add([]byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"name":"P"},"geometry":{"type":"Polygon","coordinates":[[[0,0],[0,4],[4,4],[4,0],[0,0]],[[1,1],[2,1],[2,2],[1,2],[1,1]]]}}]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > 1<<16 {
			return
		}
		fields, err := ParseFields(data)
		if err != nil {
			return
		}
		seen := map[string]bool{}
		for _, fl := range fields {
			key := strings.ToLower(fl.Name)
			if fl.Name == "" || seen[key] {
				t.Fatalf("bad or duplicate name %q accepted", fl.Name)
			}
			seen[key] = true
			if !(fl.Lat >= -90 && fl.Lat <= 90 && fl.Lon >= -180 && fl.Lon <= 180) {
				t.Fatalf("position %v, %v out of range", fl.Lat, fl.Lon)
			}
			for _, r := range fl.Polygon {
				if len(r) < 4 || r[0] != r[len(r)-1] {
					t.Fatalf("open ring accepted: %v", r)
				}
			}
			if fl.Polygon != nil && !polygonContains(fl.Polygon, fl.Lon, fl.Lat) {
				t.Fatalf("landing point outside its polygon")
			}
		}
	})
}
