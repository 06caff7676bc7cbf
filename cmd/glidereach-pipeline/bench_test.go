package main

import (
	"context"
	"io"
	"path/filepath"
	"testing"

	"glidereach/reach/plan"
	"glidereach/reach/tiling"
)

// The cost of the Beam engine over the local worker pool on one machine:
// the same plan (benchScene: 600 × 600 synthetic cells of 1″, three fields,
// 128-cell tiles) through tiling.Run and through the pipeline on Prism,
// each writing the COG. The difference is Beam's: encoding the parts and
// tiles, the shuffle, the stages run one after the other.

func benchScene(b *testing.B) *scene { return newScene(b, 600, 128, 1600) }

func BenchmarkLocalTiledRun(b *testing.B) {
	sc := benchScene(b)
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		dir := b.TempDir()
		res, err := tiling.Run(context.Background(), sc.src, sc.plan, tiling.RunOptions{WorkDir: dir, Zone: sc.zone.Contains, Workers: 2})
		if err != nil {
			b.Fatal(err)
		}
		if err := writeFileAtomic(filepath.Join(dir, "least.tif"), func(w io.Writer) error {
			return tiling.WriteCOG(w, sc.plan, res, plan.TiledCOGDescription)
		}); err != nil {
			b.Fatal(err)
		}
	}
	reportCells(b, sc)
}

func BenchmarkPipelineOnPrism(b *testing.B) {
	sc := benchScene(b)
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		runPipeline(b, sc, Outputs{COG: filepath.Join(b.TempDir(), "least.tif")})
	}
	reportCells(b, sc)
}

// reportCells reports the time per output cell of the lattice.
func reportCells(b *testing.B, sc *scene) {
	l := sc.plan.Lattice
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(l.Cols*l.Rows), "ns/cell")
}
