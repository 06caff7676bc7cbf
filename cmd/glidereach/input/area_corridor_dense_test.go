package input

import (
	"math"
	"testing"
	"time"
)

// denseRoute is a recorded-track-like route: n points along a gentle curve
// some 80 km long at 45° S.
func denseRoute(n int) *Route {
	r := &Route{Points: make([]RoutePoint, n)}
	for i := range r.Points {
		t := float64(i) / float64(n-1)
		r.Points[i] = RoutePoint{Lat: -45 + 0.5*t + 0.05*math.Sin(6*t), Lon: 170 + 0.6*t}
	}
	return r
}

// A dense route is simplified before the corridor is built (10⁵ points took
// 33 s in coverage): the zone never takes in a point farther than the half
// width from the original route (brute force over every original piece),
// and takes in every point within the half width less twice the tolerance.
func TestCorridorDenseRoute(t *testing.T) {
	r := denseRoute(20000)
	c, err := NewCorridor(r, 6000)
	if err != nil {
		t.Fatal(err)
	}
	if len(c.pieces) > 500 {
		t.Errorf("%d pieces from 20000 points; simplification did not work", len(c.pieces))
	}
	orig := make([]piece, len(r.Points)-1)
	for i := range orig {
		a, b := r.Points[i], r.Points[i+1]
		orig[i] = newPiece(a.Lat, a.Lon, b.Lat, b.Lon)
	}
	brute := func(lat, lon float64) float64 {
		best := math.Inf(1)
		for i := range orig {
			best = math.Min(best, pieceDistance(&orig[i], lat, lon))
		}
		return best
	}
	n := 0
	for lat := -45.05; lat <= -44.45; lat += 0.021 {
		for lon := 169.95; lon <= 170.65; lon += 0.023 {
			d := brute(lat, lon)
			in := c.Contains(lat, lon)
			switch {
			case in && d > c.half:
				t.Errorf("%.4f,%.4f in the corridor but %.1f m from the route (half width %.0f)", lat, lon, d, c.half)
			case !in && d <= c.half-2*corridorTolerance:
				t.Errorf("%.4f,%.4f left out but %.1f m from the route", lat, lon, d)
			}
			if in {
				n++
			}
		}
	}
	if n == 0 {
		t.Fatal("no sample inside the corridor")
	}
	// 10⁵ points: building and 10⁵ tests stay well within a second or two
	// (a generous bound for a shared machine).
	start := time.Now()
	big, err := NewCorridor(denseRoute(100000), 10000)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 100000; i++ {
		big.Contains(-45+0.5*float64(i%317)/317, 170+0.6*float64(i%331)/331)
	}
	if d := time.Since(start); d > 10*time.Second {
		t.Errorf("10⁵-point corridor took %v", d)
	}
}
