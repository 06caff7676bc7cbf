package terrain

import (
	"bytes"
	"math"
	"sync"
	"syscall"
	"testing"
	"time"
)

// The benchmark raster: 3601 × 3601 float32 cells (an SRTM1 tile's size) of
// an invented seeded surface, written by WriteGeoTIFF (256 × 256 deflate
// tiles, GDAL's TILED=YES COMPRESS=DEFLATE layout) into memory once.
var geotiffBench struct {
	once sync.Once
	data map[string][]byte
}

func geotiffBenchFile(b *testing.B, layout string) []byte {
	b.Helper()
	geotiffBench.once.Do(func() {
		const n = 3601
		g := &Grid{CRS: CRS{EPSG: 4326}, Cols: n, Rows: n, X0: -25, Y0: 1, DX: 1.0 / 3600, DY: 1.0 / 3600}
		g.Elev = make([]float32, n*n)
		seed := uint32(12345)
		for r := range n {
			for c := range n {
				seed = seed*1664525 + 1013904223 // LCG noise, Numerical Recipes constants
				v := 800 + 600*math.Sin(float64(c)/170)*math.Cos(float64(r)/130) + float64(seed>>24)/64
				g.Elev[r*n+c] = float32(v)
			}
		}
		geotiffBench.data = map[string][]byte{}
		for name, w := range map[string]GeoTIFFWriter{
			"tiled":       {},
			"tiled-pred3": {Predictor: true},
			"strips":      {Strips: true, RowsPerStrip: 1},
		} {
			var buf bytes.Buffer
			if err := w.Write(&buf, g); err != nil {
				panic(err)
			}
			geotiffBench.data[name] = buf.Bytes()
		}
	})
	return geotiffBench.data[layout]
}

func benchmarkGeoTIFF(b *testing.B, layout string, window int) {
	data := geotiffBenchFile(b, layout)
	r := bytes.NewReader(data)
	info, err := ReadGeoTIFFInfo(r, int64(len(data)))
	if err != nil {
		b.Fatal(err)
	}
	w, s, e, n := info.Extent()
	if window > 0 {
		// A window × window cell block from cell (1500, 1500), whose
		// centres enclose the window (so window cells, not window+1).
		w = info.X0 + 1500*info.DX
		n = info.Y0 - 1500*info.DY
		e = w + float64(window-1)*info.DX
		s = n - float64(window-1)*info.DY
	}
	if window == 0 {
		b.SetBytes(int64(len(data)))
	}
	b.ReportAllocs()
	cpu0 := geotiffCPUTime()
	b.ResetTimer()
	for b.Loop() {
		g, err := ReadGeoTIFFWindow(r, int64(len(data)), w, s, e, n)
		if err != nil {
			b.Fatal(err)
		}
		if window > 0 && (g.Cols != window || g.Rows != window) {
			b.Fatalf("window %d × %d", g.Cols, g.Rows)
		}
	}
	// Process CPU time per read: on a shared, loaded machine this is a
	// steadier figure than the wall-clock ns/op.
	b.ReportMetric(float64(geotiffCPUTime()-cpu0)/float64(time.Millisecond)/float64(b.N), "cpu-ms/op")
}

// geotiffCPUTime is the user+system CPU time of this process.
func geotiffCPUTime() time.Duration {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// Targets (issue 4): a 500 × 500 window ≤ 20 ms.
func BenchmarkReadGeoTIFFFull(b *testing.B)            { benchmarkGeoTIFF(b, "tiled", 0) }
func BenchmarkReadGeoTIFFWindow500(b *testing.B)       { benchmarkGeoTIFF(b, "tiled", 500) }
func BenchmarkReadGeoTIFFFullPred3(b *testing.B)       { benchmarkGeoTIFF(b, "tiled-pred3", 0) }
func BenchmarkReadGeoTIFFWindow500Pred3(b *testing.B)  { benchmarkGeoTIFF(b, "tiled-pred3", 500) }
func BenchmarkReadGeoTIFFFullStrips(b *testing.B)      { benchmarkGeoTIFF(b, "strips", 0) }
func BenchmarkReadGeoTIFFWindow500Strips(b *testing.B) { benchmarkGeoTIFF(b, "strips", 500) }
