package render_test

import (
	"bytes"
	"fmt"
	"image/png"
	"math"

	"github.com/paulmach/orb"

	"glidereach/cmd/glidereach/render"
	"glidereach/terrain"
)

// A footprint on flat ground: 20 km × 20 km at 0 m, one level, one field.
func ExampleRenderPNG() {
	frame := terrain.NewFrame(-31.5, -146.25) // open ocean: invented demo
	ground := terrain.NewFlat(frame, -9950, -9950, 100, 200, 200, 0)
	var ring orb.Ring
	for i := 0; i <= 72; i++ {
		t := 2 * math.Pi * float64(i%72) / 72
		lat, lon := frame.Inverse(7000*math.Cos(t), 7000*math.Sin(t))
		ring = append(ring, orb.Point{lon, lat})
	}
	lat, lon := frame.Inverse(2500, 1500)
	s := &render.Scene{
		Title:      "Reach on flat ground",
		Terrain:    ground,
		Levels:     []render.Level{{ArrivalAGL: 300, Polygons: orb.MultiPolygon{{ring}}}},
		Start:      &render.Marker{Point: orb.Point{-146.25, -31.5}, HeadingDeg: 90, AltMSL: 1200},
		Fields:     []render.FieldMark{{Name: "Mossbank", Point: orb.Point{lon, lat}, Reachable: true, ArrivalAGL: 610}},
		Inputs:     []string{"Start: 1200 m MSL", "Reserve: 300 m"},
		DataSource: "flat ground at 0 m",
	}
	var buf bytes.Buffer
	if err := render.RenderPNG(&buf, s, 800); err != nil {
		fmt.Println(err)
		return
	}
	cfg, err := png.DecodeConfig(&buf)
	fmt.Println(cfg.Width, err)
	// Output: 800 <nil>
}
