package render

import (
	"bytes"
	"encoding/binary"
	"errors"
	"image"
	"image/color"
	"image/png"
	"io"
	"math/rand/v2"
	"testing"
)

// noiseRGBA is an opaque image of random pixels over bounds b (any origin).
func noiseRGBA(b image.Rectangle, seed uint64) *image.RGBA {
	m := image.NewRGBA(b)
	rng := rand.New(rand.NewPCG(seed, 1))
	for i := range m.Pix {
		m.Pix[i] = uint8(rng.IntN(256))
		if i%4 == 3 {
			m.Pix[i] = 255
		}
	}
	return m
}

// TestEncodePNGRoundTrip checks encodePNG against an independent PNG
// decoder, the standard library's image/png (which verifies every chunk's
// CRC-32 and the zlib stream's Adler-32): every decoded pixel equals the
// source pixel for opaque maps (written by encodeRGB); other images are
// what image/png writes.
func TestEncodePNGRoundTrip(t *testing.T) {
	translucent := noiseRGBA(image.Rect(0, 0, 40, 30), 2)
	translucent.Pix[4*7+3] = 128
	translucent.Pix[4*7], translucent.Pix[4*7+1], translucent.Pix[4*7+2] = 100, 60, 20 // premultiplied ≤ alpha
	gray := image.NewGray(image.Rect(0, 0, 17, 5))
	for i := range gray.Pix {
		gray.Pix[i] = uint8(i * 3)
	}
	mapImg, err := Render(sampleScene(hillyLocal(120, 120, 300)), 400)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name    string
		img     image.Image
		rgbPath bool // written as colour type 2 by encodeRGB
	}{
		{"rendered map", mapImg, true},
		{"noise 1×1", noiseRGBA(image.Rect(0, 0, 1, 1), 3), true},
		{"noise, origin not at 0,0", noiseRGBA(image.Rect(-5, 7, 300, 211), 4), true},
		{"sub-image (stride wider than a row)", noiseRGBA(image.Rect(0, 0, 200, 100), 5).SubImage(image.Rect(13, 9, 150, 77)), true},
		{"translucent pixel: image/png", translucent, false},
		{"grey image: image/png", gray, false},
	} {
		var buf bytes.Buffer
		if err := encodePNG(&buf, c.img); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		data := buf.Bytes()
		// PNG (ISO/IEC 15948:2004) §5.2 signature; §11.2.2 IHDR: width,
		// height, bit depth, colour type at byte 8+8+9.
		if !bytes.HasPrefix(data, []byte("\x89PNG\r\n\x1a\n\x00\x00\x00\x0dIHDR")) {
			t.Errorf("%s: header % x", c.name, data[:16])
			continue
		}
		b := c.img.Bounds()
		if w, h := binary.BigEndian.Uint32(data[16:20]), binary.BigEndian.Uint32(data[20:24]); int(w) != b.Dx() || int(h) != b.Dy() {
			t.Errorf("%s: IHDR %d×%d, want %d×%d", c.name, w, h, b.Dx(), b.Dy())
		}
		if got := data[25] == 2 && data[24] == 8; got != c.rgbPath {
			t.Errorf("%s: 8-bit RGB %v, want %v (depth %d, colour type %d)", c.name, got, c.rgbPath, data[24], data[25])
		}
		if !c.rgbPath { // the same bytes image/png writes (it keeps 8 bits of non-premultiplied colour)
			var std bytes.Buffer
			if err := (&png.Encoder{CompressionLevel: png.BestSpeed}).Encode(&std, c.img); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(data, std.Bytes()) {
				t.Errorf("%s: not what image/png writes", c.name)
			}
			continue
		}
		dec, err := png.Decode(bytes.NewReader(data))
		if err != nil {
			t.Errorf("%s: image/png cannot decode it: %v", c.name, err)
			continue
		}
		if dec.Bounds().Size() != b.Size() {
			t.Errorf("%s: decoded %v, want %v", c.name, dec.Bounds().Size(), b.Size())
			continue
		}
		bad := 0
		for y := 0; y < b.Dy(); y++ {
			for x := 0; x < b.Dx(); x++ {
				want := color.RGBA64Model.Convert(c.img.At(b.Min.X+x, b.Min.Y+y))
				got := color.RGBA64Model.Convert(dec.At(dec.Bounds().Min.X+x, dec.Bounds().Min.Y+y))
				if want != got {
					if bad == 0 {
						t.Errorf("%s: pixel (%d, %d) decodes to %v, want %v", c.name, x, y, got, want)
					}
					bad++
				}
			}
		}
		if bad > 0 {
			t.Errorf("%s: %d pixels differ", c.name, bad)
		}
	}
}

// failAfter fails every Write once n bytes have been written.
type failAfter struct{ n int }

var errDiskFull = errors.New("disk full")

func (f *failAfter) Write(p []byte) (int, error) {
	if len(p) > f.n {
		n := f.n
		f.n = 0
		return n, errDiskFull
	}
	f.n -= len(p)
	return len(p), nil
}

// TestEncodePNGWriteError: a failing writer at any point of the stream
// gives its error back (no panic, no silent success).
func TestEncodePNGWriteError(t *testing.T) {
	img := noiseRGBA(image.Rect(0, 0, 300, 300), 6)
	var full bytes.Buffer
	if err := encodePNG(&full, img); err != nil {
		t.Fatal(err)
	}
	for _, n := range []int{0, 5, 8, 20, 33, 40, 1000, full.Len() - 12, full.Len() - 1} {
		if err := encodePNG(&failAfter{n: n}, img); !errors.Is(err, errDiskFull) {
			t.Errorf("writer failing after %d of %d bytes: error %v, want %v", n, full.Len(), err, errDiskFull)
		}
	}
	if err := encodePNG(&failAfter{n: full.Len()}, img); err != nil {
		t.Errorf("writer with room for all %d bytes: %v", full.Len(), err)
	}
}

// BenchmarkEncodePNG encodes the map of BenchmarkRenderPNG (1600 px, a
// 2000 × 2000 Local): unfiltered RGB (encodePNG) against image/png at its
// fastest level, the encoder the maps had before. Reports the file size.
func BenchmarkEncodePNG(b *testing.B) {
	img, err := Render(sampleScene(hillyLocal(2000, 2000, 20)), 1600)
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct {
		name string
		enc  func(io.Writer, image.Image) error
	}{
		{"rgb-unfiltered", encodePNG},
		{"image-png-bestspeed", func(w io.Writer, m image.Image) error {
			return (&png.Encoder{CompressionLevel: png.BestSpeed}).Encode(w, m)
		}},
	} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			var buf bytes.Buffer
			stop := cpuMeter(b)
			for b.Loop() {
				buf.Reset()
				if err := c.enc(&buf, img); err != nil {
					b.Fatal(err)
				}
			}
			stop()
			b.ReportMetric(float64(buf.Len()), "bytes/file")
		})
	}
}
