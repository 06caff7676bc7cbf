package plan

import (
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"glidereach/terrain"
)

// polyZone is a Zone of lon/lat polygons (planar test, as the demo's).
type polyZone orb.MultiPolygon

func (z polyZone) Contains(lat, lon float64) bool {
	return planar.MultiPolygonContains(orb.MultiPolygon(z), orb.Point{lon, lat})
}
func (z polyZone) Bounds() orb.Bound { return orb.MultiPolygon(z).Bound() }

// TestZoneMaskMatchesEveryCell: the block-wise mask is the mask of testing
// every cell centre, on windows at the equator, at 60° N, beside the
// antimeridian and near a pole, with a triangle, a thin sliver across block
// edges and a zone off the window (common practice, no source: the
// shortcut checked against the plain loop).
func TestZoneMaskMatchesEveryCell(t *testing.T) {
	tri := func(lat, lon, d float64) polyZone {
		return polyZone{{{{lon - d, lat - d}, {lon + d, lat - d*0.3}, {lon + d*0.2, lat + d}, {lon - d, lat - d}}}}
	}
	sliver := func(lat, lon, d float64) polyZone {
		return polyZone{{{{lon - d, lat}, {lon + d, lat + 1e-4}, {lon + d, lat + 6e-4}, {lon - d, lat}}}}
	}
	cases := []struct {
		name     string
		lat, lon float64
		cell     float64
		n        int
		z        polyZone
	}{
		{"equator triangle", 0.5, 10, 30, 400, tri(0.5, 10, 0.03)},
		{"equator sliver", 0.5, 10, 30, 400, sliver(0.5, 10, 0.04)},
		{"60N triangle", 60, -20, 90, 300, tri(60.05, -20.1, 0.08)},
		{"antimeridian", -10, 179.9, 100, 400, tri(-10, 179.95, 0.1)},
		{"near pole", 88.9, 40, 200, 300, tri(89.1, 40, 0.5)},
		{"off the window", 10, 10, 30, 200, tri(30, 30, 0.1)},
		{"ragged edge", 0, 0, 50, 333, tri(0, 0.02, 0.05)},
	}
	for _, tc := range cases {
		f := terrain.NewFrame(tc.lat, tc.lon)
		half := float64(tc.n-1) / 2 * tc.cell
		l := terrain.NewFlat(f, -half, -half, tc.cell, tc.n, tc.n, 0)
		got, gotN := zoneMask(l, tc.z)
		want, wantN := make([]bool, l.Cols*l.Rows), 0
		for r := 0; r < l.Rows; r++ {
			for c := 0; c < l.Cols; c++ {
				x, y := l.XY(c, r)
				lat, lon := l.Frame.Inverse(x, y)
				if tc.z.Contains(lat, lon) {
					want[r*l.Cols+c] = true
					wantN++
				}
			}
		}
		if gotN != wantN {
			t.Errorf("%s: %d cells in the zone, want %d", tc.name, gotN, wantN)
		}
		for i := range want {
			if got[i] != want[i] {
				t.Errorf("%s: cell %d,%d: %v, want %v", tc.name, i%l.Cols, i/l.Cols, got[i], want[i])
				break
			}
		}
		if tc.name != "off the window" && wantN == 0 {
			t.Errorf("%s: the zone holds no cell; the case tests nothing", tc.name)
		}
	}
}

// BenchmarkZoneMask: the mask of a 2001 × 2001 window around a zone a
// third of its side.
func BenchmarkZoneMask(b *testing.B) {
	f := terrain.NewFrame(-0.5, -24.5)
	n, cell := 2001, 30.0
	half := float64(n-1) / 2 * cell
	l := terrain.NewFlat(f, -half, -half, cell, n, n, 0)
	d := half / 3 / 111320
	z := polyZone{{{{-24.5 - d, -0.5 - d}, {-24.5 + d, -0.5 - d}, {-24.5 + d, -0.5 + d}, {-24.5 - d, -0.5 + d}, {-24.5 - d, -0.5 - d}}}}
	b.ReportAllocs()
	for b.Loop() {
		zoneMask(l, z)
	}
}
