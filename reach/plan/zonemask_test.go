package plan

import (
	"strings"
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

// edgeZone is polyZone with BoundaryClear: true when no edge's box meets
// the box and the box is clear of every polygon's bound or strictly inside
// it (the rule of input.Region, without its index).
type edgeZone struct {
	polyZone
	n *int // counts the boxes found clear
}

func (z edgeZone) BoundaryClear(minLat, minLon, maxLat, maxLon float64) bool {
	clear := z.clear(minLat, minLon, maxLat, maxLon)
	if clear && z.n != nil {
		*z.n++
	}
	return clear
}

func (z edgeZone) clear(minLat, minLon, maxLat, maxLon float64) bool {
	for _, p := range z.polyZone {
		b := p.Bound()
		out := maxLon < b.Min[0] || minLon > b.Max[0] || maxLat < b.Min[1] || minLat > b.Max[1]
		in := minLon > b.Min[0] && maxLon < b.Max[0] && minLat > b.Min[1] && maxLat < b.Max[1]
		if !out && !in {
			return false
		}
		for _, r := range p {
			for i := 0; i+1 < len(r); i++ {
				a, c := r[i], r[i+1]
				if max(a[0], c[0]) >= minLon && min(a[0], c[0]) <= maxLon && max(a[1], c[1]) >= minLat && min(a[1], c[1]) <= maxLat {
					return false
				}
			}
		}
	}
	return true
}

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
		{"square with a hole", 0.3, 5, 30, 500, polyZone{{
			{{4.95, 0.25}, {5.05, 0.25}, {5.05, 0.35}, {4.95, 0.35}, {4.95, 0.25}},
			{{4.99, 0.29}, {4.99, 0.31}, {5.01, 0.31}, {5.01, 0.29}, {4.99, 0.29}},
		}}},
		{"two polygons", 0.3, 5, 30, 500, append(tri(0.3, 4.97, 0.02), tri(0.31, 5.03, 0.025)...)},
	}
	for _, tc := range cases {
		f := terrain.NewFrame(tc.lat, tc.lon)
		half := float64(tc.n-1) / 2 * tc.cell
		l := terrain.NewFlat(f, -half, -half, tc.cell, tc.n, tc.n, 0)
		got, gotN := zoneMask(l, tc.z)
		clearBoxes := 0
		gotE, gotEN := zoneMask(l, edgeZone{tc.z, &clearBoxes})
		if strings.Contains(tc.name, "hole") && clearBoxes == 0 {
			t.Errorf("%s: no block found clear of the boundary; the shortcut is not tested", tc.name)
		}
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
		if gotEN != wantN {
			t.Errorf("%s, BoundaryClear: %d cells in the zone, want %d", tc.name, gotEN, wantN)
		}
		for i := range want {
			if got[i] != want[i] {
				t.Errorf("%s: cell %d,%d: %v, want %v", tc.name, i%l.Cols, i/l.Cols, got[i], want[i])
				break
			}
		}
		for i := range want {
			if gotE[i] != want[i] {
				t.Errorf("%s, BoundaryClear: cell %d,%d: %v, want %v", tc.name, i%l.Cols, i/l.Cols, gotE[i], want[i])
				break
			}
		}
		if tc.name != "off the window" && wantN == 0 {
			t.Errorf("%s: the zone holds no cell; the case tests nothing", tc.name)
		}
	}
}

// BenchmarkZoneMask: the mask of a 2001 × 2001 window around a zone a
// third of its side (a polygon without BoundaryClear; with it, most blocks
// take one test).
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
