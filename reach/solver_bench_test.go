package reach

import (
	"context"
	"math"
	"runtime"
	"testing"

	"glidereach/terrain"
	"glidereach/wind"
)

// hillyWindow returns an n×n Local with smooth seeded hills (sums of
// sinusoids; deterministic), for tests.
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

// benchSetup returns the synthetic demo landscape resampled to an n×n
// window of 1 arc-second cells (≈31 m) and a speed-to-fly table of the
// built-in sailplane in three wind layers.
func benchSetup(b *testing.B, n int) (*terrain.Local, *Table) {
	b.Helper()
	g := terrain.Synthetic(1, n+8, n+8, 1.0/3600)
	f := terrain.NewFrame(terrain.SyntheticLat, terrain.SyntheticLon)
	cell := 30.0
	half := float64(n-1) / 2 * cell
	l := terrain.Resample(g, f, -half, -half, cell, n, n)
	w, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 240, Speed: 5}, {Alt: 1500, Dir: 270, Speed: 10}, {Alt: 3000, Dir: 280, Speed: 18}})
	if err != nil {
		b.Fatal(err)
	}
	ac, err := Builtin("sailplane")
	if err != nil {
		b.Fatal(err)
	}
	tab, err := NewTable(ac, Atmosphere{}, w, Conditions{}, -300, 2600)
	if err != nil {
		b.Fatal(err)
	}
	return l, tab
}

func benchmarkFootprint(b *testing.B, n int) {
	l, tab := benchSetup(b, n)
	start := Start{Lat: terrain.SyntheticLat, Lon: terrain.SyntheticLon, Alt: 1800}
	runtime.GC()
	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	b.ReportAllocs()
	b.ResetTimer()
	stop := cpuMeter(b, n*n)
	reached := 0
	for i := 0; i < b.N; i++ {
		f, err := Footprint(context.Background(), l, start, tab, FootprintOptions{Reserve: 300, Clearance: 100, Levels: []float64{0, 150}})
		if err != nil {
			b.Fatal(err)
		}
		lv := f.Rings([]float64{300, 0, 150})
		if len(lv[0].Polygons) == 0 {
			b.Fatal("empty footprint")
		}
		reached = 0
		for _, a := range f.Arrival {
			if a == a {
				reached++
			}
		}
	}
	b.StopTimer()
	stop()
	runtime.ReadMemStats(&m1)
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n*n), "ns/cell")
	b.ReportMetric(float64(m1.TotalAlloc-m0.TotalAlloc)/float64(b.N)/float64(n*n), "B/cell")
	b.ReportMetric(float64(reached)/float64(n*n), "reached")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(max(reached, 1)), "ns/reached")
}

// BenchmarkFootprint: forward solver plus three contour levels on the
// synthetic landscape with layered wind; the bar is 2000×2000 in ≤ 1.5 s
// and ≤ 40 B/cell on one core.
func BenchmarkFootprint500(b *testing.B)  { benchmarkFootprint(b, 500) }
func BenchmarkFootprint2000(b *testing.B) { benchmarkFootprint(b, 2000) }

// BenchmarkFootprint6000 is the same at 36 M cells (about 1.5 GB; a
// benchmark only, never part of a plain go test), for the growth of the
// per-cell cost with the grid.
func BenchmarkFootprint6000(b *testing.B) { benchmarkFootprint(b, 6000) }

// BenchmarkSight: the exact line-of-sight walk (sightline.go) alone, from
// the centre of the 500 × 500 synthetic landscape to 720 cells on a circle
// of 200 cells (6 km), forward with a 100 m clearance: ns per walk, and per
// cell of line; "clear" is the fraction of lines that hold. High: from
// 1800 m MSL (every line clears: whole blocks passed at once); Low: from
// 1000 m (every line is blocked by the hills: the walk runs to the first
// obstruction). The walk starts, as the solver's do, at the pyramid's
// coarsest level of more than one block (groundPyramid.split); the High
// lines keep the clearance over the window's highest ground, which the
// solver decides without a walk (aboveAll), so High is the cost of a walk
// the solver no longer makes on such lines.
func BenchmarkSightHigh(b *testing.B) { benchmarkSight(b, 1800) }
func BenchmarkSightLow(b *testing.B)  { benchmarkSight(b, 1000) }

func benchmarkSight(b *testing.B, alt float64) {
	l, tab := benchSetup(b, 500)
	d, err := newDescentFor(tab, -300, alt+1)
	if err != nil {
		b.Fatal(err)
	}
	p := newPropagation(l, d, false, nil)
	p.clearance = 100
	const n, rad = 720, 200.0
	type target struct {
		c, r int
		v    float64
		fd   flightDir
	}
	ts := make([]target, n)
	for i := range ts {
		a := 2 * math.Pi * float64(i) / n
		c, r := 250+int(math.Round(rad*math.Sin(a))), 250+int(math.Round(rad*math.Cos(a)))
		v, fd := p.segmentDir(250, 250, alt, c, r)
		ts[i] = target{c, r, v, fd}
	}
	b.ReportAllocs()
	b.ResetTimer()
	clear := 0
	for i := 0; i < b.N; i++ {
		t := ts[i%n]
		if _, ok := p.sightDir(250, 250, alt, t.c, t.r, t.v, noTop, noTop, t.fd); ok {
			clear++
		}
	}
	b.StopTimer()
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/rad, "ns/cell")
	b.ReportMetric(float64(clear)/float64(b.N), "clear")
}
