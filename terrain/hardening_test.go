package terrain

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// A float GeoTIFF sample of ±Inf is no elevation: it reads as no data, so
// the grid's elevation range stays finite (terrain --format json failed with
// "json: unsupported value: +Inf").
func TestGeoTIFFInfIsNoData(t *testing.T) {
	g := &Grid{CRS: CRS{EPSG: 4326}, Cols: 4, Rows: 2, X0: 10, Y0: 20, DX: 0.01, DY: 0.01,
		Elev: []float32{1, 2, float32(math.Inf(1)), 4, 5, float32(math.Inf(-1)), 7, 8}}
	var buf bytes.Buffer
	if err := (GeoTIFFWriter{}).Write(&buf, g); err != nil {
		t.Fatal(err)
	}
	r := bytes.NewReader(buf.Bytes())
	got, err := ReadGeoTIFFWindow(r, int64(buf.Len()), 9, 19, 11, 21)
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsNaN(float64(got.Elev[2])) || !math.IsNaN(float64(got.Elev[5])) {
		t.Errorf("±Inf samples read as %v, %v; want NaN (no data)", got.Elev[2], got.Elev[5])
	}
	lo, hi, ok := got.ElevationRange()
	if !ok || lo != 1 || hi != 8 {
		t.Errorf("range %v..%v (%v), want 1..8", lo, hi, ok)
	}
}

// ASCII-grid samples that are not finite elevations are refused: a token
// longer than the 1 KiB the README promises (5000 digits were read as
// +Inf), "nan", "inf", and a number beyond float32.
func TestASCRefusesNonFiniteSamples(t *testing.T) {
	head := "ncols 2\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 0.01\n"
	for _, c := range []struct{ body, want string }{
		{strings.Repeat("1", 5000) + " 2\n3 4\n", "longer than 1024"},
		{"1 2\n3 " + strings.Repeat("7", 2000) + "\n", "longer than 1024"},
		{"nan 2\n3 4\n", "not a finite"},
		{"1 inf\n3 4\n", "not a finite"},
		{"1 2\n-Infinity 4\n", "not a finite"},
		{"1 2\n3 1e39\n", "not a finite"},
		{"1 2\n3 1e400\n", "not a number"},
	} {
		_, err := ReadASC(strings.NewReader(head+c.body), CRS{EPSG: 4326})
		var pe *ParseError
		if !errors.As(err, &pe) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%.30q: %v, want a ParseError with %q", c.body, err, c.want)
		}
	}
	// An underflow is zero, not an error (it is a number).
	g, err := ReadASC(strings.NewReader(head+"1e-400 2\n3 4\n"), CRS{EPSG: 4326})
	if err != nil || g.Elev[0] != 0 {
		t.Errorf("underflow: %v %v", err, g)
	}
}

// A .prj that is a link to an endless stream is read only up to its limit
// (it was read whole, 4 GB, before the size check).
func TestPRJSidecarReadWithLimit(t *testing.T) {
	if _, err := os.Stat("/dev/zero"); err != nil {
		t.Skip("no /dev/zero")
	}
	dir := t.TempDir()
	asc := filepath.Join(dir, "g.asc")
	os.WriteFile(asc, []byte("ncols 2\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 0.01\n1 2\n3 4\n"), 0o644)
	if err := os.Symlink("/dev/zero", filepath.Join(dir, "g.prj")); err != nil {
		t.Fatal(err)
	}
	_, err := Open(asc)
	if err == nil || !strings.Contains(err.Error(), "too large for a .prj") {
		t.Errorf("got %v, want too large", err)
	}
}

// Frame.Inverse undoes Forward everywhere, the poles included (the Newton
// iteration it replaced gave longitudes of ±766° from 89.9° N and ±1.7e9
// from 90° N), and keeps longitudes within 180° of the origin's.
func TestFrameInverseRoundTrip(t *testing.T) {
	for _, o := range [][2]float64{{0, 0}, {45, 10}, {-33, 151}, {89.9, 0}, {90, 0}, {-90, 45}, {0, 180}, {10, -180}, {89.999, 179.9}} {
		f := NewFrame(o[0], o[1])
		for _, d := range [][2]float64{{0, 0}, {0.05, 0.05}, {-0.08, 0.1}, {0.09, -0.2}, {0.01, 1.5}} {
			lat, lon := o[0]+d[0], o[1]+d[1]
			if lat > 90 || lat < -90 {
				continue
			}
			x, y := f.Forward(lat, lon)
			gl, gn := f.Inverse(x, y)
			if math.Abs(gl-lat) > 1e-9 {
				t.Errorf("origin %v: lat %v → %v", o, lat, gl)
			}
			if math.Abs(lat) < 90-1e-9 {
				if dl := math.Remainder(gn-lon, 360); math.Abs(dl)*math.Cos(lat*math.Pi/180) > 1e-9 {
					t.Errorf("origin %v: lon %v → %v", o, lon, gn)
				}
			}
			if math.Abs(gn-o[1]) > 180 {
				t.Errorf("origin %v: lon %v more than 180° from the origin's", o, gn)
			}
		}
	}
	// Near the pole, within a 20 km window, every longitude stays sane.
	f := NewFrame(89.9, 0)
	for x := -20000.0; x <= 20000; x += 1000 {
		for y := -20000.0; y <= 20000; y += 1000 {
			lat, lon := f.Inverse(x, y)
			if !(lat >= -90 && lat <= 90 && lon >= -180 && lon <= 180) {
				t.Fatalf("Inverse(%v, %v) = %v, %v", x, y, lat, lon)
			}
		}
	}
}

func TestNormLon(t *testing.T) {
	for _, c := range [][2]float64{{0, 0}, {180, -180}, {180.097, -179.903}, {-180, -180}, {-180.5, 179.5}, {540, -180}, {766, 46}, {-766, -46}} {
		if got := NormLon(c[0]); math.Abs(got-c[1]) > 1e-9 {
			t.Errorf("NormLon(%v) = %v, want %v", c[0], got, c[1])
		}
	}
}

// Two small files in different CRSs some 600 km apart: reading the whole
// mosaic is refused at once (it took 90 s and 600 MB for 21 600 cells of
// data), while a window over one of them still reads.
func TestMosaicFarApartRefused(t *testing.T) {
	src, err := Open("../testdata/geotiff/utm32626_int16_tiled_deflate.tif", "../testdata/geotiff/geo_int16_strip_none.tif")
	if err != nil {
		t.Fatal(err)
	}
	w, s, e, n := src.Extent()
	if _, err := src.Window(w, s, e, n); err == nil || !strings.Contains(err.Error(), "far apart") {
		t.Errorf("whole mosaic: %v, want refused as far apart", err)
	}
	if g, err := src.Window(-25.01, -0.01, -24.99, 0.01); err != nil || g.Cols == 0 {
		t.Errorf("window over one file: %v", err)
	}
}

// A geographic grid may overhang ±180° and ±90° by half a cell (edge cells
// centred on the meridian, as SRTM tiles are), not more: one reaching
// 180.25° E was accepted (the tolerance was half a degree whatever the cell).
func TestGeographicExtentOnTheGlobe(t *testing.T) {
	head := func(xll, yll, cell float64, corner bool) string {
		k := "xllcenter"
		if corner {
			k = "xllcorner"
		}
		return "ncols 3\nnrows 3\n" + k + " " + ftoa(xll) + "\nyllcorner " + ftoa(yll) + "\ncellsize " + ftoa(cell) + "\n1 2 3\n4 5 6\n7 8 9\n"
	}
	for _, c := range []struct {
		name string
		text string
		ok   bool
	}{
		{"reaches 180.25 E", head(179.95, 0, 0.1, true), false},
		{"ends at 180 E", head(179.7, 0, 0.1, true), true},
		{"centres up to 180 E (half a cell over)", head(179.8, 0, 0.1, false), true},
		{"a cell over -180", head(-180.2, 0, 0.1, false), false},
	} {
		_, err := ReadASC(strings.NewReader(c.text), CRS{EPSG: 4326})
		if (err == nil) != c.ok {
			t.Errorf("%s: err %v, want ok=%v", c.name, err, c.ok)
		}
	}
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
