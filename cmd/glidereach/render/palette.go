package render

import (
	"fmt"
	"image/color"
	"math"
)

// The Okabe–Ito palette (M. Okabe and K. Ito, "Color Universal Design (CUD):
// how to make figures and presentations that are friendly to colorblind
// people", 2008): eight colours that stay distinct under deuteranopia,
// protanopia and tritanopia. Every symbol and line colour of the map is one
// of them; meaning is also carried by shape or dash pattern.
var (
	okBlack        = color.RGBA{0x00, 0x00, 0x00, 0xff}
	okOrange       = color.RGBA{0xE6, 0x9F, 0x00, 0xff}
	okSkyBlue      = color.RGBA{0x56, 0xB4, 0xE9, 0xff}
	okBluishGreen  = color.RGBA{0x00, 0x9E, 0x73, 0xff}
	okYellow       = color.RGBA{0xF0, 0xE4, 0x42, 0xff}
	okBlue         = color.RGBA{0x00, 0x72, 0xB2, 0xff}
	okVermillion   = color.RGBA{0xD5, 0x5E, 0x00, 0xff}
	okReddishPurpl = color.RGBA{0xCC, 0x79, 0xA7, 0xff}
)

// What each map element is drawn with.
var (
	colReachFill     = okSkyBlue     // footprint fill, translucent
	colReachLine     = okBlue        // footprint outline
	colBelowReserve  = okVermillion  // below-reserve levels: hatch, dashed outline
	colReachable     = okBluishGreen // field in reach: filled circle
	colUnreachable   = okVermillion  // field out of reach: cross
	colProposed      = okBlue        // proposed field: open ring with a plus
	colRouteCovered  = okBluishGreen // solid
	colRouteOpen     = okVermillion  // dashed
	colGap           = okYellow      // wide band under the route
	colGlide         = okBlack       // final glide line
	colLowest        = okReddishPurpl
	colCovered       = okBluishGreen // coverage fill
	colUncovered     = okVermillion  // coverage hatch
	colStart         = okBlack
	colWind          = okReddishPurpl // wind arrows in the wind panel
	colCautionBorder = okOrange
	colText          = color.RGBA{0x1a, 0x1a, 0x1a, 0xff}
	colTextMuted     = color.RGBA{0x44, 0x44, 0x44, 0xff}
	colHalo          = color.RGBA{0xff, 0xff, 0xff, 0xff}
	colPaper         = color.RGBA{0xfb, 0xfa, 0xf7, 0xff}
	colVoid          = color.RGBA{0x9a, 0x9a, 0x9a, 0xff}
	colOffMap        = color.RGBA{0xd8, 0xd8, 0xd8, 0xff}
	colFlat          = color.RGBA{0xe4, 0xe6, 0xd8, 0xff}
)

// withAlpha returns c with alpha a (0–1), premultiplied as image/color
// expects.
func withAlpha(c color.RGBA, a float64) color.RGBA {
	a = math.Max(0, math.Min(1, a))
	return color.RGBA{
		R: uint8(float64(c.R)*a + 0.5), G: uint8(float64(c.G)*a + 0.5),
		B: uint8(float64(c.B)*a + 0.5), A: uint8(255*a + 0.5),
	}
}

// hex is the CSS form of an opaque colour, "#0072b2".
func hex(c color.RGBA) string { return fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B) }

// tintStop is one stop of the hypsometric tint.
type tintStop struct {
	t       float64 // 0 = lowest ground of the map, 1 = highest
	r, g, b float64
}

// hypsoTint is the project's own hypsometric tint: muted, light colours
// (pale green lowland, khaki, tan, light brown, near-white tops) so that the
// Okabe–Ito symbols drawn over it keep their contrast. It is stretched over
// the map's own elevation range (at least 300 m, so that gentle ground is
// not painted as mountains).
var hypsoTint = []tintStop{
	{0.00, 0xc6, 0xda, 0xae},
	{0.30, 0xdf, 0xe2, 0xb4},
	{0.55, 0xe2, 0xcf, 0xa4},
	{0.80, 0xc9, 0xae, 0x8e},
	{1.00, 0xf2, 0xef, 0xea},
}

// tint returns the hypsometric colour at t in [0, 1] as floats 0–255.
func tint(t float64) (r, g, b float64) {
	if !(t > 0) {
		s := &tintSegs[0]
		return s.r0, s.g0, s.b0
	}
	for i := range tintSegs {
		if s := &tintSegs[i]; t <= s.t1 {
			u := (t - s.t0) / s.dt
			return s.r0 + u*s.dr, s.g0 + u*s.dg, s.b0 + u*s.db
		}
	}
	s := hypsoTint[len(hypsoTint)-1]
	return s.r, s.g, s.b
}

// tintSeg is the stretch of hypsoTint between two stops, with the
// differences tint takes (the same float64 subtractions it made per call).
type tintSeg struct {
	t0, t1, dt, r0, g0, b0, dr, dg, db float64
}

var tintSegs = func() []tintSeg {
	out := make([]tintSeg, len(hypsoTint)-1)
	for i := range out {
		s0, s1 := hypsoTint[i], hypsoTint[i+1]
		out[i] = tintSeg{s0.t, s1.t, s1.t - s0.t, s0.r, s0.g, s0.b, s1.r - s0.r, s1.g - s0.g, s1.b - s0.b}
	}
	return out
}()

// rgb is an opaque colour from float channels 0–255.
func rgb(r, g, b float64) color.RGBA {
	return color.RGBA{uint8(r + 0.5), uint8(g + 0.5), uint8(b + 0.5), 0xff}
}
