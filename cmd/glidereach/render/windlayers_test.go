package render

import (
	"image"
	"image/color"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"glidereach/terrain"
)

// countColour counts the pixels of img inside rc that are exactly c.
func countColour(img *image.RGBA, rc image.Rectangle, c color.RGBA) int {
	n := 0
	for y := rc.Min.Y; y < rc.Max.Y; y++ {
		for x := rc.Min.X; x < rc.Max.X; x++ {
			if img.RGBAAt(x, y) == c {
				n++
			}
		}
	}
	return n
}

// TestWindDrawnOnMap checks that a scene with wind layers draws the wind
// panel in the map (pixels of the wind colour, which nothing else uses) and
// names its source beside the inputs, and that its arrows point downwind:
// for a wind from 270° on a north-up map the arrow's wind-coloured pixels
// lie mostly right (east) of the arrow's middle... the tip's head is the
// heavy part (common practice, no source: wind arrows fly with the wind).
func TestWindDrawnOnMap(t *testing.T) {
	s := flatScene()
	img0, lo0, err := render(s, 1000)
	if err != nil {
		t.Fatal(err)
	}
	if n := countColour(img0, lo0.mapRect, colWind); n != 0 {
		t.Fatalf("no wind given, yet %d wind-coloured pixels", n)
	}
	s.WindLayers = []WindMark{{AltMSL: 0, FromDeg: 270, Speed: 10}, {AltMSL: 1500, FromDeg: 270, Speed: 20}}
	s.WindSource = "--wind 0m:270/19kt,1500m:270/39kt"
	img, lo, err := render(s, 1000)
	if err != nil {
		t.Fatal(err)
	}
	// The panel sits at the upper right, under the north arrow.
	rc := image.Rect(lo.mapRect.Max.X-lo.mapRect.Dx()/3, lo.mapRect.Min.Y, lo.mapRect.Max.X, lo.mapRect.Min.Y+lo.mapRect.Dy()/3)
	n := countColour(img, rc, colWind)
	if n < 50 {
		t.Fatalf("wind panel: %d wind-coloured pixels, want an arrow per layer", n)
	}
	var sx float64
	var cnt int
	minX, maxX := rc.Max.X, rc.Min.X
	for y := rc.Min.Y; y < rc.Max.Y; y++ {
		for x := rc.Min.X; x < rc.Max.X; x++ {
			if img.RGBAAt(x, y) == colWind {
				sx += float64(x)
				cnt++
				minX, maxX = min(minX, x), max(maxX, x)
			}
		}
	}
	if mid := float64(minX+maxX) / 2; sx/float64(cnt) <= mid {
		t.Errorf("wind from 270°: the arrows' mass lies at x %.1f, not east of their middle %.1f (they should point east, downwind)", sx/float64(cnt), mid)
	}
	fc, _ := newFaces(lo.scale)
	r := &renderer{s: s, lo: lo, f: fc, px: func(v float64) float64 { return v * lo.scale }}
	if lines := strings.Join(r.inputLines(400), " "); !strings.Contains(lines, "source: --wind 0m:270/19kt") {
		t.Errorf("inputs do not name the wind's source: %q", lines)
	}
}

// TestLegendSaysFromWhereAndMarksHoles checks the legend's "field in reach"
// says from where, and that an area's hole gets its own entry (it is drawn
// dotted, unlike the outline).
func TestLegendSaysFromWhereAndMarksHoles(t *testing.T) {
	s := flatScene()
	f := s.Terrain.Frame
	s.Fields = []FieldMark{{Name: "A", Point: at(f, 1, 1), Reachable: true, ArrivalAGL: math.NaN()}, {Name: "B", Point: at(f, -1, 1), ArrivalAGL: math.NaN()}}
	s.FieldsFrom = "from the route (planned altitude)"
	outer := circleRing(f, 8000, false)
	hole := circleRing(f, 3000, true)
	s.Coverage = &Coverage{Area: orb.MultiPolygon{{outer, hole}}}
	items := legendOf(t, s)
	var texts []string
	for _, it := range items {
		texts = append(texts, it.text)
	}
	all := strings.Join(texts, "|")
	for _, want := range []string{"Field in reach from the route (planned altitude)", "Field out of reach from the route (planned altitude)", "Hole in the area (not analysed)"} {
		if !strings.Contains(all, want) {
			t.Errorf("legend lacks %q: %s", want, all)
		}
	}
	s.Coverage = &Coverage{Area: orb.MultiPolygon{{outer}}}
	s.FieldsFrom = ""
	if items := legendOf(t, s); hasLegend(items, lgAreaHole) || !strings.Contains(items[0].text+items[1].text, "from the start") {
		t.Errorf("no hole / default: %+v", items)
	}
}

// TestCoarseTerrainShadesSmoothly draws a smooth hill on cells far larger
// than the map's pixels. Shading the bilinear surface per pixel gives a
// slope that jumps at every cell edge (a grid of seams); the renderer must
// shade the DEM at its own resolution and interpolate, so that along a row
// the brightness has no jump at cell edges larger than inside the cells
// (the second difference of a smooth function is small everywhere; common
// practice, no source).
func TestCoarseTerrainShadesSmoothly(t *testing.T) {
	const n, cell = 21, 1000.0 // 1 km cells, 20 km square
	l := &terrain.Local{Frame: sampleFrame, X0: -10000, Y0: -10000, Cell: cell, Cols: n, Rows: n, Elev: make([]float32, n*n)}
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			x, y := l.XY(c, r)
			l.Elev[r*n+c] = float32(200 + 1500*math.Exp(-(x*x+y*y)/(2*2500*2500)))
		}
	}
	img, lo, err := render(&Scene{Terrain: l}, 1000)
	if err != nil {
		t.Fatal(err)
	}
	// A row across the hill, 0.5 km north of the top (between cell centres),
	// where the east-west slope is steep on both flanks.
	y := lo.mapRect.Min.Y + int((lo.maxY-500)/lo.mpp)
	var g []float64
	for x := lo.mapRect.Min.X + 20; x < lo.mapRect.Max.X-20; x++ {
		c := img.RGBAAt(x, y)
		g = append(g, float64(c.R)+float64(c.G)+float64(c.B))
	}
	worst := 0.0
	for i := 1; i+1 < len(g); i++ {
		worst = math.Max(worst, math.Abs(g[i+1]-2*g[i]+g[i-1]))
	}
	// Pixels are about 20 m, cells 1 km: a seam shows as a kink of tens of
	// grey levels; a smooth shade changes by a few per pixel at most.
	t.Logf("worst kink %.1f", worst)
	if worst > 12 {
		t.Errorf("brightness kinks by %.0f (sum of RGB) between neighbouring pixels: seams at cell edges", worst)
	}
}

// TestCoarseAndFineTerrainShadeAlike draws the same plane, rising 10 % to
// the south (so facing north, half toward the default light from the
// north-west, azimuth 315°), once on cells far coarser than the map's
// pixels (shaded at the DEM's resolution, then interpolated) and once on
// cells finer than them (shaded per pixel). The two must show the same
// brightness: the light comes from the same side whatever the DEM's
// resolution (geometry, common practice, no source). Local rows run south
// to north and the shading wants north first; passing the rows as they
// were lit the coarse DEM from the south-west.
func TestCoarseAndFineTerrainShadeAlike(t *testing.T) {
	plane := func(cell float64) *terrain.Local {
		n := int(20000/cell) + 1
		l := &terrain.Local{Frame: sampleFrame, X0: -10000, Y0: -10000, Cell: cell, Cols: n, Rows: n, Elev: make([]float32, n*n)}
		for r := 0; r < n; r++ {
			for c := 0; c < n; c++ {
				_, y := l.XY(c, r)
				l.Elev[r*n+c] = float32(2000 - 0.1*y)
			}
		}
		return l
	}
	centre := func(l *terrain.Local) [3]float64 {
		img, lo, err := render(&Scene{Terrain: l}, 1000)
		if err != nil {
			t.Fatal(err)
		}
		c := img.RGBAAt((lo.mapRect.Min.X+lo.mapRect.Max.X)/2, (lo.mapRect.Min.Y+lo.mapRect.Max.Y)/2)
		return [3]float64{float64(c.R), float64(c.G), float64(c.B)}
	}
	coarse, fine := centre(plane(1000)), centre(plane(10))
	for k := range coarse {
		if math.Abs(coarse[k]-fine[k]) > 3 {
			t.Fatalf("centre pixel %v on 1 km cells, %v on 10 m cells: the light comes from different sides", coarse, fine)
		}
	}
}
