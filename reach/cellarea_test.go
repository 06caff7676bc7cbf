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

// ContourPolygons gives the area of its polygons on the ellipsoid, not in
// the tangent plane: for a block of cells 400 km from the frame's origin,
// the area it returns over the planar (shoelace) area of the same
// polygons mapped back into the plane is the ellipsoid-to-plane ratio of
// the cells there (terrain.CellAreas, checked above against
// geodesy.RingArea), 1.002 at that distance, not 1. (Its edges are straight
// in lon/lat while the plane's are straight in the plane; over these 10 km
// edges that differs by under 1e-4 of the area.)
func TestContourAreaOnEllipsoid(t *testing.T) {
	f := terrain.NewFrame(-62, 140)
	const n, cell = 880, 500.0
	l := terrain.NewFlat(f, 0, 0, cell, n, n, 0) // origin at cell (0, 0)
	in := func(c, r int) bool { return c >= 560 && c < 580 && r >= 560 && r < 580 }
	mp, area := ContourPolygons(l, func(c, r int) float64 {
		if in(c, r) {
			return 1
		}
		return 0
	}, 0.5)
	planar := 0.0
	for _, p := range mp {
		for _, ring := range p {
			for j := 1; j < len(ring); j++ {
				x0, y0 := f.Forward(ring[j-1][1], ring[j-1][0])
				x1, y1 := f.Forward(ring[j][1], ring[j][0])
				planar += (x0*y1 - x1*y0) / 2
			}
		}
	}
	ratio := l.CellAreas().At(570*n+570) / (cell * cell)
	if got := area / planar; math.Abs(got-ratio) > 1e-4 || ratio < 1.001 {
		t.Errorf("contour area %.7g m² over its planar %.7g = %.6f, want the cells' ratio %.6f", area, planar, got, ratio)
	}
}
