package render

import (
	"bufio"
	"fmt"
	"html"
	"io"
	"math"
	"strings"
)

// Profile is an altitude profile along a line (a final glide or a route):
// distance from the start on the horizontal axis, altitude MSL on the
// vertical one.
type Profile struct {
	Title string
	// Series are the curves; each has its own distances.
	Series []Series
	// Marks are labelled points (fields, the lowest clearance).
	Marks []ProfileMark
	// Bands are stretches of the line shaded across the chart (the
	// route's gaps), in the map's gap yellow.
	Bands []ProfileBand
	// HeightFeet labels the altitude axis in feet (values stay metres).
	HeightFeet bool
}

// ProfileBand is a shaded stretch, metres from the start.
type ProfileBand struct {
	FromM, ToM float64
	// Label names the band in the chart's legend ("gap: no field in
	// reach"); bands with equal labels share one entry.
	Label string
}

// SeriesKind says how a series is drawn. Each kind has its own colour
// (Okabe–Ito) and its own dash pattern, so the chart also reads in grey.
type SeriesKind int

const (
	// SeriesTerrain is the ground along the line: a filled area.
	SeriesTerrain SeriesKind = iota
	// SeriesGlide is the glide line or the planned altitude: solid blue.
	SeriesGlide
	// SeriesLeast is the least altitude that still reaches a field (or the
	// goal) with the reserve: dashed vermillion.
	SeriesLeast
	// SeriesReserve is the reserve height above the ground or the goal:
	// dash-dotted reddish purple.
	SeriesReserve
	// SeriesBlocked is a glide line that does not get there (it runs into
	// the terrain), drawn up to where it is blocked: thin dotted black, so
	// it never reads as the line to fly.
	SeriesBlocked
)

// Series is one curve of a Profile. DistM (metres from the start,
// increasing) and AltMSL (metres MSL) have equal lengths; a NaN altitude
// breaks the curve.
type Series struct {
	Name   string
	Kind   SeriesKind
	DistM  []float64
	AltMSL []float64
}

// ProfileMark is a labelled point on the chart.
type ProfileMark struct {
	DistM, AltMSL float64
	Label         string
}

type seriesStyle struct {
	stroke, dash, fill string
	width              float64
}

func styleOf(k SeriesKind) seriesStyle {
	switch k {
	case SeriesTerrain:
		return seriesStyle{stroke: "#7a5c3e", fill: "#e2cfa4", width: 1.5}
	case SeriesGlide:
		return seriesStyle{stroke: hex(okBlue), width: 3}
	case SeriesLeast:
		return seriesStyle{stroke: hex(okVermillion), dash: "9 5", width: 2.5}
	case SeriesBlocked:
		return seriesStyle{stroke: hex(okBlack), dash: "2 4", width: 1.5}
	default:
		return seriesStyle{stroke: hex(okReddishPurpl), dash: "10 4 2 4", width: 2}
	}
}

// Chart size in SVG user units; the SVG scales to its container.
const (
	chartW, chartH                     = 960.0, 380.0
	chartL, chartR, chartT, chartB     = 70.0, 20.0, 44.0, 48.0
	chartPlotW, chartPlotH             = chartW - chartL - chartR, chartH - chartT - chartB
	chartFont                          = "font-family:sans-serif"
	chartMaxPoints                 int = 1 << 20
)

// WriteProfileSVG writes p as a standalone <svg> element (no external
// references, no scripts) for inlining in HTML.
func WriteProfileSVG(w io.Writer, p *Profile) error {
	if p == nil {
		return fmt.Errorf("render: no profile")
	}
	x0, x1 := 0.0, math.Inf(-1)
	y0, y1 := math.Inf(1), math.Inf(-1)
	for _, s := range p.Series {
		if len(s.DistM) != len(s.AltMSL) {
			return fmt.Errorf("render: profile series %q has %d distances and %d altitudes",
				s.Name, len(s.DistM), len(s.AltMSL))
		}
		if len(s.DistM) > chartMaxPoints {
			return fmt.Errorf("render: profile series %q has %d points, more than %d", s.Name, len(s.DistM), chartMaxPoints)
		}
		for i, d := range s.DistM {
			if a := s.AltMSL[i]; !math.IsNaN(a) && !math.IsInf(a, 0) && !math.IsNaN(d) {
				x1 = math.Max(x1, d)
				y0, y1 = math.Min(y0, a), math.Max(y1, a)
			}
		}
	}
	for _, m := range p.Marks {
		if !math.IsNaN(m.AltMSL) {
			y0, y1 = math.Min(y0, m.AltMSL), math.Max(y1, m.AltMSL)
		}
	}
	if !(x1 > x0) || !(y1 >= y0) {
		return fmt.Errorf("render: profile has no points")
	}
	unit, k := "m", 1.0
	if p.HeightFeet {
		unit, k = "ft", 1/0.3048
	}
	// Altitude axis from a little below the lowest value (0 at most when
	// the ground is near sea level) with room above for the legend.
	yTicks := ticks(y0*k, y1*k+(y1-y0)*k*0.12+1, 6)
	ya, yb := yTicks[0]/k, yTicks[len(yTicks)-1]/k
	xTicks := ticks(0, x1/1000, 10)
	xb := xTicks[len(xTicks)-1] * 1000
	X := func(d float64) float64 { return chartL + d/xb*chartPlotW }
	Y := func(a float64) float64 { return chartT + (yb-a)/(yb-ya)*chartPlotH }

	bw := bufio.NewWriter(w)
	pr := func(format string, a ...any) { fmt.Fprintf(bw, format, a...) }
	pr(`<svg viewBox="0 0 %g %g" width="100%%" role="img" aria-label="%s" style="max-width:%gpx;%s;background:#fff">`,
		chartW, chartH, html.EscapeString(p.Title), 1.25*chartW, chartFont)
	pr(`<title>%s</title>`, html.EscapeString(p.Title))
	pr(`<text x="%g" y="22" font-size="17" font-weight="bold" fill="#1a1a1a">%s</text>`, chartL, html.EscapeString(p.Title))
	// Grid and axes.
	for _, t := range yTicks {
		y := Y(t / k)
		pr(`<line x1="%g" y1="%.1f" x2="%g" y2="%.1f" stroke="#ddd"/>`, chartL, y, chartL+chartPlotW, y)
		pr(`<text x="%g" y="%.1f" font-size="13" text-anchor="end" fill="#333">%s</text>`, chartL-6, y+4, fmtTick(t))
	}
	for _, t := range xTicks {
		x := X(t * 1000)
		pr(`<line x1="%.1f" y1="%g" x2="%.1f" y2="%g" stroke="#eee"/>`, x, chartT, x, chartT+chartPlotH)
		pr(`<text x="%.1f" y="%g" font-size="13" text-anchor="middle" fill="#333">%s</text>`, x, chartT+chartPlotH+18, fmtTick(t))
	}
	pr(`<text x="%g" y="%g" font-size="13" text-anchor="middle" fill="#333">distance from start, km (1 nm = 1.852 km)</text>`,
		chartL+chartPlotW/2, chartH-8)
	pr(`<text x="16" y="%g" font-size="13" text-anchor="middle" fill="#333" transform="rotate(-90 16 %g)">altitude, %s MSL</text>`,
		chartT+chartPlotH/2, chartT+chartPlotH/2, unit)
	pr(`<rect x="%g" y="%g" width="%g" height="%g" fill="none" stroke="#666"/>`, chartL, chartT, chartPlotW, chartPlotH)

	for _, b := range p.Bands {
		if !(b.ToM > b.FromM) {
			continue
		}
		left, right := X(math.Max(0, b.FromM)), X(math.Min(xb, b.ToM))
		pr(`<rect x="%.1f" y="%g" width="%.1f" height="%g" fill="%s" fill-opacity="0.35"/>`, left, chartT, right-left, chartPlotH, hex(okYellow))
	}
	// Curves: terrain first (filled to the axis), then the lines.
	for pass := 0; pass < 2; pass++ {
		for _, s := range p.Series {
			if (s.Kind == SeriesTerrain) != (pass == 0) {
				continue
			}
			st := styleOf(s.Kind)
			for _, run := range runs(s) {
				var b strings.Builder
				for i, j := range run {
					cmd := "L"
					if i == 0 {
						cmd = "M"
					}
					fmt.Fprintf(&b, "%s%.1f %.1f", cmd, X(s.DistM[j]), Y(s.AltMSL[j]))
				}
				if s.Kind == SeriesTerrain {
					first, last := run[0], run[len(run)-1]
					pr(`<path d="%sL%.1f %.1fL%.1f %.1fZ" fill="%s" stroke="none"/>`, b.String(),
						X(s.DistM[last]), Y(ya), X(s.DistM[first]), Y(ya), st.fill)
				}
				dash := ""
				if st.dash != "" {
					dash = fmt.Sprintf(` stroke-dasharray="%s"`, st.dash)
				}
				pr(`<path d="%s" fill="none" stroke="%s" stroke-width="%g"%s stroke-linejoin="round"/>`,
					b.String(), st.stroke, st.width, dash)
			}
		}
	}
	var marks []ProfileMark
	for _, m := range p.Marks {
		if !math.IsNaN(m.AltMSL) && !math.IsNaN(m.DistM) {
			marks = append(marks, m)
		}
	}
	for _, m := range marks {
		pr(`<circle cx="%.1f" cy="%.1f" r="5" fill="%s" stroke="#000" stroke-width="1.2"/>`, X(m.DistM), Y(m.AltMSL), hex(okReddishPurpl))
	}
	for _, l := range placeMarkLabels(marks, X, Y) {
		pr(`<text x="%.1f" y="%.1f" font-size="13" text-anchor="%s" fill="#1a1a1a" stroke="#fff" stroke-width="3" paint-order="stroke">%s</text>`,
			l.x, l.y, l.anchor, html.EscapeString(l.text))
	}
	// Legend, top left inside the plot.
	lx, ly := chartL+12, chartT+18
	next := func(name string) {
		pr(`<text x="%g" y="%g" font-size="13" fill="#1a1a1a">%s</text>`, lx+38, ly+2, html.EscapeString(name))
		lx += 38 + 7.5*float64(len([]rune(name))) + 24
		if lx > chartL+chartPlotW-200 {
			lx, ly = chartL+12, ly+18
		}
	}
	for _, s := range p.Series {
		st := styleOf(s.Kind)
		if s.Kind == SeriesTerrain {
			pr(`<rect x="%g" y="%g" width="30" height="10" fill="%s" stroke="%s"/>`, lx, ly-8, st.fill, st.stroke)
		} else {
			dash := ""
			if st.dash != "" {
				dash = fmt.Sprintf(` stroke-dasharray="%s"`, st.dash)
			}
			pr(`<line x1="%g" y1="%g" x2="%g" y2="%g" stroke="%s" stroke-width="%g"%s/>`, lx, ly-3, lx+30, ly-3, st.stroke, st.width, dash)
		}
		next(s.Name)
	}
	seen := map[string]bool{}
	for _, b := range p.Bands {
		if b.Label == "" || seen[b.Label] {
			continue
		}
		seen[b.Label] = true
		pr(`<rect x="%g" y="%g" width="30" height="10" fill="%s" fill-opacity="0.6" stroke="#888"/>`, lx, ly-8, hex(okYellow))
		next(b.Label)
	}
	pr(`</svg>`)
	return bw.Flush()
}

// runs splits a series into index runs of finite altitudes.
func runs(s Series) [][]int {
	var out [][]int
	var cur []int
	for i, a := range s.AltMSL {
		if math.IsNaN(a) || math.IsInf(a, 0) || math.IsNaN(s.DistM[i]) {
			if len(cur) > 0 {
				out = append(out, cur)
			}
			cur = nil
			continue
		}
		cur = append(cur, i)
	}
	if len(cur) > 0 {
		out = append(out, cur)
	}
	return out
}

// ticks returns round tick values covering [lo, hi] with about n steps.
func ticks(lo, hi float64, n int) []float64 {
	if hi <= lo {
		hi = lo + 1
	}
	step := niceLength((hi - lo) / float64(n))
	if (hi-lo)/step > float64(n)*1.5 { // niceLength rounds down
		step = niceLength(step * 2.5)
	}
	start := math.Floor(lo/step) * step
	var out []float64
	for v := start; v < hi+step*0.999; v += step {
		out = append(out, math.Round(v/step)*step)
	}
	return out
}

func fmtTick(v float64) string {
	if math.Abs(v-math.Round(v)) < 1e-9 {
		return fmt.Sprintf("%.0f", v)
	}
	return strings.TrimRight(strings.TrimRight(fmt.Sprintf("%.2f", v), "0"), ".")
}

// markLabel is a mark's label as placed on the chart: text baseline at
// (x, y), anchored at its start or end.
type markLabel struct {
	x, y   float64
	anchor string
	text   string
	b      box
}

// chartCharW is the mean advance of the chart's 13-unit sans-serif font
// (about 0.55 em), used to keep mark labels apart.
const chartCharW = 7.2

// placeMarkLabels puts each mark's label above or below its dot, to the
// right (to the left in the last quarter of the plot), nearer first, on
// the first spot inside the plot that overlaps no earlier label and no
// dot; when none is free, the plain spot above the dot.
func placeMarkLabels(marks []ProfileMark, X, Y func(float64) float64) []markLabel {
	var dots, taken []box
	for _, m := range marks {
		dots = append(dots, boxAround(pt{X(m.DistM), Y(m.AltMSL)}, 6))
	}
	plot := box{chartL, chartT, chartL + chartPlotW, chartT + chartPlotH}
	var out []markLabel
	for _, m := range marks {
		x, y := X(m.DistM), Y(m.AltMSL)
		w := chartCharW*float64(len([]rune(m.Label))) + 4
		var cands []markLabel
		for _, dy := range []float64{-8, 19, -24, 35, -40, 51} {
			for _, left := range []bool{x > chartL+chartPlotW*0.75, x <= chartL+chartPlotW*0.75} {
				l := markLabel{x: x + 8, y: y + dy, anchor: "start", text: m.Label}
				l.b = box{l.x - 2, l.y - 12, l.x + w, l.y + 4}
				if left {
					l.x, l.anchor = x-8, "end"
					l.b = box{l.x - w, l.y - 12, l.x + 2, l.y + 4}
				}
				cands = append(cands, l)
			}
		}
		best := cands[0]
		for _, c := range cands {
			if !c.b.inside(plot) {
				continue
			}
			free := true
			for _, o := range append(taken, dots...) {
				if c.b.overlap(o) > 0 {
					free = false
					break
				}
			}
			if free {
				best = c
				break
			}
		}
		taken = append(taken, best.b)
		out = append(out, best)
	}
	return out
}
