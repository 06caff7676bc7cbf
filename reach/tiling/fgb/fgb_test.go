package fgb

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"

	"github.com/paulmach/orb"
)

// testFeatures are invented shapes over the open South Atlantic: a square
// with a square hole, two polygons as one multi-polygon, and a point.
func testFeatures() (Header, []Feature) {
	h := Header{Name: "coverage", Title: "test layer", Description: "invented shapes", EPSG: 4326,
		Columns: []Column{{"kind", String}, {"area_m2", Double}, {"parts", Long}}}
	sq := func(x, y, s float64) orb.Ring {
		return orb.Ring{{x, y}, {x + s, y}, {x + s, y + s}, {x, y + s}, {x, y}}
	}
	hole := orb.Ring{{-29.9, -35.9}, {-29.9, -35.2}, {-29.2, -35.2}, {-29.2, -35.9}, {-29.9, -35.9}}
	return h, []Feature{
		{orb.MultiPolygon{{sq(-30, -36, 1), hole}}, []any{"covered", 123456.5, 1}},
		{orb.MultiPolygon{{sq(-28, -36, 0.5)}, {sq(-27, -36, 0.25)}}, []any{"uncovered", 7.25, 2}},
		{orb.MultiPolygon{{sq(-25, -33, 0.1)}}, []any{nil, nil, nil}},
	}
}

// TestWriteFixture writes the file ogrinfo was run on when
// GLIDEREACH_WRITE_FIXTURES names a directory (see TestWriteAsOGRRead).
func TestWriteFixture(t *testing.T) {
	dir := os.Getenv("GLIDEREACH_WRITE_FIXTURES")
	if dir == "" {
		t.Skip("GLIDEREACH_WRITE_FIXTURES not set: nothing to write")
	}
	h, fs := testFeatures()
	var b bytes.Buffer
	if err := Write(&b, h, fs); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "test.fgb"), b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestWriteAsOGRRead checks the writer against GDAL 3.6.2's FlatGeobuf
// driver (Debian gdal-bin), which read testdata/fgb/invented-shapes.fgb
// (the bytes TestWriteFixture writes, committed) with its FlatBuffers
// verifier on and printed with ogrinfo -al:
//
//	Layer name: coverage; Geometry: Multi Polygon; Feature Count: 3
//	Extent: (-30.000000, -36.000000) - (-24.900000, -32.900000); ID["EPSG",4326]
//	kind: String, area_m2: Real, parts: Integer64
//	0: kind = covered, area_m2 = 123456.5, parts = 1,
//	   MULTIPOLYGON (((-30 -36,-29 -36,-29 -35,-30 -35,-30 -36),(-29.9 -35.9,-29.9 -35.2,-29.2 -35.2,-29.2 -35.9,-29.9 -35.9)))
//	1: kind = uncovered, area_m2 = 7.25, parts = 2,
//	   MULTIPOLYGON (((-28 -36,-27.5 -36,-27.5 -35.5,-28 -35.5,-28 -36)),((-27 -36,-26.75 -36,-26.75 -35.75,-27 -35.75,-27 -36)))
//	2: no properties, MULTIPOLYGON (((-25 -33,-24.9 -33,-24.9 -32.9,-25 -32.9,-25 -33)))
//
// The writer must still make exactly those bytes.
func TestWriteAsOGRRead(t *testing.T) {
	want, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "fgb", "invented-shapes.fgb"))
	if err != nil {
		t.Fatal(err)
	}
	h, fs := testFeatures()
	var b bytes.Buffer
	if err := Write(&b, h, fs); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(b.Bytes(), want) {
		t.Fatalf("the writer makes %d bytes that differ from the %d GDAL read", b.Len(), len(want))
	}
	if !bytes.HasPrefix(want, Magic[:]) {
		t.Error("no FlatGeobuf magic")
	}
}

func TestWriteRejects(t *testing.T) {
	h, fs := testFeatures()
	var b bytes.Buffer
	fs[0].Properties[1] = "not a number"
	if err := Write(&b, h, fs); err == nil {
		t.Error("a string in a Double column was accepted")
	}
	h, fs = testFeatures()
	fs[1].Properties = fs[1].Properties[:1]
	if err := Write(&b, h, fs); err == nil {
		t.Error("a feature with too few properties was accepted")
	}
	h, fs = testFeatures()
	fs[2].Geometry = orb.LineString{{0, 0}, {1, 1}}
	if err := Write(&b, h, fs); err == nil {
		t.Error("a LineString was accepted")
	}
}
