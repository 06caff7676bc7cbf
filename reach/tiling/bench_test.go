package tiling

import (
	"context"
	"fmt"
	"os"
	"runtime"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"glidereach/internal/benchmeter"
	"glidereach/reach"
)

// benchScene is an n × n synthetic region (terrain.Synthetic, 1 arc-second
// cells, about 31 m) with k fields on a regular grid, the generic trainer in
// a three-layer wind, flown at alt m MSL.
func benchScene(b *testing.B, n, k int, alt float64) (*scene, *Plan) {
	sc := newScene(b, n)
	w, s, e, nn := sc.grid.Extent()
	sc.box = [4]float64{w, s, e, nn}
	sc.fields = nil
	side := 1
	for side*side < k {
		side++
	}
	for i := range k {
		fx := (float64(i%side) + 0.5) / float64(side)
		fy := (float64(i/side) + 0.5) / float64(side)
		lon, lat := w+fx*(e-w), s+fy*(nn-s)
		el, _ := sc.grid.Elevation(lat, lon)
		sc.fields = append(sc.fields, reach.Target{Name: fmt.Sprint(i), Lat: lat, Lon: lon, Elev: el, Reserve: 250})
	}
	return sc, sc.plan(b, 0, alt)
}

// peakHeap samples the heap in use every 20 ms until stop is called, and
// returns the largest value seen (bytes) beyond base.
func peakHeap() (stop func() uint64) {
	var peak atomic.Uint64
	done := make(chan struct{})
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		var m runtime.MemStats
		for {
			runtime.ReadMemStats(&m)
			if m.HeapInuse > peak.Load() {
				peak.Store(m.HeapInuse)
			}
			select {
			case <-done:
				return
			case <-time.After(20 * time.Millisecond):
			}
		}
	}()
	return func() uint64 { close(done); wg.Wait(); return peak.Load() }
}

// BenchmarkRunField is one field job, the unit of work of a worker: its
// window's solver cells per second and the memory it holds (the peak heap
// of one worker beyond the scene, "heap-MB/worker").
func BenchmarkRunField(b *testing.B) {
	for _, alt := range []float64{1200, 1800} {
		b.Run(fmt.Sprintf("alt%.0f", alt), func(b *testing.B) {
			sc := newScene(b, 2000)
			sc.fields = sc.fields[:1]
			p := sc.plan(b, 0, alt)
			jobs, _, err := p.FieldJobs()
			if err != nil || len(jobs) != 1 {
				b.Fatal(err, len(jobs))
			}
			win := float64(2*jobs[0].Half+1) * float64(2*jobs[0].Half+1)
			runtime.GC()
			var m0 runtime.MemStats
			runtime.ReadMemStats(&m0)
			stop := peakHeap()
			b.ReportAllocs()
			c0 := benchmeter.CPUTime()
			b.ResetTimer()
			for range b.N {
				if _, err := RunField(context.Background(), sc.src, p, jobs[0]); err != nil {
					b.Fatal(err)
				}
			}
			b.StopTimer()
			peak := stop()
			b.ReportMetric((benchmeter.CPUTime()-c0).Seconds()/float64(b.N), "cpu-s/op")
			b.ReportMetric(win, "window-cells")
			b.ReportMetric(win*float64(b.N)/b.Elapsed().Seconds(), "cells/s")
			b.ReportMetric(float64(peak-min(peak, m0.HeapInuse))/1e6, "heap-MB/worker")
		})
	}
}

// BenchmarkTiled is a whole tiled run on all cores (Run with a work
// directory): by lattice size and number of fields, it reports lattice
// cells × fields per second and the peak heap beyond the scene.
func BenchmarkTiled(b *testing.B) {
	for _, c := range []struct{ n, k int }{{1000, 4}, {1000, 16}, {2000, 16}, {2000, 64}} {
		b.Run(fmt.Sprintf("cells%dk_fields%d", c.n*c.n/1000, c.k), func(b *testing.B) {
			sc, p := benchScene(b, c.n, c.k, 1200)
			runtime.GC()
			var m0 runtime.MemStats
			runtime.ReadMemStats(&m0)
			stop := peakHeap()
			c0 := benchmeter.CPUTime()
			b.ResetTimer()
			for range b.N {
				if _, err := Run(context.Background(), sc.src, p, RunOptions{WorkDir: b.TempDir()}); err != nil {
					b.Fatal(err)
				}
			}
			b.StopTimer()
			peak := stop()
			cells := float64(p.Lattice.Cols * p.Lattice.Rows)
			b.ReportMetric((benchmeter.CPUTime()-c0).Seconds()/float64(b.N), "cpu-s/op")
			b.ReportMetric(cells*float64(c.k)*float64(b.N)/b.Elapsed().Seconds(), "cell-fields/s")
			b.ReportMetric(float64(peak-min(peak, m0.HeapInuse))/1e6, "heap-MB")
		})
	}
}

// BenchmarkTiledLarge is the documented national-scale point: a synthetic
// region of 10⁴ × 10⁴ = 10⁸ cells of 1 arc-second with 200 fields, the
// trainer at 1500 m. It needs about 2 GB of memory and 1 GB of work files
// and runs for minutes, so it runs only with GLIDEREACH_LARGE=1.
func BenchmarkTiledLarge(b *testing.B) {
	if os.Getenv("GLIDEREACH_LARGE") == "" {
		b.Skip("set GLIDEREACH_LARGE=1 to run the 10⁸-cell benchmark")
	}
	t0 := time.Now()
	sc, p := benchScene(b, 10000, 200, 1500)
	b.Logf("scene built in %v: lattice %d × %d", time.Since(t0), p.Lattice.Cols, p.Lattice.Rows)
	jobs, _, err := p.FieldJobs()
	if err != nil {
		b.Fatal(err)
	}
	win := 0.0
	for _, j := range jobs {
		win += float64(2*j.Half+1) * float64(2*j.Half+1)
	}
	runtime.GC()
	var m0 runtime.MemStats
	runtime.ReadMemStats(&m0)
	stop := peakHeap()
	c0 := benchmeter.CPUTime()
	b.ResetTimer()
	for range b.N {
		dir := b.TempDir()
		if _, err := Run(context.Background(), sc.src, p, RunOptions{WorkDir: dir}); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	peak := stop()
	cells := float64(p.Lattice.Cols) * float64(p.Lattice.Rows)
	b.ReportMetric((benchmeter.CPUTime()-c0).Seconds()/float64(b.N), "cpu-s/op")
	b.ReportMetric(cells, "lattice-cells")
	b.ReportMetric(float64(len(jobs)), "field-jobs")
	b.ReportMetric(win/float64(len(jobs)), "window-cells/job")
	b.ReportMetric(cells*200*float64(b.N)/b.Elapsed().Seconds(), "cell-fields/s")
	b.ReportMetric(win*float64(b.N)/b.Elapsed().Seconds(), "window-cells/s")
	b.ReportMetric(float64(peak-min(peak, m0.HeapInuse))/1e6, "heap-MB")
}
