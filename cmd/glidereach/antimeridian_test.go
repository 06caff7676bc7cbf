package main

import (
	"encoding/json"
	"math"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

func lonLatArea(g orb.Geometry) float64 {
	a := 0.0
	switch g := g.(type) {
	case orb.Polygon:
		for i, r := range g {
			s := math.Abs(ringArea2(r)) / 2
			if i > 0 {
				s = -s
			}
			a += s
		}
	case orb.MultiPolygon:
		for _, p := range g {
			a += lonLatArea(p)
		}
	}
	return a
}

// A polygon across 180° E is cut into a part on each side, each within
// [-180, 180] (RFC 7946 §3.1.9), with the area in lon/lat kept; a hole
// on one side stays in that side's part; a line is cut at the meridian.
func TestSplitAntimeridian(t *testing.T) {
	sq := orb.Polygon{
		{{179, 0}, {181, 0}, {181, 1}, {179, 1}, {179, 0}},
		{{180.2, 0.2}, {180.2, 0.4}, {180.4, 0.4}, {180.4, 0.2}, {180.2, 0.2}},
	}
	fc := geojson.NewFeatureCollection()
	fc.Append(geojson.NewFeature(sq))
	fc.Append(geojson.NewFeature(orb.LineString{{179.5, 0}, {180.5, 1}}))
	fc.Append(geojson.NewFeature(orb.Point{180.097, 0}))
	inside := orb.Polygon{{{10, 0}, {11, 0}, {11, 1}, {10, 0}}}
	fc.Append(geojson.NewFeature(inside))
	splitAntimeridian(fc)
	mp, ok := fc.Features[0].Geometry.(orb.MultiPolygon)
	if !ok || len(mp) != 2 {
		t.Fatalf("polygon → %#v, want two parts", fc.Features[0].Geometry)
	}
	for _, p := range mp {
		b := p.Bound()
		if b.Min[0] < -180 || b.Max[0] > 180 {
			t.Errorf("part %v outside [-180, 180]", b)
		}
	}
	// 2 × 1 degrees minus the 0.2 × 0.2 hole.
	if a := lonLatArea(mp); math.Abs(a-(2-0.04)) > 1e-9 {
		t.Errorf("area %v, want 1.96", a)
	}
	if len(mp[0]) != 1 || len(mp[1]) != 2 {
		t.Errorf("the hole is not in the eastern part: %d, %d rings", len(mp[0]), len(mp[1]))
	}
	ml, ok := fc.Features[1].Geometry.(orb.MultiLineString)
	if !ok || len(ml) != 2 || ml[0][1] != (orb.Point{180, 0.5}) || ml[1][0] != (orb.Point{-180, 0.5}) || ml[1][1] != (orb.Point{-179.5, 1}) {
		t.Errorf("line → %v", fc.Features[1].Geometry)
	}
	if p := fc.Features[2].Geometry.(orb.Point); p != (orb.Point{-179.903, 0}) {
		t.Errorf("point → %v", p)
	}
	if g := fc.Features[3].Geometry; !orb.Equal(g, inside) {
		t.Errorf("a polygon inside [-180, 180] changed: %v", g)
	}
}

// reach from 180° E writes longitudes within [-180, 180] only (rings went
// to 180.097), and from 88° N none beyond ±180 (they reached ±766° from
// 89.9° N, which is now refused: the window holds the pole).
func TestReachGeoJSONLongitudesValid(t *testing.T) {
	for _, from := range []string{"0,180", "10,-180", "88,45", "-88.5,-170"} {
		code, out, _ := runCLI(t, "reach", "--from", from, "--alt", "1500m", "--format", "geojson")
		if code != 0 {
			t.Fatalf("%s: exit %d", from, code)
		}
		var fc geojson.FeatureCollection
		if err := json.Unmarshal([]byte(out), &fc); err != nil {
			t.Fatal(err)
		}
		for _, f := range fc.Features {
			b := f.Geometry.Bound()
			if b.Min[0] < -180 || b.Max[0] > 180 || b.Min[1] < -90 || b.Max[1] > 90 {
				t.Errorf("from %s: %s geometry spans %v", from, f.Geometry.GeoJSONType(), b)
			}
		}
	}
	if code, _, _ := runCLI(t, "reach", "--from", "89.9,0", "--alt", "1500m"); code != 2 {
		t.Errorf("from 89.9° N: exit %d, want 2 (polar cap refused)", code)
	}
}
