package reach

import (
	"math"
	"testing"

	"glidereach/reach/geodesy"
	"glidereach/terrain"
)

// The cells of a Local, summed with their ellipsoidal areas
// (terrain.CellAreas), cover the same surface as the window's outline
// traced in lon/lat: checked against geodesy.RingArea (Green's theorem on
// the WGS84 ellipsoid with Snyder's zone-area function, USGS Professional
// Paper 1395, eq. 3-12) of the outline densified to 1 km, so its
// straight lon/lat edges follow the window's edges to well under a metre.
func TestCellAreasMatchEllipsoid(t *testing.T) {
	for _, c := range []struct {
		lat, lon, half float64 // origin and half-width of the window, m
		cell           float64
	}{
		{0, -25, 50e3, 500},
		{47, 8, 200e3, 1000},
		{-62, 140, 350e3, 2000},
		{80, 10, 300e3, 2000},
	} {
		f := terrain.NewFrame(c.lat, c.lon)
		n := int(2 * c.half / c.cell)
		x0 := -c.half + c.cell/2
		l := terrain.NewFlat(f, x0, x0, c.cell, n, n, 0)
		areas := l.CellAreas()
		sum := 0.0
		for i := 0; i < n*n; i++ {
			sum += areas.At(i)
		}
		// Outline of the cells' union: x, y from −half to +half,
		// counter-clockwise, every 1 km.
		var ring [][2]float64
		k := int(2 * c.half / 1000)
		edge := func(x0, y0, x1, y1 float64) {
			for j := 0; j < k; j++ {
				s := float64(j) / float64(k)
				lat, lon := f.Inverse(x0+(x1-x0)*s, y0+(y1-y0)*s)
				ring = append(ring, [2]float64{lon, lat})
			}
		}
		h := c.half
		edge(-h, -h, h, -h)
		edge(h, -h, h, h)
		edge(h, h, -h, h)
		edge(-h, h, -h, -h)
		ring = append(ring, ring[0])
		want := geodesy.RingArea(ring)
		planar := float64(n*n) * c.cell * c.cell
		t.Logf("lat %.0f rel %.2g planar rel %.2g", c.lat, (sum-want)/want, (planar-want)/want)
		if math.Abs(sum-want) > 1e-5*want {
			t.Errorf("window %.0f km at %.0f°: cells sum to %.6g m², the ellipsoid gives %.6g (rel %.2g; planar %.6g)",
				2*h/1e3, c.lat, sum, want, (sum-want)/want, planar)
		}
		if sum < planar {
			t.Errorf("window at %.0f°: ellipsoidal %.6g below the planar %.6g", c.lat, sum, planar)
		}
	}
}
