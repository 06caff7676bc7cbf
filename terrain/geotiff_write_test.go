package terrain

import (
	"bytes"
	"math"
	"testing"
)

// geotiffTestGrid is an invented sloping surface with one void, over the
// open South Atlantic.
func geotiffTestGrid(epsg, cols, rows int) *Grid {
	g := &Grid{CRS: CRS{EPSG: epsg}, Cols: cols, Rows: rows}
	if epsg == 4326 {
		g.X0, g.Y0, g.DX, g.DY = -30+1.0/2400, -35-1.0/2400, 1.0/1200, 1.0/1200
	} else {
		g.X0, g.Y0, g.DX, g.DY = 500015, 6125985, 30, 30
	}
	g.Elev = make([]float32, cols*rows)
	for r := range rows {
		for c := range cols {
			g.Elev[r*cols+c] = float32(c)*1.5 - float32(r)*0.25 + 0.125 + float32(math.Sin(float64(c*r)))
		}
	}
	if cols > 7 && rows > 5 {
		g.Elev[5*cols+7] = float32(math.NaN())
	}
	return g
}

// TestWriteGeoTIFFRoundTrip writes grids in every layout the writer has and
// reads them back. GDAL 3.6.2 (gdalinfo, gdallocationinfo) was run once on
// the outputs of the first, second, third and fifth cases below for this
// 300 × 200 grid: it read EPSG 4326 / 32725 / 32725 / 25830, origin
// (-30, -35) or (500000, 6126000), cell 1/1200° or 30 m, AREA_OR_POINT=Area,
// NoData=nan, the block sizes and PREDICTOR=3 as written, and the cell
// values in gdalWrote below identically for all four files.
func TestWriteGeoTIFFRoundTrip(t *testing.T) {
	// Printed by gdallocationinfo -valonly FILE COL ROW for those files.
	gdalWrote := []struct {
		c, r int
		v    float64
	}{{0, 0, 0.125}, {7, 5, math.NaN()}, {299, 199, 398.182556152344}, {123, 77, 166.159469604492}}
	for _, epsg := range []int{4326, 32725} {
		g := geotiffTestGrid(epsg, 300, 200)
		for _, p := range gdalWrote {
			got := float64(g.Elev[p.r*g.Cols+p.c])
			if !(math.IsNaN(p.v) && math.IsNaN(got)) && !geotiffClose(got, p.v, 1e-6) {
				t.Errorf("EPSG %d cell (%d, %d) = %.12g, GDAL read %.12g", epsg, p.c, p.r, got, p.v)
			}
		}
	}
	for _, tc := range []struct {
		name string
		w    GeoTIFFWriter
		epsg int
	}{
		{"default", GeoTIFFWriter{}, 4326},
		{"utm strips predictor big-endian", GeoTIFFWriter{Strips: true, Predictor: true, BigEndian: true}, 32725},
		{"uncompressed tile 16", GeoTIFFWriter{Uncompressed: true, Tile: 16}, 32725},
		{"one-row strips", GeoTIFFWriter{Strips: true, RowsPerStrip: 1}, 32626},
		{"tiles predictor", GeoTIFFWriter{Tile: 64, Predictor: true}, 25830},
	} {
		g := geotiffTestGrid(tc.epsg, 300, 200)
		var buf bytes.Buffer
		if err := tc.w.Write(&buf, g); err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		r := bytes.NewReader(buf.Bytes())
		info, err := ReadGeoTIFFInfo(r, int64(buf.Len()))
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if !info.HasNoData || !math.IsNaN(info.NoData) || info.CRS != g.CRS || info.PixelIsPoint {
			t.Errorf("%s: nodata %v %g, CRS %v, point %v", tc.name, info.HasNoData, info.NoData, info.CRS, info.PixelIsPoint)
		}
		w, s, e, n := info.Extent()
		back, err := ReadGeoTIFFWindow(r, int64(buf.Len()), w, s, e, n)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if back.Cols != g.Cols || back.Rows != g.Rows || back.CRS != g.CRS ||
			!geotiffClose(back.X0, g.X0, 1e-12) || !geotiffClose(back.Y0, g.Y0, 1e-12) ||
			!geotiffClose(back.DX, g.DX, 1e-15) || !geotiffClose(back.DY, g.DY, 1e-15) {
			t.Errorf("%s: grid %+v, wrote %+v", tc.name, *back, *g)
		}
		for i := range g.Elev {
			a, b := back.Elev[i], g.Elev[i]
			if a != b && !(a != a && b != b) {
				t.Fatalf("%s: cell %d reads %g, wrote %g", tc.name, i, a, b)
			}
		}
	}
}

func TestWriteGeoTIFFRefuses(t *testing.T) {
	good := geotiffTestGrid(4326, 10, 10)
	for _, tc := range []struct {
		name string
		g    *Grid
		w    GeoTIFFWriter
	}{
		{"nil", nil, GeoTIFFWriter{}},
		{"short Elev", &Grid{CRS: good.CRS, Cols: 10, Rows: 10, DX: 1, DY: 1, Elev: make([]float32, 9)}, GeoTIFFWriter{}},
		{"zero cell", &Grid{CRS: good.CRS, Cols: 10, Rows: 10, DX: 0, DY: 1, Elev: good.Elev}, GeoTIFFWriter{}},
		{"unknown CRS", &Grid{CRS: CRS{EPSG: 3857}, Cols: 10, Rows: 10, DX: 1, DY: 1, Elev: good.Elev}, GeoTIFFWriter{}},
		{"tile not a multiple of 16", good, GeoTIFFWriter{Tile: 20}},
	} {
		if err := tc.w.Write(&bytes.Buffer{}, tc.g); err == nil {
			t.Errorf("%s: no error", tc.name)
		}
	}
}
