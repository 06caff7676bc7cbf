package render

import (
	"bufio"
	"compress/zlib"
	"encoding/binary"
	"fmt"
	"hash/crc32"
	"image"
	"image/png"
	"io"
)

// pngLevel is the zlib level of the maps' PNGs. Measured on the demo's six
// maps (one core, 2026-12-02): image/png at zlib's fastest level with its
// per-row adaptive filters, 0.70–0.85 s and 6.28 MB; unfiltered rows at
// level 1, 0.28 s and 5.93 MB; level 2, 0.26 s and 5.30 MB; level 3,
// 0.26–0.34 s and 5.15 MB; level 4 (lazy matching starts), 0.34–0.48 s and
// 4.15 MB; level 5, 0.39 s and 3.75 MB; level 6, 0.48 s and 3.54 MB.
// Level 3 is the fastest of them and still makes the files (and the base64
// in the HTML reports) 18 % smaller than before; level 4 would take another
// 0.1 s of the demo for files a fifth smaller again.
const pngLevel = 3

// encodePNG writes img as a PNG. An opaque *image.RGBA (every map: the
// paper is opaque and every layer is drawn over it) is written as 8-bit RGB
// with filter type 0 (None) on every row, which the maps compress better
// with than with the adaptive per-row filters of image/png (hillshaded
// relief has few runs that a Sub, Up or Paeth prediction makes longer, and
// choosing a filter costs as much as compressing), and much faster. Anything
// else goes through image/png.
//
// Format: PNG (ISO/IEC 15948:2004; W3C PNG second edition): the 8-byte
// signature, an IHDR chunk (width, height, bit depth 8, colour type 2, no
// interlace), the zlib stream (RFC 1950/1951) of the filtered rows split
// into IDAT chunks, and IEND; each chunk is length, type, data and the
// CRC-32 of type and data.
func encodePNG(w io.Writer, img image.Image) error {
	m, ok := img.(*image.RGBA)
	if !ok || !opaqueRGBA(m) {
		enc := png.Encoder{CompressionLevel: png.BestSpeed}
		if err := enc.Encode(w, img); err != nil {
			return fmt.Errorf("render: writing PNG: %w", err)
		}
		return nil
	}
	if err := encodeRGB(w, m); err != nil {
		return fmt.Errorf("render: writing PNG: %w", err)
	}
	return nil
}

// opaqueRGBA reports whether every pixel of m has alpha 255.
func opaqueRGBA(m *image.RGBA) bool {
	b := m.Rect
	for y := b.Min.Y; y < b.Max.Y; y++ {
		row := m.Pix[m.PixOffset(b.Min.X, y):m.PixOffset(b.Max.X, y)]
		for i := 3; i < len(row); i += 4 {
			if row[i] != 255 {
				return false
			}
		}
	}
	return true
}

// chunkWriter writes each Write as one PNG chunk of type typ.
type chunkWriter struct {
	w   io.Writer
	typ string
	err error
}

func (c *chunkWriter) Write(p []byte) (int, error) {
	if c.err != nil {
		return 0, c.err
	}
	total := len(p)
	for len(p) > 0 {
		n := min(len(p), 1<<30) // a chunk's length is at most 2³¹−1
		c.err = writeChunk(c.w, c.typ, p[:n])
		if c.err != nil {
			return 0, c.err
		}
		p = p[n:]
	}
	return total, nil
}

// writeChunk writes one PNG chunk: length, type, data, CRC-32 (IEEE) of
// type and data.
func writeChunk(w io.Writer, typ string, data []byte) error {
	var head [8]byte
	binary.BigEndian.PutUint32(head[:4], uint32(len(data)))
	copy(head[4:], typ)
	crc := crc32.NewIEEE()
	crc.Write(head[4:])
	crc.Write(data)
	var tail [4]byte
	binary.BigEndian.PutUint32(tail[:], crc.Sum32())
	for _, b := range [][]byte{head[:], data, tail[:]} {
		if _, err := w.Write(b); err != nil {
			return err
		}
	}
	return nil
}

// encodeRGB writes an opaque m as an 8-bit RGB PNG with unfiltered rows.
func encodeRGB(w io.Writer, m *image.RGBA) error {
	b := m.Rect
	wd, ht := b.Dx(), b.Dy()
	if _, err := io.WriteString(w, "\x89PNG\r\n\x1a\n"); err != nil {
		return err
	}
	var ihdr [13]byte
	binary.BigEndian.PutUint32(ihdr[0:4], uint32(wd))
	binary.BigEndian.PutUint32(ihdr[4:8], uint32(ht))
	ihdr[8] = 8 // bit depth
	ihdr[9] = 2 // colour type: truecolour (RGB)
	// ihdr[10:13]: compression 0 (zlib), filter method 0, no interlace
	if err := writeChunk(w, "IHDR", ihdr[:]); err != nil {
		return err
	}
	cw := &chunkWriter{w: w, typ: "IDAT"}
	bw := bufio.NewWriterSize(cw, 1<<16)
	zw, err := zlib.NewWriterLevel(bw, pngLevel)
	if err != nil {
		return err
	}
	row := make([]byte, 1+3*wd) // row[0] = 0: filter type None
	for y := b.Min.Y; y < b.Max.Y; y++ {
		src := m.Pix[m.PixOffset(b.Min.X, y):m.PixOffset(b.Max.X, y)]
		dst := row[1:]
		for i, j := 0, 0; i+3 < len(src); i, j = i+4, j+3 {
			dst[j], dst[j+1], dst[j+2] = src[i], src[i+1], src[i+2]
		}
		if _, err := zw.Write(row); err != nil {
			return err
		}
	}
	if err := zw.Close(); err != nil {
		return err
	}
	if err := bw.Flush(); err != nil {
		return err
	}
	if cw.err != nil {
		return cw.err
	}
	return writeChunk(w, "IEND", nil)
}
