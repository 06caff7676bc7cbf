package terrain

import (
	"io"
	"math"
	"testing"
)

// cyclicReader is a file of size bytes whose content repeats pattern and
// which ends (io.EOF) after avail bytes: a way to fuzz multi-megabyte .hgt
// tiles, and truncated ones, from short inputs.
type cyclicReader struct {
	pattern []byte
	avail   int64
}

func (c cyclicReader) ReadAt(p []byte, off int64) (int, error) {
	if off < 0 {
		return 0, io.ErrUnexpectedEOF
	}
	n := 0
	for n < len(p) && off+int64(n) < c.avail {
		if len(c.pattern) == 0 {
			p[n] = 0
		} else {
			p[n] = c.pattern[(off+int64(n))%int64(len(c.pattern))]
		}
		n++
	}
	if n < len(p) {
		return n, io.EOF
	}
	return n, nil
}

// FuzzReadHGT feeds tile names, declared sizes, truncations, contents and
// windows to the .hgt reader. Seeds are built like the test tiles in
// testdata/hgt/README.md. It must never panic; a grid it returns must be
// consistent (dimensions, integer samples or NaN, inside the tile).
func FuzzReadHGT(f *testing.F) {
	s3, s1 := int64(2*1201*1201), int64(2*3601*3601)
	f.Add("N34W119.hgt", s3, int64(0), []byte{0x04, 0xD3, 0x80, 0x00}, -118.9, 34.1, -118.8, 34.2)
	f.Add("S01W025.hgt", s3, int64(0), []byte{0x00, 0x96}, -30.0, -5.0, 10.0, 5.0)
	f.Add("N00E000.hgt", s1, int64(0), []byte{0xff, 0xff, 0x12}, 0.5, 0.5, 0.51, 0.51)
	f.Add("N00E000.hgt", s1, int64(1000), []byte{0x01}, 0.0, 0.0, 1.0, 1.0)
	f.Add("N00E000.hgt", s3-2, int64(0), []byte{0x01}, 0.0, 0.0, 1.0, 1.0)
	f.Add("bad.hgt", s3, int64(0), []byte{}, 0.0, 0.0, 1.0, 1.0)
	f.Fuzz(func(t *testing.T, name string, size, cut int64, pattern []byte, w, s, e, n float64) {
		if len(pattern) > 4096 || len(name) > 64 {
			return
		}
		h, err := ReadHGTInfo(name, size)
		if err != nil {
			return
		}
		r := cyclicReader{pattern: pattern, avail: size - max(cut, 0)}
		var g *Grid
		if size == s3 && w == 0 && s == 0 {
			g, err = ReadHGT(r, size, name)
		} else {
			g, err = ReadHGTWindow(r, size, name, w, s, e, n)
		}
		if err != nil {
			return
		}
		if g.Cols < 1 || g.Rows < 1 || g.Cols > h.Cols || g.Rows > h.Rows || len(g.Elev) != g.Cols*g.Rows {
			t.Fatalf("inconsistent grid %d×%d len %d", g.Cols, g.Rows, len(g.Elev))
		}
		for _, v := range g.Elev {
			if v == v && (v != float32(math.Trunc(float64(v))) || v < -32767 || v > 32767) {
				t.Fatalf("sample %v is not an int16 elevation", v)
			}
		}
		gw, gs, ge, gn := g.Extent()
		hw, hs, he, hn := h.Extent()
		if gw < hw-1e-9 || gs < hs-1e-9 || ge > he+1e-9 || gn > hn+1e-9 {
			t.Fatalf("window extent %v %v %v %v outside tile %v %v %v %v", gw, gs, ge, gn, hw, hs, he, hn)
		}
	})
}
