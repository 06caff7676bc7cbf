package terrain

import (
	"os"
	"strings"
	"testing"
)

// TestPRJ checks the .prj writer: for EPSG:32727 it gives exactly the WKT1
// GDAL wrote into testdata/asc/utm_center.prj, and every CRS it writes is
// read back as itself by ParsePRJ (a round trip).
func TestPRJ(t *testing.T) {
	gdal, err := os.ReadFile("../testdata/asc/utm_center.prj")
	if err != nil {
		t.Fatal(err)
	}
	got, err := PRJ(CRS{EPSG: 32727})
	if err != nil || got != strings.TrimSpace(string(gdal)) {
		t.Errorf("PRJ(32727) = %q, %v\nGDAL wrote %q", got, err, strings.TrimSpace(string(gdal)))
	}
	for _, code := range []int{4326, 32601, 32627, 32660, 32701, 32727, 25828, 25832, 25838} {
		text, err := PRJ(CRS{EPSG: code})
		if err != nil {
			t.Errorf("PRJ(%d): %v", code, err)
			continue
		}
		if back, err := ParsePRJ(text); err != nil || back.EPSG != code {
			t.Errorf("ParsePRJ(PRJ(%d)) = %v, %v", code, back, err)
		}
	}
	if _, err := PRJ(CRS{EPSG: 3857}); err == nil {
		t.Error("PRJ(3857): no error")
	}
}
