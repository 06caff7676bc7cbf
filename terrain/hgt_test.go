package terrain

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// hgtValue is the invented elevation used to fill test tiles, a function of
// the sample's longitude and latitude so that neighbouring tiles agree on
// their shared edges (as real SRTM tiles do).
func hgtValue(lat, lon float64) int16 {
	return int16(math.Round(1000 + 300*math.Sin(lat*7) + 200*math.Cos(lon*5) + 50*lat - 3*lon))
}

// makeHGT writes an n×n tile named for its south-west corner into dir, with
// samples from hgtValue and the given (row, col) cells set to the void value.
func makeHGT(t testing.TB, dir string, lat, lon, n int, voids ...[2]int) string {
	t.Helper()
	buf := make([]byte, 2*n*n)
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			v := hgtValue(float64(lat+1)-float64(r)/float64(n-1), float64(lon)+float64(c)/float64(n-1))
			buf[2*(r*n+c)], buf[2*(r*n+c)+1] = byte(uint16(v)>>8), byte(v)
		}
	}
	for _, rc := range voids {
		i := 2 * (rc[0]*n + rc[1])
		// Void value -32768 = bytes 0x80 0x00 (JPL SRTM FAQ).
		buf[i], buf[i+1] = 0x80, 0x00
	}
	p := filepath.Join(dir, HGTName(lat, lon))
	if err := os.WriteFile(p, buf, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestParseHGTName(t *testing.T) {
	// File names give the south-west corner (JPL SRTM FAQ; USGS SRTM docs).
	cases := []struct {
		name     string
		lat, lon int
		ok       bool
	}{
		{"N34W119.hgt", 34, -119, true},
		{"s01e024.hgt", -1, 24, true},
		{"/x/y/S90W180.SRTMGL1.hgt", -90, -180, true},
		{"N00E000.hgt", 0, 0, true},
		{"N90E000.hgt", 0, 0, false},
		{"N34X119.hgt", 0, 0, false},
		{"N3aW119.hgt", 0, 0, false},
		{"N+1W119.hgt", 0, 0, false},
		{"E34N119.hgt", 0, 0, false},
		{"N34.hgt", 0, 0, false},
		{"N34W181.hgt", 0, 0, false},
	}
	for _, c := range cases {
		lat, lon, err := ParseHGTName(c.name)
		if (err == nil) != c.ok || (c.ok && (lat != c.lat || lon != c.lon)) {
			t.Errorf("ParseHGTName(%q) = %d, %d, %v", c.name, lat, lon, err)
		}
		if !c.ok && !errors.Is(err, ErrHGTName) {
			t.Errorf("ParseHGTName(%q): error %v is not ErrHGTName", c.name, err)
		}
	}
}

func TestReadHGTKnownSample(t *testing.T) {
	// Index check from REFERENCES 6a (derived from the SRTM layout): in the
	// SRTM3 tile N34W119, the point 34.25N 118.75W is row (35-34.25)*1200 =
	// 900, column (-118.75+119)*1200 = 300, byte offset 2*(900*1201+300) =
	// 2,162,400; the big-endian bytes 0x04 0xD3 are 1235 m.
	dir := t.TempDir()
	buf := make([]byte, 2*1201*1201)
	buf[2162400], buf[2162401] = 0x04, 0xD3
	// A void at the next sample east (JPL SRTM FAQ: -32768 = 0x8000).
	buf[2162402], buf[2162403] = 0x80, 0x00
	p := filepath.Join(dir, "N34W119.hgt")
	if err := os.WriteFile(p, buf, 0o644); err != nil {
		t.Fatal(err)
	}
	g, err := ReadHGT(bytes.NewReader(buf), int64(len(buf)), p)
	if err != nil {
		t.Fatal(err)
	}
	if g.Cols != 1201 || g.Rows != 1201 || g.Format != "SRTM hgt" || g.CRS.EPSG != 4326 {
		t.Fatalf("header %d×%d %q %v", g.Cols, g.Rows, g.Format, g.CRS)
	}
	if v, ok := g.Elevation(34.25, -118.75); !ok || v != 1235 {
		t.Errorf("Elevation(34.25, -118.75) = %v, %v; want 1235", v, ok)
	}
	if v := g.Elev[900*1201+300]; v != 1235 {
		t.Errorf("Elev[900,300] = %v", v)
	}
	// Bilinear between the sample and the void touches the void.
	if _, ok := g.Elevation(34.25, -118.75+0.5/1200); ok {
		t.Error("sample touching a void reported as valid")
	}
	if n := g.Voids(); n != 1 {
		t.Errorf("Voids() = %d, want 1", n)
	}
	// Extent: cell edges, half a cell beyond the 34..35, -119..-118 tile
	// (the reading gdalinfo prints for SRTM tiles; common practice).
	w, s, e, n := g.Extent()
	h := 0.5 / 1200
	for _, d := range [][2]float64{{w, -119 - h}, {s, 34 - h}, {e, -118 + h}, {n, 35 + h}} {
		if math.Abs(d[0]-d[1]) > 1e-12 {
			t.Errorf("extent %v %v %v %v", w, s, e, n)
		}
	}
	// 3 arc-seconds north-south at 34.5N: M(34.5°)·π/180/1200 ≈ 92.4 m
	// (meridian radius of curvature, NIMA TR8350.2); east-west ×cos φ.
	ex, ny := g.CellSizeMetres()
	if math.Abs(ny-92.42) > 0.05 || math.Abs(ex-76.4) > 0.2 {
		t.Errorf("CellSizeMetres = %v, %v", ex, ny)
	}
}

func TestReadHGTWindowMatchesFull(t *testing.T) {
	dir := t.TempDir()
	p := makeHGT(t, dir, -1, -25, 1201, [2]int{10, 10})
	data, _ := os.ReadFile(p)
	full, err := ReadHGT(bytes.NewReader(data), int64(len(data)), p)
	if err != nil {
		t.Fatal(err)
	}
	for _, box := range [][4]float64{
		{-24.9, -0.9, -24.8, -0.7}, // narrow: per-row reads
		{-25.5, -0.6, -23.5, -0.5}, // wide, clipped on both sides
		{-25, -1, -24, 0},          // the whole tile
	} {
		g, err := ReadHGTWindow(bytes.NewReader(data), int64(len(data)), p, box[0], box[1], box[2], box[3])
		if err != nil {
			t.Fatal(err)
		}
		for _, pt := range [][2]float64{{box[1], box[0]}, {box[3], box[2]}, {(box[1] + box[3]) / 2, (box[0] + box[2]) / 2}} {
			lat, lon := math.Max(-1, math.Min(0, pt[0])), math.Max(-25, math.Min(-24, pt[1]))
			a, okA := full.Elevation(lat, lon)
			b, okB := g.Elevation(lat, lon)
			if math.Abs(a-b) > 1e-9 || okA != okB {
				t.Errorf("box %v at %v,%v: window %v %v, full %v %v", box, lat, lon, b, okB, a, okA)
			}
		}
	}
	if _, err := ReadHGTWindow(bytes.NewReader(data), int64(len(data)), p, 10, 10, 11, 11); !errors.Is(err, ErrOutside) {
		t.Errorf("window off the tile: %v", err)
	}
	// Values at sample positions are the written integers exactly.
	if v, ok := full.Elevation(-0.5, -24.5); !ok || v != float64(hgtValue(-0.5, -24.5)) {
		t.Errorf("centre sample %v, want %v", v, hgtValue(-0.5, -24.5))
	}
}

func TestHGTTileEdgeMatchesNeighbour(t *testing.T) {
	// SRTM edge rows and columns duplicate the neighbouring tiles' edges
	// (REFERENCES 6a; common practice). A point on the shared meridian or
	// parallel has the same elevation read from either tile and the mosaic.
	dir := t.TempDir()
	a := makeHGT(t, dir, -1, -25, 1201)
	b := makeHGT(t, dir, -1, -24, 1201)
	c := makeHGT(t, dir, 0, -25, 1201)
	read := func(p string) *Grid {
		data, _ := os.ReadFile(p)
		g, err := ReadHGT(bytes.NewReader(data), int64(len(data)), p)
		if err != nil {
			t.Fatal(err)
		}
		return g
	}
	ga, gb, gc := read(a), read(b), read(c)
	for _, lat := range []float64{-0.9, -0.5, -0.123456, -0.0001} {
		va, okA := ga.Elevation(lat, -24)
		vb, okB := gb.Elevation(lat, -24)
		if !okA || !okB || math.Abs(va-vb) > 1e-9 {
			t.Errorf("meridian -24 at %v: %v (%v) vs %v (%v)", lat, va, okA, vb, okB)
		}
	}
	for _, lon := range []float64{-24.9, -24.5, -24.01} {
		va, _ := ga.Elevation(0, lon)
		vc, _ := gc.Elevation(0, lon)
		if math.Abs(va-vc) > 1e-9 {
			t.Errorf("equator at %v: %v vs %v", lon, va, vc)
		}
	}
	src, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	w, s, e, n := src.Extent()
	if math.Abs(w+25) > 1e-3 || math.Abs(e+23) > 1e-3 || math.Abs(s+1) > 1e-3 || math.Abs(n-1) > 1e-3 {
		t.Errorf("mosaic extent %v %v %v %v", w, s, e, n)
	}
	m, err := src.Window(-24.1, -0.2, -23.9, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	if m.Format != "mosaic" {
		t.Errorf("window format %q", m.Format)
	}
	for _, pt := range [][2]float64{{-0.1, -24}, {-0.1, -24.05}, {-0.1, -23.95}, {0.05, -24.05}, {0, -24.07}} {
		want, _ := ga.Elevation(pt[0], pt[1])
		if pt[1] > -24 {
			want, _ = gb.Elevation(pt[0], pt[1])
		}
		if pt[0] > 0 {
			want, _ = gc.Elevation(pt[0], pt[1])
		}
		got, ok := m.Elevation(pt[0], pt[1])
		if !ok || math.Abs(got-want) > 1e-9 {
			t.Errorf("mosaic at %v: %v (%v), tile %v", pt, got, ok, want)
		}
	}
	// The north-east quarter has no tile: voids there.
	if _, ok := m.Elevation(0.05, -23.95); ok {
		t.Error("no tile covers 0.05N 23.95W but the mosaic has a value")
	}
}

func TestReadHGTRefusesBadFiles(t *testing.T) {
	full := 2 * 1201 * 1201
	cases := []struct {
		name string
		size int64
	}{
		{"N34W119.hgt", int64(full - 2)}, // truncated
		{"N34W119.hgt", 0},
		{"N34W119.hgt", int64(full + 2)},
		{"N34W119.hgt", 1 << 40}, // claims a terabyte
		{"tile.hgt", int64(full)},
	}
	for _, c := range cases {
		if _, err := ReadHGTInfo(c.name, c.size); err == nil {
			t.Errorf("ReadHGTInfo(%q, %d) accepted", c.name, c.size)
		}
	}
	// A reader shorter than the declared size fails with a clear error.
	short := make([]byte, full/2)
	if _, err := ReadHGT(bytes.NewReader(short), int64(full), "N34W119.hgt"); err == nil {
		t.Error("short reader accepted")
	}
}

func TestWriteHGTRoundTrip(t *testing.T) {
	dir := t.TempDir()
	p := makeHGT(t, dir, 10, 20, 1201, [2]int{5, 7})
	data, _ := os.ReadFile(p)
	g, err := ReadHGT(bytes.NewReader(data), int64(len(data)), p)
	if err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	if err := WriteHGT(&out, g); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(out.Bytes(), data) {
		t.Error("WriteHGT(ReadHGT(x)) != x")
	}
}

func benchHGT(b *testing.B, n int) (string, []byte) {
	dir := b.TempDir()
	p := makeHGT(b, dir, -1, -25, n)
	data, err := os.ReadFile(p)
	if err != nil {
		b.Fatal(err)
	}
	return p, data
}

// BenchmarkReadHGTFull loads a whole 3601×3601 SRTM1 tile from a file.
func BenchmarkReadHGTFull(b *testing.B) {
	p, data := benchHGT(b, 3601)
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		f, err := os.Open(p)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := ReadHGT(f, int64(len(data)), p); err != nil {
			b.Fatal(err)
		}
		f.Close()
	}
}

// BenchmarkReadHGTWindow500 reads a 500×500 window of a 3601×3601 tile.
func BenchmarkReadHGTWindow500(b *testing.B) {
	p, data := benchHGT(b, 3601)
	b.ReportAllocs()
	d := 496.0 / 3600 // 500 cells with the one-cell margins
	x0, y0 := -24.6+0.5/3600, -0.6+0.5/3600
	for b.Loop() {
		f, err := os.Open(p)
		if err != nil {
			b.Fatal(err)
		}
		g, err := ReadHGTWindow(f, int64(len(data)), p, x0, y0, x0+d, y0+d)
		if err != nil {
			b.Fatal(err)
		}
		if g.Cols != 500 || g.Rows != 500 {
			b.Fatalf("window %d×%d", g.Cols, g.Rows)
		}
		f.Close()
	}
}
