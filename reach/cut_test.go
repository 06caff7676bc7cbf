package reach

import (
	"math"
	"math/rand/v2"
	"testing"

	"glidereach/wind"
)

// The displacement bound never exceeds the height a glide of the table
// loses: for random tracks, lengths and altitudes in calm air and in a
// strong layered wind, for one segment and for two-leg paths (the bound of
// a sum of displacements is at most the sum of the legs' losses: a zigzag
// through tailwind legs cannot beat it).
func TestDisplacementBoundIsBelowEveryGlide(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 9))
	for _, layers := range [][]wind.Layer{
		{{Alt: 0, Dir: 0, Speed: 0}},
		{{Alt: 0, Dir: 240, Speed: 8}, {Alt: 1500, Dir: 270, Speed: 16}, {Alt: 3000, Dir: 300, Speed: 24}},
	} {
		w, err := wind.NewProfile(layers)
		if err != nil {
			t.Fatal(err)
		}
		for _, name := range []string{"trainer", "sailplane"} {
			ac, err := Builtin(name)
			if err != nil {
				t.Fatal(err)
			}
			tab, err := NewTable(ac, Atmosphere{}, w, Conditions{}, -200, 5000)
			if err != nil {
				t.Fatal(err)
			}
			d, err := newDescentFor(tab, 0, 4500)
			if err != nil {
				t.Fatal(err)
			}
			b := newDisplacementBound(d)
			loss := func(h, dx, dy float64) float64 { // departing at h toward (dx, dy)
				return d.departVec(h, dx, dy, math.Hypot(dx, dy)) - h
			}
			for k := 0; k < 3000; k++ {
				h := 50 + 2500*rng.Float64()
				a1, a2 := 2*math.Pi*rng.Float64(), 2*math.Pi*rng.Float64()
				l1, l2 := 10+8000*rng.Float64(), 10+8000*rng.Float64()
				x1, y1 := l1*math.Sin(a1), l1*math.Cos(a1)
				x2, y2 := l2*math.Sin(a2), l2*math.Cos(a2)
				one := loss(h, x1, y1)
				if bb := b.height(x1, y1); !(bb <= one+1e-9) && !math.IsInf(one, 1) {
					t.Fatalf("%s %v: bound %.3f m above the segment's loss %.3f m (track %.2f°, %.0f m, from %.0f m)", name, layers, bb, one, a1*180/math.Pi, l1, h)
				}
				// Two legs: the first ends lower, the second starts there
				// (departure heights are the heights needed at the start).
				h2 := h
				l2loss := loss(h2, x2, y2)
				total := l2loss + loss(h2+l2loss, x1, y1)
				if bb := b.height(x1+x2, y1+y2); !(bb <= total+1e-9) && !math.IsInf(total, 1) {
					t.Fatalf("%s: bound %.3f m above a two-leg path's %.3f m", name, bb, total)
				}
			}
		}
	}
}

func TestConvexHullSquare(t *testing.T) {
	// The hull of a square's corners and points inside it is the corners,
	// counter-clockwise (geometry, common practice, no source).
	pts := [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}, {0.5, 0.5}, {0.2, 0.7}, {1, 0.5}}
	h := convexHull(pts)
	if len(h) != 4 {
		t.Fatalf("hull %v, want the 4 corners", h)
	}
	area := 0.0
	for i := range h {
		a, b := h[i], h[(i+1)%len(h)]
		area += a[0]*b[1] - a[1]*b[0]
	}
	if math.Abs(area/2-1) > 1e-12 {
		t.Errorf("hull area %v, want +1 (counter-clockwise)", area/2)
	}
}
