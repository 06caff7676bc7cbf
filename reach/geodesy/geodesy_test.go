package geodesy

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

func dms(d, m, s float64) float64 {
	if d < 0 {
		return d - m/60 - s/3600
	}
	return d + m/60 + s/3600
}

func TestInverseReference(t *testing.T) {
	cases := []struct {
		name        string
		p1, p2      LatLon
		s, az1, az2 float64
		tolS        float64 // m
		tolAz       float64 // degrees
	}{
		// Vincenty (1975), Survey Review 23(176); the Flinders Peak -
		// Buninyong worked example as published by Geoscience Australia
		// (attribution from memory; values from several independent test
		// files, see REFERENCES.md section 5): s = 54972.271 m,
		// α12 = 306°52′05.37″, α21 = 127°10′25.07″ (final bearing α21+180°).
		{"Flinders Peak-Buninyong",
			LatLon{dms(-37, 57, 3.72030), dms(144, 25, 29.52440)},
			LatLon{dms(-37, 39, 10.15610), dms(143, 55, 35.38390)},
			54972.271, dms(306, 52, 5.37), dms(127, 10, 25.07) + 180, 0.001, 0.01 / 3600},
		// Public geodesy test file (REFERENCES.md section 5), WGS84:
		// Land's End to John o' Groats, s = 969954.166 m, initial 9.1419°,
		// final 11.2972°.
		{"Land's End-John o' Groats",
			LatLon{50.06632, -5.71475}, LatLon{58.64402, -3.07009},
			969954.166, 9.1419, 11.2972, 0.001, 0.00005},
		// Public geodesy test file (REFERENCES.md section 5): nearly
		// antipodal but convergent, (0,0) to (0.5,179.5), s = 19936288.579 m.
		// Bearings not published there; -1 skips them.
		{"near-antipodal convergent",
			LatLon{0, 0}, LatLon{0.5, 179.5},
			19936288.579, -1, -1, 0.001, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, az1, az2, err := Inverse(c.p1, c.p2)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(s-c.s) > c.tolS {
				t.Errorf("s12 = %.4f m, want %.3f ± %g", s, c.s, c.tolS)
			}
			if c.az1 >= 0 && math.Abs(az1-c.az1) > c.tolAz {
				t.Errorf("az1 = %.7f°, want %.7f ± %g", az1, c.az1, c.tolAz)
			}
			if c.az2 >= 0 && math.Abs(az2-c.az2) > c.tolAz {
				t.Errorf("az2 = %.7f°, want %.7f ± %g", az2, c.az2, c.tolAz)
			}
		})
	}
}

func TestInverseSpecialCases(t *testing.T) {
	// Coincident points: zero distance (common practice, no source).
	if s, _, _, err := Inverse(LatLon{10, 20}, LatLon{10, 20}); err != nil || s != 0 {
		t.Errorf("coincident: s=%v err=%v", s, err)
	}
	// Along the equator one degree of longitude is a·π/180 = 111319.4908 m
	// (the equator is a circle of radius a; WGS84 a from NIMA TR8350.2).
	s, az1, az2, err := Inverse(LatLon{0, 0}, LatLon{0, 1})
	if err != nil || math.Abs(s-A*math.Pi/180) > 1e-6 || az1 != 90 || az2 != 90 {
		t.Errorf("equator: s=%v az1=%v az2=%v err=%v", s, az1, az2, err)
	}
	// Quarter meridian, equator to pole: 10001965.729 m for WGS84
	// (value from memory; it is the classic WGS84 quarter meridian).
	s, az1, _, err = Inverse(LatLon{0, 0}, LatLon{90, 0})
	if err != nil || math.Abs(s-10001965.729) > 0.001 || az1 != 0 {
		t.Errorf("quarter meridian: s=%.4f az1=%v err=%v", s, az1, err)
	}
	// Across the antimeridian the short way (common practice, no source):
	// 179.5°E to 179.5°W on the equator is one degree, not 359.
	s, az1, _, err = Inverse(LatLon{0, 179.5}, LatLon{0, -179.5})
	if err != nil || math.Abs(s-A*math.Pi/180) > 1e-6 || az1 != 90 {
		t.Errorf("antimeridian: s=%v az1=%v err=%v", s, az1, err)
	}
}

func TestInverseFailsGracefully(t *testing.T) {
	// Karney (2013), "Algorithms for geodesics", section 1: Vincenty's
	// inverse fails to converge for (0°, 0°) to (0.5°, 179.7°) (from memory).
	_, _, _, err := Inverse(LatLon{0, 0}, LatLon{0.5, 179.7})
	if !errors.Is(err, ErrNoConvergence) {
		t.Errorf("(0,0)-(0.5,179.7): err = %v, want ErrNoConvergence", err)
	}
	// Exactly antipodal points on the equator (common practice, no source:
	// the geodesic is not unique and Vincenty's iteration does not settle).
	_, _, _, err = Inverse(LatLon{0, 0}, LatLon{0, 180})
	if err == nil {
		t.Log("exact antipode converged (acceptable)")
	}
	for _, p := range []LatLon{{91, 0}, {math.NaN(), 0}, {0, math.Inf(1)}} {
		if _, _, _, err := Inverse(p, LatLon{0, 0}); !errors.Is(err, ErrInvalid) {
			t.Errorf("Inverse(%v): err = %v, want ErrInvalid", p, err)
		}
		if _, _, err := Direct(p, 0, 1000); !errors.Is(err, ErrInvalid) {
			t.Errorf("Direct(%v): err = %v, want ErrInvalid", p, err)
		}
	}
}

func TestDirectReference(t *testing.T) {
	// Vincenty (1975) / Geoscience Australia worked example, direct form
	// (REFERENCES.md section 5): from Flinders Peak at 306°52′05.37″ for
	// 54972.271 m one reaches Buninyong, -37°39′10.15610″, 143°55′35.38390″.
	p1 := LatLon{dms(-37, 57, 3.72030), dms(144, 25, 29.52440)}
	p2, az2, err := Direct(p1, dms(306, 52, 5.37), 54972.271)
	if err != nil {
		t.Fatal(err)
	}
	wantLat, wantLon := dms(-37, 39, 10.15610), dms(143, 55, 35.38390)
	// 1e-6° of latitude is about 0.11 m; the published azimuth has 0.01″.
	if math.Abs(p2.Lat-wantLat) > 1e-6 || math.Abs(p2.Lon-wantLon) > 1e-6 {
		t.Errorf("Direct = %.8f, %.8f, want %.8f, %.8f", p2.Lat, p2.Lon, wantLat, wantLon)
	}
	if want := dms(127, 10, 25.07) + 180; math.Abs(az2-want) > 0.02/3600 {
		t.Errorf("az2 = %.7f, want %.7f", az2, want)
	}
}

// TestDirectInverseRoundTrip checks that Direct undoes Inverse on random
// pairs away from the antipodal region (self-consistency, common practice,
// no source).
func TestDirectInverseRoundTrip(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for i := 0; i < 2000; i++ {
		p1 := LatLon{r.Float64()*178 - 89, r.Float64()*360 - 180}
		p2 := LatLon{r.Float64()*178 - 89, r.Float64()*360 - 180}
		s, az1, az2, err := Inverse(p1, p2)
		if err != nil {
			if errors.Is(err, ErrNoConvergence) {
				continue
			}
			t.Fatal(err)
		}
		q, qaz, err := Direct(p1, az1, s)
		if err != nil {
			t.Fatal(err)
		}
		s2, _, _, err := Inverse(q, p2)
		if err != nil || s2 > 1e-4 {
			t.Errorf("%v -> %v: round trip misses by %v m (err %v)", p1, p2, s2, err)
		}
		d := math.Abs(qaz - az2)
		if d > 180 {
			d = 360 - d
		}
		if s > 1 && d > 1e-7 && math.Abs(p2.Lat) < 89 {
			t.Errorf("%v -> %v: final bearing %v vs %v", p1, p2, qaz, az2)
		}
	}
}

func BenchmarkInverse(b *testing.B) {
	p1, p2 := LatLon{-0.5, -24.8}, LatLon{-0.3, -24.2}
	for b.Loop() {
		Inverse(p1, p2)
	}
}
