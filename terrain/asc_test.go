package terrain

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

func readASCFixture(t *testing.T, name string) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "asc", name))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func TestReadASCCornerGeographic(t *testing.T) {
	// testdata/asc/geo_corner.asc (hand-written). Esri ASCII raster format:
	// the first data row is the north row; XLLCORNER/YLLCORNER are the outer
	// corner, so cell centres are half a cell inside.
	crs, err := ParsePRJ(string(readASCFixture(t, "geo_corner.prj")))
	if err != nil || crs.EPSG != 4326 {
		t.Fatalf("ParsePRJ: %v %v", crs, err)
	}
	g, err := ReadASC(bytes.NewReader(readASCFixture(t, "geo_corner.asc")), crs)
	if err != nil {
		t.Fatal(err)
	}
	if g.Cols != 4 || g.Rows != 3 || g.DX != 0.25 || g.X0 != -24.375 || g.Y0 != 0.125 {
		t.Fatalf("header %d×%d dx %v origin %v %v", g.Cols, g.Rows, g.DX, g.X0, g.Y0)
	}
	w, s, e, n := g.Extent()
	if w != -24.5 || s != -0.5 || e != -23.5 || n != 0.25 {
		t.Errorf("extent %v %v %v %v", w, s, e, n)
	}
	cases := []struct {
		lat, lon float64
		want     float64
		ok       bool
	}{
		{0.125, -24.375, 100, true},     // north-west cell centre
		{-0.375, -23.625, 330, true},    // south-east cell centre
		{0.125, -24.25, 105, true},      // midway: bilinear (common practice)
		{-0.375, -24.0, 315, true},      // south row, between 310 and 320
		{-0.125, -23.875, 0, false},     // the NODATA cell
		{-0.25, -23.75, 0, false},       // touches the NODATA cell
		{0.2, -24.45, 100, true},        // inside the half-cell border: edge value
		{0.3, -24.375, 0, false},        // north of the extent
		{-0.125, -24.125, 210, true},    // centre of a cell next to the void
		{-0.125, -24.1875, 207.5, true}, // 3/4 of the way from 200 to 210
		{-0.125, -24.0625, 0, false},    // between 210 and the void
	}
	for _, c := range cases {
		v, ok := g.Elevation(c.lat, c.lon)
		if ok != c.ok || (ok && math.Abs(v-c.want) > 1e-9) {
			t.Errorf("Elevation(%v, %v) = %v, %v; want %v, %v", c.lat, c.lon, v, ok, c.want, c.ok)
		}
	}
	if g.Voids() != 1 {
		t.Errorf("voids %d", g.Voids())
	}
	lo, hi, _ := g.ElevationRange()
	if lo != 100 || hi != 330 {
		t.Errorf("range %v..%v", lo, hi)
	}
}

func TestReadASCCenterUTM(t *testing.T) {
	// testdata/asc/utm_center.asc with a WKT1 sidecar for WGS 84 / UTM zone
	// 27S. XLLCENTER/YLLCENTER are the south-west cell's centre.
	crs, err := ParsePRJ(string(readASCFixture(t, "utm_center.prj")))
	if err != nil || crs.EPSG != 32727 {
		t.Fatalf("ParsePRJ: %v %v", crs, err)
	}
	g, err := ReadASC(bytes.NewReader(readASCFixture(t, "utm_center.asc")), crs)
	if err != nil {
		t.Fatal(err)
	}
	if g.X0 != 500000 || g.Y0 != 9944030 || g.DX != 30 {
		t.Fatalf("origin %v %v cell %v", g.X0, g.Y0, g.DX)
	}
	p := UTM(27, true)
	lat, lon := p.Inverse(500030, 9944030) // centre of the cell holding 2.5
	if v, ok := g.Elevation(lat, lon); !ok || math.Abs(v-2.5) > 1e-6 {
		t.Errorf("Elevation at cell (1,0) = %v, %v", v, ok)
	}
	lat, lon = p.Inverse(500015, 9944000) // between -4 and -5
	if v, ok := g.Elevation(lat, lon); !ok || math.Abs(v+4.5) > 1e-6 {
		t.Errorf("Elevation between -4 and -5 = %v, %v", v, ok)
	}
	if g.Voids() != 1 {
		t.Errorf("voids %d (NODATA_VALUE -32768)", g.Voids())
	}
	// Extent in lon/lat holds the projected corners; zone 27 central
	// meridian is 21°W (6·27 − 183).
	w, s, e, n := g.Extent()
	if !(w < -21 && e > -21 && e-w < 0.001 && s < -0.5 && n > -0.51) {
		t.Errorf("extent %v %v %v %v", w, s, e, n)
	}
}

func TestReadASCRefuses(t *testing.T) {
	geo := CRS{EPSG: 4326}
	cases := []struct {
		name, text string
		crs        CRS
		line       int // expected ParseError line; 0 for other errors
	}{
		{"truncated", string(readASCFixture(t, "truncated.asc")), geo, 7},
		{"no crs", string(readASCFixture(t, "noprj.asc")), CRS{}, 0},
		{"huge", "ncols 1000000000\nnrows 1000000000\nxllcorner 0\nyllcorner 0\ncellsize 0.0000001\n1 2 3\n", geo, 0},
		{"big but truncated", "ncols 100000\nnrows 1000\nxllcorner 0\nyllcorner 0\ncellsize 0.00001\n1 2 3\n", geo, 6},
		{"bad number", "ncols 2\nnrows 1\nxllcorner 0\nyllcorner 0\ncellsize 1\n1 x2\n", geo, 6},
		{"extra samples", "ncols 1\nnrows 1\nxllcorner 0\nyllcorner 0\ncellsize 1\n1 2\n", geo, 6},
		{"unknown key", "ncols 1\nnrows 1\nfoo 3\n", geo, 3},
		{"missing cellsize", "ncols 1\nnrows 1\nxllcorner 0\nyllcorner 0\n1\n", geo, 5},
		{"negative cellsize", "ncols 1\nnrows 1\nxllcorner 0\nyllcorner 0\ncellsize -1\n1\n", geo, 6},
		{"fractional ncols", "ncols 1.5\nnrows 1\nxllcorner 0\nyllcorner 0\ncellsize 1\n1\n", geo, 6},
		{"duplicate key", "ncols 1\nncols 1\n", geo, 2},
		{"off the globe", "ncols 2\nnrows 2\nxllcorner 500000\nyllcorner 0\ncellsize 30\n1 2 3 4\n", geo, 0},
		{"unsupported crs", "ncols 1\nnrows 1\nxllcorner 0\nyllcorner 0\ncellsize 1\n1\n", CRS{EPSG: 3857}, 0},
		{"empty", "", geo, 1},
		{"header only", "ncols 1\nnrows 1\nxllcorner 0\nyllcorner 0\ncellsize 1\n", geo, 6},
	}
	for _, c := range cases {
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		_, err := ReadASC(strings.NewReader(c.text), c.crs)
		runtime.ReadMemStats(&after)
		if err == nil {
			t.Errorf("%s: accepted", c.name)
			continue
		}
		if alloc := after.TotalAlloc - before.TotalAlloc; alloc > 16<<20 {
			t.Errorf("%s: allocated %d bytes before refusing", c.name, alloc)
		}
		var pe *ParseError
		if c.line > 0 {
			if !errors.As(err, &pe) || pe.Line != c.line {
				t.Errorf("%s: want ParseError at line %d, got %v", c.name, c.line, err)
			}
		}
		if !strings.HasPrefix(err.Error(), "terrain:") {
			t.Errorf("%s: error %q lacks the package prefix", c.name, err)
		}
	}
	if _, err := ReadASC(strings.NewReader(string(readASCFixture(t, "noprj.asc"))), CRS{}); !errors.Is(err, ErrNoCRS) {
		t.Errorf("no CRS: %v", err)
	}
}

func TestParsePRJ(t *testing.T) {
	// WKT forms as written by GDAL (WKT1 with AUTHORITY), Esri (no
	// authority) and WKT2 (ID); the Esri keyword form is recalled from memory.
	cases := []struct {
		text string
		epsg int
	}{
		{`GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433],AUTHORITY["EPSG","4326"]]`, 4326},
		{`PROJCS["WGS_1984_UTM_Zone_33N",GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137.0,298.257223563]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]],PROJECTION["Transverse_Mercator"],PARAMETER["False_Easting",500000.0],PARAMETER["False_Northing",0.0],PARAMETER["Central_Meridian",15.0],PARAMETER["Scale_Factor",0.9996],PARAMETER["Latitude_Of_Origin",0.0],UNIT["Meter",1.0]]`, 32633},
		{`PROJCS["ETRS89 / UTM zone 32N",GEOGCS["ETRS89",DATUM["European_Terrestrial_Reference_System_1989",SPHEROID["GRS 1980",6378137,298.257222101]]],PROJECTION["Transverse_Mercator"],UNIT["metre",1]]`, 25832},
		{`PROJCRS["WGS 84 / UTM zone 18S",BASEGEOGCRS["WGS 84",DATUM["World Geodetic System 1984",ELLIPSOID["WGS 84",6378137,298.257223563]]],CONVERSION["UTM zone 18S",METHOD["Transverse Mercator"]],CS[Cartesian,2],ID["EPSG",32718]]`, 32718},
		{"Projection    UTM\nZone          33\nDatum         WGS84\nUnits         METERS\n", 32633},
		{"Projection GEOGRAPHIC\nDatum WGS84\nUnits DD\n", 4326},
	}
	for _, c := range cases {
		crs, err := ParsePRJ(c.text)
		if err != nil || crs.EPSG != c.epsg {
			t.Errorf("ParsePRJ(%.40q) = %v, %v; want %d", c.text, crs, err, c.epsg)
		}
	}
	for _, bad := range []string{
		`PROJCS["WGS 84 / Pseudo-Mercator",GEOGCS["WGS 84"],PROJECTION["Mercator_1SP"],AUTHORITY["EPSG","3857"]]`,
		`PROJCS["NAD27 / UTM zone 11N",GEOGCS["NAD27",DATUM["North_American_Datum_1927"]],PROJECTION["Transverse_Mercator"]]`,
		`GEOGCS["NAD27",DATUM["North_American_Datum_1927"]]`,
		"hello",
		"",
	} {
		if crs, err := ParsePRJ(bad); err == nil {
			t.Errorf("ParsePRJ(%.40q) = %v, want an error", bad, crs)
		}
	}
}

func TestReadASCWindow(t *testing.T) {
	// A 200×100 grid with value 1000·row + col, read whole and by window.
	g := &Grid{CRS: CRS{EPSG: 4326}, Cols: 200, Rows: 100, X0: -24.9995, Y0: -0.0005, DX: 0.001, DY: 0.001}
	g.Elev = make([]float32, g.Cols*g.Rows)
	for i := range g.Elev {
		g.Elev[i] = float32(1000*(i/g.Cols) + i%g.Cols)
	}
	g.Elev[5] = float32(math.NaN())
	var buf bytes.Buffer
	if err := WriteASC(&buf, g); err != nil {
		t.Fatal(err)
	}
	full, err := ReadASC(bytes.NewReader(buf.Bytes()), g.CRS)
	if err != nil {
		t.Fatal(err)
	}
	if full.Cols != 200 || full.Rows != 100 || math.Abs(full.X0-g.X0) > 1e-12 || math.Abs(full.Y0-g.Y0) > 1e-12 || full.Voids() != 1 {
		t.Fatalf("round trip header %d×%d %v %v voids %d", full.Cols, full.Rows, full.X0, full.Y0, full.Voids())
	}
	for i, v := range g.Elev {
		if v == v && full.Elev[i] != v {
			t.Fatalf("sample %d: %v != %v", i, full.Elev[i], v)
		}
	}
	w, err := ReadASCWindow(bytes.NewReader(buf.Bytes()), g.CRS, -24.95, -0.08, -24.9, -0.05)
	if err != nil {
		t.Fatal(err)
	}
	// Columns 48..101 and rows 48..81 (window plus one cell each side).
	if w.Cols != 54 || w.Rows != 34 {
		t.Errorf("window %d×%d", w.Cols, w.Rows)
	}
	for _, pt := range [][2]float64{{-0.08, -24.95}, {-0.05, -24.9}, {-0.0654, -24.9321}} {
		a, _ := full.Elevation(pt[0], pt[1])
		b, ok := w.Elevation(pt[0], pt[1])
		if !ok || math.Abs(a-b) > 1e-6 {
			t.Errorf("at %v: window %v, full %v", pt, b, a)
		}
	}
	if _, err := ReadASCWindow(bytes.NewReader(buf.Bytes()), g.CRS, 10, 10, 11, 11); !errors.Is(err, ErrOutside) {
		t.Errorf("outside: %v", err)
	}
	// A window in the north rows stops reading early: a truncated tail is
	// not even seen.
	cut := buf.Bytes()[:buf.Len()/2]
	if _, err := ReadASCWindow(bytes.NewReader(cut), g.CRS, -24.95, -0.01, -24.9, -0.005); err != nil {
		t.Errorf("north window of a half file: %v", err)
	}
}

func TestParseNumber(t *testing.T) {
	// Decimal notation: common practice, no source.
	cases := map[string]float64{"0": 0, "-12": -12, "+3.5": 3.5, "1234.5678": 1234.5678, "-9999": -9999, "1e3": 1000, "-2.5E-1": -0.25, ".5": 0.5, "7.": 7}
	for s, want := range cases {
		if v, ok := parseNumber([]byte(s)); !ok || v != want {
			t.Errorf("parseNumber(%q) = %v, %v", s, v, ok)
		}
	}
	for _, s := range []string{"", "-", ".", "1.2.3", "abc", "1,5"} {
		if _, ok := parseNumber([]byte(s)); ok {
			t.Errorf("parseNumber(%q) accepted", s)
		}
	}
	if v, ok := parseNumber([]byte("nan")); !ok || !math.IsNaN(v) {
		t.Errorf("nan: %v %v", v, ok)
	}
}

func BenchmarkReadASC1000(b *testing.B) {
	g := Synthetic(1, 1000, 1000, 1.0/3600)
	var buf bytes.Buffer
	if err := WriteASC(&buf, g); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(buf.Len()))
	b.ReportAllocs()
	for b.Loop() {
		if _, err := ReadASC(bytes.NewReader(buf.Bytes()), g.CRS); err != nil {
			b.Fatal(err)
		}
	}
}

func ExampleGrid_Elevation() {
	text := "ncols 2\nnrows 2\nxllcorner -24.5\nyllcorner -0.5\ncellsize 0.5\n100 200\n300 400\n"
	g, err := ReadASC(strings.NewReader(text), CRS{EPSG: 4326})
	if err != nil {
		fmt.Println(err)
		return
	}
	v, ok := g.Elevation(0, -24.0) // midway between the four cell centres
	fmt.Println(v, ok)
	// Output: 250 true
}
