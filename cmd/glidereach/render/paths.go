package render

import (
	"image"
	"image/color"
	"math"

	"golang.org/x/image/vector"
)

// pt is a point in pixel coordinates (x right, y down).
type pt struct{ X, Y float64 }

// canvas draws anti-aliased vector shapes on an RGBA image with
// golang.org/x/image/vector. The rasterizer accumulates signed coverage:
// overlapping sub-paths of the same orientation merge, and of opposite
// orientation cancel. So every shape is drawn in one pass with each ring
// oriented by its role: outer rings and stroke pieces positive, holes
// negative (see addRing). That makes holes visible whatever the orientation
// of the input rings.
type canvas struct {
	img  *image.RGBA
	clip image.Rectangle // shapes are cut to this rectangle
	z    vector.Rasterizer
	big  bigRaster // shapes whose box is wider or taller than bigRasterMin
	// shape under construction, in pixel coordinates
	rings [][]pt
	signs []float64
}

// newCanvas returns a canvas on img, with the rasterizers' buffers of an
// earlier map when one was released (bigRaster's cells are all zero
// between shapes).
func newCanvas(img *image.RGBA) *canvas {
	c, ok := canvasPool.Get().(*canvas)
	if !ok {
		c = new(canvas)
	}
	c.img, c.clip = img, img.Bounds()
	c.rings, c.signs = c.rings[:0], c.signs[:0]
	return c
}

// release hands the canvas's buffers to the next map; c is not used again.
func (c *canvas) release() {
	c.img = nil
	clear(c.rings)
	c.rings, c.signs = c.rings[:0], c.signs[:0]
	canvasPool.Put(c)
}

// addRing adds a closed ring to the current shape; sign +1 for an area, −1
// for a hole in it.
func (c *canvas) addRing(r []pt, sign float64) {
	if len(r) >= 3 {
		c.rings = append(c.rings, r)
		c.signs = append(c.signs, sign)
	}
}

// signedArea is the shoelace area of ring r (pixel coordinates, y down).
func signedArea(r []pt) float64 {
	s := 0.0
	for i := range r {
		j := (i + 1) % len(r)
		s += r[i].X*r[j].Y - r[j].X*r[i].Y
	}
	return s / 2
}

// paint fills the current shape with col (premultiplied, may be
// translucent) and clears it.
func (c *canvas) paint(col color.RGBA) {
	defer func() { c.rings, c.signs = c.rings[:0], c.signs[:0] }()
	if len(c.rings) == 0 || col.A == 0 {
		return
	}
	bb := c.shapeBox()
	if bb.Empty() {
		return
	}
	if bb.Dx() > bigRasterMin || bb.Dy() > bigRasterMin {
		c.rasterize(&c.big, bb)
		c.big.draw(c.img, bb, col)
		return
	}
	c.rasterize(vectorSink{&c.z}, bb)
	c.z.Draw(c.img, bb, image.NewUniform(col), image.Point{})
}

// pathSink is a rasterizer paint feeds the rings to.
type pathSink interface {
	reset(w, h int)
	moveTo(x, y float32)
	lineTo(x, y float32)
	closePath()
}

// vectorSink adapts golang.org/x/image/vector's Rasterizer.
type vectorSink struct{ *vector.Rasterizer }

func (v vectorSink) reset(w, h int)      { v.Reset(w, h) }
func (v vectorSink) moveTo(x, y float32) { v.MoveTo(x, y) }
func (v vectorSink) lineTo(x, y float32) { v.LineTo(x, y) }
func (v vectorSink) closePath()          { v.ClosePath() }

// rasterize feeds the current shape's rings, oriented by their signs, to
// z in the coordinates of box bb.
func (c *canvas) rasterize(sink pathSink, bb image.Rectangle) {
	sink.reset(bb.Dx(), bb.Dy())
	ox, oy := float64(bb.Min.X), float64(bb.Min.Y)
	for i, r := range c.rings {
		a := signedArea(r)
		if a == 0 || a != a {
			continue
		}
		fwd := (a > 0) == (c.signs[i] > 0)
		n := len(r)
		at := func(k int) pt {
			if fwd {
				return r[k]
			}
			return r[n-1-k]
		}
		p := at(0)
		sink.moveTo(float32(p.X-ox), float32(p.Y-oy))
		for k := 1; k < n; k++ {
			p = at(k)
			sink.lineTo(float32(p.X-ox), float32(p.Y-oy))
		}
		sink.closePath()
	}
}

// shapeBox is the box paint rasterizes the current shape in: the rings'
// bounds rounded out by a pixel, within the clip (empty for no rings or
// NaN coordinates).
func (c *canvas) shapeBox() image.Rectangle {
	minX, minY, maxX, maxY := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, r := range c.rings {
		for _, p := range r {
			minX, maxX = math.Min(minX, p.X), math.Max(maxX, p.X)
			minY, maxY = math.Min(minY, p.Y), math.Max(maxY, p.Y)
		}
	}
	if !(minX <= maxX && minY <= maxY) { // NaN or empty
		return image.Rectangle{}
	}
	return image.Rect(int(math.Floor(minX))-1, int(math.Floor(minY))-1,
		int(math.Ceil(maxX))+1, int(math.Ceil(maxY))+1).Intersect(c.clip)
}

// fillPolys fills polygons (ring 0 the outside, the rest holes) as one shape.
func (c *canvas) fillPolys(polys [][][]pt, col color.RGBA) {
	for _, p := range polys {
		for i, r := range p {
			sign := 1.0
			if i > 0 {
				sign = -1
			}
			c.addRing(r, sign)
		}
	}
	c.paint(col)
}

// addStroke adds the outline of polyline line, width w pixels, with round
// joins and round caps, to the current shape. closed joins the last point
// to the first.
func (c *canvas) addStroke(line []pt, w float64, closed bool) {
	if len(line) == 0 {
		return
	}
	h := w / 2
	n := len(line)
	segs := n - 1
	if closed {
		segs = n
	}
	for i := 0; i < segs; i++ {
		a, b := line[i], line[(i+1)%n]
		dx, dy := b.X-a.X, b.Y-a.Y
		l := math.Hypot(dx, dy)
		if l == 0 {
			continue
		}
		nx, ny := -dy/l*h, dx/l*h
		c.addRing([]pt{{a.X + nx, a.Y + ny}, {b.X + nx, b.Y + ny}, {b.X - nx, b.Y - ny}, {a.X - nx, a.Y - ny}}, 1)
	}
	if w < 1.2 { // thin lines need no round joins
		return
	}
	for _, p := range line {
		c.addRing(circle(p, h, 0), 1)
	}
}

// stroke draws polyline line with width w in col.
func (c *canvas) stroke(line []pt, w float64, closed bool, col color.RGBA) {
	c.addStroke(line, w, closed)
	c.paint(col)
}

// dashes splits polyline line into dashes of on pixels separated by off.
func dashes(line []pt, on, off float64) [][]pt {
	var out [][]pt
	var cur []pt
	drawing, left := true, on
	for i := 0; i+1 < len(line); i++ {
		a, b := line[i], line[i+1]
		l := math.Hypot(b.X-a.X, b.Y-a.Y)
		pos := 0.0
		if drawing && len(cur) == 0 {
			cur = append(cur, a)
		}
		for l-pos > left {
			pos += left
			t := pos / l
			p := pt{a.X + t*(b.X-a.X), a.Y + t*(b.Y-a.Y)}
			if drawing {
				out = append(out, append(cur, p))
				cur = nil
				left = off
			} else {
				cur = []pt{p}
				left = on
			}
			drawing = !drawing
		}
		left -= l - pos
		if drawing {
			cur = append(cur, b)
		}
	}
	if len(cur) > 1 {
		out = append(out, cur)
	}
	return out
}

// circle is a polygon approximating a circle of radius r around p; n = 0
// chooses the number of sides from the radius.
func circle(p pt, r float64, n int) []pt {
	if n == 0 {
		n = int(math.Max(8, math.Min(48, 2*math.Pi*r/2)))
	}
	out := make([]pt, n)
	for i := range out {
		s, c := math.Sincos(2 * math.Pi * float64(i) / float64(n))
		out[i] = pt{p.X + r*c, p.Y + r*s}
	}
	return out
}

// rect is the ring of an axis-aligned rectangle.
func rect(x0, y0, x1, y1 float64) []pt { return []pt{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}} }

// fillRect fills an axis-aligned rectangle (translucent colours blend).
func (c *canvas) fillRect(x0, y0, x1, y1 float64, col color.RGBA) {
	c.addRing(rect(x0, y0, x1, y1), 1)
	c.paint(col)
}

// box draws a filled rectangle with a thin border.
func (c *canvas) box(r image.Rectangle, fill, border color.RGBA, bw float64) {
	x0, y0, x1, y1 := float64(r.Min.X), float64(r.Min.Y), float64(r.Max.X), float64(r.Max.Y)
	c.fillRect(x0, y0, x1, y1, fill)
	if bw > 0 {
		c.stroke(rect(x0+bw/2, y0+bw/2, x1-bw/2, y1-bw/2), bw, true, border)
	}
}

// hatchPolys fills polys with diagonal stripes of col, spacing gap pixels
// and width w: drawn through an alpha mask of the polygons.
func (c *canvas) hatchPolys(polys [][][]pt, col color.RGBA, gap, w float64) {
	c.hatchPolysMinus(polys, nil, col, gap, w)
}

// hatchPolysMinus hatches polys except where minus covers them (minus lies
// inside polys, e.g. a nested footprint level: its rings are added with the
// opposite sign so the winding cancels there).
func (c *canvas) hatchPolysMinus(polys, minus [][][]pt, col color.RGBA, gap, w float64) {
	saved := c.img
	// Rasterize the polygons into the mask with the same ring logic.
	for k, set := range [][][][]pt{polys, minus} {
		for _, p := range set {
			for i, r := range p {
				sign := 1.0
				if i > 0 {
					sign = -1
				}
				if k == 1 {
					sign = -sign
				}
				c.addRing(r, sign)
			}
		}
	}
	if len(c.rings) == 0 {
		return
	}
	minX, minY, maxX, maxY := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, r := range c.rings {
		for _, p := range r {
			minX, maxX = math.Min(minX, p.X), math.Max(maxX, p.X)
			minY, maxY = math.Min(minY, p.Y), math.Max(maxY, p.Y)
		}
	}
	// The mask covers only the rings' box (paint draws the rings nothing
	// beyond it: its rasterizer spans their box rounded out by a pixel,
	// within the clip), in the image's own coordinates, so every pixel of
	// it is the one a whole-image mask had; outside the box that mask was
	// zero, and DrawMask (which clips to the mask) left the image as it
	// was. The stripes' layer stays the whole image: painted through a
	// smaller clip its rasterizer would start elsewhere and round
	// differently.
	box := image.Rect(int(math.Floor(minX))-2, int(math.Floor(minY))-2,
		int(math.Ceil(maxX))+2, int(math.Ceil(maxY))+2).Intersect(c.clip).Intersect(saved.Bounds())
	if box.Empty() {
		c.rings, c.signs = c.rings[:0], c.signs[:0]
		return
	}
	mask := image.NewAlpha(box)
	tmp := image.NewRGBA(box)
	c.img = tmp
	c.paint(color.RGBA{255, 255, 255, 255})
	c.img = saved
	for i := range mask.Pix {
		mask.Pix[i] = tmp.Pix[4*i+3]
	}
	// Stripes over the bounding box, into a layer drawn through the mask.
	// The layer covers only the box the stripes are painted in (paint
	// rasterizes them there whatever the image): beyond it a whole-image
	// layer was transparent, which draw.Over through any mask leaves as it
	// was.
	for d := minX - (maxY - minY); d < maxX+gap; d += gap {
		c.addStroke([]pt{{d, maxY + w}, {d + (maxY - minY) + 2*w, minY - w}}, w, false)
	}
	sb := c.shapeBox()
	if sb.Empty() {
		c.rings, c.signs = c.rings[:0], c.signs[:0]
		return
	}
	layer := image.NewRGBA(sb)
	c.img = layer
	c.paint(col)
	c.img = saved
	maskOver(c.img, c.clip, layer, mask)
}

// maskOver is draw.DrawMask(dst, r, src, r.Min, mask, r.Min, draw.Over)
// (image/draw's drawRGBAMaskOver, the same arithmetic per pixel) for
// pixels where both mask and src are non-zero: a mask of 0 or a
// transparent black source pixel leaves dst as it is, exactly, and most of
// a hatch's layer is the gaps between its stripes.
func maskOver(dst *image.RGBA, r image.Rectangle, src *image.RGBA, mask *image.Alpha) {
	r = r.Intersect(dst.Rect).Intersect(src.Rect).Intersect(mask.Rect)
	const m = 1<<16 - 1
	for y := r.Min.Y; y < r.Max.Y; y++ {
		mrow := mask.Pix[mask.PixOffset(r.Min.X, y):mask.PixOffset(r.Max.X, y)]
		srow := src.Pix[src.PixOffset(r.Min.X, y):src.PixOffset(r.Max.X, y)]
		drow := dst.Pix[dst.PixOffset(r.Min.X, y):dst.PixOffset(r.Max.X, y)]
		for x, mv := range mrow {
			s := srow[4*x : 4*x+4 : 4*x+4]
			if mv == 0 || s[0]|s[1]|s[2]|s[3] == 0 {
				continue
			}
			ma := uint32(mv)
			ma |= ma << 8
			sr, sg, sb, sa := uint32(s[0]), uint32(s[1]), uint32(s[2]), uint32(s[3])
			sr |= sr << 8
			sg |= sg << 8
			sb |= sb << 8
			sa |= sa << 8
			d := drow[4*x : 4*x+4 : 4*x+4]
			a := (m - (sa * ma / m)) * 0x101
			d[0] = uint8((uint32(d[0])*a + sr*ma) / m >> 8)
			d[1] = uint8((uint32(d[1])*a + sg*ma) / m >> 8)
			d[2] = uint8((uint32(d[2])*a + sb*ma) / m >> 8)
			d[3] = uint8((uint32(d[3])*a + sa*ma) / m >> 8)
		}
	}
}
