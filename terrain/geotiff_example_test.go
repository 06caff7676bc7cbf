package terrain_test

import (
	"fmt"
	"log"
	"math"
	"os"

	"glidereach/terrain"
)

// Read the header of a GeoTIFF, then a small window around a point. The
// fixture was made with GDAL by testdata/geotiff/make.sh; gdallocationinfo
// printed 1338 at this point (values.txt).
func ExampleReadGeoTIFFWindow() {
	f, err := os.Open("../testdata/geotiff/geo_int16_tiled_lzw_pred2.tif")
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		log.Fatal(err)
	}
	info, err := terrain.ReadGeoTIFFInfo(f, st.Size())
	if err != nil {
		log.Fatal(err)
	}
	w, s, e, n := info.Extent()
	fmt.Printf("%d × %d %s, EPSG %d, %s tiles %d × %d, compression %d, predictor %d\n",
		info.Width, info.Height, info.Sample, info.CRS.EPSG, map[bool]string{true: "in", false: "not in"}[info.Tiled],
		info.ChunkWidth, info.ChunkHeight, info.Compression, info.Predictor)
	fmt.Printf("extent %.4f %.4f %.4f %.4f\n", w, s, e, n)

	lon, lat := -24.9997916667, 0.0002083333
	g, err := terrain.ReadGeoTIFFWindow(f, st.Size(), lon, lat, lon, lat)
	if err != nil {
		log.Fatal(err)
	}
	// The window is the 2 × 2 cells whose centres enclose the point; the
	// cell that holds it is the one with the nearest centre.
	c := int(math.Round((lon - g.X0) / g.DX))
	r := int(math.Round((g.Y0 - lat) / g.DY))
	fmt.Printf("window %d × %d cells; the point's cell (%d, %d) holds %.0f m\n", g.Cols, g.Rows, c, r, g.Elev[r*g.Cols+c])
	// Output:
	// 120 × 90 int16, EPSG 4326, in tiles 64 × 32, compression 5, predictor 2
	// extent -25.0500 -0.0375 -24.9500 0.0375
	// window 2 × 2 cells; the point's cell (1, 0) holds 1338 m
}
