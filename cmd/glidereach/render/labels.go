package render

import (
	"image/color"
	"math"
	"sort"

	"golang.org/x/image/font"
)

// box is an axis-aligned rectangle in pixels, x0 < x1, y0 < y1.
type box struct{ x0, y0, x1, y1 float64 }

func (b box) overlap(o box) float64 {
	w := math.Min(b.x1, o.x1) - math.Max(b.x0, o.x0)
	h := math.Min(b.y1, o.y1) - math.Max(b.y0, o.y0)
	if w <= 0 || h <= 0 {
		return 0
	}
	return w * h
}

func (b box) inside(o box) bool {
	return b.x0 >= o.x0 && b.y0 >= o.y0 && b.x1 <= o.x1 && b.y1 <= o.y1
}

func boxAround(p pt, r float64) box { return box{p.X - r, p.Y - r, p.X + r, p.Y + r} }

// label is text to be placed near an anchor point.
type label struct {
	lines    []string
	bold     bool       // first line bold
	anchor   pt         // the symbol's centre
	gap      float64    // distance kept from the anchor (the symbol's radius)
	priority int        // lower is placed first
	must     bool       // place even where every position overlaps something
	col      color.RGBA // text colour
}

// placed is a label with its chosen box.
type placed struct {
	label
	at     box
	leader bool // placed far from its anchor: draw a leader line
}

// placer places labels greedily. Labels are taken by priority (stable, so
// equal priorities keep their order); each label tries eight candidate
// positions around its anchor (right, upper right, lower right, left, upper
// left, lower left, above, below), then the same at 2.2, 4, 6.5 and 9 times the distance (those beyond
// 2.2 with a leader line), and
// takes the first whose box lies inside the map and collides with no
// symbol or earlier label. A label that fits nowhere is dropped, unless it
// must be shown; then it takes the candidate with the least overlap.
type placer struct {
	bounds   box
	occupied []box
}

// reserve marks a region (a symbol, the scale bar) as taken.
func (p *placer) reserve(b box) { p.occupied = append(p.occupied, b) }

func (p *placer) placeAll(ls []label, f, fb font.Face, pad float64) []placed {
	sort.SliceStable(ls, func(i, j int) bool { return ls[i].priority < ls[j].priority })
	var out []placed
	for _, l := range ls {
		w, h := labelSize(l, f, fb, pad)
		best, bestCost, found := box{}, math.Inf(1), false
		far := false
		for _, k := range []float64{1, 2.2, 4, 6.5, 9} {
			g := l.gap*k + pad
			ax, ay := l.anchor.X, l.anchor.Y
			cands := []box{
				{ax + g, ay - h/2, ax + g + w, ay + h/2},                 // right
				{ax + g*0.7, ay - g*0.7 - h, ax + g*0.7 + w, ay - g*0.7}, // upper right
				{ax + g*0.7, ay + g*0.7, ax + g*0.7 + w, ay + g*0.7 + h}, // lower right
				{ax - g - w, ay - h/2, ax - g, ay + h/2},                 // left
				{ax - g*0.7 - w, ay - g*0.7 - h, ax - g*0.7, ay - g*0.7}, // upper left
				{ax - g*0.7 - w, ay + g*0.7, ax - g*0.7, ay + g*0.7 + h}, // lower left
				{ax - w/2, ay - g - h, ax + w/2, ay - g},                 // above
				{ax - w/2, ay + g, ax + w/2, ay + g + h},                 // below
			}
			for _, c := range cands {
				if !c.inside(p.bounds) {
					continue
				}
				cost := 0.0
				for _, o := range p.occupied {
					cost += c.overlap(o)
				}
				if cost < bestCost {
					best, bestCost = c, cost
				}
				if cost == 0 {
					found, far = true, k > 2.2
					break
				}
			}
			if found {
				break
			}
		}
		if math.IsInf(bestCost, 1) && l.must { // no candidate inside the map: push one in
			ax, ay := l.anchor.X+l.gap+pad, l.anchor.Y-h/2
			ax = math.Max(p.bounds.x0, math.Min(ax, p.bounds.x1-w))
			ay = math.Max(p.bounds.y0, math.Min(ay, p.bounds.y1-h))
			best, bestCost = box{ax, ay, ax + w, ay + h}, 0
		}
		if math.IsInf(bestCost, 1) || (!found && !l.must) {
			continue
		}
		p.occupied = append(p.occupied, best)
		out = append(out, placed{l, best, far && found})
	}
	return out
}

// labelSize is the size of a label's box: its lines plus padding.
func labelSize(l label, f, fb font.Face, pad float64) (w, h float64) {
	for i, s := range l.lines {
		face := f
		if i == 0 && l.bold {
			face = fb
		}
		w = math.Max(w, textWidth(face, s))
	}
	return w + 2*pad, float64(len(l.lines))*lineHeight(f) + 2*pad
}
