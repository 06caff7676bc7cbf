package render

import (
	"fmt"
	"testing"
)

func TestPlacerAvoidsOverlaps(t *testing.T) {
	fc, err := newFaces(1)
	if err != nil {
		t.Fatal(err)
	}
	// Twelve labels on anchors 40 px apart in a roomy map: greedy placement
	// finds a free spot for each (common practice, no source).
	p := &placer{bounds: box{0, 0, 1000, 800}}
	var ls []label
	for i := 0; i < 12; i++ {
		a := pt{300 + float64(i%4)*40, 300 + float64(i/4)*40}
		p.reserve(boxAround(a, 9))
		ls = append(ls, label{lines: []string{fmt.Sprintf("Field %d", i), "arrive +100 m"}, bold: true,
			anchor: a, gap: 9, priority: i % 3, must: true})
	}
	got := p.placeAll(ls, fc.label, fc.labelBold, 3)
	if len(got) != len(ls) {
		t.Fatalf("%d of %d labels placed", len(got), len(ls))
	}
	for i, a := range got {
		if !a.at.inside(p.bounds) {
			t.Errorf("label %q outside the map", a.lines[0])
		}
		for _, b := range got[i+1:] {
			if a.at.overlap(b.at) > 0 {
				t.Errorf("labels %q and %q overlap", a.lines[0], b.lines[0])
			}
		}
	}
}

func TestPlacerKeepsMustLabelsAtTheEdge(t *testing.T) {
	fc, err := newFaces(1)
	if err != nil {
		t.Fatal(err)
	}
	// A field in the corner of a small map with a long name: no candidate
	// fits, but a field must never lose its name; the label is pushed in.
	p := &placer{bounds: box{0, 0, 120, 60}}
	got := p.placeAll([]label{{lines: []string{"A very long invented field name"}, anchor: pt{118, 2}, gap: 9, must: true},
		{lines: []string{"optional"}, anchor: pt{60, 30}, gap: 3}}, fc.label, fc.labelBold, 3)
	if len(got) == 0 || got[0].lines[0] != "A very long invented field name" {
		t.Fatalf("must label dropped: %+v", got)
	}
	if got[0].at.x0 < 0 || got[0].at.y0 < 0 {
		t.Errorf("pushed label box %+v leaves the map's top left", got[0].at)
	}
}
