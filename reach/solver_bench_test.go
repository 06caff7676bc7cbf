package reach

import (
	"context"
	"math"
	"testing"

	"glidereach/terrain"
)

// hillyWindow returns an n×n Local with smooth seeded hills (sums of
// sinusoids; deterministic), for benchmarks and property tests.
func hillyWindow(n int, cell float64, seed int) *terrain.Local {
	l := flatWindow(-0.5, -24.5, n, cell, 0)
	l.Flat = false
	ph := float64(seed) * 0.7
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			x, y := float64(c)*cell, float64(r)*cell
			v := 200 + 150*math.Sin(x/3100+ph)*math.Cos(y/2300-ph) + 90*math.Sin((x+y)/1300+2*ph) + 40*math.Cos((x-2*y)/700)
			l.Elev[r*n+c] = float32(math.Max(v, 0))
		}
	}
	return l
}

func benchmarkFootprint(b *testing.B, n int) {
	g := hillyWindow(n, 30, 1)
	start := Start{Lat: -0.5, Lon: -24.5, Alt: 200 + 1800}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Footprint(context.Background(), g, start, ConstantLoss(30), FootprintOptions{Reserve: 300, Clearance: 100}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n*n), "ns/cell")
}

func BenchmarkFootprint500(b *testing.B)  { benchmarkFootprint(b, 500) }
func BenchmarkFootprint2000(b *testing.B) { benchmarkFootprint(b, 2000) }
