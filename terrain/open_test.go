package terrain

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func copyFixture(t *testing.T, dir string, names ...string) {
	t.Helper()
	for _, n := range names {
		b, err := os.ReadFile(filepath.Join("..", "testdata", "asc", n))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, n), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func TestOpenASC(t *testing.T) {
	src, err := Open(filepath.Join("..", "testdata", "asc", "geo_corner.asc"))
	if err != nil {
		t.Fatal(err)
	}
	w, s, e, n := src.Extent()
	if w != -24.5 || s != -0.5 || e != -23.5 || n != 0.25 {
		t.Errorf("extent %v %v %v %v", w, s, e, n)
	}
	// 0.25° north-south at 0.1° S: M·π/180·0.25 ≈ 27.6 km (WGS84 radii,
	// NIMA TR8350.2).
	if r := src.Resolution(); math.Abs(r-27640) > 30 {
		t.Errorf("resolution %v", r)
	}
	if d := src.Describe(); !strings.Contains(d, "ESRI ASCII grid") || !strings.Contains(d, "geo_corner.asc") {
		t.Errorf("describe %q", d)
	}
	g, err := src.Window(w, s, e, n)
	if err != nil {
		t.Fatal(err)
	}
	if g.Cols != 4 || g.Rows != 3 || g.Name != "geo_corner.asc" {
		t.Errorf("window %d×%d %q", g.Cols, g.Rows, g.Name)
	}
	// No .prj: refused, unless a CRS is given.
	p := filepath.Join("..", "testdata", "asc", "noprj.asc")
	_, err = Open(p)
	var fe *FileError
	if !errors.Is(err, ErrNoCRS) || !errors.As(err, &fe) || fe.Path != p {
		t.Errorf("no .prj: %v", err)
	}
	if _, err := OpenWith(OpenOptions{CRS: CRS{EPSG: 4326}}, p); err != nil {
		t.Errorf("with CRS: %v", err)
	}
}

func TestOpenErrors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "x.dem")
	os.WriteFile(bad, []byte("x"), 0o644)
	empty := filepath.Join(dir, "empty")
	os.Mkdir(empty, 0o755)
	short := filepath.Join(dir, "N00W025.hgt")
	os.WriteFile(short, make([]byte, 1000), 0o644)
	for _, c := range []struct {
		paths []string
		want  error
	}{
		{[]string{bad}, ErrUnknownFormat},
		{[]string{filepath.Join(dir, "missing.hgt")}, os.ErrNotExist},
		{[]string{empty}, nil},
		{[]string{short}, nil},
		{nil, nil},
	} {
		_, err := Open(c.paths...)
		if err == nil {
			t.Errorf("Open(%v) accepted", c.paths)
			continue
		}
		if c.want != nil && !errors.Is(err, c.want) {
			t.Errorf("Open(%v): %v, want %v", c.paths, err, c.want)
		}
		if !strings.Contains(err.Error(), "terrain") {
			t.Errorf("Open(%v): %q lacks the package prefix", c.paths, err)
		}
	}
}

func TestMosaicResamplesDifferentLattices(t *testing.T) {
	// An SRTM3 tile and an ASCII grid of coarser cells overlapping it: the
	// window is put on one lattice at the finer (SRTM) spacing, and the finer
	// data wins where both have a value.
	dir := t.TempDir()
	hp := makeHGT(t, dir, -1, -25, 1201)
	ap := filepath.Join(dir, "coarse.asc")
	text := "ncols 4\nnrows 4\nxllcorner -24.2\nyllcorner -0.6\ncellsize 0.1\n" +
		"500 500 500 500\n500 500 500 500\n500 500 500 500\n500 500 500 500\n"
	if err := os.WriteFile(ap, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	src, err := OpenWith(OpenOptions{CRS: CRS{EPSG: 4326}}, hp, ap)
	if err != nil {
		t.Fatal(err)
	}
	if r := src.Resolution(); math.Abs(r-92.6) > 1 {
		t.Errorf("resolution %v", r)
	}
	g, err := src.Window(-24.1, -0.5, -23.85, -0.3)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(g.DY*1200-1) > 0.01 {
		t.Errorf("lattice DY %v, want about 1/1200", g.DY)
	}
	// Inside the tile: the tile's value.
	want := float64(hgtValue(-0.4, -24.05))
	if v, ok := g.Elevation(-0.4, -24.05); !ok || math.Abs(v-want) > 2 {
		t.Errorf("in tile: %v %v, want about %v", v, ok, want)
	}
	// East of the tile: the coarse grid.
	if v, ok := g.Elevation(-0.4, -23.9); !ok || math.Abs(v-500) > 1e-9 {
		t.Errorf("coarse area: %v %v", v, ok)
	}
}

func TestOpenFillVoids(t *testing.T) {
	dir := t.TempDir()
	makeHGT(t, dir, -1, -25, 1201, [2]int{600, 600}, [2]int{600, 601})
	src, err := OpenWith(OpenOptions{FillVoids: 10}, dir)
	if err != nil {
		t.Fatal(err)
	}
	g, err := src.Window(-24.6, -0.6, -24.4, -0.4)
	if err != nil {
		t.Fatal(err)
	}
	if g.Voids() != 0 {
		t.Errorf("%d voids left", g.Voids())
	}
	src, _ = Open(dir)
	g, _ = src.Window(-24.6, -0.6, -24.4, -0.4)
	if g.Voids() != 2 {
		t.Errorf("default keeps voids: %d", g.Voids())
	}
}

// TestOpenGeoTIFFMatchesGDAL reads two GeoTIFF fixtures through Open (the
// dispatch, the lon/lat → CRS window conversion and, for UTM, our
// transverse Mercator) and compares the elevation at each listed cell
// centre with the value gdallocationinfo -valonly printed for that cell
// (testdata/geotiff/values.txt, made by testdata/geotiff/make.sh with GDAL).
func TestOpenGeoTIFFMatchesGDAL(t *testing.T) {
	text, err := os.ReadFile(filepath.Join("..", "testdata", "geotiff", "values.txt"))
	if err != nil {
		t.Skip("no GeoTIFF fixtures:", err)
	}
	for _, name := range []string{"geo_int16_strip_none.tif", "utm25828_int16_strip_packbits_nodata.tif"} {
		src, err := Open(filepath.Join("..", "testdata", "geotiff", name))
		if err != nil {
			t.Fatal(err)
		}
		w, s, e, n := src.Extent()
		g, err := src.Window(w, s, e, n)
		if err != nil {
			t.Fatal(err)
		}
		in, checked := false, 0
		for _, line := range strings.Split(string(text), "\n") {
			f := strings.Fields(line)
			if len(f) == 2 && f[0] == "fixture" {
				in = f[1] == name
			}
			if !in || len(f) != 4 || f[0] != "px" || f[3] == "" {
				continue
			}
			var col, row int
			var want float64
			if _, err := fmt.Sscan(f[1], &col); err != nil {
				continue
			}
			fmt.Sscan(f[2], &row)
			if _, err := fmt.Sscan(f[3], &want); err != nil {
				continue
			}
			lat, lon, err := g.fromCRS(g.X0+float64(col)*g.DX, g.Y0-float64(row)*g.DY)
			if err != nil {
				t.Fatal(err)
			}
			got, ok := g.Elevation(lat, lon)
			if want == -9999 { // the file's nodata value
				if ok {
					t.Errorf("%s px %d %d: %v, GDAL nodata", name, col, row, got)
				}
				continue
			}
			if !ok || math.Abs(got-want) > 1e-6 {
				t.Errorf("%s px %d %d: %v %v, gdallocationinfo %v", name, col, row, got, ok, want)
			}
			// The same through a small window around the point.
			sub, err := src.Window(lon-1e-4, lat-1e-4, lon+1e-4, lat+1e-4)
			if err != nil {
				t.Fatal(err)
			}
			if v, ok := sub.Elevation(lat, lon); !ok || math.Abs(v-want) > 1e-6 {
				t.Errorf("%s px %d %d via small window: %v %v", name, col, row, v, ok)
			}
			checked++
		}
		if checked < 10 {
			t.Errorf("%s: only %d GDAL values checked", name, checked)
		}
	}
}

// TestSourceContract runs every reader through the Source interface: a
// whole-extent window and a small window agree at the centre, the window
// misses cleanly outside, and the metadata is filled in.
func TestSourceContract(t *testing.T) {
	dir := t.TempDir()
	paths := []string{
		makeHGT(t, dir, -1, -25, 1201),
		filepath.Join("..", "testdata", "asc", "geo_corner.asc"),
		filepath.Join("..", "testdata", "asc", "utm_center.asc"),
		filepath.Join("..", "testdata", "geotiff", "geo_int16_tiled_lzw_pred2.tif"),
		filepath.Join("..", "testdata", "geotiff", "utm25828_int16_strip_packbits_nodata.tif"),
	}
	for _, p := range paths {
		if _, err := os.Stat(p); err != nil {
			t.Logf("skip %s: %v", p, err)
			continue
		}
		src, err := Open(p)
		if err != nil {
			t.Errorf("%s: %v", p, err)
			continue
		}
		if src.Resolution() <= 0 || src.Describe() == "" {
			t.Errorf("%s: resolution %v describe %q", p, src.Resolution(), src.Describe())
		}
		w, s, e, n := src.Extent()
		full, err := src.Window(w, s, e, n)
		if err != nil || len(full.Elev) != full.Cols*full.Rows {
			t.Errorf("%s: whole window: %v", p, err)
			continue
		}
		lat, lon := s+(n-s)*0.37, w+(e-w)*0.61
		a, okA := full.Elevation(lat, lon)
		d := math.Min(e-w, n-s) / 50
		part, err := src.Window(lon-d, lat-d, lon+d, lat+d)
		if err != nil {
			t.Errorf("%s: small window: %v", p, err)
			continue
		}
		b, okB := part.Elevation(lat, lon)
		if okA != okB || (okA && math.Abs(a-b) > 1e-6) {
			t.Errorf("%s: full %v %v, window %v %v", p, a, okA, b, okB)
		}
		if _, err := src.Window(w-10, s-10, w-9, s-9); !errors.Is(err, ErrOutside) {
			t.Errorf("%s: window outside: %v", p, err)
		}
	}
}
