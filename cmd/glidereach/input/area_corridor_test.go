package input

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"glidereach/reach/geodesy"
)

// geodesicDistance is the distance (m) from q to the route, minimised over
// each geodesic segment by golden-section search on geodesy.Inverse to a
// point moved along it by geodesy.Direct (Vincenty 1975; the reference the
// corridor's plane approximation is checked against).
func geodesicDistance(t *testing.T, r *Route, q geodesy.LatLon) float64 {
	best := math.Inf(1)
	line := r.Line()
	for i := 0; i+1 < len(line); i++ {
		s, az, _, err := geodesy.Inverse(line[i], line[i+1])
		if err != nil {
			t.Fatal(err)
		}
		f := func(d float64) float64 {
			p, _, err := geodesy.Direct(line[i], az, d)
			if err != nil {
				t.Fatal(err)
			}
			v, _, _, err := geodesy.Inverse(q, p)
			if err != nil {
				t.Fatal(err)
			}
			return v
		}
		lo, hi := 0.0, s
		g := (math.Sqrt(5) - 1) / 2
		for k := 0; k < 80; k++ {
			a, b := hi-g*(hi-lo), lo+g*(hi-lo)
			if f(a) < f(b) {
				hi = b
			} else {
				lo = a
			}
		}
		best = math.Min(best, math.Min(f((lo+hi)/2), math.Min(f(0), f(s))))
	}
	return best
}

func TestCorridorAgainstGeodesic(t *testing.T) {
	cases := []struct {
		name  string
		route *Route
		width float64
	}{
		{"demo route, 10 km", mustRoute(t, demoRouteGPX), 10e3},
		// A long route at high latitude, where a single flat frame would
		// be visibly wrong (invented positions).
		{"60N, 40 km", &Route{Points: []RoutePoint{{Lat: 60, Lon: 10}, {Lat: 61.5, Lon: 14}, {Lat: 60.2, Lon: 17}}}, 40e3},
	}
	r := rand.New(rand.NewPCG(7, 8))
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			co, err := NewCorridor(c.route, c.width)
			if err != nil {
				t.Fatal(err)
			}
			b := co.Bounds()
			half := c.width / 2
			checked := 0
			for i := 0; i < 300; i++ {
				lat := b.Min[1] + r.Float64()*(b.Max[1]-b.Min[1])
				lon := b.Min[0] + r.Float64()*(b.Max[0]-b.Min[0])
				want := geodesicDistance(t, c.route, geodesy.LatLon{Lat: lat, Lon: lon})
				got := co.Distance(lat, lon)
				if want <= half {
					// Within the corridor the distance must match to 5e-5 relative + 0.2 m
					// (the 2 km pieces are chords of the geodesic: a few cm of sagitta).
					if math.Abs(got-want) > 5e-5*want+0.2 {
						t.Errorf("(%v,%v): distance %v, geodesic %v", lat, lon, got, want)
					}
					checked++
				}
				// Membership agrees except within 0.1 % of the edge.
				if math.Abs(want-half) > 1e-3*half && co.Contains(lat, lon) != (want <= half) {
					t.Errorf("(%v,%v): Contains %v, geodesic distance %v (half-width %v)", lat, lon, !(want <= half), want, half)
				}
			}
			if checked < 30 {
				t.Errorf("only %d of 300 random points fell inside; test too weak", checked)
			}
		})
	}
}

func mustRoute(t *testing.T, path string) *Route {
	t.Helper()
	r, err := LoadRoute(path)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestParseCorridor(t *testing.T) {
	c, err := ParseCorridor(demoRouteGPX + ",4km")
	if err != nil {
		t.Fatal(err)
	}
	if c.Width != 4000 || c.Route.Name != "Demo ferry line" {
		t.Errorf("corridor %v %q", c.Width, c.Route.Name)
	}
	// The route's start is inside, a point 3 km north of it is not (1' of
	// latitude is about 1843 m at the equator; common practice, from memory).
	if !c.Contains(-0.68, -24.72) || c.Contains(-0.68+3000.0/110574, -24.72-0.001) {
		t.Error("membership near the start wrong")
	}
	var zone Zone = c
	_ = zone
	for _, bad := range []struct{ spec, want string }{
		{demoRouteGPX, "want ROUTE,WIDTH"},
		{demoRouteGPX + ",", "want ROUTE,WIDTH"},
		{demoRouteGPX + ",wide", "not a length"},
		{demoRouteGPX + ",0m", "want more than 0"},
		{demoRouteGPX + ",500km", "at most 200000 m"},
		{"nope.gpx,5km", "nope.gpx"},
	} {
		_, err := ParseCorridor(bad.spec)
		var ue *UsageError
		if !errors.As(err, &ue) || !strings.Contains(err.Error(), bad.want) {
			t.Errorf("ParseCorridor(%q) = %v, want …%s", bad.spec, err, bad.want)
		}
	}
	if _, err := NewCorridor(&Route{Points: []RoutePoint{{Lat: 0, Lon: 179.9}, {Lat: 0, Lon: -179.9}}}, 1000); err == nil {
		t.Error("antimeridian corridor accepted")
	}
}

func BenchmarkCorridorContains(b *testing.B) {
	r, err := LoadRoute(demoRouteGPX)
	if err != nil {
		b.Fatal(err)
	}
	c, err := NewCorridor(r, 10e3)
	if err != nil {
		b.Fatal(err)
	}
	bd := c.Bounds()
	rng := rand.New(rand.NewPCG(9, 10))
	pts := make([][2]float64, 4096)
	for i := range pts {
		pts[i] = [2]float64{bd.Min[1] + rng.Float64()*(bd.Max[1]-bd.Min[1]), bd.Min[0] + rng.Float64()*(bd.Max[0]-bd.Min[0])}
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; b.Loop(); i++ {
		p := pts[i&4095]
		c.Contains(p[0], p[1])
	}
}
