package reach

import (
	"context"
	"math"
	"testing"
)

func TestFarthestVertexWithinOneCell(t *testing.T) {
	// The farthest point a reach run reports is the reserve ring's vertex
	// farthest from the start (issue 11, defect 5). The contour lies
	// between the last cell reached with the level and the next, so the
	// vertex is within one cell (√2 cells, a diagonal) of the farthest
	// cell reached with the reserve, and it lies within a cell of some such
	// cell (geometry of marching squares, common practice, no source).
	ac, _ := Builtin("trainer")
	w := uniformWind(t, 270, 15.4)
	tab, err := NewTable(ac, Atmosphere{}, w, Conditions{}, -300, 2000)
	if err != nil {
		t.Fatal(err)
	}
	const cell = 100.0
	g := flatWindow(10, 10, 401, cell, 0)
	f, err := Footprint(context.Background(), g, Start{Lat: 10, Lon: 10, Alt: 1500}, tab, FootprintOptions{Reserve: 300, Clearance: 100})
	if err != nil {
		t.Fatal(err)
	}
	lv := f.Rings([]float64{300})[0]
	p, dist, _, ok := lv.FarthestVertex(10, 10)
	if !ok {
		t.Fatal("no reserve ring")
	}
	cellDist, _ := f.Farthest(300)
	if math.Abs(dist-cellDist) > math.Sqrt2*cell {
		t.Errorf("farthest vertex %.1f m, farthest reached cell %.1f m (cell %v m)", dist, cellDist, cell)
	}
	x, y := g.Frame.Forward(p[1], p[0])
	near := math.Inf(1)
	for r := 0; r < g.Rows; r++ {
		for c := 0; c < g.Cols; c++ {
			if f.AGL(c, r) >= 300 {
				cx, cy := g.XY(c, r)
				near = math.Min(near, math.Hypot(cx-x, cy-y))
			}
		}
	}
	if near > math.Sqrt2*cell {
		t.Errorf("the farthest vertex is %.1f m from the nearest cell reached with the reserve", near)
	}
}
