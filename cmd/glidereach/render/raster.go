// The edge walk (lineTo) below is copied from golang.org/x/image/vector
// (raster_floating.go, floatingLineTo), Copyright 2016 The Go Authors, used
// under its BSD-style licence:
//
// Redistribution and use in source and binary forms, with or without
// modification, are permitted provided that the following conditions are
// met:
//
//   - Redistributions of source code must retain the above copyright
//     notice, this list of conditions and the following disclaimer.
//   - Redistributions in binary form must reproduce the above copyright
//     notice, this list of conditions and the following disclaimer in the
//     documentation and/or other materials provided with the distribution.
//   - Neither the name of Google LLC nor the names of its contributors may
//     be used to endorse or promote products derived from this software
//     without specific prior written permission.
//
// THIS SOFTWARE IS PROVIDED BY THE COPYRIGHT HOLDERS AND CONTRIBUTORS "AS
// IS" AND ANY EXPRESS OR IMPLIED WARRANTIES, INCLUDING, BUT NOT LIMITED TO,
// THE IMPLIED WARRANTIES OF MERCHANTABILITY AND FITNESS FOR A PARTICULAR
// PURPOSE ARE DISCLAIMED. IN NO EVENT SHALL THE COPYRIGHT OWNER OR
// CONTRIBUTORS BE LIABLE FOR ANY DIRECT, INDIRECT, INCIDENTAL, SPECIAL,
// EXEMPLARY, OR CONSEQUENTIAL DAMAGES (INCLUDING, BUT NOT LIMITED TO,
// PROCUREMENT OF SUBSTITUTE GOODS OR SERVICES; LOSS OF USE, DATA, OR
// PROFITS; OR BUSINESS INTERRUPTION) HOWEVER CAUSED AND ON ANY THEORY OF
// LIABILITY, WHETHER IN CONTRACT, STRICT LIABILITY, OR TORT (INCLUDING
// NEGLIGENCE OR OTHERWISE) ARISING IN ANY WAY OUT OF THE USE OF THIS
// SOFTWARE, EVEN IF ADVISED OF THE POSSIBILITY OF SUCH DAMAGE.

package render

import (
	"image"
	"image/color"
	"math"
	"math/bits"
)

// bigRasterMin is golang.org/x/image/vector's floatingPointMathThreshold:
// a Rasterizer wider or taller than this uses its floating-point
// algorithm, the one bigRaster reproduces; smaller shapes stay with the
// library's fixed-point one.
const bigRasterMin = 512

// bigRaster draws a shape whose box is wider or taller than bigRasterMin
// pixels and gives every pixel the value golang.org/x/image/vector's
// Rasterizer gives it on amd64 (floating-point edge walk, SSE prefix sum,
// draw.Over of a uniform colour), but at a cost in proportion to the cells
// the edges cross, not to the box: a ring's outline across the whole map
// touches a few thousand of its two or three million cells.
//
// The library's Draw clears the box, sums it left to right and row after
// row (a sum carried from the end of a row into the next: an edge right of
// the box adds to the next row's first cell), and blends every cell, even
// those of coverage 0, which leave the pixel as it was. bigRaster marks
// each group of four cells an edge wrote (one bit a group); a run of cells
// no edge touched adds 0 to the running sum, so every one of them has the
// coverage of the last cell before it, computed once: 0 outside a shape
// and inside an outline (not blended at all), full inside a fill (blended
// through a table of the 256 channel values). The sum is the library's SSE
// one (floatingAccumulateMaskSIMD): in groups of four cells from the start
// of the box, lanes s0, s0+s1, (s1+s2)+s0, (s2+s3)+(s0+s1), each plus the
// sum so far (float32 addition is not associative, so the grouping is
// kept), and the last len % 4 cells one at a time.
// TestBigRasterMatchesVector compares it with the library on random
// shapes, box sizes and colours.
type bigRaster struct {
	w, h     int
	buf      []float32 // area and cover per cell, w·h; all zero between shapes
	dirty    []uint64  // bit g: an edge wrote one of cells 4g … 4g+3
	penX     float32
	penY     float32
	firstX   float32
	firstY   float32
	mask     []uint32      // masks of the cells being blended
	lut      [4][256]uint8 // blend table for lutMask
	lutMask  uint32
	lutCol   color.RGBA
	lutValid bool
}

// reset starts a shape on a w×h box.
func (z *bigRaster) reset(w, h int) {
	z.w, z.h = w, h
	if n := w * h; n > len(z.buf) {
		z.buf = make([]float32, n) // the old one is all zero; no need to keep it
	}
	if g := (w*h+255)/256 + 1; g > len(z.dirty) {
		z.dirty = make([]uint64, g) // likewise all zero
	}
	z.penX, z.penY, z.firstX, z.firstY = 0, 0, 0, 0
}

func (z *bigRaster) moveTo(x, y float32) {
	z.firstX, z.firstY, z.penX, z.penY = x, y, x, y
}

func (z *bigRaster) closePath() { z.lineTo(z.firstX, z.firstY) }

// touch records that row y's cells i0 … i1 (clamped as the edge walk
// clamps them: below 0 to 0, from w on to w, which is the next row's first
// cell) were written.
func (z *bigRaster) touch(y int32, i0, i1 uint) {
	base := int(y) * z.w
	g0, g1 := (base+int(i0))>>2, min(base+int(i1), z.w*z.h-1)>>2
	for g := g0; g <= g1; g++ {
		z.dirty[g>>6] |= 1 << (g & 63)
	}
}

func rclamp(i, width int32) uint {
	if i < 0 {
		return 0
	}
	if i < width {
		return uint(i)
	}
	return uint(width)
}

// lineTo is golang.org/x/image/vector's floatingLineTo (v0.48.0), with the
// cells it writes recorded by touch.
func (z *bigRaster) lineTo(bx, by float32) {
	ax, ay := z.penX, z.penY
	z.penX, z.penY = bx, by
	dir := float32(1)
	if ay > by {
		dir, ax, ay, bx, by = -1, bx, by, ax, ay
	}
	if by-ay <= 0.000001 {
		return
	}
	dxdy := (bx - ax) / (by - ay)

	x := ax
	y := int32(math.Floor(float64(ay)))
	yMax := int32(math.Ceil(float64(by)))
	if yMax > int32(z.h) {
		yMax = int32(z.h)
	}
	width := int32(z.w)

	for ; y < yMax; y++ {
		dy := min(float32(y+1), by) - max(float32(y), ay)
		// float32(…) around products: no fused multiply-add, as in the
		// library, so the rounding is the same.
		xNext := x + float32(dy*dxdy)
		if y < 0 {
			x = xNext
			continue
		}
		buf := z.buf[int(y)*z.w : z.w*z.h]
		d := float32(dy * dir)
		x0, x1 := x, xNext
		if x > xNext {
			x0, x1 = x1, x0
		}
		x0i := int32(math.Floor(float64(x0)))
		x0Floor := float32(x0i)
		x1i := int32(math.Ceil(float64(x1)))
		x1Ceil := float32(x1i)

		if x1i <= x0i+1 {
			xmf := float32(0.5*(x+xNext)) - x0Floor
			i0, i1 := rclamp(x0i+0, width), rclamp(x0i+1, width)
			if i0 < uint(len(buf)) {
				buf[i0] += d - float32(d*xmf)
			}
			if i1 < uint(len(buf)) {
				buf[i1] += float32(d * xmf)
			}
			z.touch(y, i0, i1)
		} else {
			s := 1 / (x1 - x0)
			x0f := x0 - x0Floor
			oneMinusX0f := 1 - x0f
			a0 := float32(0.5 * s * oneMinusX0f * oneMinusX0f)
			x1f := x1 - x1Ceil + 1
			am := float32(0.5 * s * x1f * x1f)

			if i := rclamp(x0i, width); i < uint(len(buf)) {
				buf[i] += float32(d * a0)
			}

			if x1i == x0i+2 {
				if i := rclamp(x0i+1, width); i < uint(len(buf)) {
					buf[i] += float32(d * (1 - a0 - am))
				}
			} else {
				a1 := float32(s * (1.5 - x0f))
				if i := rclamp(x0i+1, width); i < uint(len(buf)) {
					buf[i] += float32(d * (a1 - a0))
				}
				dTimesS := float32(d * s)
				for xi := x0i + 2; xi < x1i-1; xi++ {
					if i := rclamp(xi, width); i < uint(len(buf)) {
						buf[i] += dTimesS
					}
				}
				a2 := a1 + float32(s*float32(x1i-x0i-3))
				if i := rclamp(x1i-1, width); i < uint(len(buf)) {
					buf[i] += float32(d * (1 - a2 - am))
				}
			}

			if i := rclamp(x1i, width); i < uint(len(buf)) {
				buf[i] += float32(d * am)
			}
			z.touch(y, rclamp(x0i, width), rclamp(x1i, width))
		}

		x = xNext
	}
}

// almost65536 is golang.org/x/image/vector's scale from coverage [0, 1] to
// a 16-bit mask (math.Float32bits 0x477fffff).
const almost65536 = float32(255.99998 * 256)

// coverage is the library's mask of running sum acc: |acc| capped at 1
// (SSE MINPS, which gives 1 for NaN), times almost65536, truncated.
func coverage(acc float32) uint32 {
	a := float32(math.Abs(float64(acc)))
	if !(a < 1) {
		a = 1
	}
	return uint32(almost65536 * a)
}

// draw blends col (premultiplied) through the shape's coverage over dst
// in rectangle r (r's size is the box's), clears the cells written, and
// forgets the shape.
func (z *bigRaster) draw(dst *image.RGBA, r image.Rectangle, col color.RGBA) {
	sr, sg, sb, sa := col.RGBA()
	w, n := z.w, z.w*z.h
	n4 := n &^ 3
	var off float32 // the running sum
	// blend composites cells [i, j) of one row; mask nil: every cell of
	// mask ma (0 leaves the pixels as they are), else cell i+k of mask[k].
	blend := func(i, j int, ma uint32, mask []uint32) {
		if i >= j || (mask == nil && ma == 0) {
			return
		}
		y, x := i/w, i%w
		p := dst.Pix[dst.PixOffset(r.Min.X+x, r.Min.Y+y):]
		p = p[: 4*(j-i) : 4*(j-i)]
		if mask == nil && j-i >= 64 {
			lut := z.table(ma, col, sr, sg, sb, sa)
			for k := 0; k < len(p); k += 4 {
				q := p[k : k+4 : k+4]
				q[0], q[1], q[2], q[3] = lut[0][q[0]], lut[1][q[1]], lut[2][q[2]], lut[3][q[3]]
			}
			return
		}
		for k := 0; k < len(p); k += 4 {
			if mask != nil {
				ma = mask[k/4]
				if ma == 0 {
					continue
				}
			}
			a := 0xffff - (sa * ma / 0xffff)
			q := p[k : k+4 : k+4]
			q[0] = uint8(((uint32(q[0])*0x101*a + sr*ma) / 0xffff) >> 8)
			q[1] = uint8(((uint32(q[1])*0x101*a + sg*ma) / 0xffff) >> 8)
			q[2] = uint8(((uint32(q[2])*0x101*a + sb*ma) / 0xffff) >> 8)
			q[3] = uint8(((uint32(q[3])*0x101*a + sa*ma) / 0xffff) >> 8)
		}
	}
	// rows splits cells [i, j) (any rows) into rows for blend.
	rows := func(i, j int, ma uint32, mask []uint32) {
		for i < j {
			e := min(j, (i/w+1)*w)
			if mask != nil {
				blend(i, e, 0, mask[:e-i])
				mask = mask[e-i:]
			} else {
				blend(i, e, ma, nil)
			}
			i = e
		}
	}
	// sum runs the sum over cells [i, j), i a multiple of 4, clears them
	// and blends each with its own mask.
	sum := func(i, j int) {
		if cap(z.mask) < j-i {
			z.mask = make([]uint32, j-i+1024)
		}
		m := z.mask[:j-i]
		k := 0
		for ; i+k < j && i+k < n4; k += 4 {
			s := z.buf[i+k : i+k+4 : i+k+4]
			t0, t1, t2, t3 := s[0]+0, s[1]+s[0], s[2]+s[1], s[3]+s[2]
			l0, l1, l2, l3 := t0+0, t1+0, t2+t0, t3+t1
			l0, l1, l2, l3 = l0+off, l1+off, l2+off, l3+off
			off = l3
			mm := m[k : k+4 : k+4]
			mm[0], mm[1], mm[2], mm[3] = coverage(l0), coverage(l1), coverage(l2), coverage(l3)
			clear(s)
		}
		for ; i+k < j; k++ { // the last n % 4 cells, one at a time
			off = z.buf[i+k] + off
			m[k] = coverage(off)
			z.buf[i+k] = 0
		}
		rows(i, j, 0, m)
	}
	at := 0 // cells before at are done
	for wi, word := range z.dirty[:(n+255)/256] {
		if word == 0 {
			continue
		}
		z.dirty[wi] = 0
		for word != 0 {
			// A run of dirty groups: bits b0 … b1−1 of this word.
			b0 := bits.TrailingZeros64(word)
			b1 := b0 + bits.TrailingZeros64(^(word >> b0))
			if b1 >= 64 {
				word = 0
			} else {
				word &^= (1<<(b1-b0) - 1) << b0
			}
			i, j := (wi*64+b0)*4, min((wi*64+b1)*4, n)
			rows(at, i, coverage(off), nil) // no edge wrote there: the sum stays as it was
			sum(i, j)
			at = j
		}
	}
	rows(at, n, coverage(off), nil)
}

// table is the blend of col at mask ma for every channel value, as the
// library computes it per pixel.
func (z *bigRaster) table(ma uint32, col color.RGBA, sr, sg, sb, sa uint32) *[4][256]uint8 {
	if z.lutValid && z.lutMask == ma && z.lutCol == col {
		return &z.lut
	}
	a := 0xffff - (sa * ma / 0xffff)
	for v := uint32(0); v < 256; v++ {
		z.lut[0][v] = uint8(((v*0x101*a + sr*ma) / 0xffff) >> 8)
		z.lut[1][v] = uint8(((v*0x101*a + sg*ma) / 0xffff) >> 8)
		z.lut[2][v] = uint8(((v*0x101*a + sb*ma) / 0xffff) >> 8)
		z.lut[3][v] = uint8(((v*0x101*a + sa*ma) / 0xffff) >> 8)
	}
	z.lutMask, z.lutCol, z.lutValid = ma, col, true
	return &z.lut
}
