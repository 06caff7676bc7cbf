package render

import (
	"fmt"
	"math"
)

// drawWindPanel draws the wind by layer at the map's upper right, under the
// north-arrow box nb, and returns its box. Each layer is one row, highest
// first: its altitude and direction/speed, and an arrow pointing where the
// air goes (downwind, true direction turned by the map's north), as long as
// the speed asks (a 6 px stub for light air up to the full row width at
// 60 kt and above), with one cross-tick for every full 10 kt so that two
// arrows of similar length still read apart. A calm layer is a small ring.
// The design is this project's own.
func (r *renderer) drawWindPanel(nb box) box {
	s, lo, c, px := r.s, r.lo, r.c, r.px
	f := r.f.small
	rows := make([]WindMark, len(s.WindLayers))
	copy(rows, s.WindLayers)
	for i, j := 0, len(rows)-1; i < j; i, j = i+1, j-1 { // highest first
		rows[i], rows[j] = rows[j], rows[i]
	}
	if len(rows) > 6 {
		rows = rows[:6]
	}
	texts := make([]string, len(rows))
	textW := textWidth(r.f.labelBold, "Wind")
	for i, w := range rows {
		t := w.Text
		if t == "" {
			if w.Speed == 0 {
				t = fmt.Sprintf("%s calm", s.height(w.AltMSL))
			} else {
				t = fmt.Sprintf("%s %03.0f°/%.0f kt", s.height(w.AltMSL), w.FromDeg, w.Speed/0.514444)
			}
		}
		texts[i] = t
		textW = math.Max(textW, textWidth(f, t))
	}
	arrowW := px(96)
	rowH := math.Max(lineHeight(f), px(26))
	w := px(10) + textW + px(10) + arrowW + px(10)
	h := px(8) + lineHeight(r.f.labelBold) + float64(len(rows))*rowH + px(6)
	x1 := float64(lo.mapRect.Max.X) - px(10)
	y0 := nb.y1 + px(8)
	b := box{x1 - w, y0, x1, y0 + h}
	c.fillRect(b.x0, b.y0, b.x1, b.y1, withAlpha(colHalo, 0.88))
	c.stroke(rect(b.x0, b.y0, b.x1, b.y1), px(1), true, withAlpha(colTextMuted, 0.6))
	drawText(r.img, r.f.labelBold, b.x0+px(10), b.y0+px(6)+ascent(r.f.labelBold), "Wind", colText)
	y := b.y0 + px(8) + lineHeight(r.f.labelBold)
	for i, wm := range rows {
		cy := y + rowH/2
		drawText(r.img, f, b.x0+px(10), cy+ascent(f)/2-px(1), texts[i], colText)
		cx := b.x1 - px(10) - arrowW/2
		kt := wm.Speed / 0.514444
		if !(kt >= 0.5) {
			c.stroke(circle(pt{cx, cy}, px(4), 16), px(1.6), true, colWind)
			y += rowH
			continue
		}
		L := px(6) + (arrowW-px(6))*math.Min(kt, 60)/60
		a := (wm.FromDeg + 180 + lo.northDeg) * math.Pi / 180 // downwind, on the map
		dx, dy := math.Sin(a), -math.Cos(a)
		tail := pt{cx - dx*L/2, cy - dy*L/2}
		tip := pt{cx + dx*L/2, cy + dy*L/2}
		c.stroke([]pt{tail, tip}, px(3), false, colWind)
		ex, ey := -dy, dx
		hs := px(9)
		c.addRing([]pt{tip, {tip.X - dx*hs + ex*hs*0.55, tip.Y - dy*hs + ey*hs*0.55}, {tip.X - dx*hs - ex*hs*0.55, tip.Y - dy*hs - ey*hs*0.55}}, 1)
		c.paint(colWind)
		for k := 1; k <= int(kt/10) && k <= 6; k++ {
			t := pt{tail.X + dx*float64(k-1)*px(4), tail.Y + dy*float64(k-1)*px(4)}
			c.stroke([]pt{{t.X - ex*px(4), t.Y - ey*px(4)}, {t.X + ex*px(4), t.Y + ey*px(4)}}, px(1.4), false, colWind)
		}
		y += rowH
	}
	return b
}

// drawWarnings draws the scene's warnings in bold at the map's upper left,
// on a band that stays readable over any terrain, and returns its box.
func (r *renderer) drawWarnings() box {
	s, lo, c, px := r.s, r.lo, r.c, r.px
	f := r.f.labelBold
	width := float64(lo.mapRect.Dx()) * 0.55
	var lines []string
	for _, w := range s.Warnings {
		lines = append(lines, wrap(f, w, width)...)
	}
	lh := lineHeight(f) + px(2)
	x0, y0 := float64(lo.mapRect.Min.X)+px(10), float64(lo.mapRect.Min.Y)+px(10)
	wMax := 0.0
	for _, l := range lines {
		wMax = math.Max(wMax, textWidth(f, l))
	}
	b := box{x0, y0, x0 + wMax + px(20), y0 + float64(len(lines))*lh + px(12)}
	c.fillRect(b.x0, b.y0, b.x1, b.y1, withAlpha(colHalo, 0.9))
	c.stroke(rect(b.x0, b.y0, b.x1, b.y1), px(2.5), true, colCautionBorder)
	y := y0 + px(6)
	for _, l := range lines {
		drawText(r.img, f, x0+px(10), y+ascent(f), l, colText)
		y += lh
	}
	return b
}
