package render

import (
	"bytes"
	"flag"
	"image"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/paulmach/orb"

	"glidereach/terrain"
)

// -sample DIR writes the sample map and report there to look at, e.g.
//
//	go test ./cmd/glidereach/render -run TestSample -sample /tmp/glidereach-sample
var sampleDir = flag.String("sample", "", "write the sample map.png and report.html to this directory")

// sampleFrame is placed over open ocean in the South Pacific so nobody
// mistakes the invented terrain for a real place.
var sampleFrame = terrain.NewFrame(-31.5, -146.25)

// hillyLocal is an invented valley-and-ridge terrain, cols×rows cells of
// cell metres centred on the frame origin: a valley floor at about 200 m
// rising to a ridge in the north-east and one round hill.
func hillyLocal(cols, rows int, cell float64) *terrain.Local {
	l := &terrain.Local{Frame: sampleFrame, Cell: cell, Cols: cols, Rows: rows,
		Elev: make([]float32, cols*rows), Source: "synthetic valley-and-ridge terrain (invented)"}
	l.X0, l.Y0 = -float64(cols-1)*cell/2, -float64(rows-1)*cell/2
	for r := 0; r < rows; r++ {
		for c := 0; c < cols; c++ {
			x, y := l.XY(c, r)
			u, v := x/1000, y/1000 // km
			e := 200 + 6*u + 3*v
			ridge := 0.6*u + 0.8*v - 9
			e += 650 * math.Exp(-ridge*ridge/18) * (1 + 0.25*math.Sin(u/2.1))
			hd := (u+6)*(u+6) + (v+4)*(v+4)
			e += 520 * math.Exp(-hd/7)
			e += 25 * math.Sin(u*1.7) * math.Cos(v*1.3)
			l.Elev[r*cols+c] = float32(e)
		}
	}
	return l
}

// at returns the lon/lat of frame point (x, y) in km.
func at(f terrain.Frame, xkm, ykm float64) orb.Point {
	lat, lon := f.Inverse(xkm*1000, ykm*1000)
	return orb.Point{lon, lat}
}

// ellipseRing is a closed ring around (cx, cy) km with radii a, b km and a
// wobble, counter-clockwise (RFC 7946 exterior) unless cw.
func ellipseRing(f terrain.Frame, cx, cy, a, b, wobble float64, n int, cw bool) orb.Ring {
	r := make(orb.Ring, 0, n+1)
	for i := 0; i < n; i++ {
		t := 2 * math.Pi * float64(i) / float64(n)
		if cw {
			t = -t
		}
		k := 1 + wobble*math.Sin(3*t)
		r = append(r, at(f, cx+a*k*math.Cos(t), cy+b*k*math.Sin(t)))
	}
	return append(r, r[0])
}

// sampleScene is an invented scene with every kind of element.
func sampleScene(l *terrain.Local) *Scene {
	f := l.Frame
	outer := ellipseRing(f, 1, -1, 15, 11, 0.08, 120, false)
	hole := ellipseRing(f, -6, -4, 2.2, 1.8, 0.1, 40, true)
	inner := ellipseRing(f, 1.5, -1.5, 9, 6.5, 0.06, 100, false)
	hole2 := ellipseRing(f, -6, -4, 3.5, 3, 0.1, 40, true)
	return &Scene{
		Title:   "Reach from Kestrel Mere, 1500 m MSL (invented demo)",
		Terrain: l,
		Levels: []Level{
			{ArrivalAGL: 0, Polygons: orb.MultiPolygon{{outer, hole}}},
			{ArrivalAGL: 300, Polygons: orb.MultiPolygon{{inner, hole2}}},
		},
		Start: &Marker{Point: at(f, 1, -1), Label: "Start", HeadingDeg: 60, AltMSL: 1500},
		Fields: []FieldMark{
			{Name: "Kestrel Mere", Point: at(f, 1.5, -0.5), Reachable: true, ArrivalAGL: 1210},
			{Name: "Brackwater Farm", Point: at(f, 9, 3), Reachable: true, ArrivalAGL: 420},
			{Name: "Lowfold Strip", Point: at(f, -9, 5), Reachable: true, ArrivalAGL: 95},
			{Name: "Cairn Top", Point: at(f, 12, 11), Reachable: false, ArrivalAGL: -260},
			{Name: "Saltings", Point: at(f, -16, -11), Reachable: false, ArrivalAGL: math.NaN()},
		},
		Route: []RoutePiece{
			{Line: orb.LineString{at(f, -17, -6), at(f, -8, 0), at(f, 0, 4)}, Covered: true},
			{Line: orb.LineString{at(f, 0, 4), at(f, 6, 8), at(f, 11, 10)}, Covered: false},
			{Line: orb.LineString{at(f, 11, 10), at(f, 17, 12)}, Covered: true},
		},
		Gaps:  []Gap{{Line: orb.LineString{at(f, 0, 4), at(f, 6, 8), at(f, 11, 10)}}},
		Glide: &GlideLine{Line: orb.LineString{at(f, 1, -1), at(f, 9, 3)}, Lowest: at(f, 5.2, 1.1), LowestClearance: 180},
		Inputs: []string{
			"Aircraft: demo two-seat trainer (glide ratio 9)",
			"Start: 1500 m MSL, heading 060°",
			"Wind: 0 m 240/10 kt, 1500 m 270/20 kt",
			"Reserve: 300 m, clearance 100 m",
		},
	}
}

func TestSample(t *testing.T) {
	dir := *sampleDir
	if dir == "" {
		dir = t.TempDir()
	} else if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	s := sampleScene(hillyLocal(400, 300, 100))
	width := 0 // the default 1600 px to look at; smaller in CI, where nobody looks
	if *sampleDir == "" {
		width = 600
	}
	var buf bytes.Buffer
	if err := RenderPNG(&buf, s, width); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "map.png"), buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("wrote %s (%d bytes)", filepath.Join(dir, "map.png"), buf.Len())
	var rep bytes.Buffer
	sr := sampleReport(s)
	sr.MapWidthPx = width
	if err := WriteReport(&rep, sr); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "report.html"), rep.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("wrote %s (%d bytes)", filepath.Join(dir, "report.html"), rep.Len())
	if *sampleDir != "" { // a full-resolution crop of the middle, to judge the detail
		img, _ := Render(s, 0)
		b := img.Bounds()
		sub := img.SubImage(image.Rect(b.Dx()/4, b.Dy()/4, b.Dx()/4+800, b.Dy()/4+600))
		var cb bytes.Buffer
		if err := png.Encode(&cb, sub); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, "map_crop.png"), cb.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		cb.Reset()
		if err := png.Encode(&cb, deuteranopia(img)); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, "map_deuteranopia.png"), cb.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// TestSampleCoverage draws an invented coverage scene on flat ground, at a
// smaller width (with -sample: coverage.png).
func TestSampleCoverage(t *testing.T) {
	l := terrain.NewFlat(sampleFrame, -14950, -9950, 100, 300, 200, 40)
	l.Source = "flat ground at 40 m"
	f := l.Frame
	area := orb.Polygon{orb.Ring{at(f, -13, -8), at(f, 13, -8), at(f, 13, 8), at(f, -13, 8), at(f, -13, -8)}}
	s := &Scene{
		Title:   "Field coverage of the Marram corridor (invented demo)",
		Terrain: l,
		Coverage: &Coverage{
			Area:      orb.MultiPolygon{area},
			Covered:   orb.MultiPolygon{{ellipseRing(f, -6, 0, 7, 6, 0.05, 80, false)}, {ellipseRing(f, 7, 1, 5, 5, 0.05, 80, false)}},
			Uncovered: orb.MultiPolygon{{orb.Ring{at(f, 12, -8), at(f, 13, -8), at(f, 13, 8), at(f, 10, 8), at(f, 11.5, 0), at(f, 12, -8)}}},
		},
		Fields: []FieldMark{
			{Name: "Marram Sands", Point: at(f, -6, 0), Reachable: true, ArrivalAGL: math.NaN()},
			{Name: "Dunlin Field", Point: at(f, 7, 1), Reachable: true, ArrivalAGL: math.NaN()},
			{Name: "Candidate: Sedge Lot", Point: at(f, 11, -4), Reachable: false, ArrivalAGL: math.NaN()},
		},
		Start:  NewMarker(at(f, 0, 0), "Reference"),
		Inputs: []string{"Aircraft: demo sailplane (glide ratio 38)", "Height: 600 m AGL", "Reserve: 200 m"},
	}
	dir := *sampleDir
	if dir == "" {
		dir = t.TempDir()
	}
	var buf bytes.Buffer
	if err := RenderPNG(&buf, s, 1000); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "coverage.png"), buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// deuteranopia simulates full deuteranopia on img with the matrix of
// Machado, Oliveira and Fernandes (IEEE TVCG 15(6), 2009), severity 1.0,
// applied in linear RGB (matrix values recalled from memory), for looking at
// the sample map as a deuteranope would.
func deuteranopia(img *image.RGBA) *image.RGBA {
	m := [3][3]float64{{0.367322, 0.860646, -0.227968}, {0.280085, 0.672501, 0.047413}, {-0.011820, 0.042940, 0.968881}}
	lin := func(v uint8) float64 {
		c := float64(v) / 255
		if c <= 0.04045 {
			return c / 12.92
		}
		return math.Pow((c+0.055)/1.055, 2.4)
	}
	enc := func(c float64) uint8 {
		c = math.Max(0, math.Min(1, c))
		if c <= 0.0031308 {
			c *= 12.92
		} else {
			c = 1.055*math.Pow(c, 1/2.4) - 0.055
		}
		return uint8(c*255 + 0.5)
	}
	out := image.NewRGBA(img.Bounds())
	for i := 0; i < len(img.Pix); i += 4 {
		r, g, b := lin(img.Pix[i]), lin(img.Pix[i+1]), lin(img.Pix[i+2])
		for k := 0; k < 3; k++ {
			out.Pix[i+k] = enc(m[k][0]*r + m[k][1]*g + m[k][2]*b)
		}
		out.Pix[i+3] = img.Pix[i+3]
	}
	return out
}
