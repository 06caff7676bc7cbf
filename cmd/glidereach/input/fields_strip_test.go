package input

import (
	"math"
	"testing"
)

// A LineString strip: ends kept, midpoint as landing point, geodesic length
// (1 minute of latitude near the equator is 1842.9 m on WGS84 — Vincenty's
// inverse, checked in reach/geodesy against REFERENCES.md §5), directions
// and pattern side read.
func TestParseFieldsStrip(t *testing.T) {
	fs, err := ParseFields([]byte(`{"type":"FeatureCollection","features":[
	 {"type":"Feature","properties":{"name":"Strip","pattern_side":"Right","elevation_m":12},
	  "geometry":{"type":"LineString","coordinates":[[-24.5,-0.5],[-24.5,-0.48333333333]]}},
	 {"type":"Feature","properties":{"name":"Pad","landing_directions":[360,90.5]},
	  "geometry":{"type":"Point","coordinates":[-24.4,-0.4]}}]}`))
	if err != nil {
		t.Fatal(err)
	}
	s := fs[0]
	if len(s.Strip) != 2 || s.PatternSide != "right" || s.LandingDirs != nil {
		t.Errorf("strip %+v", s)
	}
	if math.Abs(s.Lat-(-0.4916666667)) > 1e-9 || math.Abs(s.Lon+24.5) > 1e-12 {
		t.Errorf("midpoint %v,%v", s.Lat, s.Lon)
	}
	if math.Abs(s.Length-1842.9) > 0.5 {
		t.Errorf("length %v m", s.Length)
	}
	p := fs[1]
	if len(p.LandingDirs) != 2 || p.LandingDirs[0] != 0 || p.LandingDirs[1] != 90.5 || p.PatternSide != "" {
		t.Errorf("pad %+v", p)
	}
}
