package render

import (
	"image"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

// warmShare is the share of pixels on the row y between x0 and x1 that are
// vermillion-ish (red well above blue): the below-reserve hatch.
func warmShare(img *image.RGBA, y, x0, x1 int) float64 {
	n, warm := 0, 0
	for x := x0; x <= x1; x++ {
		c := img.RGBAAt(x, y)
		n++
		if int(c.R)-int(c.B) > 90 {
			warm++
		}
	}
	return float64(warm) / float64(n)
}

func TestBelowReserveLevelsReadAsWarning(t *testing.T) {
	// Rings at 0 and 150 m below a 300 m reserve: the band outside the
	// reserve ring is hatched in vermillion (a warning, Okabe–Ito), not
	// filled as reach; inside the reserve ring there is no warning colour;
	// the legend names the reserve ring and has one below-reserve entry;
	// the ring labels say "below reserve" (common practice, no source: a
	// map must not make a margin-less ring look like a landing option).
	s := flatScene()
	f := s.Terrain.Frame
	s.Levels = []Level{
		{ArrivalAGL: 0, Polygons: orb.MultiPolygon{{circleRing(f, 8000, false)}}, BelowReserve: true},
		{ArrivalAGL: 150, Polygons: orb.MultiPolygon{{circleRing(f, 7000, false)}}, BelowReserve: true},
		{ArrivalAGL: 300, Polygons: orb.MultiPolygon{{circleRing(f, 5000, false)}}, IsReserve: true},
	}
	img, lo, err := render(s, 1000)
	if err != nil {
		t.Fatal(err)
	}
	c := lo.toPix(at(f, 0, 0))
	band0, band1 := lo.toPix(at(f, 5.4, 0)), lo.toPix(at(f, 6.6, 0))
	if w := warmShare(img, int(c.Y)+3, int(band0.X), int(band1.X)); w < 0.15 {
		t.Errorf("below-reserve band: %.0f %% warning pixels, want at least 15 %%", 100*w)
	}
	in0, in1 := lo.toPix(at(f, 1, 0)), lo.toPix(at(f, 4.5, 0))
	if w := warmShare(img, int(c.Y)+3, int(in0.X), int(in1.X)); w > 0 {
		t.Errorf("inside the reserve ring: %.1f %% warning pixels, want none", 100*w)
	}
	items := legendOf(t, s)
	var below, reserve int
	for _, it := range items {
		switch {
		case it.kind == lgBelowReserve:
			below++
			if !strings.Contains(it.text, "Below the 300 m reserve") || !strings.Contains(it.text, "NOT a safe landing margin") {
				t.Errorf("below-reserve legend %q", it.text)
			}
		case it.kind == lgReach && it.reserve:
			reserve++
			if !strings.Contains(it.text, "Reserve ring") {
				t.Errorf("reserve legend %q", it.text)
			}
		case it.kind == lgReach:
			t.Errorf("a below-reserve level reads as reach in the legend: %q", it.text)
		}
	}
	if below != 1 || reserve != 1 {
		t.Errorf("legend: %d below-reserve entries, %d reserve entries; want 1 and 1", below, reserve)
	}
	if labelWith(lo, "0 m AGL: below reserve") == nil || labelWith(lo, "300 m AGL (reserve)") == nil {
		t.Error("ring labels do not mark below-reserve and reserve rings")
	}
}
