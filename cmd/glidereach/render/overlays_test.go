package render

import (
	"bytes"
	"io"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

// labelWith returns the placed label whose lines contain text, or nil.
func labelWith(lo *layout, text string) *placed {
	for i := range lo.labels {
		for _, l := range lo.labels[i].lines {
			if strings.Contains(l, text) {
				return &lo.labels[i]
			}
		}
	}
	return nil
}

func hasLegend(r []legendItem, k legendKind) bool {
	for _, it := range r {
		if it.kind == k {
			return true
		}
	}
	return false
}

func legendOf(t *testing.T, s *Scene) []legendItem {
	t.Helper()
	_, lo, err := render(s, 800)
	if err != nil {
		t.Fatal(err)
	}
	fc, err := newFaces(lo.scale)
	if err != nil {
		t.Fatal(err)
	}
	r := &renderer{s: s, lo: lo, f: fc, px: func(v float64) float64 { return v * lo.scale }}
	r.sampleTerrain()
	return r.legendItems()
}

func TestOffMapFieldDrawnAtTheEdge(t *testing.T) {
	s := flatScene() // 20 km square around the origin
	f := s.Terrain.Frame
	s.Fields = []FieldMark{{Name: "Far Reed", Point: at(f, 16, 0), Reachable: false, ArrivalAGL: math.NaN()}}
	img, lo, err := render(s, 1000)
	if err != nil {
		t.Fatal(err)
	}
	// A field 6 km beyond the east edge: its cross stands inside the map on
	// the line from the centre toward it (here due east), and its label
	// says how far it is beyond the edge, so a name never floats without a
	// symbol (common practice, no source).
	l := labelWith(lo, "Far Reed")
	if l == nil {
		t.Fatal("no label for the off-map field")
	}
	if !strings.Contains(strings.Join(l.lines, " "), "6.0 km beyond the map edge") {
		t.Errorf("label %q, want the distance beyond the edge (6.0 km)", l.lines)
	}
	a := l.anchor
	if !(a.X > float64(lo.mapRect.Max.X)-60 && a.X < float64(lo.mapRect.Max.X)) {
		t.Errorf("edge symbol at x %.0f, want within 60 px inside the east edge %d", a.X, lo.mapRect.Max.X)
	}
	cy := float64(lo.mapRect.Min.Y+lo.mapRect.Max.Y) / 2
	if math.Abs(a.Y-cy) > 1 {
		t.Errorf("edge symbol at y %.0f, want the map's middle %.0f (the field is due east)", a.Y, cy)
	}
	if got := rgbaAt(img, a); !near(got, colUnreachable, 2) {
		t.Errorf("edge symbol pixel %v, want the cross %v", got, colUnreachable)
	}
}

func TestLowestClearanceAtTheGoalIsTold(t *testing.T) {
	s := flatScene()
	f := s.Terrain.Frame
	goal := at(f, 5, 5)
	s.Glide = &GlideLine{Line: orb.LineString{at(f, -5, -5), at(f, 0, -2), goal}, Lowest: goal, LowestClearance: 351,
		Turns: []TurnPoint{{Name: "TP1", Point: at(f, 0, -2)}}}
	s.Fields = []FieldMark{{Name: "Tern Mere", Point: goal, Reachable: true, ArrivalAGL: 351}}
	_, lo, err := render(s, 1000)
	if err != nil {
		t.Fatal(err)
	}
	// The lowest point is the goal: a diamond there would hide under the
	// field's circle, so the field's label tells it and the legend has no
	// diamond entry (common practice, no source).
	l := labelWith(lo, "Tern Mere")
	if l == nil || !strings.Contains(strings.Join(l.lines, " "), "lowest clearance 351 m") {
		t.Errorf("goal label %v, want the lowest clearance in it", l)
	}
	if labelWith(lo, "TP1") == nil {
		t.Errorf("turn point TP1 not labelled")
	}
	items := legendOf(t, s)
	if hasLegend(items, lgLowest) {
		t.Errorf("legend lists the lowest-clearance diamond, which is not drawn")
	}
	if !hasLegend(items, lgTurn) {
		t.Errorf("legend lacks the turn point")
	}
	// Away from any field the diamond and its own label come back.
	s.Glide.Lowest = at(f, 0, -2)
	if labelWith(func() *layout { _, lo, _ := render(s, 1000); return lo }(), "lowest clearance") == nil {
		t.Errorf("lowest clearance away from the goal not labelled")
	}
	if !hasLegend(legendOf(t, s), lgLowest) {
		t.Errorf("legend lacks the lowest-clearance diamond")
	}
}

func TestFieldLabelsAndLegendSayWhatIsShown(t *testing.T) {
	s := flatScene()
	f := s.Terrain.Frame
	s.Fields = []FieldMark{
		{Name: "Kelp Strip", Point: at(f, 3, 3), Reachable: false, ArrivalAGL: 97, Note: "below the 300 m reserve"},
		{Name: "Sedge Lot", Point: at(f, -3, 3), Proposed: true, ArrivalAGL: math.NaN(), Note: "proposed, pick 1"},
		{Name: "Dunlin Field", Point: at(f, -3, -3), Reachable: true, ArrivalAGL: math.NaN()},
	}
	img, lo, err := render(s, 1000)
	if err != nil {
		t.Fatal(err)
	}
	// A cross with "arrive +97 m" alone reads as a contradiction; the
	// label says the height is above ground and why the field is still
	// out of reach (common practice, no source).
	l := labelWith(lo, "Kelp Strip")
	if l == nil || strings.Join(l.lines, "|") != "Kelp Strip|arrive +97 m AGL|below the 300 m reserve" {
		t.Errorf("label %v, want name, arrival AGL and the note", l)
	}
	// A proposed field is neither in reach nor out of it: its own symbol
	// (blue ring with a plus, Okabe–Ito blue) and its own legend entry.
	if got := rgbaAt(img, lo.toPix(at(f, -3, 3))); !near(got, colProposed, 2) {
		t.Errorf("proposed field centre %v, want %v", got, colProposed)
	}
	items := legendOf(t, s)
	if !hasLegend(items, lgProposed) {
		t.Errorf("legend lacks the proposed field")
	}
	for _, it := range items {
		if it.kind == lgReachable && strings.Contains(it.text, "arrival height") {
			t.Errorf("legend %q promises arrival heights that no reachable field shows", it.text)
		}
		if it.kind == lgVoid || it.kind == lgOffMap {
			t.Errorf("legend lists %q, which this map does not show", it.text)
		}
	}
}

func TestVoidLegendOnlyWhenVisible(t *testing.T) {
	l := hillyLocal(100, 100, 100) // 10 km square
	for i := 0; i < 300; i++ {     // the three southern rows are void
		l.Elev[i] = float32(math.NaN())
	}
	s := &Scene{Terrain: l}
	if !hasLegend(legendOf(t, s), lgVoid) {
		t.Errorf("voids on the map but no legend entry")
	}
	// The same raster with the map cut to its northern half: no void shows,
	// so the legend must not list one (common practice, no source).
	s.Bounds = orb.Bound{Min: at(l.Frame, -4, 0), Max: at(l.Frame, 4, 4)}
	items := legendOf(t, s)
	if hasLegend(items, lgVoid) || hasLegend(items, lgOffMap) {
		t.Errorf("legend %v lists voids or off-map ground the map does not show", items)
	}
	// A map larger than the raster shows the off-map grey: listed.
	s.Bounds = orb.Bound{Min: at(l.Frame, -8, 0), Max: at(l.Frame, 4, 4)}
	if !hasLegend(legendOf(t, s), lgOffMap) {
		t.Errorf("map reaches beyond the raster but the legend does not say so")
	}
}

func TestRouteEndsLabelled(t *testing.T) {
	s := flatScene()
	f := s.Terrain.Frame
	s.Route = []RoutePiece{{Line: orb.LineString{at(f, -6, -6), at(f, 0, 0)}, Covered: true},
		{Line: orb.LineString{at(f, 0, 0), at(f, 6, 4)}, Covered: false}}
	_, lo, err := render(s, 1000)
	if err != nil {
		t.Fatal(err)
	}
	// The profile runs from the route's start; the map says which end that
	// is (common practice, no source).
	for _, c := range []struct {
		text string
		p    orb.Point
	}{{"route start", at(f, -6, -6)}, {"route end", at(f, 6, 4)}} {
		l := labelWith(lo, c.text)
		if l == nil {
			t.Errorf("no %q label", c.text)
			continue
		}
		if p := lo.toPix(c.p); math.Hypot(l.anchor.X-p.X, l.anchor.Y-p.Y) > 0.5 {
			t.Errorf("%q anchored at %v, want %v", c.text, l.anchor, p)
		}
	}
}

func TestProfileMarkLabelsDoNotOverlap(t *testing.T) {
	// Two marks at the same end of the chart (the goal and the lowest
	// clearance there) and one further in: every label gets its own spot
	// inside the plot (common practice, no source).
	marks := []ProfileMark{{DistM: 54900, AltMSL: 771, Label: "Tern Hollow: arrive 351 m AGL"},
		{DistM: 54900, AltMSL: 771, Label: "lowest clearance 351 m"}, {DistM: 21000, AltMSL: 2000, Label: "TP1"}}
	X := func(d float64) float64 { return chartL + d/60000*chartPlotW }
	Y := func(a float64) float64 { return chartT + (3500-a)/3500*chartPlotH }
	ls := placeMarkLabels(marks, X, Y)
	plot := box{chartL, chartT, chartL + chartPlotW, chartT + chartPlotH}
	for i, a := range ls {
		if !a.b.inside(plot) {
			t.Errorf("label %q outside the plot", a.text)
		}
		for _, b := range ls[i+1:] {
			if a.b.overlap(b.b) > 0 {
				t.Errorf("labels %q and %q overlap", a.text, b.text)
			}
		}
	}
}

func TestProfileBandsAndSourceLine(t *testing.T) {
	s := sampleScene(hillyLocal(100, 80, 200))
	s.DataSource = "terrain: hills.tif"
	rep := sampleReport(s)
	rep.MapWidthPx = 400
	rep.Profile.Bands = []ProfileBand{{FromM: 2000, ToM: 4000, Label: "gap: no field in reach"}}
	var buf bytes.Buffer
	if err := WriteReport(&buf, rep); err != nil {
		t.Fatal(err)
	}
	doc := buf.String()
	// The gap band is drawn in the map's gap yellow (Okabe–Ito) and named
	// in the chart's legend; the source line is not "terrain: terrain: …".
	if !strings.Contains(doc, `fill="`+hex(okYellow)+`" fill-opacity="0.35"`) || !strings.Contains(doc, "gap: no field in reach") {
		t.Errorf("report lacks the gap band or its legend entry")
	}
	if !strings.Contains(doc, "Terrain data: hills.tif") {
		t.Errorf("report source line is not \"Terrain data: hills.tif\"")
	}
	checkSelfContained(t, buf.Bytes())
}

func TestDegenerateGeometryDoesNotPanic(t *testing.T) {
	s := flatScene()
	f := s.Terrain.Frame
	nan := orb.Point{math.NaN(), math.NaN()}
	// Empty rings and lines, single points and NaN coordinates are drawn as
	// nothing rather than crashing the command (RULES.md: nothing panics on
	// user input).
	s.Levels = []Level{{Polygons: orb.MultiPolygon{{orb.Ring{}}, {orb.Ring{at(f, 0, 0)}}}}}
	s.Coverage = &Coverage{Area: orb.MultiPolygon{{orb.Ring{}}}, Covered: orb.MultiPolygon{{}}, Uncovered: orb.MultiPolygon{{orb.Ring{nan, nan, nan}}}}
	s.Route = []RoutePiece{{Line: orb.LineString{}}, {Line: orb.LineString{at(f, 1, 1)}}}
	s.Gaps = []Gap{{Line: orb.LineString{}}, {Line: orb.LineString{at(f, 1, 1)}}}
	s.Glide = &GlideLine{Line: orb.LineString{nan}, Lowest: nan, LowestClearance: 10, Turns: []TurnPoint{{Name: "TP", Point: nan}}}
	s.Fields = []FieldMark{{Name: "Nowhere", Point: nan, ArrivalAGL: math.NaN()}}
	s.Start = NewMarker(nan, "")
	if err := RenderPNG(io.Discard, s, 400); err != nil {
		t.Fatal(err)
	}
}

func TestNoSeamAlongVoidEdge(t *testing.T) {
	// An even slope rising to the east, 100 m cells, the three northern
	// rows void. Along a pixel row just south of the void every pixel sees
	// the same slope, so the shaded colour must not vary along the row (a
	// dashed seam there read as a fence on the map). Tolerance ±3 levels
	// (common practice, no source).
	l := hillyLocal(60, 40, 100)
	for r := 0; r < l.Rows; r++ {
		for c := 0; c < l.Cols; c++ {
			x, _ := l.XY(c, r)
			l.Elev[r*l.Cols+c] = float32(300 + 0.08*x)
			if r >= l.Rows-3 {
				l.Elev[r*l.Cols+c] = float32(math.NaN())
			}
		}
	}
	img, lo, err := render(&Scene{Terrain: l}, 1200)
	if err != nil {
		t.Fatal(err)
	}
	// The last valid row's centre is 3.5 cells below the top edge; a
	// quarter cell above it the bilinear taps include a void corner.
	y := float64(lo.mapRect.Min.Y) + 3.25*100/lo.mpp
	jump := 0
	for x := lo.mapRect.Min.X + 40; x < lo.mapRect.Max.X-40; x++ {
		a, b := img.RGBAAt(x, int(y)), img.RGBAAt(x+1, int(y))
		for _, d := range []int{int(a.R) - int(b.R), int(a.G) - int(b.G), int(a.B) - int(b.B)} {
			jump = max(jump, d, -d)
		}
	}
	// The tint changes by about a level per pixel along the slope; steps
	// one cell long made the shade jump by tens of levels at cell edges.
	if jump > 3 {
		t.Errorf("colour jumps by %d levels between neighbouring pixels along the row next to the void", jump)
	}
}

// A line drawn with its own names (an approach plan's path and gates) is
// named so in the legend; without names it is a final glide line.
func TestGlideLineLegendNames(t *testing.T) {
	s := flatScene()
	f := s.Terrain.Frame
	line := orb.LineString{at(f, -5, 0), at(f, 5, 0)}
	texts := func() []string {
		var out []string
		for _, it := range legendOf(t, s) {
			if it.kind == lgGlide || it.kind == lgTurn {
				out = append(out, it.text)
			}
		}
		return out
	}
	s.Glide = &GlideLine{Line: line, LowestClearance: math.NaN(), Turns: []TurnPoint{{Name: "TP1", Point: at(f, 0, 0)}}}
	if got := texts(); len(got) != 2 || got[0] != "Final glide line" || got[1] != "Turn point" {
		t.Errorf("default legend %q", got)
	}
	s.Glide.LineLabel, s.Glide.TurnLabel = "Planned path", "Gate"
	if got := texts(); len(got) != 2 || got[0] != "Planned path" || got[1] != "Gate" {
		t.Errorf("named legend %q", got)
	}
}
