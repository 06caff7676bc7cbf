package terrain

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// FuzzReadASC feeds ESRI ASCII grids to the reader, seeded from
// testdata/asc. It must never panic; a grid it returns must be consistent,
// survive a write/read round trip, and a window of its whole extent must
// give the same samples.
func FuzzReadASC(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join("..", "testdata", "asc", "*.asc"))
	for _, p := range files {
		b, err := os.ReadFile(p)
		if err == nil {
			f.Add(b, false)
			f.Add(b, true)
		}
	}
	f.Add([]byte("ncols 1\nnrows 1\nxllcenter 0\nyllcenter 0\ncellsize 1\nnodata_value 5\n5\n"), false)
	f.Fuzz(func(t *testing.T, data []byte, utm bool) {
		if len(data) > 1<<16 {
			return
		}
		crs := CRS{EPSG: 4326}
		if utm {
			crs = CRS{EPSG: 32727}
		}
		g, err := ReadASC(bytes.NewReader(data), crs)
		if err != nil {
			return
		}
		if g.Cols < 1 || g.Rows < 1 || len(g.Elev) != g.Cols*g.Rows || !(g.DX > 0) || !(g.DY > 0) {
			t.Fatalf("inconsistent grid %d×%d len %d cell %v %v", g.Cols, g.Rows, len(g.Elev), g.DX, g.DY)
		}
		w, s, e, n := g.Extent()
		win, err := ReadASCWindow(bytes.NewReader(data), crs, w, s, e, n)
		if err != nil {
			if crs.EPSG == 4326 {
				t.Fatalf("window of the whole extent: %v", err)
			}
			return // a UTM outline far outside the zone may not invert cleanly
		}
		if crs.EPSG == 4326 && (win.Cols != g.Cols || win.Rows != g.Rows) {
			t.Fatalf("whole-extent window %d×%d of %d×%d", win.Cols, win.Rows, g.Cols, g.Rows)
		}
		if g.DX != g.DY {
			return
		}
		for _, v := range g.Elev {
			if v == -9999 {
				return // would read back as NODATA
			}
		}
		var buf bytes.Buffer
		if err := WriteASC(&buf, g); err != nil {
			t.Fatal(err)
		}
		h, err := ReadASC(&buf, crs)
		if err != nil {
			t.Fatalf("round trip: %v", err)
		}
		if h.Cols != g.Cols || h.Rows != g.Rows {
			t.Fatalf("round trip size %d×%d, was %d×%d", h.Cols, h.Rows, g.Cols, g.Rows)
		}
		for i, v := range g.Elev {
			if u := h.Elev[i]; u != v && !(math.IsNaN(float64(u)) && math.IsNaN(float64(v))) {
				t.Fatalf("round trip sample %d: %v, was %v", i, u, v)
			}
		}
	})
}
