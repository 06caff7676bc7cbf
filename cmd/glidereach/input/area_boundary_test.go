package input

import (
	"math/rand"
	"testing"

	"github.com/paulmach/orb"
)

// TestRegionBoundaryClear: wherever BoundaryClear says a box holds none of
// the area's boundary, Contains gives one answer at 400 points of the box
// (its corners and edges among them); it says so for boxes well inside and
// well outside, and never for a box across an edge (common practice, no
// source: the claim checked against the test it stands for).
func TestRegionBoundaryClear(t *testing.T) {
	// A concave polygon with a hole, and a second polygon apart.
	a := NewRegion(orb.MultiPolygon{
		{
			{{10, 0}, {11, 0}, {11, 1}, {10.5, 0.4}, {10, 1}, {10, 0}},
			{{10.2, 0.1}, {10.2, 0.2}, {10.3, 0.2}, {10.3, 0.1}, {10.2, 0.1}},
		},
		{{{12, 0}, {12.5, 0}, {12.5, 0.5}, {12, 0}}},
	})
	rng := rand.New(rand.NewSource(3))
	saidClear, inside := 0, 0
	for n := 0; n < 20000; n++ {
		lat0, lon0 := rng.Float64()*1.4-0.2, 9.8+rng.Float64()*3
		d := rng.Float64() * 0.08
		minLat, minLon, maxLat, maxLon := lat0, lon0, lat0+d, lon0+d*1.3
		if !a.BoundaryClear(minLat, minLon, maxLat, maxLon) {
			continue
		}
		saidClear++
		first := a.Contains(minLat, minLon)
		if first {
			inside++
		}
		for i := 0; i < 20; i++ {
			for j := 0; j < 20; j++ {
				lat := minLat + (maxLat-minLat)*float64(i)/19
				lon := minLon + (maxLon-minLon)*float64(j)/19
				if a.Contains(lat, lon) != first {
					t.Fatalf("box %.4f..%.4f N %.4f..%.4f E said clear, but Contains differs at %.5f,%.5f", minLat, maxLat, minLon, maxLon, lat, lon)
				}
			}
		}
	}
	if saidClear < 1000 || inside < 100 {
		t.Errorf("%d boxes said clear, %d of them inside: too few to test the claim", saidClear, inside)
	}
	// A box across an edge of the hole is never clear.
	if a.BoundaryClear(0.15, 10.25, 0.25, 10.35) {
		t.Error("a box across the hole's edge said clear")
	}
	// A box strictly inside a plain box area, and one across its edge.
	b := NewRegion(orb.MultiPolygon{{{{0, 0}, {1, 0}, {1, 1}, {0, 1}, {0, 0}}}})
	if !b.BoundaryClear(0.4, 0.4, 0.5, 0.5) || b.BoundaryClear(0.9, 0.9, 1.1, 1.1) {
		t.Error("box area: inside box not clear, or box across its corner clear")
	}
}
