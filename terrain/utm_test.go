package terrain

import (
	"math"
	"testing"
)

// The expected values in this table were printed by PROJ's cs2cs (Debian
// proj-bin, PROJ 9.1.1), run once with
//
//	cs2cs -f "%.4f" EPSG:4326 EPSG:<code>
//
// on the listed latitude/longitude pairs.
var cs2csForward = []struct {
	epsg     int
	lat, lon float64
	e, n     float64
}{
	{32633, 52.5, 15.0, 500000.0000, 5816652.0065},
	{32633, 52.5, 12.0, 296374.8298, 5820882.9787},
	{32633, 0.0, 18.0, 833978.5569, 0.0000},
	{32633, 60.0, 17.999, 667239.0817, 6655202.9542},
	{32633, 71.0, 13.5, 445500.1845, 7878071.3472},
	{32718, -33.9, -75.0, 500000.0000, 6248931.7339},
	{32718, -0.5, -72.1, 822823.9626, 9944663.6224},
	{32718, -54.0, -77.9, 309931.3719, 4012585.4601},
	{32718, -10.0, -78.0, 171071.2639, 8893091.1458},
	{25832, 48.1, 11.5, 686121.7558, 5330438.1301},
	{25832, 54.3, 6.2, 317806.5582, 6020517.1115},
	{32727, -0.5, -24.5, 110308.3261, 9944630.9971},
	// 6° from the central meridian, outside the zone: the series still holds.
	{32633, 45.0, 9.0, 27108.2087, 5000491.0055},
}

func TestUTMForwardMatchesCs2cs(t *testing.T) {
	for _, c := range cs2csForward {
		p, err := utmFor(c.epsg)
		if err != nil {
			t.Fatal(err)
		}
		e, n := p.Forward(c.lat, c.lon)
		// cs2cs printed 0.1 mm; our series is good to well below that.
		if math.Abs(e-c.e) > 1e-3 || math.Abs(n-c.n) > 1e-3 {
			t.Errorf("EPSG:%d (%v, %v): got %.4f %.4f, cs2cs %.4f %.4f", c.epsg, c.lat, c.lon, e, n, c.e, c.n)
		}
	}
}

func TestUTMInverseMatchesCs2cs(t *testing.T) {
	// Printed by cs2cs -f "%.9f" EPSG:32633 EPSG:4326 (PROJ 9.1.1).
	cases := []struct{ e, n, lat, lon float64 }{
		{500000, 0, 0.000000000, 15.000000000},
		{166021.4, 5000000, 45.074588553, 10.756999959},
		{833978.6, 7000000, 62.975385191, 21.596544963},
	}
	p := UTM(33, false)
	for _, c := range cases {
		lat, lon := p.Inverse(c.e, c.n)
		// 1e-8° is about 1 mm.
		if math.Abs(lat-c.lat) > 1e-8 || math.Abs(lon-c.lon) > 1e-8 {
			t.Errorf("(%v, %v): got %.9f %.9f, cs2cs %.9f %.9f", c.e, c.n, lat, lon, c.lat, c.lon)
		}
	}
	for _, c := range cs2csForward {
		p, _ := utmFor(c.epsg)
		lat, lon := p.Inverse(c.e, c.n)
		e, n := p.Forward(lat, lon)
		if math.Hypot(e-c.e, n-c.n) > 1e-3 {
			t.Errorf("round trip EPSG:%d %v %v: off by %.2g m", c.epsg, c.e, c.n, math.Hypot(e-c.e, n-c.n))
		}
	}
}

func TestTransverseMercatorEPSGWorkedExample(t *testing.T) {
	// Worked example of the transverse Mercator method in IOGP (EPSG)
	// Guidance Note 7-2, "Coordinate Conversions and Transformations
	// including Formulas": OSGB 1936 / British National Grid, Airy 1830
	// ellipsoid, origin 49°N 2°W, k0 = 0.9996012717, FE 400000, FN -100000;
	// 50°30'N 0°30'E gives E = 577274.99 m, N = 69740.50 m.
	p := NewTransverseMercator(6377563.396, 1/299.3249646, 49, -2, 0.9996012717, 400000, -100000)
	// The Guidance Note's own series (to n⁴ in the form it prints) agrees
	// with Krüger's to about a centimetre, so the tolerance is 1 cm.
	e, n := p.Forward(50.5, 0.5)
	if math.Abs(e-577274.99) > 0.01 || math.Abs(n-69740.50) > 0.01 {
		t.Errorf("forward: got %.3f %.3f, want 577274.99 69740.50", e, n)
	}
	// cs2cs (PROJ 9.1.1) printed 577274.9838 69740.4923 for the same
	// +proj=tmerc +ellps=airy +lat_0=49 +lon_0=-2 +k=0.9996012717
	// +x_0=400000 +y_0=-100000.
	if math.Abs(e-577274.9838) > 1e-3 || math.Abs(n-69740.4923) > 1e-3 {
		t.Errorf("forward: got %.4f %.4f, cs2cs 577274.9838 69740.4923", e, n)
	}
	lat, lon := p.Inverse(577274.99, 69740.50)
	if math.Abs(lat-50.5) > 1e-7 || math.Abs(lon-0.5) > 1e-7 {
		t.Errorf("inverse: got %.9f %.9f, want 50.5 0.5", lat, lon)
	}
}

func TestUTMZone(t *testing.T) {
	// EPSG code ranges for WGS84 / UTM and ETRS89 / UTM: common practice, no source.
	cases := []struct {
		epsg  int
		zone  int
		south bool
		ok    bool
	}{
		{32601, 1, false, true}, {32660, 60, false, true}, {32701, 1, true, true},
		{32760, 60, true, true}, {25832, 32, false, true}, {4326, 0, false, false},
		{32661, 0, false, false}, {3857, 0, false, false},
	}
	for _, c := range cases {
		z, s, ok := UTMZone(c.epsg)
		if z != c.zone || s != c.south || ok != c.ok {
			t.Errorf("UTMZone(%d) = %d %v %v", c.epsg, z, s, ok)
		}
	}
}

func BenchmarkUTMForward(b *testing.B) {
	p := UTM(33, false)
	for i := 0; b.Loop(); i++ {
		p.Forward(52+float64(i%100)*1e-3, 14+float64(i%77)*1e-3)
	}
}
