package demo

import (
	"testing"
)

// Every place of the scenario lies on the invented landscape, inside its
// edges by a margin (common practice, no source: a start point at the DEM's
// edge would make every figure a terrain-edge case).
func TestScenarioOnTheLandscape(t *testing.T) {
	g := Landscape(Seed)
	w, s, e, n := g.Extent()
	const margin = 0.02 // degrees, about 2.2 km
	type pt struct {
		what     string
		lat, lon float64
	}
	var pts []pt
	names := map[string]bool{}
	for _, f := range Fields() {
		if names[f.Name] {
			t.Errorf("field name %q twice", f.Name)
		}
		names[f.Name] = true
		pts = append(pts, pt{"field " + f.Name, f.Lat, f.Lon})
		for _, r := range f.Polygon {
			for _, p := range r {
				pts = append(pts, pt{"outline of " + f.Name, p[1], p[0]})
			}
		}
	}
	for _, fp := range Footprints() {
		pts = append(pts, pt{"footprint " + fp.Name, fp.Lat, fp.Lon})
	}
	fr := Final()
	if !names[fr.Field] {
		t.Errorf("final glide to %q, not a field", fr.Field)
	}
	pts = append(pts, pt{"final start", fr.Lat, fr.Lon}, pt{"final turn", fr.TurnLat, fr.TurnLon})
	fl := Failure()
	pts = append(pts, pt{"failure", fl.Lat, fl.Lon})
	for i, p := range Route().Points {
		pts = append(pts, pt{"route point " + string(rune('1'+i)), p.Lat, p.Lon})
	}
	cv := Coverage()
	for _, c := range cv.Candidates {
		pts = append(pts, pt{"candidate " + c.Name, c.Lat, c.Lon})
	}
	for _, p := range cv.Area.Bound().ToRing() {
		pts = append(pts, pt{"area corner", p[1], p[0]})
	}
	for _, p := range pts {
		if p.lat < s+margin || p.lat > n-margin || p.lon < w+margin || p.lon > e-margin {
			t.Errorf("%s at %v, %v is not inside the landscape %v..%v N, %v..%v E by %v°", p.what, p.lat, p.lon, s, n, w, e, margin)
		}
	}
	if _, err := WindProfile(); err != nil {
		t.Error(err)
	}
	if cv.Pick < 1 || cv.Pick > len(cv.Candidates) {
		t.Errorf("pick %d of %d candidates", cv.Pick, len(cv.Candidates))
	}
	// The area's hole is a no-landing zone: a point in it is outside.
	z := Zone(cv.Area)
	if z.Contains(-0.47, -24.47) || !z.Contains(-0.6, -24.6) {
		t.Error("zone: the hole is inside or the area outside")
	}
}

// Each call gives new values: a caller changing them changes nobody
// else's scenario.
func TestScenarioCopies(t *testing.T) {
	f := Fields()
	f[0].Name = "changed"
	f[2].Polygon[0][0][0] = 0
	if g := Fields(); g[0].Name == "changed" || g[2].Polygon[0][0][0] == 0 {
		t.Error("Fields shares its values between calls")
	}
	r := Route()
	r.Points[0].Lat = 0
	if Route().Points[0].Lat == 0 {
		t.Error("Route shares its points")
	}
	wl := Wind()
	wl[0].Speed = 0
	if Wind()[0].Speed == 0 {
		t.Error("Wind shares its layers")
	}
	if Terrain() != Terrain() {
		t.Error("Terrain is built again on every call")
	}
}
