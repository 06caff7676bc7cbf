package terrain

import (
	"bytes"
	"encoding/binary"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// FuzzReadGeoTIFF checks that no input makes the reader panic or return an
// inconsistent grid. It is seeded with the GDAL-made fixtures of
// testdata/geotiff, the writer's layouts and a few hand-built files. Inputs
// are screened with the header call: rasters over 4 M cells get a small
// window read only, so that a fuzzed header cannot ask for gigabytes.
func FuzzReadGeoTIFF(f *testing.F) {
	names, _ := filepath.Glob(filepath.Join("..", "testdata", "geotiff", "*.tif"))
	for _, n := range names {
		if b, err := os.ReadFile(n); err == nil {
			f.Add(b)
		}
	}
	for _, w := range []GeoTIFFWriter{{}, {Strips: true, Predictor: true, BigEndian: true}, {Uncompressed: true, Tile: 16}} {
		var buf bytes.Buffer
		if err := w.Write(&buf, geotiffTestGrid(32725, 40, 30)); err == nil {
			f.Add(buf.Bytes())
		}
	}
	f.Add(buildTestTIFF(binary.LittleEndian, geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{512}, 1)...), make([]byte, 512)))
	f.Fuzz(func(t *testing.T, data []byte) {
		r := bytes.NewReader(data)
		info, err := ReadGeoTIFFInfo(r, int64(len(data)))
		if err != nil {
			return
		}
		if info.Width <= 0 || info.Height <= 0 || !(info.DX > 0) || !(info.DY > 0) || info.Sample.Size() == 0 {
			t.Fatalf("header accepted with %+v", info)
		}
		w, s, e, n := info.Extent()
		if int64(info.Width)*int64(info.Height) > 4_000_000 {
			// A 50 × 50 cell window in the north-west corner.
			e, s = w+50*info.DX, n-50*info.DY
		}
		g, err := ReadGeoTIFFWindow(r, int64(len(data)), w, s, e, n)
		if err != nil {
			return
		}
		if g.Cols <= 0 || g.Rows <= 0 || g.Cols > info.Width || g.Rows > info.Height || len(g.Elev) != g.Cols*g.Rows {
			t.Fatalf("grid %d × %d with %d cells from a %d × %d raster", g.Cols, g.Rows, len(g.Elev), info.Width, info.Height)
		}
		if g.CRS != info.CRS || g.DX != info.DX || g.DY != info.DY {
			t.Fatalf("grid georeference %v %g %g differs from the header %v %g %g", g.CRS, g.DX, g.DY, info.CRS, info.DX, info.DY)
		}
		// Round trip: what was read writes and reads back the same.
		var buf bytes.Buffer
		// Only for georeferences whose cell centres float64 tells apart.
		if g.Cols*g.Rows > 1<<16 || math.Abs(g.X0) > 1e9 || math.Abs(g.Y0) > 1e9 ||
			g.DX < 1e-6*math.Max(1, math.Abs(g.X0)) || g.DY < 1e-6*math.Max(1, math.Abs(g.Y0)) ||
			g.DX > 1e6 || g.DY > 1e6 {
			return
		}
		if err := WriteGeoTIFF(&buf, g); err != nil {
			return // e.g. an origin the writer cannot store
		}
		back, err := ReadGeoTIFFWindow(bytes.NewReader(buf.Bytes()), int64(buf.Len()), g.X0, g.Y0-float64(g.Rows-1)*g.DY, g.X0+float64(g.Cols-1)*g.DX, g.Y0)
		if err != nil {
			t.Fatalf("reading back the written grid: %v", err)
		}
		if back.Cols != g.Cols || back.Rows != g.Rows {
			t.Fatalf("round trip %d × %d, wrote %d × %d", back.Cols, back.Rows, g.Cols, g.Rows)
		}
		for i := range g.Elev {
			a, b := back.Elev[i], g.Elev[i]
			if a != b && !(a != a && b != b) {
				t.Fatalf("round trip cell %d: %g, wrote %g", i, a, b)
			}
		}
	})
}
