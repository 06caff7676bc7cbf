package render

import (
	"bytes"
	"image"
	"image/color"
	"image/draw"
	"math"
	"math/rand/v2"
	"sync"
	"testing"

	"golang.org/x/image/vector"
)

// TestBigRasterMatchesVector draws random shapes (polygons reaching past
// every side of the box, strokes with round joins, holes, shapes lying
// wholly outside) with bigRaster and with golang.org/x/image/vector's
// Rasterizer (the reference: the library the maps were drawn with) over
// the same random background, on boxes above the library's 512 px
// floating-point threshold (widths that are and are not multiples of 4),
// and wants every pixel the same.
func TestBigRasterMatchesVector(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 13))
	sizes := []image.Point{{513, 40}, {40, 600}, {700, 700}, {1001, 517}, {1600, 1300}, {2050, 9}}
	var c canvas
	for trial := 0; trial < 60; trial++ {
		sz := sizes[trial%len(sizes)]
		bb := image.Rectangle{Min: image.Pt(rng.IntN(30), rng.IntN(30))}
		bb.Max = bb.Min.Add(sz)
		bg := noiseRGBA(image.Rect(0, 0, bb.Max.X+5, bb.Max.Y+5), uint64(trial))
		c.rings, c.signs = c.rings[:0], c.signs[:0]
		W, H := float64(sz.X), float64(sz.Y)
		rp := func(m float64) pt { // a point of the box widened by m on every side
			return pt{float64(bb.Min.X) - m + rng.Float64()*(W+2*m), float64(bb.Min.Y) - m + rng.Float64()*(H+2*m)}
		}
		for k := 0; k < 1+rng.IntN(4); k++ {
			switch rng.IntN(4) {
			case 0: // a polygon, partly outside the box
				r := make([]pt, 3+rng.IntN(40))
				for i := range r {
					r[i] = rp(80)
				}
				c.addRing(r, 1)
			case 1: // a stroked open line
				l := make([]pt, 2+rng.IntN(30))
				for i := range l {
					l[i] = rp(20)
				}
				c.addStroke(l, 0.5+rng.Float64()*8, false)
			case 2: // a ring outline with a hole
				ctr, rad := rp(0), 5+rng.Float64()*math.Min(W, H)
				c.addRing(circle(ctr, rad, 0), 1)
				c.addRing(circle(ctr, rad*rng.Float64(), 0), -1)
				c.addStroke(circle(ctr, rad*1.1, 0), 3.6, true)
			case 3: // wholly left of or below the box (edges at x < 0 or past the right)
				x := float64(bb.Min.X) - 50
				if rng.IntN(2) == 0 {
					x = float64(bb.Max.X) + 10
				}
				y := float64(bb.Min.Y) + rng.Float64()*H
				c.addRing(rect(x, y, x+30, y+H/3), 1)
			}
		}
		col := color.RGBA{uint8(rng.IntN(256)), uint8(rng.IntN(256)), uint8(rng.IntN(256)), 0}
		col.A = uint8(rng.IntN(256))
		col.R, col.G, col.B = min(col.R, col.A), min(col.G, col.A), min(col.B, col.A) // premultiplied

		want := image.NewRGBA(bg.Rect)
		copy(want.Pix, bg.Pix)
		var z vector.Rasterizer
		c.rasterize(vectorSink{&z}, bb)
		z.Draw(want, bb, image.NewUniform(col), image.Point{})

		got := image.NewRGBA(bg.Rect)
		copy(got.Pix, bg.Pix)
		c.rasterize(&c.big, bb)
		c.big.draw(got, bb, col)

		bad, changed := 0, 0
		for i := range want.Pix {
			if want.Pix[i] != got.Pix[i] {
				if bad == 0 {
					p := i / 4
					t.Errorf("trial %d (box %v, colour %v): pixel (%d, %d) channel %d is %d, want %d",
						trial, bb, col, p%want.Stride*4/4%bg.Rect.Dx(), p/bg.Rect.Dx(), i%4, got.Pix[i], want.Pix[i])
				}
				bad++
			}
			if want.Pix[i] != bg.Pix[i] {
				changed++
			}
		}
		if bad > 0 {
			t.Errorf("trial %d: %d channels differ", trial, bad)
		}
		if changed == 0 && col.A > 8 && trial%len(sizes) != 5 {
			t.Logf("trial %d drew nothing", trial)
		}
		// The buffer is left clear for the next shape.
		for i, v := range c.big.buf {
			if v != 0 {
				t.Fatalf("trial %d: cell %d left at %g", trial, i, v)
			}
		}
	}
}

// BenchmarkPaintRingOutline strokes a ring across a 1600 × 1400 map, as the
// maps draw each footprint level's outline (bigRaster), against the
// library's Rasterizer on the same shape.
func BenchmarkPaintRingOutline(b *testing.B) {
	img := image.NewRGBA(image.Rect(0, 0, 1600, 1500))
	ring := circle(pt{800, 750}, 680, 720) // many vertices, as a footprint has
	for _, c := range []struct {
		name string
		lib  bool
	}{{"bigRaster", false}, {"x-image-vector", true}} {
		b.Run(c.name, func(b *testing.B) {
			cv := newCanvas(img)
			b.ReportAllocs()
			stop := cpuMeter(b)
			for b.Loop() {
				cv.addStroke(ring, 6, true)
				if c.lib {
					bb := cv.shapeBox()
					cv.rasterize(vectorSink{&cv.z}, bb)
					cv.z.Draw(img, bb, image.NewUniform(colHalo), image.Point{})
					cv.rings, cv.signs = cv.rings[:0], cv.signs[:0]
				} else {
					cv.paint(colHalo)
				}
			}
			stop()
		})
	}
}

// BenchmarkHatch hatches a polygon across a 1600 × 1500 map with the
// below-reserve stripes (9 px apart, 1.8 px wide), as hatchPolysMinus draws
// the band outside the reserve ring.
func BenchmarkHatch(b *testing.B) {
	img := image.NewRGBA(image.Rect(0, 0, 1600, 1500))
	outer := circle(pt{800, 750}, 700, 720)
	inner := circle(pt{820, 760}, 420, 720)
	cv := newCanvas(img)
	b.ReportAllocs()
	stop := cpuMeter(b)
	for b.Loop() {
		cv.hatchPolysMinus([][][]pt{{outer}}, [][][]pt{{inner}}, withAlpha(colBelowReserve, 0.70), 9, 1.8)
	}
	stop()
}

// TestMaskOverMatchesDrawMask: maskOver gives the pixels image/draw's
// DrawMask (Over, RGBA source, Alpha mask) gives, the reference it skips
// work for, on random layers with many zero pixels and masks with many
// zeros, over offset and partly overlapping rectangles.
func TestMaskOverMatchesDrawMask(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for trial := 0; trial < 40; trial++ {
		dst := noiseRGBA(image.Rect(0, 0, 120, 90), uint64(trial))
		src := image.NewRGBA(image.Rect(rng.IntN(40)-10, rng.IntN(30)-10, 60+rng.IntN(80), 40+rng.IntN(60)))
		for i := 0; i < len(src.Pix); i += 4 {
			if rng.IntN(3) == 0 {
				continue // transparent black
			}
			a := uint8(rng.IntN(256))
			src.Pix[i], src.Pix[i+1], src.Pix[i+2], src.Pix[i+3] = uint8(rng.IntN(int(a)+1)), uint8(rng.IntN(int(a)+1)), uint8(rng.IntN(int(a)+1)), a
		}
		mask := image.NewAlpha(image.Rect(rng.IntN(50)-20, rng.IntN(50)-20, 50+rng.IntN(90), 30+rng.IntN(80)))
		for i := range mask.Pix {
			if rng.IntN(3) > 0 {
				mask.Pix[i] = uint8(rng.IntN(256))
			}
		}
		clip := image.Rect(rng.IntN(20), rng.IntN(20), 70+rng.IntN(60), 50+rng.IntN(50))
		want := image.NewRGBA(dst.Rect)
		copy(want.Pix, dst.Pix)
		draw.DrawMask(want, clip, src, clip.Min, mask, clip.Min, draw.Over)
		maskOver(dst, clip, src, mask)
		for i := range want.Pix {
			if want.Pix[i] != dst.Pix[i] {
				t.Fatalf("trial %d: byte %d is %d, image/draw gives %d", trial, i, dst.Pix[i], want.Pix[i])
			}
		}
	}
}

// TestRenderReusesBuffers: the scratch buffers a map hands to the next
// (pools) change nothing: a map drawn after others of other sizes and
// terrains, and maps drawn two at a time, are byte for byte the map drawn
// first in a fresh process state (here: the first rendering).
func TestRenderReusesBuffers(t *testing.T) {
	voids := hillyLocal(300, 300, 133)
	for k := range voids.Elev {
		if (k/300/29+k%300/41)%5 == 0 {
			voids.Elev[k] = float32(math.NaN())
		}
	}
	scenes := []struct {
		s *Scene
		w int
	}{
		{sampleScene(hillyLocal(700, 700, 40000.0/700)), 1600},
		{sampleScene(voids), 900},
		{sampleScene(hillyLocal(1200, 1200, 33)), 1200},
		{flatScene(), 600},
	}
	first := make([]*image.RGBA, len(scenes))
	for i, c := range scenes {
		img, err := Render(c.s, c.w)
		if err != nil {
			t.Fatal(err)
		}
		first[i] = img
	}
	same := func(what string, i int, img *image.RGBA) {
		if !bytes.Equal(img.Pix, first[i].Pix) {
			t.Errorf("%s: map %d differs from its first drawing", what, i)
		}
	}
	for i := len(scenes) - 1; i >= 0; i-- { // again, in the other order
		img, err := Render(scenes[i].s, scenes[i].w)
		if err != nil {
			t.Fatal(err)
		}
		same("drawn again", i, img)
	}
	var wg sync.WaitGroup
	imgs := make([]*image.RGBA, len(scenes))
	for i := range scenes {
		wg.Go(func() { imgs[i], _ = Render(scenes[i].s, scenes[i].w) })
	}
	wg.Wait()
	for i, img := range imgs {
		if img == nil {
			t.Fatalf("map %d: no image", i)
		}
		same("drawn at once with the others", i, img)
	}
}
