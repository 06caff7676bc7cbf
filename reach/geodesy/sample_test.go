package geodesy

import (
	"errors"
	"math"
	"testing"
)

func TestSample(t *testing.T) {
	// Three vertices along the equator, 1° and 0.5° apart; along the equator
	// distance is a·Δλ (WGS84 a from NIMA TR8350.2).
	deg1 := A * math.Pi / 180
	line := []LatLon{{0, 0}, {0, 1}, {0, 1}, {0, 1.5}}
	step := 25000.0
	got, err := Sample(line, step)
	if err != nil {
		t.Fatal(err)
	}
	total := 1.5 * deg1
	// multiples 0..6 of 25 km below 166979 m (7 points) plus the vertices at
	// 111319 m and at the end: 9 samples; the duplicate vertex gives none.
	if len(got) != 9 {
		t.Fatalf("got %d samples, want 9: %+v", len(got), got)
	}
	if got[0].Dist != 0 || got[len(got)-1].Dist != total && math.Abs(got[len(got)-1].Dist-total) > 1e-6 {
		t.Errorf("ends %v, %v; want 0, %v", got[0].Dist, got[len(got)-1].Dist, total)
	}
	for i, s := range got {
		if i > 0 && !(s.Dist > got[i-1].Dist) {
			t.Errorf("sample %d not after %d: %v <= %v", i, i-1, s.Dist, got[i-1].Dist)
		}
		if math.Abs(s.Lat) > 1e-12 || math.Abs(s.Lon-s.Dist/deg1) > 1e-9 || s.Bearing != 90 {
			t.Errorf("sample %d = %+v, want on the equator at lon %v heading 90", i, s, s.Dist/deg1)
		}
	}
	if got[5].Dist != 111319.49079327357 && math.Abs(got[5].Dist-deg1) > 1e-6 || got[5].Seg != 2 && got[5].Seg != 1 {
		t.Errorf("vertex sample = %+v", got[5])
	}
	if last := got[len(got)-1]; last.Seg != 3 {
		t.Errorf("last sample Seg = %d, want 3", last.Seg)
	}
}

func TestSampleAlongGeodesic(t *testing.T) {
	// The Flinders Peak - Buninyong line (Vincenty 1975 example): every
	// sample must lie on the geodesic, i.e. its distances to both ends add
	// up to the whole (triangle equality on a geodesic; common practice).
	p1 := LatLon{-37.951033417, 144.424867889}
	p2 := LatLon{-37.652821139, 143.926495528}
	got, err := Sample([]LatLon{p1, p2}, 1000)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 56 {
		t.Errorf("len = %d, want 56 (0..54 km and the end)", len(got))
	}
	for _, s := range got {
		a, _, _, _ := Inverse(p1, LatLon{s.Lat, s.Lon})
		b, _, _, _ := Inverse(LatLon{s.Lat, s.Lon}, p2)
		if math.Abs(a-s.Dist) > 1e-6 || math.Abs(a+b-got[len(got)-1].Dist) > 1e-6 {
			t.Errorf("sample at %v: %v + %v", s.Dist, a, b)
		}
	}
}

func TestSampleErrors(t *testing.T) {
	if _, err := Sample(nil, 100); !errors.Is(err, ErrInvalid) {
		t.Errorf("empty: %v", err)
	}
	for _, step := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		if _, err := Sample([]LatLon{{0, 0}, {0, 1}}, step); !errors.Is(err, ErrInvalid) {
			t.Errorf("step %v: %v", step, err)
		}
	}
	if _, err := Sample([]LatLon{{0, 0}, {0.5, 179.7}}, 1000); !errors.Is(err, ErrNoConvergence) {
		t.Errorf("antipodal segment: %v", err)
	}
	if _, err := Sample([]LatLon{{0, 0}, {0, 10}}, 0.01); !errors.Is(err, ErrInvalid) {
		t.Errorf("too many samples: %v", err)
	}
	got, err := Sample([]LatLon{{1, 2}}, 10)
	if err != nil || len(got) != 1 {
		t.Errorf("one point: %v %v", got, err)
	}
}

func BenchmarkSample60km(b *testing.B) {
	line := []LatLon{{-0.7, -24.8}, {-0.5, -24.5}, {-0.3, -24.3}}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Sample(line, 250); err != nil {
			b.Fatal(err)
		}
	}
}
