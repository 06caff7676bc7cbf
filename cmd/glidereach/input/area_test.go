package input

import (
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

func writeTemp(t testing.TB, name, content string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

const demoArea = "../../../testdata/areas/demo-area.geojson"

func TestParseBox(t *testing.T) {
	// --box is LAT,LON,LAT,LON, two opposite corners, latitude first like
	// --from; any pair of opposite corners gives the same box.
	for _, in := range []string{" -0.8, -24.8 ,-0.2,-24.2", "-0.2,-24.2,-0.8,-24.8", "-0.2,-24.8,-0.8,-24.2"} {
		a, err := ParseBox(in)
		if err != nil {
			t.Fatal(err)
		}
		if b := a.Bounds(); b.Min != (orb.Point{-24.8, -0.8}) || b.Max != (orb.Point{-24.2, -0.2}) {
			t.Errorf("%q: bounds %v", in, b)
		}
		for _, c := range []struct {
			lat, lon float64
			in       bool
		}{{-0.5, -24.5, true}, {-0.8, -24.8, true}, {-0.1, -24.5, false}, {-0.5, -24.1, false}, {math.NaN(), -24.5, false}} {
			if got := a.Contains(c.lat, c.lon); got != c.in {
				t.Errorf("%q: Contains(%v, %v) = %v", in, c.lat, c.lon, got)
			}
		}
		if ringArea(a.Polygons[0][0]) <= 0 {
			t.Error("box ring is not counter-clockwise (RFC 7946 §3.1.6)")
		}
	}
}

func TestParseBoxErrors(t *testing.T) {
	cases := []struct{ in, want string }{
		{"-0.8,-24.8,-0.2", "want four numbers LAT,LON,LAT,LON"},
		{"1,2,3,4e", `part 4 "4e" is not a number`},
		{"-0.8,-24.8,-0.8,-24.2", "share a latitude or a longitude"},
		// The old lon-first order: a longitude beyond ±90 read as a latitude.
		{"-124.8,-0.8,-124.2,-0.2", "latitude -124.8 out of range -90..90 (order is LAT,LON,LAT,LON: latitude first)"},
		{"0,-190,1,1", "longitude -190 out of range"},
		{"10,170,20,-170", "a box across the antimeridian (180°) cannot be typed"},
	}
	for _, c := range cases {
		_, err := ParseBox(c.in)
		var ue *UsageError
		if !errors.As(err, &ue) || ue.Where != "--box" || !strings.Contains(err.Error(), c.want) {
			t.Errorf("ParseBox(%q) = %v; want --box: …%s", c.in, err, c.want)
		}
	}
}

func TestParseAreaErrors(t *testing.T) {
	cases := []struct{ in, where, want string }{
		// A typed box in --area fails loudly and points to --box, with the
		// old minlon,minlat,maxlon,maxlat order turned round.
		{"-24.85,-0.8,-24.15,-0.15", "--area", "--area takes a GeoJSON file only; type a box as --box LAT,LON,LAT,LON"},
		{"-24.85,-0.8,-24.15,-0.15", "--area", "e.g. --box -0.8,-24.85,-0.15,-24.15 if you meant the old"},
		{"-0.8,-24.85,-0.15,-24.15", "--area", "is a typed box"},
		{"-24.8,-0.8,-24.2", "--area", "is not a readable GeoJSON file"},
	}
	for _, c := range cases {
		_, err := ParseArea(c.in)
		var ue *UsageError
		if !errors.As(err, &ue) || ue.Where != c.where || !strings.Contains(err.Error(), c.want) {
			t.Errorf("ParseArea(%q) = %v; want %s: …%s", c.in, err, c.where, c.want)
		}
	}
	p := writeTemp(t, "a.geojson", `{"type":"Point","coordinates":[1,2]}`)
	_, err := ParseArea(p)
	var ue *UsageError
	if !errors.As(err, &ue) || ue.Where != p || !strings.Contains(err.Error(), "geometry Point not supported for an area") {
		t.Errorf("point area: %v", err)
	}
}

func TestParseAreaDemoFile(t *testing.T) {
	a, err := ParseArea(demoArea)
	if err != nil {
		t.Fatal(err)
	}
	if a.Source != demoArea || len(a.Polygons) != 1 || len(a.Polygons[0]) != 2 {
		t.Fatalf("area %+v", a)
	}
	// The points below are inside, inside the hole, and outside the
	// invented area (see testdata/areas/ORIGIN.md for its vertices).
	for _, c := range []struct {
		lat, lon float64
		in       bool
	}{
		{-0.6, -24.6, true},
		{-0.47, -24.47, false}, // in the hole
		{-0.3, -24.2, false},   // outside the slanted east edge
		{-0.5, -24.18, true},   // inside near the east vertex
		{-0.9, -24.5, false},
	} {
		if got := a.Contains(c.lat, c.lon); got != c.in {
			t.Errorf("Contains(%v, %v) = %v, want %v", c.lat, c.lon, got, c.in)
		}
	}
}

func TestParseAreaMultiPolygon(t *testing.T) {
	src := `{"type":"MultiPolygon","coordinates":[[[[0,0],[1,0],[1,1],[0,1],[0,0]]],[[[2,0],[3,0],[3,1],[2,1],[2,0]]]]}`
	a, err := ParseAreaGeoJSON([]byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if !a.Contains(0.5, 0.5) || !a.Contains(0.5, 2.5) || a.Contains(0.5, 1.5) {
		t.Error("MultiPolygon membership wrong")
	}
}

// starPolygon is a random star-shaped ring of n vertices around (0, 0), with
// a hole, for index checks.
func starPolygon(r *rand.Rand, n int) orb.Polygon {
	ring := make(orb.Ring, 0, n+1)
	for i := 0; i < n; i++ {
		th := 2 * math.Pi * float64(i) / float64(n)
		rad := 0.5 + r.Float64()
		ring = append(ring, orb.Point{rad * math.Cos(th), rad * math.Sin(th)})
	}
	ring = append(ring, ring[0])
	hole := orb.Ring{{-0.2, -0.2}, {-0.2, 0.2}, {0.2, 0.2}, {0.2, -0.2}, {-0.2, -0.2}}
	return orb.Polygon{ring, hole}
}

// TestRegionIndexMatchesBruteForce: the banded index gives the same answer
// as the plain even-odd test over all edges (W. R. Franklin's PNPOLY, the
// rule RFC 7946 polygons follow), on random points.
func TestRegionIndexMatchesBruteForce(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{3, 17, 500, 20000} {
		p := starPolygon(r, n)
		a := NewRegion(orb.MultiPolygon{p})
		for i := 0; i < 20000; i++ {
			x, y := r.Float64()*3.2-1.6, r.Float64()*3.2-1.6
			if got, want := a.Contains(y, x), polygonContains(p, x, y); got != want {
				t.Fatalf("n=%d (%v,%v): index %v, brute force %v", n, x, y, got, want)
			}
		}
	}
}

// wobblyPolygon is a smooth closed outline of n vertices (a circle with a
// sevenfold wobble), the kind of ring a planner draws or a contour gives.
func wobblyPolygon(n int) orb.Polygon {
	ring := make(orb.Ring, 0, n+1)
	for i := 0; i < n; i++ {
		th := 2 * math.Pi * float64(i) / float64(n)
		rad := 1 + 0.3*math.Sin(7*th)
		ring = append(ring, orb.Point{rad * math.Cos(th), rad * math.Sin(th)})
	}
	return orb.Polygon{append(ring, ring[0])}
}

func benchmarkRegionContains(b *testing.B, p orb.Polygon) {
	r := rand.New(rand.NewPCG(5, 6))
	a := NewRegion(orb.MultiPolygon{p})
	pts := make([][2]float64, 4096)
	for i := range pts {
		pts[i] = [2]float64{r.Float64()*3.2 - 1.6, r.Float64()*3.2 - 1.6}
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; b.Loop(); i++ {
		p := pts[i&4095]
		a.Contains(p[1], p[0])
	}
}

func BenchmarkRegionContains100(b *testing.B)   { benchmarkRegionContains(b, wobblyPolygon(100)) }
func BenchmarkRegionContains10000(b *testing.B) { benchmarkRegionContains(b, wobblyPolygon(10000)) }

// BenchmarkRegionContainsSpiky10000 is the worst case for the band index:
// a random star whose edges each span a large part of the height.
func BenchmarkRegionContainsSpiky10000(b *testing.B) {
	benchmarkRegionContains(b, starPolygon(rand.New(rand.NewPCG(1, 1)), 10000))
}
