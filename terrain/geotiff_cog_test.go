package terrain

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// cogTestGrid is geotiffTestGrid's invented surface, 600 × 400 cells, with a
// void block, for the COG tests.
func cogTestGrid(epsg int) *Grid {
	g := geotiffTestGrid(epsg, 600, 400)
	for r := 300; r < 310; r++ {
		for c := 100; c < 113; c++ {
			g.Elev[r*g.Cols+c] = float32(math.NaN())
		}
	}
	return g
}

// TestWriteCOGFixture writes the COG fixtures GDAL was run on when
// GLIDEREACH_WRITE_FIXTURES names a directory (see TestWriteCOGAsGDALRead).
func TestWriteCOGFixture(t *testing.T) {
	dir := os.Getenv("GLIDEREACH_WRITE_FIXTURES")
	if dir == "" {
		t.Skip("GLIDEREACH_WRITE_FIXTURES not set: nothing to write")
	}
	for _, epsg := range []int{4326, 32725} {
		var b bytes.Buffer
		if err := (GeoTIFFWriter{COG: true, Tile: 128, Predictor: true, Description: "test"}).Write(&b, cogTestGrid(epsg)); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, "cog_"+itoa(epsg)+".tif"), b.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func itoa(i int) string {
	if i == 0 {
		return "0"
	}
	var b []byte
	for ; i > 0; i /= 10 {
		b = append([]byte{byte('0' + i%10)}, b...)
	}
	return string(b)
}

// TestWriteCOGAsGDALRead checks the COG layout against what GDAL 3.6.2
// (Debian gdal-bin / python3-gdal) made of the fixtures TestWriteCOGFixture
// writes, run once and printed here:
//   - gdalinfo: "Size is 600, 400", "LAYOUT=COG", "PREDICTOR=3",
//     "Block=128x128", "NoData Value=nan", "Overviews: 300x200, 150x100,
//     75x50", for both EPSG:32725 and EPSG:4326;
//   - validate_cloud_optimized_geotiff.py --full-check=yes: "is a valid
//     cloud optimized GeoTIFF", "The size of all IFD headers is 1316 bytes";
//   - gdallocationinfo -valonly -overview K FILE X Y (X, Y in base cells):
//     the values in gdalPrinted.
//
// The test reads the overview cells back from the bytes the writer makes
// and compares them with what GDAL printed.
func TestWriteCOGAsGDALRead(t *testing.T) {
	gdalPrinted := []struct {
		ov, x, y int
		v        float64
	}{
		{1, 0, 0, 2.21647095680237}, {1, 104, 304, math.NaN()}, {1, 599, 399, 799.806030273438}, {1, 333, 222, 447.92236328125},
		{2, 0, 0, 4.625}, {2, 104, 304, math.NaN()}, {2, 599, 399, 800.552734375}, {2, 333, 222, 447.318328857422},
		{3, 0, 0, math.NaN()}, {3, 599, 399, 801.29931640625}, {3, 333, 222, 459.560638427734},
		{0, 333, 222, 443.199157714844},
	}
	for _, epsg := range []int{4326, 32725} {
		g := cogTestGrid(epsg)
		var b bytes.Buffer
		if err := (GeoTIFFWriter{COG: true, Tile: 128, Predictor: true, Description: "test"}).Write(&b, g); err != nil {
			t.Fatal(err)
		}
		data := b.Bytes()
		// The ghost area GDAL reads as LAYOUT=COG follows the header.
		if !bytes.HasPrefix(data[8:], []byte("GDAL_STRUCTURAL_METADATA_SIZE=")) {
			t.Fatal("no structural metadata after the header")
		}
		// The first IFD is the full resolution: the package's reader reads it.
		x0, y1 := g.X0-g.DX/2, g.Y0+g.DY/2
		got, err := ReadGeoTIFFWindow(bytes.NewReader(data), int64(len(data)), x0, y1-float64(g.Rows)*g.DY, x0+float64(g.Cols)*g.DX, y1)
		if err != nil {
			t.Fatal(err)
		}
		if got.Cols != 600 || got.Rows != 400 || got.CRS.EPSG != epsg {
			t.Fatalf("read back %d×%d EPSG %d", got.Cols, got.Rows, got.CRS.EPSG)
		}
		for i := range g.Elev {
			if math.Float32bits(g.Elev[i]) != math.Float32bits(got.Elev[i]) && !(g.Elev[i] != g.Elev[i] && got.Elev[i] != got.Elev[i]) {
				t.Fatalf("cell %d read back %v, wrote %v", i, got.Elev[i], g.Elev[i])
			}
		}
		levels := []*cogLevel{{cols: g.Cols, rows: g.Rows, elev: g.Elev}}
		for len(levels) < 4 {
			levels = append(levels, overview(levels[len(levels)-1], OverviewMax))
		}
		if l := levels[3]; l.cols != 75 || l.rows != 50 {
			t.Fatalf("third overview %d×%d, GDAL printed 75x50", l.cols, l.rows)
		}
		for _, p := range gdalPrinted {
			// gdallocationinfo maps a base cell to an overview's as
			// int(0.5 + x·width_ov/width), clamped to the overview
			// (the nearest overview cell; from its output, from memory).
			l := levels[p.ov]
			x := int(0.5 + float64(p.x)*float64(l.cols)/float64(g.Cols))
			y := int(0.5 + float64(p.y)*float64(l.rows)/float64(g.Rows))
			x, y = min(x, l.cols-1), min(y, l.rows-1)
			v := float64(l.elev[y*l.cols+x])
			if !(math.IsNaN(p.v) && math.IsNaN(v)) && !geotiffClose(v, p.v, 1e-6) {
				t.Errorf("EPSG %d overview %d at base (%d, %d) = %.12g, GDAL printed %.12g", epsg, p.ov, p.x, p.y, v, p.v)
			}
		}
	}
}

// TestOverviewMaxIsWorst checks the overview rule on its own: the highest
// of the cells, NaN over any NaN, never an average (common practice for
// conservative rasters, no source).
func TestOverviewMaxIsWorst(t *testing.T) {
	nan := float32(math.NaN())
	for _, c := range []struct {
		in   []float32
		want float32
	}{{[]float32{1, 5, 3, 2}, 5}, {[]float32{7}, 7}, {[]float32{1, nan, 3}, nan}, {[]float32{-4, -9}, -4}} {
		got := OverviewMax(c.in)
		if math.Float32bits(got) != math.Float32bits(c.want) && !(got != got && c.want != c.want) {
			t.Errorf("OverviewMax(%v) = %v, want %v", c.in, got, c.want)
		}
	}
}
