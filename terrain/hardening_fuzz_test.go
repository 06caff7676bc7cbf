package terrain

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzParsePRJ: the .prj parser never panics, and a CRS it returns is one
// the package handles.
func FuzzParsePRJ(f *testing.F) {
	for _, p := range []string{"../testdata/asc/geo_corner.prj", "../testdata/asc/utm_center.prj", "../testdata/cli-errors/unknown-crs.prj"} {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(string(b))
		}
	}
	for _, s := range []string{`GEOGCS["WGS 84",DATUM["WGS_1984"],AUTHORITY["EPSG","4326"]]`,
		"PROJECTION UTM\nZONE 33\nDATUM WGS84\n", "PROJECTION UTM\nZONE -33\nDATUM NAD83\n",
		`PROJCS["WGS 84 / UTM zone 33N",AUTHORITY["EPSG","32633"]]`, `PROJCRS["x",ID["EPSG",25832]]`, "", "UTM zone 99N", "UTM_zone_1S"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if len(s) > maxPRJ {
			return
		}
		crs, err := ParsePRJ(s)
		if err != nil {
			return
		}
		if err := CheckCRS(crs); err != nil {
			t.Fatalf("ParsePRJ(%.80q) = %v, which CheckCRS refuses: %v", s, crs, err)
		}
	})
}

// FuzzParseHGTName: tile names parse to a corner on the globe, and the
// name HGTName gives for it parses back to the same corner.
func FuzzParseHGTName(f *testing.F) {
	for _, s := range []string{"N34W119.hgt", "s01e024.hgt", "S90W180.hgt", "N89E179.HGT", "N90E000.hgt", "N00E180.hgt", "N+1E001.hgt", "dir/N12E034.hgt.zip", "X", ""} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, name string) {
		lat, lon, err := ParseHGTName(name)
		if err != nil {
			return
		}
		if lat < -90 || lat > 89 || lon < -180 || lon > 179 {
			t.Fatalf("ParseHGTName(%q) = %d, %d: off the globe", name, lat, lon)
		}
		la, lo, err := ParseHGTName(HGTName(lat, lon))
		if err != nil || la != lat || lo != lon {
			t.Fatalf("round trip of %q: %s → %d, %d, %v", name, HGTName(lat, lon), la, lo, err)
		}
	})
}

// FuzzOpenMosaic: a directory of files of mixed formats (an ASCII grid with
// or without a .prj, a .hgt tile, a GeoTIFF, junk) is opened, its extent
// read and a window taken, and none of it panics; a window returned is a
// consistent grid.
func FuzzOpenMosaic(f *testing.F) {
	asc, _ := os.ReadFile("../testdata/asc/geo_corner.asc")
	prj, _ := os.ReadFile("../testdata/asc/geo_corner.prj")
	tif, _ := os.ReadFile("../testdata/geotiff/geo_int16_strip_none.tif")
	f.Add(asc, prj, tif, []byte("junk"), uint8(0xff), -24.6, -0.6, -24.4, -0.4)
	f.Add(asc, []byte(""), []byte{}, []byte{}, uint8(0x0f), -25.1, -0.1, -24.9, 0.1)
	f.Add([]byte("ncols 1\nnrows 1\nxllcorner 0\nyllcorner 0\ncellsize 1\n5\n"), prj, tif[:min(len(tif), 400)], []byte{}, uint8(0x07), 0.0, 0.0, 1.0, 1.0)
	f.Fuzz(func(t *testing.T, ascData, prjData, tifData, other []byte, which uint8, w, s, e, n float64) {
		if len(ascData)+len(prjData)+len(tifData)+len(other) > 1<<20 {
			return
		}
		dir := t.TempDir()
		var paths []string
		put := func(bit uint8, name string, data []byte) {
			if which&bit != 0 {
				p := filepath.Join(dir, name)
				os.WriteFile(p, data, 0o644)
				if !strings.HasSuffix(name, ".prj") {
					paths = append(paths, p)
				}
			}
		}
		put(1, "g.asc", ascData)
		put(2, "g.prj", prjData)
		put(4, "t.tif", tifData)
		put(8, "N00E000.hgt", other)
		put(16, "notes.txt", other)
		var src Source
		var err error
		if which&32 != 0 {
			src, err = Open(dir)
		} else if len(paths) > 0 {
			src, err = Open(paths...)
		} else {
			return
		}
		if err != nil {
			return
		}
		x0, y0, x1, y1 := src.Extent()
		if !(x0 <= x1 && y0 <= y1) {
			t.Fatalf("extent %v %v %v %v", x0, y0, x1, y1)
		}
		_ = src.Describe()
		_ = src.Resolution()
		g, err := src.Window(w, s, e, n)
		if err != nil {
			return
		}
		if g.Cols < 1 || g.Rows < 1 || len(g.Elev) != g.Cols*g.Rows {
			t.Fatalf("window %d×%d with %d samples", g.Cols, g.Rows, len(g.Elev))
		}
		for _, v := range g.Elev {
			if math.IsInf(float64(v), 0) {
				t.Fatalf("window holds ±Inf")
			}
		}
	})
}
