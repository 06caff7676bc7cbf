package terrain

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// The fixtures in testdata/geotiff were made with GDAL 3.6.2 (Debian
// gdal-bin) by testdata/geotiff/make.sh, from an invented surface placed
// over open ocean. values.txt holds what GDAL printed about each file:
// gdalinfo -json (size, block, type, no-data, compression, corners) and
// gdallocationinfo -valonly at cells (px) and at CRS points (geo). The tests
// compare this reader to those values; they do not run GDAL.

type gdalPoint struct {
	x, y float64 // px: column and row; geo: CRS coordinates
	v    float64
	geo  bool
}

type gdalFixture struct {
	name string
	info struct {
		Size        [2]int   `json:"size"`
		Block       [2]int   `json:"block"`
		Type        string   `json:"type"`
		NoData      *float64 `json:"nodata"`
		Compression *string  `json:"compression"`
		Interleave  string   `json:"interleave"`
		Bands       int      `json:"bands"`
		AreaOrPoint string   `json:"area_or_point"`
	}
	corners   map[string][2]float64
	points    []gdalPoint
	transform []float64
}

func readGeoTIFFValues(t testing.TB) []*gdalFixture {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "testdata", "geotiff", "values.txt"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var out []*gdalFixture
	var cur *gdalFixture
	sc := bufio.NewScanner(f)
	num := func(s string) float64 {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("values.txt: %q: %v", s, err)
		}
		return v
	}
	for sc.Scan() {
		fs := strings.Fields(sc.Text())
		if len(fs) == 0 || strings.HasPrefix(fs[0], "#") {
			continue
		}
		switch fs[0] {
		case "fixture":
			cur = &gdalFixture{name: fs[1], corners: map[string][2]float64{}}
			out = append(out, cur)
		case "info":
			if err := json.Unmarshal([]byte(strings.TrimPrefix(sc.Text(), "info ")), &cur.info); err != nil {
				t.Fatal(err)
			}
		case "corner":
			cur.corners[fs[1]] = [2]float64{num(fs[2]), num(fs[3])}
		case "px", "geo":
			cur.points = append(cur.points, gdalPoint{num(fs[1]), num(fs[2]), num(fs[3]), fs[0] == "geo"})
		case "transform":
			if err := json.Unmarshal([]byte(fs[1]), &cur.transform); err != nil {
				t.Fatal(err)
			}
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return out
}

func readGeoTIFFFixture(t testing.TB, name string) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "geotiff", name))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// geotiffClose reports |a-b| <= tol·max(1, |b|).
func geotiffClose(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*math.Max(1, math.Abs(b))
}

func TestGeoTIFFMatchesGDAL(t *testing.T) {
	fixtures := readGeoTIFFValues(t)
	if len(fixtures) < 15 {
		t.Fatalf("values.txt has %d fixtures, want the full set", len(fixtures))
	}
	for _, fx := range fixtures {
		if fx.transform != nil || fx.info.Interleave == "PIXEL" {
			continue // refused files, see TestGeoTIFFRefusesGDALFixtures
		}
		t.Run(fx.name, func(t *testing.T) {
			data := readGeoTIFFFixture(t, fx.name)
			info, err := ReadGeoTIFFInfo(bytes.NewReader(data), int64(len(data)))
			if err != nil {
				t.Fatal(err)
			}
			// Header against gdalinfo -json.
			if info.Width != fx.info.Size[0] || info.Height != fx.info.Size[1] {
				t.Errorf("size %d × %d, gdalinfo %v", info.Width, info.Height, fx.info.Size)
			}
			if info.ChunkWidth != fx.info.Block[0] || info.ChunkHeight != fx.info.Block[1] {
				t.Errorf("block %d × %d, gdalinfo %v", info.ChunkWidth, info.ChunkHeight, fx.info.Block)
			}
			if got := strings.ToLower(info.Sample.String()); got != strings.ToLower(fx.info.Type) {
				t.Errorf("sample %s, gdalinfo %s", got, fx.info.Type)
			}
			wantComp := map[string]int{"": 1, "LZW": 5, "DEFLATE": 8, "PACKBITS": 32773}
			comp := ""
			if fx.info.Compression != nil {
				comp = *fx.info.Compression
			}
			if info.Compression != wantComp[comp] {
				t.Errorf("compression %d, gdalinfo %q", info.Compression, comp)
			}
			if info.PixelIsPoint != (fx.info.AreaOrPoint == "Point") {
				t.Errorf("PixelIsPoint %v, gdalinfo AREA_OR_POINT %q", info.PixelIsPoint, fx.info.AreaOrPoint)
			}
			if (fx.info.NoData != nil) != info.HasNoData || (info.HasNoData && info.NoData != *fx.info.NoData) {
				t.Errorf("nodata %v %g, gdalinfo %v", info.HasNoData, info.NoData, fx.info.NoData)
			}
			// CRS: the fixture name carries the EPSG code make.sh gave it.
			wantEPSG := 4326
			if strings.HasPrefix(fx.name, "utm") {
				wantEPSG, _ = strconv.Atoi(fx.name[3:8])
			}
			if info.CRS.EPSG != wantEPSG {
				t.Errorf("CRS EPSG %d, want %d (make.sh -a_srs)", info.CRS.EPSG, wantEPSG)
			}
			// Corners printed by gdalinfo (cell edges), to 1e-9 relative.
			w, s, e, n := info.Extent()
			ul, lr := fx.corners["upperLeft"], fx.corners["lowerRight"]
			if !geotiffClose(w, ul[0], 1e-9) || !geotiffClose(n, ul[1], 1e-9) || !geotiffClose(e, lr[0], 1e-9) || !geotiffClose(s, lr[1], 1e-9) {
				t.Errorf("extent %.12g %.12g %.12g %.12g, gdalinfo corners %v %v", w, s, e, n, ul, lr)
			}

			g, err := ReadGeoTIFFWindow(bytes.NewReader(data), int64(len(data)), w, s, e, n)
			if err != nil {
				t.Fatal(err)
			}
			if g.Cols != info.Width || g.Rows != info.Height || len(g.Elev) != g.Cols*g.Rows {
				t.Fatalf("full read gave %d × %d (%d cells)", g.Cols, g.Rows, len(g.Elev))
			}
			isInt := info.Sample != SampleFloat32 && info.Sample != SampleFloat64
			for _, p := range fx.points {
				c, r := int(p.x), int(p.y)
				if p.geo {
					c = int(math.Round((p.x - g.X0) / g.DX))
					r = int(math.Round((g.Y0 - p.y) / g.DY))
				}
				got := float64(g.Elev[r*g.Cols+c])
				// make.sh's surface lies in -180..2400 m: a value outside it
				// means GDAL misread its own fixture, which then proves nothing.
				if (p.v < -200 || p.v > 2500) && !(info.HasNoData && p.v == info.NoData) {
					t.Errorf("values.txt %v: GDAL printed %g, outside the make.sh surface", p, p.v)
				}
				// gdallocationinfo -valonly prints the raw value, also for no data.
				if info.HasNoData && p.v == info.NoData {
					if !math.IsNaN(got) {
						t.Errorf("%v: got %g, want NaN (GDAL printed the no-data value %g)", p, got, p.v)
					}
					continue
				}
				// Exact for integer samples, 1e-6 relative for floating point
				// (gdallocationinfo prints 15 significant digits).
				if isInt && got != p.v || !isInt && !geotiffClose(got, p.v, 1e-6) {
					t.Errorf("cell (%d, %d) from %v: got %.10g, gdallocationinfo %.10g", c, r, p, got, p.v)
				}
			}
			// A window read matches the full read where they overlap.
			wx0, wy0 := g.X0+20.2*g.DX, g.Y0-30.6*g.DY
			sub, err := ReadGeoTIFFWindow(bytes.NewReader(data), int64(len(data)), wx0, wy0-25*g.DY, wx0+40*g.DX, wy0)
			if err != nil {
				t.Fatal(err)
			}
			c0 := int(math.Round((sub.X0 - g.X0) / g.DX))
			r0 := int(math.Round((g.Y0 - sub.Y0) / g.DY))
			if c0 != 20 || r0 != 30 || sub.Cols != 42 || sub.Rows != 27 {
				t.Errorf("window starts at cell (%d, %d) with %d × %d cells, want (20, 30) and 42 × 27", c0, r0, sub.Cols, sub.Rows)
			}
			for r := range sub.Rows {
				for c := range sub.Cols {
					a, b := sub.Elev[r*sub.Cols+c], g.Elev[(r+r0)*g.Cols+c+c0]
					if a != b && !(a != a && b != b) {
						t.Fatalf("window cell (%d, %d) = %g, full read %g", c, r, a, b)
					}
				}
			}
		})
	}
}

func TestGeoTIFFRefusesGDALFixtures(t *testing.T) {
	for _, tc := range []struct{ name, tag string }{
		// Made by make.sh with gdal_translate -co INTERLEAVE=PIXEL from two bands.
		{"geo_int16_2band_pixel.tif", "SamplesPerPixel (277)"},
		// Made by make.sh from a VRT with rotation terms 0.0002 (values.txt "transform").
		{"geo_int16_rotated.tif", "ModelTransformation (34264)"},
	} {
		data := readGeoTIFFFixture(t, tc.name)
		_, err := ReadGeoTIFFInfo(bytes.NewReader(data), int64(len(data)))
		var ue *GeoTIFFUnsupportedError
		if !errors.As(err, &ue) || ue.Tag != tc.tag {
			t.Errorf("%s: error %v, want *GeoTIFFUnsupportedError naming %s", tc.name, err, tc.tag)
			continue
		}
		if !strings.HasPrefix(err.Error(), "terrain: geotiff: ") {
			t.Errorf("%s: message %q lacks the package prefix", tc.name, err)
		}
	}
}

// TestGeoTIFFPixelIsPoint checks the raster-type conversion: in a
// RasterPixelIsPoint file the tiepoint is a cell centre, in a
// RasterPixelIsArea file a cell corner (OGC GeoTIFF 1.1 §B.3). Both UTM 26N
// fixtures come from the same source grid, so their cell centres agree.
func TestGeoTIFFPixelIsPoint(t *testing.T) {
	read := func(name string) *GeoTIFFInfo {
		data := readGeoTIFFFixture(t, name)
		info, err := ReadGeoTIFFInfo(bytes.NewReader(data), int64(len(data)))
		if err != nil {
			t.Fatal(err)
		}
		return info
	}
	pt, area := read("utm32626_float32_point_lzw.tif"), read("utm32626_int16_tiled_deflate.tif")
	if !pt.PixelIsPoint || area.PixelIsPoint {
		t.Fatalf("PixelIsPoint %v / %v, want true / false", pt.PixelIsPoint, area.PixelIsPoint)
	}
	// make.sh: xllcorner 480000, yllcorner 550000, 30 m cells, 90 rows, so the
	// north-west cell centre is (480015, 552685).
	for _, info := range []*GeoTIFFInfo{pt, area} {
		if info.X0 != 480015 || info.Y0 != 552685 || info.DX != 30 || info.DY != 30 {
			t.Errorf("X0 %g Y0 %g DX %g DY %g, want 480015 552685 30 30", info.X0, info.Y0, info.DX, info.DY)
		}
	}
}

// TestGeoTIFFDeflateOldCode patches Compression 8 to 32946 (the older code
// for the same zlib stream, Adobe TIFF Technical Note 3) in a GDAL fixture
// and expects the same cells.
func TestGeoTIFFDeflateOldCode(t *testing.T) {
	data := readGeoTIFFFixture(t, "geo_float32_tiled_deflate_pred3.tif")
	want, err := ReadGeoTIFFWindow(bytes.NewReader(data), int64(len(data)), -180, -90, 180, 90)
	if err != nil {
		t.Fatal(err)
	}
	patched := bytes.Clone(data)
	n := int(binary.LittleEndian.Uint16(patched[8:]))
	found := false
	for i := range n {
		e := patched[10+12*i:]
		if binary.LittleEndian.Uint16(e) == tiffTagCompression {
			binary.LittleEndian.PutUint16(e[8:], GeoTIFFDeflateOld)
			found = true
		}
	}
	if !found {
		t.Fatal("no Compression tag")
	}
	got, err := ReadGeoTIFFWindow(bytes.NewReader(patched), int64(len(patched)), -180, -90, 180, 90)
	if err != nil {
		t.Fatal(err)
	}
	for i := range want.Elev {
		if got.Elev[i] != want.Elev[i] {
			t.Fatalf("cell %d: %g, want %g", i, got.Elev[i], want.Elev[i])
		}
	}
}

func TestGeoTIFFWindowEdges(t *testing.T) {
	data := readGeoTIFFFixture(t, "geo_int16_tiled_lzw_pred2.tif")
	r, size := bytes.NewReader(data), int64(len(data))
	info, err := ReadGeoTIFFInfo(r, size)
	if err != nil {
		t.Fatal(err)
	}
	w, s, e, n := info.Extent()
	for _, tc := range []struct {
		name                     string
		west, south, east, north float64
		cols, rows               int
		err                      bool
	}{
		// One point in the middle of cell (10, 10): its cell and the
		// neighbours towards the point, 2 × 2 cells (bilinear support).
		{"point", info.X0 + 10.25*info.DX, info.Y0 - 10.25*info.DY, info.X0 + 10.25*info.DX, info.Y0 - 10.25*info.DY, 2, 2, false},
		{"point on a centre", info.X0 + 10*info.DX, info.Y0 - 10*info.DY, info.X0 + 10*info.DX, info.Y0 - 10*info.DY, 1, 1, false},
		{"larger than the raster", w - 1, s - 1, e + 1, n + 1, 120, 90, false},
		{"north-east corner cell", e - 0.1*info.DX, n - 0.1*info.DY, e + 5, n + 5, 1, 1, false},
		{"outside", e + 1, s, e + 2, n, 0, 0, true},
		{"reversed", e, s, w, n, 0, 0, true},
		{"NaN", math.NaN(), s, e, n, 0, 0, true},
	} {
		g, err := ReadGeoTIFFWindow(r, size, tc.west, tc.south, tc.east, tc.north)
		if tc.err {
			if err == nil {
				t.Errorf("%s: no error", tc.name)
			}
			continue
		}
		if err != nil {
			t.Errorf("%s: %v", tc.name, err)
			continue
		}
		if g.Cols != tc.cols || g.Rows != tc.rows {
			t.Errorf("%s: %d × %d cells, want %d × %d", tc.name, g.Cols, g.Rows, tc.cols, tc.rows)
		}
	}
}

func TestGeoTIFFTwoBandPlanar(t *testing.T) {
	// geo_int16_2band_planar.tif (make.sh, INTERLEAVE=BAND) holds the surface
	// twice; band 1 must equal the single-band striped fixture.
	one := readGeoTIFFFixture(t, "geo_int16_strip_none.tif")
	two := readGeoTIFFFixture(t, "geo_int16_2band_planar.tif")
	a, err := ReadGeoTIFFWindow(bytes.NewReader(one), int64(len(one)), -180, -90, 180, 90)
	if err != nil {
		t.Fatal(err)
	}
	b, err := ReadGeoTIFFWindow(bytes.NewReader(two), int64(len(two)), -180, -90, 180, 90)
	if err != nil {
		t.Fatal(err)
	}
	for i := range a.Elev {
		if a.Elev[i] != b.Elev[i] {
			t.Fatalf("cell %d: band 1 %g, single band %g", i, b.Elev[i], a.Elev[i])
		}
	}
}
