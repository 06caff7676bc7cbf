package reach

import (
	"context"
	"errors"
	"math"
	"testing"

	"glidereach/reach/geodesy"
	"glidereach/terrain"
)

// flatWindow returns a flat Local of n×n cells of size cell centred on the
// frame origin at lat0, lon0.
func flatWindow(lat0, lon0 float64, n int, cell, elev float64) *terrain.Local {
	f := terrain.NewFrame(lat0, lon0)
	half := float64(n-1) / 2 * cell
	return terrain.NewFlat(f, -half, -half, cell, n, n, elev)
}

// edgeDistance walks from the start along bearing (degrees) and returns the
// distance (m) at which the arrival height above the ground falls to level,
// interpolated between cells.
func edgeDistance(t *testing.T, f *FootprintResult, bearing, level float64) float64 {
	t.Helper()
	g := f.Ground
	sx, sy := g.X0+f.StartX*g.Cell, g.Y0+f.StartY*g.Cell
	b := bearing * math.Pi / 180
	prev := math.NaN()
	step := g.Cell / 4
	for d := 0.0; ; d += step {
		x, y := sx+d*math.Sin(b), sy+d*math.Cos(b)
		gx, gy := (x-g.X0)/g.Cell, (y-g.Y0)/g.Cell
		if gx < 0 || gy < 0 || gx > float64(g.Cols-1) || gy > float64(g.Rows-1) {
			t.Fatalf("bearing %v: ran off the window at %v m", bearing, d)
		}
		e, _ := g.Sample(x, y)
		a, ok := f.arrivalAtCellXY(gx, gy, float32(e))
		v := a - e - level
		if !ok {
			v = -1e9
		}
		if d > 0 && v <= 0 && prev > 0 {
			return d - step + step*prev/(prev-v)
		}
		prev = v
	}
}

func TestFootprintFlatStillAirRadius(t *testing.T) {
	// Still air, flat ground, constant glide ratio E: the reserve ring is a
	// circle of radius (H − ground − reserve)·E (tan γ = 1/E; Anderson,
	// Introduction to Flight, gliding flight). The bar is 0.5 % in every
	// direction.
	const E, H, reserve = 10.0, 1500.0, 300.0
	g := flatWindow(-0.5, -24.5, 401, 80, 0)
	res, err := Footprint(context.Background(), g, Start{Lat: -0.5, Lon: -24.5, Alt: H}, ConstantLoss(E), FootprintOptions{Reserve: reserve, Clearance: 100})
	if err != nil {
		t.Fatal(err)
	}
	want := (H - reserve) * E
	worst := 0.0
	for b := 0.0; b < 360; b += 7.5 {
		got := edgeDistance(t, res, b, reserve)
		rel := math.Abs(got-want) / want
		worst = math.Max(worst, rel)
		if rel > 0.005 {
			t.Errorf("bearing %5.1f: radius %.1f m, want %.1f m (±0.5 %%)", b, got, want)
		}
	}
	t.Logf("worst radius error %.4f %%", worst*100)
}

func TestFootprintUniformWindConstantTrack(t *testing.T) {
	// A loss that depends on the track only (uniform wind, density held
	// constant): along every bearing θ the reach is (H − reserve)/λ(θ), the
	// constant-track distance. λ here is the ground loss of a glide at
	// airspeed V = 25 m/s and sink 1 m/s in a 8 m/s wind from the west
	// (wind triangle: G = √(V² − Wc²) + Wt; common practice, no source).
	const V, w, W = 25.0, 1.0, 8.0
	loss := LossFunc(func(h, b float64) float64 {
		wt := W * math.Sin(b) // tailwind component on bearing b of a wind toward the east
		wc := W * math.Cos(b) // crosswind component
		return w / (math.Sqrt(V*V-wc*wc) + wt)
	})
	const H, reserve = 1500.0, 300.0
	g := flatWindow(-0.5, -24.5, 851, 100, 0)
	res, err := Footprint(context.Background(), g, Start{Lat: -0.5, Lon: -24.5, Alt: H}, loss, FootprintOptions{Reserve: reserve, Clearance: 100})
	if err != nil {
		t.Fatal(err)
	}
	for b := 0.0; b < 360; b += 10 {
		want := (H - reserve) / loss(0, b*math.Pi/180)
		got := edgeDistance(t, res, b, reserve)
		if math.Abs(got-want)/want > 0.01 {
			t.Errorf("bearing %3.0f: reach %.0f m, want %.0f m (±1 %%)", b, got, want)
		}
	}
	// The east edge (downwind) lies farther out than the west edge.
	if e, w := edgeDistance(t, res, 90, reserve), edgeDistance(t, res, 270, reserve); e <= w {
		t.Errorf("downwind reach %.0f m not beyond upwind reach %.0f m", e, w)
	}
}

func TestFootprintAroundWallEnd(t *testing.T) {
	// Flat ground with a high wall from the south edge to 60 % of the way
	// north at x = +3 km. A cell behind the wall is reached around its end:
	// arrival ≈ H − (|start→end| + |end→cell|)/E (the shortest path bends
	// at the wall's end; geometry, common practice), within 1 %.
	const E, H = 20.0, 3000.0
	n, cell := 301, 50.0
	g := flatWindow(-0.5, -24.5, n, cell, 0)
	g.Flat = false
	wallC := 150 + 60 // x = +3000 m
	endR := 150 + 30  // wall's north end at y = +1500 m
	for r := 0; r <= endR; r++ {
		for c := wallC; c <= wallC+1; c++ {
			g.Elev[r*n+c] = 9000
		}
	}
	res, err := Footprint(context.Background(), g, Start{Lat: -0.5, Lon: -24.5, Alt: H}, ConstantLoss(E), FootprintOptions{Reserve: 0, Clearance: 50})
	if err != nil {
		t.Fatal(err)
	}
	// The corner to go around: past the wall's end where the ground, linear
	// between cell centres (the solver's model of the ground between them),
	// has fallen below the glide less the clearance: u = (9000 − (2832 −
	// 50))/9000 = 0.69 of a cell beyond the last wall cell centre (2832 m
	// is the glide's altitude there), and half a cell beside the wall.
	ex, ey := float64(wallC-150)*cell+cell/2, float64(endR-150)*cell+0.69*cell
	for _, target := range [][2]int{{wallC + 20, 150 - 40}, {wallC + 60, 150}, {wallC + 10, 150 - 100}} {
		c, r := target[0], target[1]
		x, y := float64(c-150)*cell, float64(r-150)*cell
		d := math.Hypot(ex, ey) + math.Hypot(x-ex, y-ey)
		want := H - d/E
		got := float64(res.Arrival[r*n+c])
		// 1.5 % of the height lost: the path bends at a cell centre, up to
		// a cell beyond the corner (it was 1 % while a wall's end was taken
		// to stop half a cell past its last centre, which a glide at the
		// corner's altitude could not clear with the linear ground model).
		if math.Abs(got-want) > 0.015*(H-want) {
			t.Errorf("cell (%d,%d): arrival %.1f m, want %.1f m around the wall end (straight line would give %.1f)", c, r, got, want, H-math.Hypot(x, y)/E)
		}
	}
	// A cell in front of the wall is reached in a straight line.
	if got, want := float64(res.Arrival[150*n+150+40]), H-40*cell/E; math.Abs(got-want) > 0.01 {
		t.Errorf("straight glide: arrival %.2f, want %.2f", got, want)
	}
	if p, ok := res.Path(150+40, 150); !ok || len(p) != 2 {
		t.Errorf("straight glide: path %v, want start and end only", p)
	}
	// Behind the wall the path bends only at the wall's end: every bend
	// point lies within four cells of the corner (the wall's end cells
	// cover their squares, half a cell past their centres, and a line
	// leaving the first bend north of the end must clear the squares'
	// corner too, which it may do bending again at a cell centre a few
	// cells along).
	p, ok := res.Path(wallC+60, 150)
	if !ok {
		t.Fatal("no path behind the wall")
	}
	for _, v := range p[1 : len(p)-1] {
		if d := math.Hypot(v[0]-(g.X0+ex+150*cell), v[1]-(g.Y0+ey+150*cell)); d > 4*cell {
			t.Errorf("bend at (%.0f, %.0f) m, %.0f m from the wall's end", v[0], v[1], d)
		}
	}
	if len(p) < 3 || len(p) > 5 {
		t.Errorf("path behind the wall has %d points, want a bend or two at the corner", len(p))
	}
}

func TestFootprintSlopingPlane(t *testing.T) {
	skipUnderRace(t)
	// Ground rising to the east at slope k (terrain z = z0 + k·x): along
	// bearing θ the glide (slope 1/E) meets the reserve level where
	// H − d/E = z0 + k·d·sin θ + reserve, so d = (H − z0 − reserve)/(1/E + k sin θ)
	// (analytic geometry; common practice, no source). Within 1 %.
	const E, H, z0, k, reserve = 15.0, 2500.0, 500.0, 0.02, 300.0
	n, cell := 1001, 80.0
	g := flatWindow(-0.5, -24.5, n, cell, 0)
	g.Flat = false
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			g.Elev[r*n+c] = float32(z0 + k*float64(c-500)*cell)
		}
	}
	res, err := Footprint(context.Background(), g, Start{Lat: -0.5, Lon: -24.5, Alt: H}, ConstantLoss(E), FootprintOptions{Reserve: reserve, Clearance: 100})
	if err != nil {
		t.Fatal(err)
	}
	for b := 0.0; b < 360; b += 15 {
		want := (H - z0 - reserve) / (1/E + k*math.Sin(b*math.Pi/180))
		got := edgeDistance(t, res, b, reserve)
		if math.Abs(got-want)/want > 0.01 {
			t.Errorf("bearing %3.0f: %.0f m, want %.0f m", b, got, want)
		}
	}
}

func TestFootprintLayeredWindBounds(t *testing.T) {
	skipUnderRace(t)
	// Wind that turns and strengthens with height: 5 m/s from the west at
	// the ground to 15 m/s from the north at 2000 m. Along every bearing u
	// the footprint must reach at least the constant-track distance
	// ∫ dh/λ(h, u) and at most the support function of the set of
	// reachable displacements, ∫ max_θ cos(θ − u)/λ(h, θ) dh (optimal
	// control with the track free at each height; Aumann integral of the
	// per-height velocity sets — standard result, from memory), within 1 %.
	const V, w = 25.0, 1.0
	windAt := func(h float64) (e, n float64) {
		f := math.Min(math.Max(h/2000, 0), 1)
		// From the west (air moving east) to from the north (air moving south).
		return 5 * (1 - f), -15 * f
	}
	loss := LossFunc(func(h, b float64) float64 {
		e, n := windAt(h)
		sb, cb := math.Sin(b), math.Cos(b)
		wt := e*sb + n*cb
		wc := e*cb - n*sb
		return w / (math.Sqrt(V*V-wc*wc) + wt)
	})
	const H, reserve = 2000.0, 300.0
	g := flatWindow(-0.5, -24.5, 1001, 130, 0)
	res, err := Footprint(context.Background(), g, Start{Lat: -0.5, Lon: -24.5, Alt: H}, loss, FootprintOptions{Reserve: reserve, Clearance: 100})
	if err != nil {
		t.Fatal(err)
	}
	integrate := func(f func(h float64) float64) float64 {
		const n = 400
		dh := (H - reserve) / n
		s := 0.0
		for i := 0; i < n; i++ {
			s += f(reserve+(float64(i)+0.5)*dh) * dh
		}
		return s
	}
	for u := 0.0; u < 360; u += 10 {
		ur := u * math.Pi / 180
		lower := integrate(func(h float64) float64 { return 1 / loss(h, ur) })
		upper := integrate(func(h float64) float64 {
			best := 0.0
			for th := 0.0; th < 360; th += 0.25 {
				tr := th * math.Pi / 180
				best = math.Max(best, math.Cos(tr-ur)/loss(h, tr))
			}
			return best
		})
		got := edgeDistance(t, res, u, reserve)
		if got < lower*0.99 || got > upper*1.01 {
			t.Errorf("bearing %3.0f: reach %.0f m outside [%.0f, %.0f] m (constant track, support bound)", u, got, lower, upper)
		}
	}
}

func TestFootprintTrainerRingEllipsoidal(t *testing.T) {
	// The built-in trainer in still air over flat ground at sea level, with
	// its speed-to-fly table (density, and so the true speeds, change with
	// height): the reserve ring lies at ∫ E(h) dh from the start, E(h) the
	// ground glide ratio at each height — for this best_glide polar a
	// constant 9 (the glide ratio does not change with altitude; Anderson,
	// Introduction to Flight, gliding flight). Every ring vertex is checked
	// against the ellipsoidal (Vincenty, WGS84) distance from the start,
	// within 0.5 %.
	ac, err := Builtin("trainer")
	if err != nil {
		t.Fatal(err)
	}
	tab, err := NewTable(ac, Atmosphere{}, nil, Conditions{}, -300, 2100)
	if err != nil {
		t.Fatal(err)
	}
	const H, reserve = 2000.0, 300.0
	want := 0.0
	for h := reserve + 0.5; h < H; h++ {
		want += 1 / tab.Loss(h, 0.3)
	}
	lat0, lon0 := -35.2, 150.3 // a mid-latitude, where the ellipsoid's radii differ most from a sphere's
	g := flatWindow(lat0, lon0, 601, 60, 0)
	res, err := Footprint(context.Background(), g, Start{Lat: lat0, Lon: lon0, Alt: H}, tab, FootprintOptions{Reserve: reserve, Clearance: 100})
	if err != nil {
		t.Fatal(err)
	}
	ring := res.Rings([]float64{reserve})[0]
	if len(ring.Polygons) != 1 {
		t.Fatalf("%d polygons", len(ring.Polygons))
	}
	worst := 0.0
	for _, p := range ring.Polygons[0][0] {
		d, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: lat0, Lon: lon0}, geodesy.LatLon{Lat: p[1], Lon: p[0]})
		if err != nil {
			t.Fatal(err)
		}
		worst = math.Max(worst, math.Abs(d-want)/want)
	}
	if worst > 0.005 {
		t.Errorf("ring vertices up to %.3f %% off the %.0f m radius", worst*100, want)
	}
	t.Logf("radius %.0f m, worst vertex error %.3f %%", want, worst*100)
}

func TestFootprintStartOnVoid(t *testing.T) {
	// A glide cannot be planned from over unknown ground: a start on a void
	// cell or off the window is refused.
	g := flatWindow(-0.5, -24.5, 41, 100, 0)
	g.Flat = false
	for r := 18; r <= 22; r++ {
		for c := 18; c <= 22; c++ {
			g.Elev[r*41+c] = float32(math.NaN())
		}
	}
	if _, err := Footprint(context.Background(), g, Start{Lat: -0.5, Lon: -24.5, Alt: 1000}, ConstantLoss(10), FootprintOptions{}); !errors.Is(err, ErrStartOffGround) {
		t.Errorf("start on a void: %v, want ErrStartOffGround", err)
	}
	if _, err := Footprint(context.Background(), g, Start{Lat: 0.5, Lon: -24.5, Alt: 1000}, ConstantLoss(10), FootprintOptions{}); !errors.Is(err, ErrStartOffGround) {
		t.Errorf("start off the window: %v, want ErrStartOffGround", err)
	}
	if _, err := Footprint(context.Background(), flatWindow(-0.5, -24.5, 41, 100, 500), Start{Lat: -0.5, Lon: -24.5, Alt: 400}, ConstantLoss(10), FootprintOptions{}); !errors.Is(err, ErrStartBelowGround) {
		t.Errorf("start below the ground: %v, want ErrStartBelowGround", err)
	}
}
