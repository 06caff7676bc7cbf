package render

import (
	"fmt"
	"image"
	"math"
	"sort"
)

// legendKind is the symbol a legend entry shows.
type legendKind int

const (
	lgReach legendKind = iota
	lgStart
	lgStartNoHeading
	lgReachable
	lgUnreachable
	lgRouteCovered
	lgRouteOpen
	lgGap
	lgGlide
	lgLowest
	lgCovered
	lgUncovered
	lgArea
	lgTerrain
	lgVoid
	lgOffMap
	lgProposed
	lgTurn
	lgBelowReserve
	lgAreaHole
)

type legendItem struct {
	kind    legendKind
	text    string
	level   int  // nesting depth for lgReach swatches
	reserve bool // lgReach: the reserve ring (heaviest outline)
}

// legendItems lists the entries for what the scene contains, in a fixed
// order.
func (r *renderer) legendItems() []legendItem {
	s := r.s
	var it []legendItem
	levels := append([]Level(nil), s.Levels...)
	sort.SliceStable(levels, func(i, j int) bool { return levels[i].ArrivalAGL < levels[j].ArrivalAGL })
	reserve := ""
	for _, l := range levels {
		if l.IsReserve {
			reserve = s.height(l.ArrivalAGL) + " "
		}
	}
	belowDone := false
	for i, l := range levels {
		t := l.Label
		switch {
		case l.BelowReserve:
			// One entry for all below-reserve bands: they share the hatch.
			if belowDone {
				continue
			}
			belowDone = true
			if t == "" {
				t = "Below the " + reserve + "reserve: NOT a safe landing margin"
			}
			it = append(it, legendItem{kind: lgBelowReserve, text: t})
			continue
		case t == "" && l.IsReserve:
			t = "Reserve ring: arrive \u2265 " + s.height(l.ArrivalAGL) + " AGL"
		case t == "":
			t = "In glide reach, arrive \u2265 " + s.height(l.ArrivalAGL) + " AGL"
		}
		it = append(it, legendItem{kind: lgReach, text: t, level: i, reserve: l.IsReserve})
	}
	if m := s.Start; m != nil {
		if math.IsNaN(m.HeadingDeg) {
			it = append(it, legendItem{kind: lgStartNoHeading, text: "Start position"})
		} else {
			it = append(it, legendItem{kind: lgStart, text: "Start, arrow = heading"})
		}
	}
	var reach, out, proposed, arrival bool
	for _, f := range s.Fields {
		switch {
		case f.Proposed:
			proposed = true
		case f.Reachable:
			reach = true
			arrival = arrival || !math.IsNaN(f.ArrivalAGL)
		default:
			out = true
		}
	}
	from := s.FieldsFrom
	if from == "" {
		from = "from the start"
	}
	if reach {
		t := "Field in reach " + from
		if arrival {
			t += " (arrival height above it)"
		}
		it = append(it, legendItem{kind: lgReachable, text: t})
	}
	if out {
		it = append(it, legendItem{kind: lgUnreachable, text: "Field out of reach " + from})
	}
	if proposed {
		it = append(it, legendItem{kind: lgProposed, text: "Proposed field (not yet a landing option)"})
	}
	var cov, open bool
	for _, p := range s.Route {
		cov = cov || p.Covered
		open = open || !p.Covered
	}
	if cov {
		it = append(it, legendItem{kind: lgRouteCovered, text: "Route, a field in reach (solid)"})
	}
	if open {
		it = append(it, legendItem{kind: lgRouteOpen, text: "Route, no field in reach (dashed)"})
	}
	if len(s.Gaps) > 0 {
		it = append(it, legendItem{kind: lgGap, text: "Gap: no landing option"})
	}
	if g := s.Glide; g != nil {
		lineText, turnText := "Final glide line", "Turn point"
		if g.LineLabel != "" {
			lineText = g.LineLabel
		}
		if g.TurnLabel != "" {
			turnText = g.TurnLabel
		}
		it = append(it, legendItem{kind: lgGlide, text: lineText})
		if len(g.Turns) > 0 {
			it = append(it, legendItem{kind: lgTurn, text: turnText})
		}
		if !math.IsNaN(g.LowestClearance) && r.lowestAtField() < 0 {
			it = append(it, legendItem{kind: lgLowest, text: "Lowest terrain clearance"})
		}
	}
	if cv := s.Coverage; cv != nil {
		if len(cv.Covered) > 0 {
			it = append(it, legendItem{kind: lgCovered, text: "Covered: a field in reach"})
		}
		if len(cv.Uncovered) > 0 {
			it = append(it, legendItem{kind: lgUncovered, text: "Not covered (hatched)"})
		}
		if len(cv.Area) > 0 {
			it = append(it, legendItem{kind: lgArea, text: "Area analysed"})
			holes := false
			for _, p := range cv.Area {
				holes = holes || len(p) > 1
			}
			if holes {
				it = append(it, legendItem{kind: lgAreaHole, text: "Hole in the area (not analysed)"})
			}
		}
	}
	l := s.Terrain
	lo, hi := elevRange(l)
	if l.Flat {
		it = append(it, legendItem{kind: lgTerrain, text: "Flat ground at " + s.height(lo) + " MSL"})
	} else {
		it = append(it, legendItem{kind: lgTerrain,
			text: fmt.Sprintf("Terrain %s to %s MSL, shaded", s.height(lo), s.height(hi))})
	}
	if r.voidShown {
		it = append(it, legendItem{kind: lgVoid, text: "No terrain data (treated as obstacle)"})
	}
	if r.offShown {
		it = append(it, legendItem{kind: lgOffMap, text: "Outside the computed window"})
	}
	return it
}

// drawLegend draws the legend in its rectangle, two columns.
func (r *renderer) drawLegend(items []legendItem) {
	lo, px, f := r.lo, r.px, r.f
	rc := lo.legendRect
	r.c.box(rc, colHalo, withAlpha(colTextMuted, 0.5), px(1))
	x0, y := float64(rc.Min.X)+px(12), float64(rc.Min.Y)+px(10)
	drawText(r.img, f.legendBold, x0, y+ascent(f.legendBold), "Legend", colText)
	y += lineHeight(f.legendBold) + px(4)
	rowH := lineHeight(f.legend) + px(9)
	colW := (float64(rc.Dx()) - px(24)) / 2
	rows := (len(items) + 1) / 2
	sw := px(34) // swatch width
	for i, it := range items {
		cx := x0 + float64(i/rows)*colW
		cy := y + float64(i%rows)*rowH
		mid := cy + rowH/2
		r.legendSymbol(it, cx, mid, sw)
		drawText(r.img, f.legend, cx+sw+px(10), mid+ascent(f.legend)/2-px(1.5), it.text, colText)
	}
}

// legendSymbol draws the symbol of one entry in a swatch of width sw
// centred vertically on y.
func (r *renderer) legendSymbol(it legendItem, x, y, sw float64) {
	c, px := r.c, r.px
	h := px(16)
	mid := pt{x + sw/2, y}
	switch it.kind {
	case lgReach:
		for k := 0; k <= it.level; k++ {
			c.fillRect(x, y-h/2, x+sw, y+h/2, withAlpha(colReachFill, 0.24))
		}
		w := px(2.4)
		if it.reserve {
			w = px(3.6)
		}
		c.stroke(rect(x, y-h/2, x+sw, y+h/2), w, true, colReachLine)
	case lgBelowReserve:
		box := [][][]pt{{rect(x, y-h/2, x+sw, y+h/2)}}
		c.fillPolys(box, withAlpha(colBelowReserve, 0.10))
		c.hatchPolys(box, withAlpha(colBelowReserve, 0.70), px(9), px(1.8))
		for _, d := range dashes(append(rect(x, y-h/2, x+sw, y+h/2), pt{x, y - h/2}), px(10), px(6)) {
			c.addStroke(d, px(2.4), false)
		}
		c.paint(colBelowReserve)
	case lgStart:
		r.startSymbol(mid, 90-r.lo.northDeg)
	case lgStartNoHeading:
		r.startSymbol(mid, math.NaN())
	case lgReachable:
		r.fieldSymbol(mid, true, px(9))
	case lgUnreachable:
		r.fieldSymbol(mid, false, px(9))
	case lgRouteCovered:
		seg := []pt{{x, y}, {x + sw, y}}
		c.stroke(seg, px(8), false, colHalo)
		c.stroke(seg, px(4.5), false, colRouteCovered)
	case lgRouteOpen:
		seg := []pt{{x, y}, {x + sw, y}}
		c.stroke(seg, px(8), false, withAlpha(colTextMuted, 0.25))
		for _, d := range dashes(seg, px(14), px(8)) {
			c.addStroke(d, px(4.5), false)
		}
		c.paint(colRouteOpen)
	case lgGap:
		seg := []pt{{x, y}, {x + sw, y}}
		c.stroke(seg, px(16), false, withAlpha(colGap, 0.85))
		for _, d := range dashes(seg, px(14), px(8)) {
			c.addStroke(d, px(4.5), false)
		}
		c.paint(colRouteOpen)
		c.stroke([]pt{{x, y - px(11)}, {x, y + px(11)}}, px(3), false, colText)
		c.stroke([]pt{{x + sw, y - px(11)}, {x + sw, y + px(11)}}, px(3), false, colText)
	case lgGlide:
		c.stroke([]pt{{x, y}, {x + sw, y}}, px(3), false, colGlide)
	case lgLowest:
		d := px(9)
		dia := []pt{{mid.X, y - d}, {mid.X + d, y}, {mid.X, y + d}, {mid.X - d, y}}
		c.addRing(dia, 1)
		c.paint(colLowest)
		c.stroke(dia, px(1.2), true, colText)
	case lgCovered:
		c.fillRect(x, y-h/2, x+sw, y+h/2, withAlpha(colCovered, 0.30))
		c.stroke(rect(x, y-h/2, x+sw, y+h/2), px(1), true, withAlpha(colTextMuted, 0.6))
	case lgUncovered:
		sq := [][][]pt{{rect(x, y-h/2, x+sw, y+h/2)}}
		c.fillPolys(sq, withAlpha(colUncovered, 0.12))
		c.hatchPolys(sq, withAlpha(colUncovered, 0.75), px(11), px(2.2))
		c.stroke(rect(x, y-h/2, x+sw, y+h/2), px(1), true, withAlpha(colTextMuted, 0.6))
	case lgArea:
		for _, d := range dashes(rect(x, y-h/2, x+sw, y+h/2), px(10), px(6)) {
			c.addStroke(d, px(2), false)
		}
		c.paint(colText)
	case lgAreaHole:
		for _, d := range dashes(rect(x, y-h/2, x+sw, y+h/2), px(2.5), px(4.5)) {
			c.addStroke(d, px(2.2), false)
		}
		c.paint(colTextMuted)
	case lgTerrain:
		if r.s.Terrain.Flat {
			c.fillRect(x, y-h/2, x+sw, y+h/2, colFlat)
		} else {
			n := 24
			for k := 0; k < n; k++ {
				cr, cg, cb := tint(float64(k) / float64(n-1))
				x0 := x + sw*float64(k)/float64(n)
				fillSolid(r.img, image.Rect(int(x0), int(y-h/2), int(math.Ceil(x0+sw/float64(n))), int(y+h/2)),
					rgb(cr, cg, cb))
			}
		}
		c.stroke(rect(x, y-h/2, x+sw, y+h/2), px(1), true, withAlpha(colTextMuted, 0.6))
	case lgVoid:
		c.fillRect(x, y-h/2, x+sw, y+h/2, colVoid)
	case lgOffMap:
		c.fillRect(x, y-h/2, x+sw, y+h/2, colOffMap)
		c.stroke(rect(x, y-h/2, x+sw, y+h/2), px(1), true, withAlpha(colTextMuted, 0.6))
	case lgProposed:
		r.proposedSymbol(mid, px(9))
	case lgTurn:
		r.turnSymbol(mid)
	}
}

// inputLines is the text of the inputs box, wrapped to width.
func (r *renderer) inputLines(width float64) []string {
	s := r.s
	var out []string
	if len(s.Inputs) > 0 {
		out = append(out, "\x01Inputs")
		for _, in := range s.Inputs {
			out = append(out, wrap(r.f.legend, in, width)...)
		}
	}
	out = append(out, "\x01Terrain data")
	out = append(out, wrap(r.f.legend, s.sourceText(), width)...)
	if len(s.WindLayers) > 0 {
		src := s.WindSource
		if src == "" {
			src = "as given"
		}
		out = append(out, "\x01Wind")
		out = append(out, wrap(r.f.legend, "Arrows on the map point where the air goes; source: "+src, width)...)
	}
	if len(s.Warnings) > 0 {
		out = append(out, "\x01Limits of this result")
		for _, w := range s.Warnings {
			out = append(out, wrap(r.f.legend, w, width)...)
		}
	}
	return out
}

// drawInputs draws the key inputs and the data source; lines starting
// with \x01 are headings.
func (r *renderer) drawInputs(lines []string) {
	lo, px, f := r.lo, r.px, r.f
	rc := lo.inputsRect
	r.c.box(rc, colHalo, withAlpha(colTextMuted, 0.5), px(1))
	x, y := float64(rc.Min.X)+px(12), float64(rc.Min.Y)+px(10)
	for i, s := range lines {
		face := f.legend
		if len(s) > 0 && s[0] == '\x01' {
			face, s = f.legendBold, s[1:]
			if i > 0 {
				y += px(4)
			}
		}
		drawText(r.img, face, x, y+ascent(face), s, colText)
		y += lineHeight(f.legend) + px(3)
	}
}

// drawCaution draws the caution in a box with an orange border.
func (r *renderer) drawCaution(lines []string) {
	lo, px, f := r.lo, r.px, r.f
	rc := lo.cautionRect
	r.c.box(rc, rgb(0xff, 0xf7, 0xe0), colCautionBorder, px(3))
	x, y := float64(rc.Min.X)+px(14), float64(rc.Min.Y)+px(8)
	for _, s := range lines {
		drawText(r.img, f.legendBold, x, y+ascent(f.legendBold), s, colText)
		y += lineHeight(f.legend) + px(2)
	}
}
