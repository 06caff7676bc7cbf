package reach

import (
	"context"
	"math"
	"math/rand"
	"runtime"
	"testing"

	"glidereach/terrain"
	"glidereach/wind"
)

// syntheticLocal turns terrain.Synthetic's n×n grid of 1 arc-second cells
// into a Local of 30 m cells (rows flipped to south-first; the few per cent
// of scale difference does not matter for a benchmark).
func syntheticLocal(n int) *terrain.Local {
	gr := terrain.Synthetic(1, n, n, 1.0/3600)
	const cell = 30.0
	half := float64(n-1) / 2 * cell
	l := &terrain.Local{Frame: terrain.NewFrame(terrain.SyntheticLat, terrain.SyntheticLon), X0: -half, Y0: -half, Cell: cell, Cols: n, Rows: n}
	l.Elev = make([]float32, n*n)
	for r := 0; r < n; r++ {
		copy(l.Elev[r*n:(r+1)*n], gr.Elev[(n-1-r)*n:(n-r)*n])
	}
	return l
}

// benchmarkRequired runs the backward solver on an n×n synthetic terrain
// with k fields spread over it, the generic trainer and a three-layer wind.
// It reports the time and the bytes allocated per cell.
func benchmarkRequired(b *testing.B, n, k int) {
	l := syntheticLocal(n)
	ac, err := Builtin("trainer")
	if err != nil {
		b.Fatal(err)
	}
	wp, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 240, Speed: 5}, {Alt: 1500, Dir: 270, Speed: 10}, {Alt: 3000, Dir: 290, Speed: 18}})
	if err != nil {
		b.Fatal(err)
	}
	tab, err := NewTable(ac, Atmosphere{}, wp, Conditions{}, -100, 6100)
	if err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewSource(5))
	var ts []Target
	side := int(math.Ceil(math.Sqrt(float64(k))))
	for i := 0; i < k; i++ {
		c := int((float64(i%side) + 0.2 + 0.6*rng.Float64()) / float64(side) * float64(n-1))
		r := int((float64(i/side) + 0.2 + 0.6*rng.Float64()) / float64(side) * float64(n-1))
		x, y := l.XY(c, r)
		lat, lon := l.Frame.Inverse(x, y)
		ts = append(ts, Target{Lat: lat, Lon: lon, Elev: l.At(c, r), Reserve: 300})
	}
	runtime.GC()
	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	b.ReportAllocs()
	b.ResetTimer()
	stop := cpuMeter(b, n*n)
	for i := 0; i < b.N; i++ {
		if _, err := Required(context.Background(), l, ts, tab, RequiredOptions{Clearance: 100, Ceiling: 6000}); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	stop()
	runtime.ReadMemStats(&m1)
	cells := float64(n * n)
	b.ReportMetric(float64(m1.TotalAlloc-m0.TotalAlloc)/float64(b.N)/cells, "B/cell")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/cells, "ns/cell")
}

// BenchmarkRequired5000 is the acceptance benchmark of the backward solver:
// 5000×5000 cells, 20 fields, layered wind (target ≤ 30 s on 2 cores and
// ≤ 48 B/cell).
func BenchmarkRequired5000(b *testing.B) { benchmarkRequired(b, 5000, 20) }

// BenchmarkRequired1000 is the same at 1000×1000 cells, for quick runs.
func BenchmarkRequired1000(b *testing.B) { benchmarkRequired(b, 1000, 20) }

// BenchmarkRequired2000 is the backward solver at 4 M cells with 20 fields
// (the bar: ≤ 5 s on 2 cores).
func BenchmarkRequired2000(b *testing.B) { benchmarkRequired(b, 2000, 20) }

// benchmarkCoverage is the coverage computation (per-field windowed runs at
// 1500 m MSL) on n×n cells with 20 fields on a 5 × 4 lattice, the generic
// trainer in a three-layer wind.
func benchmarkCoverage(b *testing.B, n int) {
	l := syntheticLocal(n)
	ac, err := Builtin("trainer")
	if err != nil {
		b.Fatal(err)
	}
	wp, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 240, Speed: 5}, {Alt: 1500, Dir: 270, Speed: 10}, {Alt: 3000, Dir: 290, Speed: 18}})
	if err != nil {
		b.Fatal(err)
	}
	tab, err := NewTable(ac, Atmosphere{}, wp, Conditions{}, -100, 2500)
	if err != nil {
		b.Fatal(err)
	}
	var ts []Target
	for i := 0; i < 20; i++ {
		c, r := n/20+(i%5)*n*22/100, n/20+(i/5)*n*22/100
		x, y := l.XY(c, r)
		lat, lon := l.Frame.Inverse(x, y)
		ts = append(ts, Target{Lat: lat, Lon: lon, Elev: l.At(c, r), Reserve: 300})
	}
	runtime.GC()
	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	b.ReportAllocs()
	b.ResetTimer()
	stop := cpuMeter(b, n*n)
	for i := 0; i < b.N; i++ {
		if _, err := Coverage(context.Background(), l, ts, tab, CoverageOptions{Alt: 1500, Clearance: 100}); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	stop()
	runtime.ReadMemStats(&m1)
	cells := float64(n * n)
	b.ReportMetric(float64(m1.TotalAlloc-m0.TotalAlloc)/float64(b.N)/cells, "B/cell")
}

// BenchmarkCoverage1000 and BenchmarkCoverage4000: 1 M and 16 M cells (the
// issue's bar for 16 M cells and 20 fields: ≤ 2 s on 2 cores).
func BenchmarkCoverage1000(b *testing.B) { benchmarkCoverage(b, 1000) }
func BenchmarkCoverage4000(b *testing.B) { benchmarkCoverage(b, 4000) }
