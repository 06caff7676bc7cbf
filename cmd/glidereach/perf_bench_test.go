package main

import (
	"context"
	"fmt"
	"glidereach/reach/plan"
	"glidereach/reach/plan/demo"
	"io"
	"math"
	"testing"

	"glidereach/cmd/glidereach/input"
)

// benchmarkDemoReach runs the reach command's computation for the demo
// sailplane (the demo's start, wind and landscape) with the given fields and
// wind uncertainty; it is what `glidereach reach` does before writing.
func benchmarkDemoReach(b *testing.B, fields []input.Field, windError string) {
	sc, err := loadDemoScene()
	if err != nil {
		b.Fatal(err)
	}
	benchmarkReach(b, plan.Ground{Src: sc.src}, fields, windError)
}

func benchmarkReach(b *testing.B, gr plan.Ground, fields []input.Field, windError string) {
	r := demo.Footprints()[1]
	b.ReportAllocs()
	b.ResetTimer()
	defer cpuMeter(b)()
	for i := 0; i < b.N; i++ {
		g := newGlideFlags()
		g.aircraft = r.Aircraft
		g.wind = demoWindSpec()
		g.windError = windError
		setup, err := g.resolve()
		if err != nil {
			b.Fatal(err)
		}
		pos := newPositionFlags()
		pos.from.Lat, pos.from.Lon, pos.from.Given = r.Lat, r.Lon, true
		pos.agl.Value, pos.agl.Given = r.AGL, true
		if _, err := computeReach(context.Background(), setup, gr, pos, fields, []float64{0, 150}, io.Discard); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkReachDemoNoFields and BenchmarkReachDemoFields: the footprint
// alone and with the seven demo fields judged (the bar: at most
// twice the time without fields).
func BenchmarkReachDemoNoFields(b *testing.B) { benchmarkDemoReach(b, nil, "") }
func BenchmarkReachDemoFields(b *testing.B) {
	sc, _ := loadDemoScene()
	benchmarkDemoReach(b, sc.fields, "")
}

// BenchmarkReachDemoWindErrorFields: nine winds (--wind-error 20deg,5kt)
// with the seven fields.
func BenchmarkReachDemoWindErrorFields(b *testing.B) {
	sc, _ := loadDemoScene()
	benchmarkDemoReach(b, sc.fields, "20deg,5kt")
}

// BenchmarkReach1000FieldsFlat: the seven demo fields plus 993 invented
// ones spread over the globe (most thousands of km away), on flat ground
// at 0 m (where every field has an elevation and a window can be made).
func BenchmarkReach1000FieldsFlat(b *testing.B) {
	sc, _ := loadDemoScene()
	fields := append([]input.Field(nil), sc.fields...)
	for i := 0; len(fields) < 1000; i++ {
		// A deterministic scatter (golden-angle spiral over the sphere).
		z := 1 - 2*(float64(i)+0.5)/993
		lat := math.Asin(z) * 180 / math.Pi
		lon := math.Mod(float64(i)*137.50776, 360) - 180
		fields = append(fields, input.Field{Name: fmt.Sprintf("far %d", i), Lat: lat, Lon: lon})
	}
	benchmarkReach(b, plan.Ground{}, fields, "")
}
