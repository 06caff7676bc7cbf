package reach

import (
	"context"
	"math"
	"math/rand"
	"testing"
)

func TestRequiredFlatStillAir(t *testing.T) {
	// One field on flat ground in still air: the least altitude at distance
	// d is field elevation + reserve + d/E (tan γ = 1/E; Anderson,
	// Introduction to Flight, gliding flight), within 0.5 % in any direction.
	const E, elev, reserve = 12.0, 150.0, 300.0
	n, cell := 401, 75.0
	g := flatWindow(-0.5, -24.5, n, cell, elev)
	res, err := Required(context.Background(), g, []Target{{Name: "A", Lat: -0.5, Lon: -24.5, Elev: elev, Reserve: reserve}}, ConstantLoss(E), RequiredOptions{Clearance: 100, Ceiling: 5000})
	if err != nil {
		t.Fatal(err)
	}
	for _, rc := range [][2]int{{200 + 150, 200}, {200, 200 + 180}, {200 - 120, 200 - 90}, {200 + 13, 200 - 170}, {200 + 100, 200 + 100}} {
		c, r := rc[0], rc[1]
		d := math.Hypot(float64(c-200), float64(r-200)) * cell
		want := elev + reserve + d/E
		got := float64(res.Required[r*n+c])
		if math.Abs(got-want) > 0.005*(want-elev) {
			t.Errorf("cell (%d,%d) at %.0f m: required %.1f m, want %.1f m", c, r, d, got, want)
		}
		if res.Best[r*n+c] != 0 {
			t.Errorf("best field %d, want 0", res.Best[r*n+c])
		}
	}
}

func TestRequiredUniformWind(t *testing.T) {
	// Uniform wind: the aircraft at bearing φ from the field flies track
	// φ+180° toward it, so the least altitude is elev + reserve + d·λ(φ+π)
	// (constant-track glide; wind triangle, common practice, no source),
	// within 1 %.
	const V, w, W = 25.0, 1.0, 8.0
	loss := LossFunc(func(h, b float64) float64 {
		wt, wc := W*math.Sin(b), W*math.Cos(b)
		return w / (math.Sqrt(V*V-wc*wc) + wt)
	})
	const elev, reserve = 0.0, 250.0
	n, cell := 401, 75.0
	g := flatWindow(-0.5, -24.5, n, cell, elev)
	res, err := Required(context.Background(), g, []Target{{Lat: -0.5, Lon: -24.5, Elev: elev, Reserve: reserve}}, loss, RequiredOptions{Clearance: 100, Ceiling: 6000})
	if err != nil {
		t.Fatal(err)
	}
	for phi := 0.0; phi < 360; phi += 30 {
		d := 12000.0
		b := phi * math.Pi / 180
		c := 200 + int(math.Round(d*math.Sin(b)/cell))
		r := 200 + int(math.Round(d*math.Cos(b)/cell))
		dx, dy := float64(c-200)*cell, float64(r-200)*cell
		dd := math.Hypot(dx, dy)
		track := math.Atan2(-dx, -dy)
		want := elev + reserve + dd*loss(0, track)
		got := float64(res.Required[r*n+c])
		if math.Abs(got-want) > 0.01*(want-elev-reserve) {
			t.Errorf("bearing %3.0f: required %.1f m, want %.1f m", phi, got, want)
		}
	}
}

func TestForwardBackwardConsistency(t *testing.T) {
	// For random start cells on hilly terrain, a forward glide from the
	// least altitude the backward solver gives reaches the field with the
	// reserve (two independent passes of the solver agree) within 1 m.
	// Uses an altitude-dependent loss so the integration through height is
	// exercised.
	loss := LossFunc(func(h, b float64) float64 { return 1 / (18 + h/1000) })
	n, cell := 201, 60.0
	g := hillyWindow(n, cell, 3)
	const reserve = 250.0
	fl := struct{ c, r int }{100, 100}
	fx, fy := g.XY(fl.c, fl.r)
	flat, flon := g.Frame.Inverse(fx, fy)
	fe := g.At(fl.c, fl.r)
	res, err := Required(context.Background(), g, []Target{{Lat: flat, Lon: flon, Elev: fe, Reserve: reserve}}, loss, RequiredOptions{Clearance: 100, Ceiling: 5000})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewSource(7))
	checked := 0
	for tries := 0; tries < 200 && checked < 12; tries++ {
		c, r := rng.Intn(n), rng.Intn(n)
		req := float64(res.Required[r*n+c])
		if req != req {
			continue
		}
		x, y := g.XY(c, r)
		lat, lon := g.Frame.Inverse(x, y)
		fw, err := Footprint(context.Background(), g, Start{Lat: lat, Lon: lon, Alt: req}, loss, FootprintOptions{Reserve: reserve, Clearance: 100})
		if err != nil {
			t.Fatal(err)
		}
		arr, ok := fw.ArrivalAt(flat, flon)
		if !ok {
			t.Errorf("start (%d,%d) at %.1f m: forward glide does not reach the field", c, r, req)
			continue
		}
		if got := arr - fe; math.Abs(got-reserve) > 1 {
			t.Errorf("start (%d,%d) at %.1f m: arrives %.2f m above the field, want %.0f ± 1", c, r, req, got, reserve)
		}
		checked++
	}
	if checked < 10 {
		t.Fatalf("only %d start cells checked", checked)
	}
}
