package render

import (
	"image"
	"image/color"
	"image/draw"
	"strings"
	"sync"

	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"
	"golang.org/x/image/math/fixed"
)

// The Go fonts (regular and bold), parsed once. They are compiled into the
// binary, so no system font is needed.
var parsedFonts = sync.OnceValues(func() ([2]*opentype.Font, error) {
	var fs [2]*opentype.Font
	var err error
	if fs[0], err = opentype.Parse(goregular.TTF); err != nil {
		return fs, err
	}
	fs[1], err = opentype.Parse(gobold.TTF)
	return fs, err
})

// faces holds the font faces of one rendering, sized to the map width. A
// font.Face is not safe for concurrent use, so each rendering has its own.
type faces struct {
	title, label, labelBold, small, legend, legendBold font.Face
}

func newFaces(scale float64) (*faces, error) {
	fs, err := parsedFonts()
	if err != nil {
		return nil, err
	}
	mk := func(f *opentype.Font, px float64) (font.Face, error) {
		return opentype.NewFace(f, &opentype.FaceOptions{Size: px, DPI: 72, Hinting: font.HintingNone})
	}
	var fc faces
	for _, x := range []struct {
		dst  *font.Face
		bold bool
		px   float64
	}{
		{&fc.title, true, 26}, {&fc.label, false, 15}, {&fc.labelBold, true, 15},
		{&fc.small, false, 13}, {&fc.legend, false, 15}, {&fc.legendBold, true, 15},
	} {
		f := fs[0]
		if x.bold {
			f = fs[1]
		}
		if *x.dst, err = mk(f, x.px*scale); err != nil {
			return nil, err
		}
	}
	return &fc, nil
}

// textWidth is the advance width of s in face f, pixels.
func textWidth(f font.Face, s string) float64 {
	return float64(font.MeasureString(f, s)) / 64
}

// lineHeight is the distance between baselines in face f, pixels.
func lineHeight(f font.Face) float64 {
	m := f.Metrics()
	return float64(m.Height) / 64
}

// ascent is the height of the face above its baseline, pixels.
func ascent(f font.Face) float64 { return float64(f.Metrics().Ascent) / 64 }

// drawText draws s with its baseline starting at (x, y).
func drawText(dst draw.Image, f font.Face, x, y float64, s string, col color.Color) {
	d := font.Drawer{Dst: dst, Src: image.NewUniform(col), Face: f,
		Dot: fixed.Point26_6{X: fixed.Int26_6(x * 64), Y: fixed.Int26_6(y * 64)}}
	d.DrawString(s)
}

// wrap breaks s into lines no wider than width pixels in face f, at spaces.
// A single word wider than width gets a line of its own.
func wrap(f font.Face, s string, width float64) []string {
	var lines []string
	for _, para := range strings.Split(s, "\n") {
		words := strings.Fields(para)
		line := ""
		for _, w := range words {
			try := w
			if line != "" {
				try = line + " " + w
			}
			if line != "" && textWidth(f, try) > width {
				lines = append(lines, line)
				line = w
				continue
			}
			line = try
		}
		lines = append(lines, line)
	}
	return lines
}
