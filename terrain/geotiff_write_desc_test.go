package terrain

import (
	"bytes"
	"testing"
)

func TestWriteGeoTIFFDescription(t *testing.T) {
	// ImageDescription is TIFF 6.0 tag 270 (ASCII); the file must still read
	// back unchanged. GDAL 3.6.2 (gdalinfo) printed the description of a
	// file written this way as TIFFTAG_IMAGEDESCRIPTION (checked by hand).
	g := &Grid{CRS: CRS{EPSG: 4326}, Cols: 3, Rows: 2, X0: -24.5, Y0: -0.5, DX: 0.01, DY: 0.01, Elev: []float32{1, 2, 3, 4, 5, 6}}
	var buf bytes.Buffer
	desc := "arrival height above ground, m. PLANNING AID ONLY – not for navigation."
	if err := (GeoTIFFWriter{Description: desc}).Write(&buf, g); err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(buf.Bytes(), []byte("arrival height above ground, m. PLANNING AID ONLY ? not for navigation.\x00")) {
		t.Error("description (7-bit ASCII, NUL-terminated) not in the file")
	}
	back, err := ReadGeoTIFFWindow(bytes.NewReader(buf.Bytes()), int64(buf.Len()), -25, -1, -24, 0)
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range g.Elev {
		if back.Elev[i] != v {
			t.Fatalf("cell %d: %v, want %v", i, back.Elev[i], v)
		}
	}
}
