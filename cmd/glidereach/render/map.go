package render

import (
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"sort"

	"github.com/paulmach/orb"

	"glidereach/terrain"
)

// RenderPNG draws the scene as a PNG map widthPx pixels wide (0 means
// DefaultWidthPx; at most MaxWidthPx) and writes it to w. The height
// follows from the map's extent and the panel below it (legend, inputs,
// data source and caution).
func RenderPNG(w io.Writer, s *Scene, widthPx int) error {
	img, err := Render(s, widthPx)
	if err != nil {
		return err
	}
	return encodePNG(w, img)
}

// Render draws the scene into a new image; see RenderPNG.
func Render(s *Scene, widthPx int) (*image.RGBA, error) {
	img, _, err := render(s, widthPx)
	return img, err
}

// layout is where things went on one map; the tests read it.
type layout struct {
	W, H            int
	scale           float64         // 1 at 1600 px
	mapRect         image.Rectangle // the map frame
	minX, maxY, mpp float64         // frame metres at the map's top-left; metres per pixel
	frame           terrain.Frame
	legendRect      image.Rectangle
	inputsRect      image.Rectangle
	cautionRect     image.Rectangle
	titleRect       image.Rectangle
	northDeg        float64 // true north, degrees clockwise from map up
	windArrow       pt      // centre of the wind arrow, when drawn
	labels          []placed
}

// toPix projects a lon/lat point to pixel coordinates.
func (lo *layout) toPix(p orb.Point) pt {
	x, y := lo.frame.Forward(p[1], p[0])
	return pt{float64(lo.mapRect.Min.X) + (x-lo.minX)/lo.mpp, float64(lo.mapRect.Min.Y) + (lo.maxY-y)/lo.mpp}
}

func (lo *layout) line(ls orb.LineString) []pt {
	out := make([]pt, 0, len(ls))
	for _, p := range ls {
		out = append(out, lo.toPix(p))
	}
	return out
}

func (lo *layout) ring(r orb.Ring) []pt {
	n := len(r)
	if n > 1 && r[0] == r[n-1] {
		n--
	}
	return lo.line(orb.LineString(r[:n]))
}

func (lo *layout) polys(mp orb.MultiPolygon) [][][]pt {
	out := make([][][]pt, 0, len(mp))
	for _, p := range mp {
		var rs [][]pt
		for _, r := range p {
			rs = append(rs, lo.ring(r))
		}
		out = append(out, rs)
	}
	return out
}

// extent is the frame rectangle the map shows, metres.
func extent(s *Scene) (minX, minY, maxX, maxY float64) {
	l := s.Terrain
	if b := s.Bounds; b.Max[0] > b.Min[0] && b.Max[1] > b.Min[1] {
		b := s.Bounds
		minX, minY, maxX, maxY = math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
		for _, p := range []orb.Point{b.Min, b.Max, {b.Min[0], b.Max[1]}, {b.Max[0], b.Min[1]}} {
			x, y := l.Frame.Forward(p[1], p[0])
			minX, maxX = math.Min(minX, x), math.Max(maxX, x)
			minY, maxY = math.Min(minY, y), math.Max(maxY, y)
		}
		return
	}
	h := l.Cell / 2
	return l.X0 - h, l.Y0 - h, l.X0 + float64(l.Cols-1)*l.Cell + h, l.Y0 + float64(l.Rows-1)*l.Cell + h
}

// renderer carries one rendering.
type renderer struct {
	s   *Scene
	lo  *layout
	img *image.RGBA
	c   *canvas
	f   *faces
	px  func(float64) float64 // design pixels at 1600 px width → pixels

	z                   []float32 // the DEM resampled to the map's pixels (sampleTerrain)
	shade               []float32 // hillshade per map pixel when the DEM is coarser than the pixels; nil: shade z
	state               []uint8   // pxGround, pxVoid or pxOff per map pixel
	voidShown, offShown bool      // some map pixel is void / off the raster
}

func render(s *Scene, widthPx int) (*image.RGBA, *layout, error) {
	if err := s.validate(); err != nil {
		return nil, nil, err
	}
	if widthPx == 0 {
		widthPx = DefaultWidthPx
	}
	if widthPx < 200 || widthPx > MaxWidthPx {
		return nil, nil, fmt.Errorf("render: map width %d px out of range 200–%d", widthPx, MaxWidthPx)
	}
	minX, minY, maxX, maxY := extent(s)
	if !(maxX > minX && maxY > minY) {
		return nil, nil, ErrEmptyMap
	}
	scale := float64(widthPx) / DefaultWidthPx
	fc, err := newFaces(scale)
	if err != nil {
		return nil, nil, fmt.Errorf("render: loading fonts: %w", err)
	}
	r := &renderer{s: s, f: fc, px: func(v float64) float64 { return v * scale }}
	lo := &layout{W: widthPx, scale: scale, frame: s.Terrain.Frame}
	r.lo = lo

	margin := int(r.px(16))
	titleH := int(r.px(14) + lineHeight(fc.title) + r.px(6))
	mapW := widthPx - 2*margin
	mpp := (maxX - minX) / float64(mapW)
	mapH := int(math.Round((maxY - minY) / mpp))
	if maxH := int(1.4 * float64(widthPx)); mapH > maxH { // a tall window: narrower map
		mapH = maxH
		mpp = (maxY - minY) / float64(mapH)
		mapW = int(math.Round((maxX - minX) / mpp))
	}
	mx := (widthPx - mapW) / 2
	lo.mapRect = image.Rect(mx, titleH, mx+mapW, titleH+mapH)
	lo.titleRect = image.Rect(margin, 0, widthPx-margin, titleH)
	lo.minX, lo.maxY, lo.mpp = minX, maxY, mpp

	// The panel below the map: legend (left), inputs and source (right),
	// caution (full width).
	r.sampleTerrain() // before the legend: it lists voids only when they show
	items := r.legendItems()
	panelTop := lo.mapRect.Max.Y + int(r.px(12))
	inner := widthPx - 2*margin
	legendW := int(float64(inner) * 0.60)
	rowH := lineHeight(fc.legend) + r.px(9)
	cols := 2
	rows := (len(items) + cols - 1) / cols
	legendH := int(r.px(12)+lineHeight(fc.legendBold)+r.px(4)) + int(float64(rows)*rowH) + int(r.px(8))
	inputLines := r.inputLines(float64(inner - legendW - int(r.px(24))))
	inputsH := int(r.px(12)+float64(len(inputLines))*(lineHeight(fc.legend)+r.px(3))) + int(r.px(8))
	panelH := max(legendH, inputsH)
	lo.legendRect = image.Rect(margin, panelTop, margin+legendW, panelTop+panelH)
	lo.inputsRect = image.Rect(margin+legendW+int(r.px(12)), panelTop, widthPx-margin, panelTop+panelH)
	cautionLines := wrap(fc.legendBold, s.caution(), float64(inner)-r.px(28))
	cautionH := int(r.px(16) + float64(len(cautionLines))*(lineHeight(fc.legend)+r.px(2)))
	cTop := lo.legendRect.Max.Y + int(r.px(10))
	lo.cautionRect = image.Rect(margin, cTop, widthPx-margin, cTop+cautionH)
	lo.H = lo.cautionRect.Max.Y + margin

	lo.northDeg = trueNorth(lo)

	r.img = image.NewRGBA(image.Rect(0, 0, lo.W, lo.H))
	r.c = newCanvas(r.img)
	// The paper around the map; drawTerrain paints every pixel of the map
	// rectangle itself.
	b, m := r.img.Bounds(), lo.mapRect
	for _, rc := range []image.Rectangle{
		image.Rect(b.Min.X, b.Min.Y, b.Max.X, m.Min.Y), image.Rect(b.Min.X, m.Max.Y, b.Max.X, b.Max.Y),
		image.Rect(b.Min.X, m.Min.Y, m.Min.X, m.Max.Y), image.Rect(m.Max.X, m.Min.Y, b.Max.X, m.Max.Y),
	} {
		fillSolid(r.img, rc, colPaper)
	}

	r.drawTerrain()
	r.c.clip = lo.mapRect
	r.drawOverlays()
	r.c.clip = r.img.Bounds()
	r.c.stroke(rect(float64(lo.mapRect.Min.X)-0.5, float64(lo.mapRect.Min.Y)-0.5,
		float64(lo.mapRect.Max.X)+0.5, float64(lo.mapRect.Max.Y)+0.5), r.px(1.5), true, colTextMuted)

	title := s.Title
	if title == "" {
		title = "Glide reach"
	}
	drawText(r.img, fc.title, float64(margin), r.px(10)+ascent(fc.title), title, colText)
	r.drawLegend(items)
	r.drawInputs(inputLines)
	r.drawCaution(cautionLines)
	r.c.release()
	r.c = nil
	return r.img, lo, nil
}

// fillSolid paints a rectangle with an opaque colour.
func fillSolid(img *image.RGBA, rc image.Rectangle, col color.RGBA) {
	rc = rc.Intersect(img.Bounds())
	for y := rc.Min.Y; y < rc.Max.Y; y++ {
		row := img.Pix[img.PixOffset(rc.Min.X, y):img.PixOffset(rc.Max.X, y)]
		for i := 0; i < len(row); i += 4 {
			row[i], row[i+1], row[i+2], row[i+3] = col.R, col.G, col.B, 255
		}
	}
}

// hasReserveLevel reports whether one of levels is marked as the reserve.
func hasReserveLevel(levels []Level) bool {
	for _, l := range levels {
		if l.IsReserve {
			return true
		}
	}
	return false
}

// drawOverlays draws everything on the map above the terrain.
func (r *renderer) drawOverlays() {
	s, lo, c, px := r.s, r.lo, r.c, r.px
	if cv := s.Coverage; cv != nil {
		c.fillPolys(lo.polys(cv.Covered), withAlpha(colCovered, 0.30))
		up := lo.polys(cv.Uncovered)
		c.fillPolys(up, withAlpha(colUncovered, 0.12))
		c.hatchPolys(up, withAlpha(colUncovered, 0.75), px(11), px(2.2))
	}

	// Footprint levels, largest (lowest arrival height) first.
	levels := append([]Level(nil), s.Levels...)
	sort.SliceStable(levels, func(i, j int) bool { return levels[i].ArrivalAGL < levels[j].ArrivalAGL })
	// Below-reserve ground: a warning hatch over the band outside the
	// lowest level at or above the reserve, never the reach fill.
	var below, safe *Level
	for i := range levels {
		if levels[i].BelowReserve {
			if below == nil {
				below = &levels[i]
			}
		} else if safe == nil {
			safe = &levels[i]
		}
	}
	if below != nil {
		var minus [][][]pt
		if safe != nil {
			minus = lo.polys(safe.Polygons)
		}
		bp := lo.polys(below.Polygons)
		c.fillPolys(bp, withAlpha(colBelowReserve, 0.10))
		c.hatchPolysMinus(bp, minus, withAlpha(colBelowReserve, 0.70), px(9), px(1.8))
	}
	for _, l := range levels {
		if !l.BelowReserve {
			c.fillPolys(lo.polys(l.Polygons), withAlpha(colReachFill, 0.24))
		}
	}
	for i, l := range levels {
		w := px(2.4)
		if l.IsReserve || (i == 0 && !hasReserveLevel(levels)) {
			w = px(3.6)
		}
		for _, p := range lo.polys(l.Polygons) {
			for _, rg := range p {
				c.addStroke(rg, w+px(2.5), true)
			}
		}
		c.paint(withAlpha(colHalo, 0.65))
		if l.BelowReserve {
			for _, p := range lo.polys(l.Polygons) {
				for _, rg := range p {
					if len(rg) == 0 {
						continue
					}
					for _, d := range dashes(append(rg, rg[0]), px(10), px(6)) {
						c.addStroke(d, w, false)
					}
				}
			}
			c.paint(colBelowReserve)
			continue
		}
		for _, p := range lo.polys(l.Polygons) {
			for _, rg := range p {
				c.addStroke(rg, w, true)
			}
		}
		c.paint(colReachLine)
	}

	if cv := s.Coverage; cv != nil {
		// The outline long-dashed; a hole (not part of the area) dotted in
		// grey, so it does not read as more outline.
		for hole := 0; hole < 2; hole++ {
			for _, p := range lo.polys(cv.Area) {
				for k, rg := range p {
					if len(rg) == 0 || (k > 0) != (hole == 1) {
						continue
					}
					on, off, w := px(10), px(6), px(2)
					if hole == 1 {
						on, off, w = px(2.5), px(4.5), px(2.2)
					}
					for _, d := range dashes(append(rg, rg[0]), on, off) {
						c.addStroke(d, w, false)
					}
				}
			}
			if hole == 0 {
				c.paint(colText)
			} else {
				c.paint(colTextMuted)
			}
		}
	}

	for _, g := range s.Gaps {
		c.stroke(lo.line(g.Line), px(16), false, withAlpha(colGap, 0.85))
	}
	for _, rp := range s.Route {
		c.addStroke(lo.line(rp.Line), px(8), false)
	}
	c.paint(withAlpha(colHalo, 0.9))
	for _, rp := range s.Route {
		line := lo.line(rp.Line)
		if rp.Covered {
			c.stroke(line, px(4.5), false, colRouteCovered)
			continue
		}
		for _, d := range dashes(line, px(14), px(8)) {
			c.addStroke(d, px(4.5), false)
		}
		c.paint(colRouteOpen)
	}
	for _, g := range s.Gaps { // end ticks across the route
		line := lo.line(g.Line)
		if len(line) < 2 {
			continue
		}
		for _, e := range [][2]pt{{line[0], line[1]}, {line[len(line)-1], line[len(line)-2]}} {
			dx, dy := e[1].X-e[0].X, e[1].Y-e[0].Y
			l := math.Hypot(dx, dy)
			if l == 0 {
				continue
			}
			nx, ny := -dy/l*px(11), dx/l*px(11)
			c.addStroke([]pt{{e[0].X - nx, e[0].Y - ny}, {e[0].X + nx, e[0].Y + ny}}, px(3), false)
		}
		c.paint(colText)
	}

	if g := s.Glide; g != nil {
		line := lo.line(g.Line)
		c.stroke(line, px(7), false, withAlpha(colHalo, 0.9))
		c.stroke(line, px(3), false, colGlide)
		for _, tp := range g.Turns {
			r.turnSymbol(lo.toPix(tp.Point))
		}
		if !math.IsNaN(g.LowestClearance) && r.lowestAtField() < 0 {
			p := lo.toPix(g.Lowest)
			d := px(10)
			dia := []pt{{p.X, p.Y - d}, {p.X + d, p.Y}, {p.X, p.Y + d}, {p.X - d, p.Y}}
			c.stroke(dia, px(3), true, colHalo)
			c.addRing(dia, 1)
			c.paint(colLowest)
			c.stroke(dia, px(1.2), true, colText)
		}
	}

	pl := &placer{bounds: box{float64(lo.mapRect.Min.X) + 2, float64(lo.mapRect.Min.Y) + 2,
		float64(lo.mapRect.Max.X) - 2, float64(lo.mapRect.Max.Y) - 2}}
	var labels []label
	symR := px(9)
	lowestField := r.lowestAtField()
	for i, f := range s.Fields {
		p := lo.toPix(f.Point)
		lines := []string{f.Name}
		if q, off := r.edgePoint(p, symR+px(16)); off {
			// Beyond the map: the symbol stands at the edge with an arrow
			// toward the field and the distance still to go.
			pl.reserve(r.offMapArrow(q, p, symR))
			e, _ := r.edgePoint(p, 0)
			km := math.Hypot(p.X-e.X, p.Y-e.Y) * lo.mpp / 1000
			d := fmt.Sprintf("%.0f", km)
			if km < 9.95 {
				d = fmt.Sprintf("%.1f", km)
			}
			lines = append(lines, d+" km beyond the map edge")
			p = q
		}
		pl.reserve(boxAround(p, symR+px(2)))
		switch {
		case f.Proposed:
			r.proposedSymbol(p, symR)
		default:
			r.fieldSymbol(p, f.Reachable, symR)
		}
		if !math.IsNaN(f.ArrivalAGL) {
			lines = append(lines, "arrive "+s.signedHeight(f.ArrivalAGL)+" AGL")
		}
		if f.Note != "" {
			lines = append(lines, f.Note)
		}
		if i == lowestField {
			lines = append(lines, "lowest clearance "+s.height(s.Glide.LowestClearance)+" here")
		}
		prio := 2
		if f.Reachable && !f.Proposed {
			prio = 1
		}
		labels = append(labels, label{lines: lines, bold: true, anchor: p, gap: symR, priority: prio, must: true, col: colText})
	}
	if g := s.Glide; g != nil {
		for _, tp := range g.Turns {
			p := lo.toPix(tp.Point)
			pl.reserve(boxAround(p, px(8)))
			labels = append(labels, label{lines: []string{tp.Name}, bold: true, anchor: p, gap: px(8), priority: 3, must: true, col: colText})
		}
	}
	if n := len(s.Route); n > 0 {
		first, last := s.Route[0].Line, s.Route[n-1].Line
		if len(first) > 0 && len(last) > 0 {
			for _, e := range []struct {
				p    orb.Point
				text string
			}{{first[0], "route start"}, {last[len(last)-1], "route end"}} {
				p := lo.toPix(e.p)
				r.turnSymbol(p)
				pl.reserve(boxAround(p, px(8)))
				labels = append(labels, label{lines: []string{e.text}, bold: true, anchor: p, gap: px(8), priority: 3, must: true, col: colText})
			}
		}
	}
	if m := s.Start; m != nil {
		p := lo.toPix(m.Point)
		r.startSymbol(p, m.HeadingDeg)
		pl.reserve(boxAround(p, px(16)))
		name := m.Label
		if name == "" {
			name = "Start"
		}
		lines := []string{name}
		if !math.IsNaN(m.AltMSL) {
			lines = append(lines, s.height(m.AltMSL)+" MSL")
		}
		labels = append(labels, label{lines: lines, bold: true, anchor: p, gap: px(16), priority: 0, must: true, col: colText})
	}
	if g := s.Glide; g != nil && !math.IsNaN(g.LowestClearance) && lowestField < 0 {
		p := lo.toPix(g.Lowest)
		pl.reserve(boxAround(p, px(10)))
		labels = append(labels, label{lines: []string{"lowest clearance", s.height(g.LowestClearance)},
			anchor: p, gap: px(10), priority: 3, must: true, col: colText})
	}
	for _, g := range s.Gaps {
		line := lo.line(g.Line)
		if len(line) == 0 {
			continue
		}
		text := g.Label
		if text == "" {
			km := lineLength(line) * lo.mpp / 1000
			text = fmt.Sprintf("GAP %.1f km / %.1f nm", km, km/1.852)
		}
		labels = append(labels, label{lines: []string{text}, bold: true, anchor: midpoint(line), gap: px(10),
			priority: 4, must: true, col: colText})
	}
	for _, l := range levels {
		if p, ok := topVertex(lo.polys(l.Polygons)); ok {
			text, col := s.height(l.ArrivalAGL)+" AGL", colReachLine
			switch {
			case l.BelowReserve:
				text, col = s.height(l.ArrivalAGL)+" AGL: below reserve", colBelowReserve
			case l.IsReserve:
				text += " (reserve)"
			}
			labels = append(labels, label{lines: []string{text}, anchor: p, gap: px(3),
				priority: 5, col: col})
		}
	}
	sb := r.drawScaleBar()
	pl.reserve(sb)
	nb := r.drawNorthArrow()
	pl.reserve(nb)
	above := nb
	if s.Wind != nil {
		above = r.drawWindArrow(nb, *s.Wind)
		pl.reserve(above)
	}
	if len(s.WindLayers) > 0 {
		pl.reserve(r.drawWindPanel(above))
	}
	if len(s.Warnings) > 0 {
		pl.reserve(r.drawWarnings())
	}

	pad := px(3)
	lo.labels = pl.placeAll(labels, r.f.label, r.f.labelBold, pad)
	for _, l := range lo.labels {
		if l.leader {
			q := pt{math.Max(l.at.x0, math.Min(l.anchor.X, l.at.x1)), math.Max(l.at.y0, math.Min(l.anchor.Y, l.at.y1))}
			dx, dy := q.X-l.anchor.X, q.Y-l.anchor.Y
			if d := math.Hypot(dx, dy); d > l.gap {
				a := pt{l.anchor.X + dx/d*l.gap, l.anchor.Y + dy/d*l.gap}
				c.stroke([]pt{a, q}, px(3), false, withAlpha(colHalo, 0.9))
				c.stroke([]pt{a, q}, px(1.3), false, colTextMuted)
			}
		}
		c.box(image.Rect(int(l.at.x0), int(l.at.y0), int(math.Ceil(l.at.x1)), int(math.Ceil(l.at.y1))),
			withAlpha(colHalo, 0.86), withAlpha(colTextMuted, 0.6), px(1))
		y := l.at.y0 + pad + ascent(r.f.label)
		for i, s := range l.lines {
			face := r.f.label
			if i == 0 && l.bold {
				face = r.f.labelBold
			}
			drawText(r.img, face, l.at.x0+pad, y, s, l.col)
			y += lineHeight(r.f.label)
		}
	}
}

// fieldSymbol draws a field: a filled bluish-green circle with a white and
// a black ring when reachable, a vermillion cross on a white halo when not.
func (r *renderer) fieldSymbol(p pt, reachable bool, rad float64) {
	c, px := r.c, r.px
	if reachable {
		c.addRing(circle(p, rad+px(2.5), 0), 1)
		c.paint(colText)
		c.addRing(circle(p, rad+px(1.3), 0), 1)
		c.paint(colHalo)
		c.addRing(circle(p, rad, 0), 1)
		c.paint(colReachable)
		return
	}
	d := rad * 0.8
	arms := [][]pt{{{p.X - d, p.Y - d}, {p.X + d, p.Y + d}}, {{p.X - d, p.Y + d}, {p.X + d, p.Y - d}}}
	for _, a := range arms {
		c.addStroke(a, px(9), false)
	}
	c.paint(colText)
	for _, a := range arms {
		c.addStroke(a, px(6.5), false)
	}
	c.paint(colHalo)
	for _, a := range arms {
		c.addStroke(a, px(4), false)
	}
	c.paint(colUnreachable)
}

// proposedSymbol draws a proposed field: an open blue ring with a plus,
// on a white halo, a shape of its own beside the filled circle and the
// cross.
func (r *renderer) proposedSymbol(p pt, rad float64) {
	c, px := r.c, r.px
	ring := circle(p, rad, 0)
	c.stroke(ring, px(6.5), true, colHalo)
	arms := [][]pt{{{p.X - rad*0.55, p.Y}, {p.X + rad*0.55, p.Y}}, {{p.X, p.Y - rad*0.55}, {p.X, p.Y + rad*0.55}}}
	for _, a := range arms {
		c.addStroke(a, px(5.5), false)
	}
	c.paint(colHalo)
	c.stroke(ring, px(3), true, colProposed)
	for _, a := range arms {
		c.addStroke(a, px(2.6), false)
	}
	c.paint(colProposed)
}

// turnSymbol draws a turn point or a route end: a small white dot with a
// black ring.
func (r *renderer) turnSymbol(p pt) {
	c, px := r.c, r.px
	c.addRing(circle(p, px(6.5), 0), 1)
	c.paint(colText)
	c.addRing(circle(p, px(4.2), 0), 1)
	c.paint(colHalo)
}

// edgePoint returns p when it lies on the map, else the point where the
// line from the map centre to p meets the map's frame inset by inset
// pixels, and true.
func (r *renderer) edgePoint(p pt, inset float64) (pt, bool) {
	m := r.lo.mapRect
	x0, y0, x1, y1 := float64(m.Min.X), float64(m.Min.Y), float64(m.Max.X), float64(m.Max.Y)
	if p.X >= x0 && p.X <= x1 && p.Y >= y0 && p.Y <= y1 {
		return p, false
	}
	c := pt{(x0 + x1) / 2, (y0 + y1) / 2}
	hx, hy := (x1-x0)/2-inset, (y1-y0)/2-inset
	dx, dy := p.X-c.X, p.Y-c.Y
	t := math.Inf(1)
	if dx != 0 {
		t = math.Min(t, hx/math.Abs(dx))
	}
	if dy != 0 {
		t = math.Min(t, hy/math.Abs(dy))
	}
	if math.IsInf(t, 1) || !(t > 0) {
		return c, true
	}
	return pt{c.X + dx*t, c.Y + dy*t}, true
}

// offMapArrow draws a black arrowhead beside the symbol at q, pointing
// toward the field's true position p beyond the map's edge, and returns
// the arrow's box.
func (r *renderer) offMapArrow(q, p pt, rad float64) box {
	c, px := r.c, r.px
	dx, dy := p.X-q.X, p.Y-q.Y
	d := math.Hypot(dx, dy)
	if d == 0 {
		return boxAround(q, rad)
	}
	ux, uy := dx/d, dy/d
	b := pt{q.X + ux*(rad+px(3)), q.Y + uy*(rad+px(3))}
	tip := pt{q.X + ux*(rad+px(13)), q.Y + uy*(rad+px(13))}
	w := px(6)
	tri := []pt{tip, {b.X - uy*w, b.Y + ux*w}, {b.X + uy*w, b.Y - ux*w}}
	c.stroke(tri, px(3), true, colHalo)
	c.addRing(tri, 1)
	c.paint(colText)
	m := pt{(b.X + tip.X) / 2, (b.Y + tip.Y) / 2}
	return boxAround(m, px(8))
}

// lowestAtField is the index of the field the glide line's lowest point
// coincides with (within its symbol), or -1. The lowest clearance is then
// told in the field's label instead of a diamond hidden under it.
func (r *renderer) lowestAtField() int {
	g := r.s.Glide
	if g == nil || math.IsNaN(g.LowestClearance) {
		return -1
	}
	lp := r.lo.toPix(g.Lowest)
	for i, f := range r.s.Fields {
		p := r.lo.toPix(f.Point)
		if math.Hypot(p.X-lp.X, p.Y-lp.Y) <= r.px(9)+r.px(10) {
			return i
		}
	}
	return -1
}

// startSymbol draws the start: a black arrowhead along the heading, or a
// black ringed dot when there is no heading.
func (r *renderer) startSymbol(p pt, headingDeg float64) {
	c, px := r.c, r.px
	if math.IsNaN(headingDeg) {
		c.addRing(circle(p, px(11), 0), 1)
		c.paint(colHalo)
		c.addRing(circle(p, px(9), 0), 1)
		c.paint(colStart)
		c.addRing(circle(p, px(4), 0), 1)
		c.paint(colHalo)
		return
	}
	a := (headingDeg + r.lo.northDeg) * math.Pi / 180
	dx, dy := math.Sin(a), -math.Cos(a)
	ex, ey := -dy, dx
	L, W := px(38), px(26)
	shape := []pt{
		{p.X + dx*L*0.6, p.Y + dy*L*0.6},
		{p.X - dx*L*0.4 + ex*W/2, p.Y - dy*L*0.4 + ey*W/2},
		{p.X - dx*L*0.15, p.Y - dy*L*0.15},
		{p.X - dx*L*0.4 - ex*W/2, p.Y - dy*L*0.4 - ey*W/2},
	}
	c.stroke(shape, px(4), true, colHalo)
	c.addRing(shape, 1)
	c.paint(colStart)
}

// drawScaleBar draws bars in km and nm at the map's lower left and returns
// their box.
func (r *renderer) drawScaleBar() box {
	lo, c, px := r.lo, r.c, r.px
	mapWm := float64(lo.mapRect.Dx()) * lo.mpp
	km := niceLength(mapWm / 1000 * 0.22)
	nm := niceLength(mapWm / 1852 * 0.22)
	kmPx, nmPx := km*1000/lo.mpp, nm*1852/lo.mpp
	barH := px(7)
	lh := lineHeight(r.f.small)
	w := math.Max(kmPx+textWidth(r.f.small, fmtLen(km)+" km")/2, nmPx+textWidth(r.f.small, fmtLen(nm)+" nm")/2) + px(24)
	h := px(10) + 2*(lh+barH+px(6))
	x0 := float64(lo.mapRect.Min.X) + px(10)
	y1 := float64(lo.mapRect.Max.Y) - px(10)
	y0 := y1 - h
	c.fillRect(x0, y0, x0+w, y1, withAlpha(colHalo, 0.85))
	bx := x0 + px(10)
	y := y0 + px(6)
	for _, b := range []struct {
		n    float64
		unit string
		len  float64
	}{{km, "km", kmPx}, {nm, "nm", nmPx}} {
		drawText(r.img, r.f.small, bx, y+ascent(r.f.small), "0", colText)
		half := fmtLen(b.n / 2)
		drawText(r.img, r.f.small, bx+b.len/2-textWidth(r.f.small, half)/2, y+ascent(r.f.small), half, colText)
		end := fmtLen(b.n) + " " + b.unit
		drawText(r.img, r.f.small, bx+b.len-textWidth(r.f.small, fmtLen(b.n))/2, y+ascent(r.f.small), end, colText)
		y += lh
		c.fillRect(bx, y, bx+b.len, y+barH, colText)
		c.fillRect(bx+b.len/2, y+px(1.2), bx+b.len-px(1.2), y+barH-px(1.2), colHalo)
		y += barH + px(6)
	}
	return box{x0, y0, x0 + w, y1}
}

// niceLength rounds v down to 1, 2 or 5 times a power of ten.
func niceLength(v float64) float64 {
	if !(v > 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(v)))
	for _, m := range []float64{5, 2, 1} {
		if m*p <= v {
			return m * p
		}
	}
	return p
}

func fmtLen(v float64) string {
	if v == math.Trunc(v) {
		return fmt.Sprintf("%.0f", v)
	}
	return fmt.Sprintf("%g", v)
}

// trueNorth is the direction of true north at the map centre, degrees
// clockwise from map up, found by projecting a point 0.01° north of it.
func trueNorth(lo *layout) float64 {
	cx := lo.minX + float64(lo.mapRect.Dx())*lo.mpp/2
	cy := lo.maxY - float64(lo.mapRect.Dy())*lo.mpp/2
	lat, lon := lo.frame.Inverse(cx, cy)
	nx, ny := lo.frame.Forward(lat+0.01, lon)
	return math.Atan2(nx-cx, ny-cy) * 180 / math.Pi
}

// drawNorthArrow draws an arrow to true north (layout.northDeg) at the
// map's upper right and returns its box.
func (r *renderer) drawNorthArrow() box {
	lo, c, px := r.lo, r.c, r.px
	a := lo.northDeg * math.Pi / 180
	dx, dy := math.Sin(a), -math.Cos(a)
	ex, ey := -dy, dx
	size := px(46)
	o := pt{float64(lo.mapRect.Max.X) - px(14) - size/2, float64(lo.mapRect.Min.Y) + px(14) + size/2 + px(8)}
	b := box{o.X - size/2 - px(4), o.Y - size/2 - px(22), o.X + size/2 + px(4), o.Y + size/2 + px(4)}
	c.fillRect(b.x0, b.y0, b.x1, b.y1, withAlpha(colHalo, 0.85))
	tip := pt{o.X + dx*size*0.45, o.Y + dy*size*0.45}
	tail := pt{o.X - dx*size*0.45, o.Y - dy*size*0.45}
	left := pt{tail.X + ex*size*0.22 - dx*size*0.05, tail.Y + ey*size*0.22 - dy*size*0.05}
	right := pt{tail.X - ex*size*0.22 - dx*size*0.05, tail.Y - ey*size*0.22 - dy*size*0.05}
	c.addRing([]pt{tip, tail, left}, 1)
	c.paint(colText)
	c.stroke([]pt{tip, right, tail}, px(1.6), true, colText)
	n := "N"
	drawText(r.img, r.f.labelBold, tip.X-textWidth(r.f.labelBold, n)/2, tip.Y-px(5), n, colText)
	return b
}

// drawWindArrow draws the wind below box above (the north arrow's): an
// arrow the way the air moves, turned for the map's north, with its label,
// and returns its box.
func (r *renderer) drawWindArrow(above box, w WindArrow) box {
	lo, c, px := r.lo, r.c, r.px
	a := (w.FromDeg + 180 + lo.northDeg) * math.Pi / 180
	dx, dy := math.Sin(a), -math.Cos(a)
	ex, ey := -dy, dx
	size := px(46)
	tw := textWidth(r.f.label, w.Label)
	half := math.Max(size/2+px(4), tw/2+px(6))
	o := pt{(above.x0 + above.x1) / 2, above.y1 + px(10) + size/2}
	if o.X+half > float64(lo.mapRect.Max.X)-px(4) {
		o.X = float64(lo.mapRect.Max.X) - px(4) - half
	}
	b := box{o.X - half, o.Y - size/2 - px(4), o.X + half, o.Y + size/2 + px(22)}
	c.fillRect(b.x0, b.y0, b.x1, b.y1, withAlpha(colHalo, 0.85))
	tip := pt{o.X + dx*size*0.45, o.Y + dy*size*0.45}
	tail := pt{o.X - dx*size*0.45, o.Y - dy*size*0.45}
	hl := pt{tip.X - dx*size*0.3 + ex*size*0.18, tip.Y - dy*size*0.3 + ey*size*0.18}
	hr := pt{tip.X - dx*size*0.3 - ex*size*0.18, tip.Y - dy*size*0.3 - ey*size*0.18}
	lo.windArrow = o
	c.stroke([]pt{tail, tip}, px(2.4), false, colText)
	c.addRing([]pt{tip, hl, hr}, 1)
	c.paint(colText)
	drawText(r.img, r.f.label, o.X-tw/2, b.y1-px(6), w.Label, colText)
	return b
}

func lineLength(l []pt) float64 {
	s := 0.0
	for i := 1; i < len(l); i++ {
		s += math.Hypot(l[i].X-l[i-1].X, l[i].Y-l[i-1].Y)
	}
	return s
}

// midpoint is the point halfway along polyline l.
func midpoint(l []pt) pt {
	half := lineLength(l) / 2
	for i := 1; i < len(l); i++ {
		d := math.Hypot(l[i].X-l[i-1].X, l[i].Y-l[i-1].Y)
		if d >= half && d > 0 {
			t := half / d
			return pt{l[i-1].X + t*(l[i].X-l[i-1].X), l[i-1].Y + t*(l[i].Y-l[i-1].Y)}
		}
		half -= d
	}
	return l[len(l)-1]
}

// topVertex is the highest (smallest y) vertex of all outer rings.
func topVertex(polys [][][]pt) (pt, bool) {
	best, ok := pt{}, false
	for _, p := range polys {
		if len(p) == 0 {
			continue
		}
		for _, v := range p[0] {
			if !ok || v.Y < best.Y {
				best, ok = v, true
			}
		}
	}
	return best, ok
}
