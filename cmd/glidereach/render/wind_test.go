package render

import (
	"image"
	"testing"
)

// The wind arrow appears below the north arrow when the scene has a wind,
// and points the way the air moves: for a wind from the west (270°) its
// head is on the east side of its box.
func TestWindArrow(t *testing.T) {
	s := flatScene()
	plain, lo, err := render(s, 1200)
	if err != nil {
		t.Fatal(err)
	}
	s.Wind = &WindArrow{FromDeg: 270, Label: "wind 270°/20 kt"}
	img, wlo, err := render(s, 1200)
	if err != nil {
		t.Fatal(err)
	}
	// The region below the north arrow, upper right of the map.
	mr := lo.mapRect
	rc := image.Rect(mr.Max.X-200, mr.Min.Y+90, mr.Max.X, mr.Min.Y+230)
	if a, b := inkPixels(plain, rc), inkPixels(img, rc); !(b > a+100) {
		t.Fatalf("dark pixels below the north arrow: %d without wind, %d with", a, b)
	}
	// Head east: more ink in the right half of the arrow's row band than
	// in the left (the head is a filled triangle).
	o := wlo.windArrow
	ox, oy, h := int(o.X), int(o.Y), 20
	band := func(x0, x1 int) int { return inkPixels(img, image.Rect(x0, oy-h, x1, oy+h)) }
	if l, r := band(ox-30, ox), band(ox, ox+30); !(r > l+20) {
		t.Errorf("arrow ink left %d, right %d: the head should be east for a west wind", l, r)
	}
}
