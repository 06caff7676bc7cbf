package reach

// Properties that must hold for every input (issue 11), each checked over
// random cases: a quick sample in plain `go test ./...`, and at least 1000
// cases each with
//
//	go test ./reach -run Invariant -args -full
//
// (or GLIDEREACH_FULL_PROPERTIES=1 in the environment). The tolerances are
// those README "Tolerances" states; sources are given at each check.

import (
	"context"
	"flag"
	"math"
	"math/rand"
	"os"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"glidereach/reach/geodesy"
	"glidereach/terrain"
	"glidereach/wind"
)

var fullProperties = flag.Bool("full", false, "run the property tests of invariants_test.go at full size (1000 random cases each)")

// propCases returns the number of random cases: quick in plain go test,
// 1000 with -full or GLIDEREACH_FULL_PROPERTIES set.
func propCases(quick int) int {
	if *fullProperties || os.Getenv("GLIDEREACH_FULL_PROPERTIES") != "" {
		return 1000
	}
	if raceEnabled {
		// Under -race a few cases exercise the concurrent code; the whole
		// quick sample runs in the plain go test.
		return max(2, quick/8)
	}
	return quick
}

// skipUnderRace skips a long sequential numerical check under the race
// detector: it runs in full in the plain go test (the README's test
// command), and -race is there for the code that runs goroutines, which
// other tests exercise.
func skipUnderRace(t *testing.T) {
	t.Helper()
	if raceEnabled {
		t.Skip("long sequential check: run in full by the plain go test, not under -race")
	}
}

// propAircraft returns a random built-in profile.
func propAircraft(rng *rand.Rand) *Aircraft {
	names := BuiltinNames()
	ac, err := Builtin(names[rng.Intn(len(names))])
	if err != nil {
		panic(err)
	}
	return ac
}

// propBearing returns a random bearing in degrees: half the time a multiple
// of 90° exactly or within 1e-9° of one, either side.
func propBearing(rng *rand.Rand) float64 {
	if rng.Intn(2) == 0 {
		return rng.Float64() * 360
	}
	b := float64(rng.Intn(4)) * 90
	switch rng.Intn(3) {
	case 1:
		b += 1e-9
	case 2:
		b -= 1e-9
		if b < 0 {
			b += 360
		}
	}
	return b
}

// propWind returns a random wind: uniform, or two to three layers with
// shear in direction and speed, speeds up to maxSpeed m/s; directions are
// drawn like propBearing.
func propWind(t testing.TB, rng *rand.Rand, maxSpeed float64) *wind.Profile {
	t.Helper()
	n := 1 + rng.Intn(3)
	layers := make([]wind.Layer, n)
	alt := 0.0
	for i := range layers {
		layers[i] = wind.Layer{Alt: alt, Dir: propBearing(rng), Speed: rng.Float64() * maxSpeed}
		alt += 800 + rng.Float64()*1200
	}
	p, err := wind.NewProfile(layers)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// propTerrain returns an n×n Local (cell m) around 0.5°S 24.5°W with a
// random mix of the features the issue names: ridges, walls one cell
// thick (straight or diagonal, some with a gap), pits and voids. The
// centre cell, where the tests start, is never a void.
func propTerrain(rng *rand.Rand, n int, cell float64) *terrain.Local {
	l := flatWindow(-0.5, -24.5, n, cell, 0)
	l.Flat = false
	base := rng.Float64() * 300
	for i := range l.Elev {
		l.Elev[i] = float32(base)
	}
	mid := n / 2
	set := func(c, r int, v float64) {
		if v != v && c >= mid-1 && c <= mid+1 && r >= mid-1 && r <= mid+1 {
			return // the start stands on known ground
		}
		if c >= 0 && r >= 0 && c < n && r < n && !(c == mid && r == mid) {
			l.Elev[r*n+c] = float32(v)
		}
	}
	for k := 0; k < 1+rng.Intn(4); k++ {
		h := base + 100 + rng.Float64()*900
		switch rng.Intn(5) {
		case 0: // a Gaussian ridge of random direction
			th := rng.Float64() * math.Pi
			cx, cy, w := rng.Float64()*float64(n), rng.Float64()*float64(n), 1+rng.Float64()*3
			for r := 0; r < n; r++ {
				for c := 0; c < n; c++ {
					d := (float64(c)-cx)*math.Cos(th) - (float64(r)-cy)*math.Sin(th)
					v := float64(l.Elev[r*n+c]) + (h-base)*math.Exp(-d*d/(w*w))
					set(c, r, v)
				}
			}
		case 1: // a straight wall one cell thick, row or column, maybe with a gap
			at := rng.Intn(n)
			gap := -1
			if rng.Intn(2) == 0 {
				gap = rng.Intn(n)
			}
			row := rng.Intn(2) == 0
			for i := 0; i < n; i++ {
				if i >= gap-1 && i <= gap+1 {
					continue
				}
				if row {
					set(i, at, h)
				} else {
					set(at, i, h)
				}
			}
		case 2: // a diagonal wall one cell thick
			off := rng.Intn(n) - n/2
			sign := 1
			if rng.Intn(2) == 0 {
				sign = -1
			}
			for c := 0; c < n; c++ {
				r := mid + off + sign*(c-mid)
				if r == mid && c == mid {
					continue
				}
				set(c, r, h)
			}
		case 3: // pits
			for j := 0; j < 3+rng.Intn(10); j++ {
				set(rng.Intn(n), rng.Intn(n), base-50-rng.Float64()*300)
			}
		case 4: // voids: small blobs of unknown ground
			for j := 0; j < 1+rng.Intn(3); j++ {
				c0, r0, rad := rng.Intn(n), rng.Intn(n), 1+rng.Intn(3)
				for r := r0 - rad; r <= r0+rad; r++ {
					for c := c0 - rad; c <= c0+rad; c++ {
						if (c-c0)*(c-c0)+(r-r0)*(r-r0) <= rad*rad {
							set(c, r, math.NaN())
						}
					}
				}
			}
		}
	}
	return l
}

// stfLoss is the independent loss of the re-fly: the speed to fly optimised
// afresh at each point (no table, no descent integrator).
func stfLoss(ac *Aircraft, atm Atmosphere, w *wind.Profile, c Conditions, h, trackDeg float64) float64 {
	along, cross := w.Components(h, trackDeg)
	return ac.SpeedToFly(atm.Density(h), along, cross, c).Loss
}

// refly flies the bend points pts (frame metres, start first) from h0 with
// a midpoint (RK2) integrator in steps of at most cell/8, the loss from
// stfLoss, and checks the terrain floor t + min(clearance, h − eDest) where
// the line crosses each row or column of cell centres (along its major
// axis), with the terrain linear between the two cell centres it passes
// between — the solver's model of the ground between cell centres; a void
// counts where it is the nearer of the two. It returns the arrival and the
// worst deficit below the floor (≤ 0 when the floor is kept).
func refly(l *terrain.Local, pts [][2]float64, h0 float64, loss func(h, deg float64) float64, clearance, eDest float64) (arrival, worst float64) {
	h := h0
	worst = math.Inf(-1)
	cellOf := func(x, y float64) (float64, float64) { return (x - l.X0) / l.Cell, (y - l.Y0) / l.Cell }
	for k := 0; k+1 < len(pts); k++ {
		ax, ay := pts[k][0], pts[k][1]
		bx, by := pts[k+1][0], pts[k+1][1]
		dx, dy := bx-ax, by-ay
		L := math.Hypot(dx, dy)
		if L == 0 {
			continue
		}
		deg := math.Atan2(dx, dy) * 180 / math.Pi
		// The crossings of the major axis's integer lines, in order.
		ga, gb := [2]float64{}, [2]float64{}
		ga[0], ga[1] = cellOf(ax, ay)
		gb[0], gb[1] = cellOf(bx, by)
		major := 0
		if math.Abs(gb[1]-ga[1]) > math.Abs(gb[0]-ga[0]) {
			major = 1
		}
		var cross []float64 // fractions along the segment
		lo, hi := math.Min(ga[major], gb[major]), math.Max(ga[major], gb[major])
		for v := math.Ceil(lo); v <= hi; v++ {
			f := (v - ga[major]) / (gb[major] - ga[major])
			if f > 1e-9 && f < 1-1e-9 {
				cross = append(cross, f)
			}
		}
		if ga[major] > gb[major] {
			for i, j := 0, len(cross)-1; i < j; i, j = i+1, j-1 {
				cross[i], cross[j] = cross[j], cross[i]
			}
		}
		steps := int(math.Ceil(L / (l.Cell / 8)))
		ds := L / float64(steps)
		s := 0.0
		ci := 0
		for i := 0; i < steps; i++ {
			// Check the crossings within this step at the linearly
			// interpolated altitude.
			lam := loss(h, deg)
			hm := h - lam*ds/2
			h2 := h - loss(hm, deg)*ds
			for ci < len(cross) && cross[ci]*L <= s+ds {
				u := (cross[ci]*L - s) / ds
				hc := h + (h2-h)*u
				gx := ga[0] + (gb[0]-ga[0])*cross[ci]
				gy := ga[1] + (gb[1]-ga[1])*cross[ci]
				var t float64
				if major == 0 {
					t = lineTerrain(l, int(math.Round(gx)), gy, false)
				} else {
					t = lineTerrain(l, int(math.Round(gy)), gx, true)
				}
				if math.IsInf(t, 1) {
					worst = math.Inf(1)
				} else if d := t + math.Min(clearance, hc-eDest) - hc; d > worst {
					worst = d
				}
				ci++
			}
			h = h2
			s += ds
		}
	}
	return h, worst
}

// lineTerrain is the terrain on column (or row, when rowMajor) k at the
// fractional minor coordinate m: linear between the two cells, +Inf where
// the nearer one is a void or the point is off the window.
func lineTerrain(l *terrain.Local, k int, m float64, rowMajor bool) float64 {
	m0 := int(math.Floor(m))
	u := m - float64(m0)
	get := func(j int) float64 {
		c, r := k, j
		if rowMajor {
			c, r = j, k
		}
		if c < 0 || r < 0 || c >= l.Cols || r >= l.Rows {
			return math.NaN()
		}
		return float64(l.Elev[r*l.Cols+c])
	}
	a, b := get(m0), get(m0+1)
	switch {
	case u < 1e-9:
		b = a
	case a != a && b != b:
		return math.Inf(1)
	case a != a:
		if u < 0.5 {
			return math.Inf(1)
		}
		a = b
	case b != b:
		if u > 0.5 {
			return math.Inf(1)
		}
		b = a
	}
	if a != a {
		return math.Inf(1)
	}
	return a*(1-u) + b*u
}

// progressBound returns, for every direction, an upper bound on the ground
// distance per metre of height toward it that any track at any altitude of
// tab gives: max over nodes of G/(w+s) times the best cosine between that
// node's track (±1°, the interpolation interval) and the direction. Any
// path, bent or straight, loses at least distance/bound between two points
// (each element ds on track θ loses ds/ratio(θ) ≥ ds·cos(θ−β)/bound(β)).
func progressBound(tab *Table) func(bearing float64) float64 {
	nd := tab.nd
	colMax := make([]float64, nd)
	for i := 0; i < tab.nh; i++ {
		for j := 0; j < nd; j++ {
			if l := tab.loss[i*nd+j]; l > 0 {
				colMax[j] = math.Max(colMax[j], 1/l)
			} else if l <= 0 {
				colMax[j] = math.Inf(1)
			}
		}
	}
	step := 2 * math.Pi / float64(nd)
	return func(b float64) float64 {
		best := 0.0
		for j, r := range colMax {
			d := math.Abs(math.Remainder(float64(j)*step-b, 2*math.Pi))
			d = math.Max(0, d-step)
			if c := math.Cos(d); c > 0 {
				best = math.Max(best, r*c)
			}
		}
		return best
	}
}

func TestInvariantReflyPathsAndRings(t *testing.T) {
	// Re-fly what the solver claims (issue 11): on random terrains with
	// ridges, one-cell walls, diagonal walls, pits and voids, in random
	// layered wind and air warmer or colder than standard, the path the
	// footprint found to a reached cell is flown again by refly (its own
	// integrator and speed-to-fly optimisation), which must keep the terrain
	// floor and arrive at least as high as claimed: within 0.2 % of the
	// height lost + 0.3 m (RK2 and table interpolation), and the floor
	// within 1 m at the crossings (the solver's line of sight is exact on
	// a ground model at least as strict as refly's, sightline.go; the 1 m
	// is for the float32 altitudes and the integrators). No arrival is above the physics bound (progressBound, one-sided,
	// exact up to 1e-6 relative). A cell whose centre lies inside a ring is
	// reached with at least the ring's level (a cell counts as inside when
	// its centre is; the rings are simplified inward only); coordinates are
	// rounded to 1e-6° (0.1 m), so a centre counts as inside when points
	// 3e-6° around it are inside too, and 0.05 m of the level is allowed.
	rng := rand.New(rand.NewSource(11))
	ctx := context.Background()
	cases := propCases(25)
	bad := map[string]int{}
	worstFloor, worstArr := math.Inf(-1), math.Inf(-1)
	for k := 0; k < cases; k++ {
		n := 31 + 2*rng.Intn(8)
		cell := 100 + rng.Float64()*150
		l := propTerrain(rng, n, cell)
		ac := propAircraft(rng)
		w := propWind(t, rng, 12)
		atm := Atmosphere{ISADev: rng.Float64()*40 - 20}
		cond := Conditions{Bugs: rng.Float64() * 0.2 * float64(rng.Intn(2))}
		mid := n / 2
		te := l.At(mid, mid)
		start := Start{Lat: -0.5, Lon: -24.5, Alt: te + 300 + rng.Float64()*1500}
		tab, err := NewTable(ac, atm, w, cond, -800, start.Alt+100)
		if err != nil {
			t.Fatal(err)
		}
		reserve := []float64{0, 50, 150, 300}[rng.Intn(4)]
		clearance := []float64{0, 50, 100, 150}[rng.Intn(4)]
		f, err := Footprint(ctx, l, start, tab, FootprintOptions{Reserve: reserve, Clearance: clearance, Levels: []float64{0}})
		if err != nil {
			t.Fatal(err)
		}
		loss := func(h, deg float64) float64 { return stfLoss(ac, atm, w, cond, h, deg) }
		bound := progressBound(tab)
		sx, sy := l.XY(mid, mid)
		var reached []int
		for i := range f.Arrival {
			c, r := i%n, i/n
			if f.AGL(c, r) >= 0 {
				reached = append(reached, i)
				d := math.Hypot(float64(c)-f.StartX, float64(r)-f.StartY) * cell
				if d > 0 {
					b := math.Atan2(float64(c)-f.StartX, float64(r)-f.StartY)
					if lim := start.Alt - d/bound(b); float64(f.Arrival[i]) > lim+1e-6*start.Alt {
						bad["arrival above the physics bound"]++
					}
				}
			}
		}
		for j := 0; j < 20 && len(reached) > 0; j++ {
			i := reached[rng.Intn(len(reached))]
			c, r := i%n, i/n
			pts, ok := f.Path(c, r)
			if !ok {
				bad["reached cell without a path"]++
				continue
			}
			pts[0] = [2]float64{sx, sy}
			claimed := float64(f.Arrival[i])
			arr, floor := refly(l, pts, start.Alt, loss, clearance, l.At(c, r))
			worstFloor = math.Max(worstFloor, floor)
			if short := claimed - arr; short > worstArr {
				worstArr = short
			}
			if arr < claimed-(0.002*(start.Alt-claimed)+0.3) {
				bad["re-flown arrival below the claim"]++
				t.Logf("case %d cell %d,%d: claimed %.2f m, re-flown %.2f m", k, c, r, claimed, arr)
			}
			if floor > 1 {
				bad["re-flown path below the terrain floor"]++
				t.Logf("case %d cell %d,%d: %.2f m below the floor (clearance %v, start %.0f m, arrival %.1f m over %.1f m)", k, c, r, floor, clearance, start.Alt, claimed, l.At(c, r))
			}
		}
		for _, lv := range f.Rings([]float64{reserve, 0}) {
			for r := 0; r < n; r++ {
				for c := 0; c < n; c++ {
					x, y := l.XY(c, r)
					lat, lon := l.Frame.Inverse(x, y)
					inside := true
					for _, d := range [][2]float64{{0, 0}, {3e-6, 0}, {-3e-6, 0}, {0, 3e-6}, {0, -3e-6}} {
						inside = inside && planar.MultiPolygonContains(lv.Polygons, orb.Point{lon + d[0], lat + d[1]})
					}
					if inside && !(f.AGL(c, r) >= lv.ArrivalAGL-0.05) {
						bad["cell inside a ring not reached with its level"]++
						t.Logf("case %d cell %d,%d: inside the %v m ring, arrival %.2f m above ground", k, c, r, lv.ArrivalAGL, f.AGL(c, r))
					}
				}
			}
		}
	}
	t.Logf("%d cases: worst re-flown shortfall %.3f m, worst floor deficit %.3f m", cases, worstArr, worstFloor)
	for what, count := range bad {
		t.Errorf("%s: %d times", what, count)
	}
}

func TestInvariantForwardBackwardFinalAgree(t *testing.T) {
	// Forward and backward agree (issue 11): on flat ground at a random
	// elevation, with random aircraft, wind (uniform or layered), reserve
	// and clearance, and a field at a random bearing — half of them exact
	// multiples of 90° or within 1e-9° of one — the arrival from the
	// footprint equals the final glide's from the same start, and the
	// backward solver's required altitude (RequiredFrom, and the raster
	// route and coverage read, Required/RequiredAt and Coverage's Least)
	// equals the final glide's, within 0.1 % of the height lost + 0.5 m:
	// on flat ground every solver flies the same straight track (the
	// footprint and backward along the local frame, the final glide along
	// the geodesic; tan γ = 1/E generalised to the speed to fly in wind).
	// Every figure also respects the physics bound (progressBound).
	rng := rand.New(rand.NewSource(12))
	ctx := context.Background()
	cases := propCases(20)
	bad := map[string]int{}
	worst := 0.0
	for k := 0; k < cases; k++ {
		ac := propAircraft(rng)
		w := propWind(t, rng, 10)
		atm := Atmosphere{ISADev: rng.Float64()*30 - 15}
		elev := rng.Float64() * 500
		startAlt := elev + 500 + rng.Float64()*1000
		reserve := []float64{0, 50, 150, 300}[rng.Intn(4)]
		clearance := []float64{0, 100}[rng.Intn(2)]
		brg := propBearing(rng)
		tab, err := NewTable(ac, atm, w, Conditions{}, elev-300, startAlt+2000)
		if err != nil {
			t.Fatal(err)
		}
		// A distance the glide reaches in most cases.
		ratio := 1 / tab.Loss(startAlt, brg*math.Pi/180)
		if math.IsInf(ratio, 0) || ratio <= 0 || math.IsNaN(ratio) {
			continue
		}
		dist := (startAlt - elev - reserve) * ratio * (0.3 + 0.9*rng.Float64())
		dist = math.Max(500, math.Min(dist, 18000))
		cell := math.Max(60, (dist+2500)/60)
		n := 2*int(math.Ceil((dist+2500)/cell)) + 1
		l := flatWindow(-0.5, -24.5, n, cell, elev)
		start := geodesy.LatLon{Lat: -0.5, Lon: -24.5}
		goal, _, err := geodesy.Direct(start, brg, dist)
		if err != nil {
			t.Fatal(err)
		}
		fg, err := FinalGlide(ctx, []geodesy.LatLon{start, goal}, startAlt, Performance{Aircraft: ac, Atm: atm, Wind: w},
			FinalGlideOptions{GoalElev: elev, Reserve: reserve, Clearance: clearance, Step: 50})
		if err != nil {
			t.Fatal(err)
		}
		if fg.Status == FinalNoHeadway {
			continue
		}
		f, err := Footprint(ctx, l, Start{Lat: start.Lat, Lon: start.Lon, Alt: startAlt}, tab, FootprintOptions{Reserve: reserve, Clearance: clearance})
		if err != nil {
			t.Fatal(err)
		}
		bound := progressBound(tab)(brg * math.Pi / 180)
		if fg.Arrival > startAlt-dist/bound+1e-6*startAlt {
			bad["final glide above the physics bound"]++
		}
		target := Target{Lat: goal.Lat, Lon: goal.Lon, Elev: elev, Reserve: reserve}
		if a, ok := f.ArrivalAtField(goal.Lat, goal.Lon, elev); ok && a > elev {
			tol := 0.001*(startAlt-fg.Arrival) + 0.5
			worst = math.Max(worst, math.Abs(a-fg.Arrival)/tol)
			if math.Abs(a-fg.Arrival) > tol {
				bad["footprint and final glide arrivals differ"]++
				t.Logf("case %d: bearing %.10g°, %0.f m: footprint arrives %.2f m, final glide %.2f m", k, brg, dist, a, fg.Arrival)
			}
			if a > startAlt-dist/bound+1e-6*startAlt {
				bad["footprint above the physics bound"]++
			}
		} else if fg.Arrival-elev > 1 && fg.Arrival < startAlt-10 {
			bad["final glide arrives, the footprint does not"]++
			t.Logf("case %d: bearing %.10g°, %0.f m: final glide arrives %.2f m, footprint none", k, brg, dist, fg.Arrival)
		}
		ceiling := fg.Required + 500
		rb, ok, err := RequiredFrom(ctx, l, target, tab, RequiredOptions{Clearance: clearance, Ceiling: ceiling}, start.Lat, start.Lon)
		if err != nil {
			t.Fatal(err)
		}
		figures := map[string]float64{"RequiredFrom": rb}
		if !ok {
			bad["backward finds no altitude"]++
			continue
		}
		if k%3 == 0 {
			rr, err := Required(ctx, l, []Target{target}, tab, RequiredOptions{Clearance: clearance, Ceiling: ceiling})
			if err != nil {
				t.Fatal(err)
			}
			if a, _, ok := rr.RequiredAt(start.Lat, start.Lon); ok {
				figures["Required (route)"] = a
			} else {
				bad["route raster has no altitude"]++
			}
			cv, err := Coverage(ctx, l, []Target{target}, tab, CoverageOptions{Alt: startAlt, Clearance: clearance, Margin: ceiling - startAlt})
			if err != nil {
				t.Fatal(err)
			}
			if v := cv.Least[(n/2)*n+n/2]; v == v {
				figures["Coverage"] = float64(v)
			} else {
				bad["coverage has no altitude"]++
			}
		}
		for what, v := range figures {
			tol := 0.001*(fg.Required-elev) + 0.5
			worst = math.Max(worst, math.Abs(v-fg.Required)/tol)
			if math.Abs(v-fg.Required) > tol {
				bad[what+" and final glide required altitudes differ"]++
				t.Logf("case %d: bearing %.10g°, %0.f m: %s needs %.2f m, final glide %.2f m", k, brg, dist, what, v, fg.Required)
			}
			if v < elev+reserve+dist/bound-1e-6*v {
				bad[what+" below the physics bound"]++
			}
		}
	}
	t.Logf("%d cases: worst difference %.2f of the tolerance", cases, worst)
	for what, count := range bad {
		t.Errorf("%s: %d times", what, count)
	}
}

func TestInvariantSymmetry(t *testing.T) {
	// Rotating the wind and the fields about the start by any angle rotates
	// the result on flat ground, and mirroring likewise (isotropy of the
	// model, common practice, no source). Exactly on the grid for quarter
	// turns and the north–south mirror: every cell's arrival maps to its
	// image within 1e-3 of the height lost + 0.05 m (floating point in the
	// wind components and the queue's order). For any angle the fields'
	// arrivals agree within 0.3 % of the height lost + 0.5 m (the 1°
	// direction columns are not rotated with the wind).
	rng := rand.New(rand.NewSource(13))
	ctx := context.Background()
	cases := propCases(12)
	bad := map[string]int{}
	for k := 0; k < cases; k++ {
		ac := propAircraft(rng)
		dir, speed := propBearing(rng), rng.Float64()*12
		elev := rng.Float64() * 300
		alt := elev + 400 + rng.Float64()*800
		reserve := []float64{0, 150, 300}[rng.Intn(3)]
		n := 61
		cell := 200.0
		l := flatWindow(-0.5, -24.5, n, cell, elev)
		run := func(d float64) (*FootprintResult, *Table) {
			tab, err := NewTable(ac, Atmosphere{}, uniformWind(t, math.Mod(d+360, 360), speed), Conditions{}, elev-300, alt+100)
			if err != nil {
				t.Fatal(err)
			}
			f, err := Footprint(ctx, l, Start{Lat: -0.5, Lon: -24.5, Alt: alt}, tab, FootprintOptions{Reserve: reserve, Clearance: 100})
			if err != nil {
				t.Fatal(err)
			}
			return f, tab
		}
		base, _ := run(dir)
		mid := n / 2
		// map(c, r) → image cell
		images := map[string]struct {
			wind float64
			img  func(dc, dr int) (int, int)
		}{
			"quarter turn": {dir + 90, func(dc, dr int) (int, int) { return dr, -dc }},
			"half turn":    {dir + 180, func(dc, dr int) (int, int) { return -dc, -dr }},
			"mirror":       {360 - dir, func(dc, dr int) (int, int) { return -dc, dr }},
		}
		for what, im := range images {
			f, _ := run(im.wind)
			for r := 0; r < n; r++ {
				for c := 0; c < n; c++ {
					ic, ir := im.img(c-mid, r-mid)
					a, b := base.AGL(c, r), f.AGL(ic+mid, ir+mid)
					if (a >= 0) != (b >= 0) && math.Abs(a-b) > 0.05 && !(math.IsNaN(a) && b < 0) && !(math.IsNaN(b) && a < 0) {
						bad[what+": reached on one side only"]++
						continue
					}
					if a >= 0 && b >= 0 && math.Abs(a-b) > 1e-3*(alt-elev-math.Min(a, b))+0.05 {
						bad[what+": arrivals differ"]++
						if bad[what+": arrivals differ"] < 4 {
							t.Logf("case %d %s: cell %d,%d %.3f m, image %.3f m", k, what, c, r, a, b)
						}
					}
				}
			}
		}
		// Any angle: fields.
		alpha := rng.Float64() * 360
		rot, _ := run(dir + alpha)
		mir, _ := run(360 - dir)
		start := geodesy.LatLon{Lat: -0.5, Lon: -24.5}
		for j := 0; j < 6; j++ {
			b := propBearing(rng)
			d := 1000 + rng.Float64()*5000
			p, _, _ := geodesy.Direct(start, b, d)
			pr, _, _ := geodesy.Direct(start, math.Mod(b+alpha, 360), d)
			pm, _, _ := geodesy.Direct(start, math.Mod(360-b, 360), d)
			a0, ok0 := base.ArrivalAtField(p.Lat, p.Lon, elev)
			for what, q := range map[string]struct {
				f  *FootprintResult
				pt geodesy.LatLon
			}{"rotation": {rot, pr}, "mirror (fields)": {mir, pm}} {
				a1, ok1 := q.f.ArrivalAtField(q.pt.Lat, q.pt.Lon, elev)
				if !ok0 || !ok1 || a0 < elev || a1 < elev {
					if (ok0 && a0 >= elev+1) != (ok1 && a1 >= elev+1) && math.Abs(a0-a1) > 1 {
						bad[what+": field reached on one side only"]++
					}
					continue
				}
				if math.Abs(a0-a1) > 0.003*(alt-math.Min(a0, a1))+0.5 {
					bad[what+": field arrivals differ"]++
					t.Logf("case %d %s by %.1f°: field at %.10g° %.0f m: %.2f m, image %.2f m", k, what, alpha, b, d, a0, a1)
				}
			}
		}
	}
	for what, count := range bad {
		t.Errorf("%s: %d times", what, count)
	}
}

func TestInvariantMonotone(t *testing.T) {
	// Monotone (physics, common practice, no source): more altitude never
	// shrinks the footprint (winds below the usable maximum speed); more
	// reserve, clearance, contamination, sinking air or wind uncertainty
	// never grows it; a field reached from altitude h is reached from above
	// h. On random terrains (propTerrain) in random wind. The any-angle
	// search is near-optimal, not optimal (DEVELOPERS.md "Optimality"): a
	// cell counts against a property only when it is off by more than 1 %
	// of the height lost to reach it; those within the band are counted and
	// logged.
	rng := rand.New(rand.NewSource(14))
	ctx := context.Background()
	cases := propCases(8)
	bad := map[string]int{}
	band, pessimistic, endSearch := 0, 0, 0
	for k := 0; k < cases; k++ {
		n := 31 + 2*rng.Intn(6)
		cell := 100 + rng.Float64()*150
		l := propTerrain(rng, n, cell)
		ac := propAircraft(rng)
		w := propWind(t, rng, 10)
		mid := n / 2
		te := l.At(mid, mid)
		alt := te + 300 + rng.Float64()*1200
		reserve := []float64{0, 50, 150, 300}[rng.Intn(4)]
		clearance := []float64{0, 50, 100}[rng.Intn(3)]
		model := func(c Conditions, wp *wind.Profile) LossModel {
			tab, err := NewTable(ac, Atmosphere{}, wp, c, -800, alt+400)
			if err != nil {
				t.Fatal(err)
			}
			return tab
		}
		run := func(h float64, o FootprintOptions, m LossModel) *FootprintResult {
			f, err := Footprint(ctx, l, Start{Lat: -0.5, Lon: -24.5, Alt: h}, m, o)
			if err != nil {
				t.Fatal(err)
			}
			return f
		}
		opts := FootprintOptions{Reserve: reserve, Clearance: clearance}
		nominal := model(Conditions{}, w)
		ref := run(alt, opts, nominal)
		reached := func(f *FootprintResult, i int, level float64) bool { return f.AGL(i%n, i/n) >= level }
		within := func(i int, level float64) bool {
			c, r := i%n, i/n
			return ref.AGL(c, r) >= level-0.01*(alt-l.At(c, r)-level)
		}
		// Bigger footprints: every cell of ref must stay.
		hi := run(alt+50+rng.Float64()*300, opts, nominal)
		// Smaller footprints: no cell outside ref.
		more := opts
		more.Reserve += 50 + rng.Float64()*100
		moreC := opts
		moreC.Clearance += 50 + rng.Float64()*100
		var set []*FootprintResult
		set = append(set, ref)
		for _, pw := range wind.Perturb(w, 15, 3)[1:] {
			set = append(set, run(alt, opts, model(Conditions{}, pw)))
		}
		werr, err := Intersect(set)
		if err != nil {
			t.Fatal(err)
		}
		bugsC := Conditions{Bugs: 0.05 + rng.Float64()*0.3}
		sinkC := Conditions{AirSink: 0.1 + rng.Float64()*0.8}
		bugs := run(alt, opts, model(bugsC, w))
		sink := run(alt, opts, model(sinkC, w))
		smaller := map[string]struct {
			f         *FootprintResult
			level     float64
			c         Conditions
			clearance float64
		}{
			"more reserve": {run(alt, more, nominal), more.Reserve, Conditions{}, clearance}, "more clearance": {run(alt, moreC, nominal), reserve, Conditions{}, moreC.Clearance},
			"contamination": {bugs, reserve, bugsC, clearance}, "sinking air": {sink, reserve, sinkC, clearance}, "wind uncertainty": {werr, reserve, Conditions{}, clearance},
		}
		for i := range ref.Arrival {
			if math.IsNaN(float64(l.Elev[i])) {
				continue
			}
			if reached(ref, i, reserve) && !reached(hi, i, reserve) {
				bad["more altitude lost a cell"]++
			}
			for what, s := range smaller {
				if reached(s.f, i, s.level) && !reached(ref, i, reserve) {
					if within(i, reserve) {
						band++
						continue
					}
					// Off by more than the band: one of the two runs is
					// wrong. Re-fly the gaining path in its own conditions:
					// if it holds, the reference run missed a path (it is
					// pessimistic, the safe side; counted, and bounded by
					// 5 % of the height lost); if not, the gaining run
					// promised too much — a failure.
					c, r := i%n, i/n
					pts, ok := s.f.Path(c, r)
					if !ok {
						bad[what+" gained a cell without a path"]++
						continue
					}
					sx, sy := l.XY(mid, mid)
					pts[0] = [2]float64{sx, sy}
					arr, floor := refly(l, pts, alt, func(h, deg float64) float64 { return stfLoss(ac, Atmosphere{}, w, s.c, h, deg) }, s.clearance, l.At(c, r))
					claimed := float64(s.f.Arrival[i])
					switch {
					case floor > 1 || arr < claimed-(0.002*(alt-claimed)+0.3):
						bad[what+" gained a cell on a path that does not re-fly"]++
						t.Logf("case %d %s: cell %d,%d: re-flown %.2f m (claimed %.2f m), %.2f m below the floor", k, what, c, r, arr, claimed, floor)
					case !(ref.AGL(c, r) >= reserve-0.05*(alt-l.At(c, r)-reserve)):
						// Beyond the 5 % band the reference must have
						// missed the path for the one reason the search
						// has (DEVELOPERS.md "Optimality"): end values
						// (glides below the clearance) are tried straight
						// and bent at every end cell, values above the
						// clearance bent only where a line of sight fails.
						// A run with more clearance, more sink or
						// contamination has more end cells, so a wider
						// search there. Checked: the gaining path bends at
						// a cell that is an end cell in the gaining run
						// and above the clearance (closed) in the
						// reference, and re-flown in the reference's own
						// conditions it keeps the reference's floor and
						// arrives with its reserve — a path the reference
						// could have flown and did not find (pessimistic).
						rarr, rfloor := refly(l, pts, alt, func(h, deg float64) float64 { return stfLoss(ac, Atmosphere{}, w, Conditions{}, h, deg) }, clearance, l.At(c, r))
						if endBendMissed(ref, s.f, pts) && rfloor <= 1 && rarr-l.At(c, r) >= reserve-(0.002*(alt-rarr)+0.3) {
							endSearch++
							t.Logf("case %d %s: cell %d,%d reached %.2f m above ground bending at an end cell; the reference run found %.2f m (its search does not bend there; the path re-flies in its conditions arriving %.2f m above ground)", k, what, c, r, s.f.AGL(c, r), ref.AGL(c, r), rarr-l.At(c, r))
							continue
						}
						bad[what+" gained a cell beyond the 5 % band"]++
						t.Logf("case %d %s: cell %d,%d reached %.2f m above ground, before %.2f m", k, what, c, r, s.f.AGL(c, r), ref.AGL(c, r))
					default:
						pessimistic++
						t.Logf("case %d %s: cell %d,%d reached %.2f m above ground on a path that re-flies; the reference run found %.2f m (pessimistic)", k, what, c, r, s.f.AGL(c, r), ref.AGL(c, r))
					}
				}
			}
		}
		// A field reached from h is reached from above h.
		for j := 0; j < 5; j++ {
			c, r := rng.Intn(n), rng.Intn(n)
			e := l.At(c, r)
			if e != e {
				continue
			}
			x, y := l.XY(c, r)
			lat, lon := l.Frame.Inverse(x, y)
			if a, ok := ref.ArrivalAtField(lat, lon, e); ok && a >= e+reserve {
				if b, ok := hi.ArrivalAtField(lat, lon, e); !ok || b < e+reserve {
					bad["a field reached from h is not reached from higher"]++
					t.Logf("case %d: field at cell %d,%d: arrival %.2f m from %.0f m, %.2f m from higher", k, c, r, a-e, alt, b-e)
				}
			}
		}
	}
	t.Logf("cells within the 1 %% near-optimality band: %d; beyond it on the pessimistic side (re-flown, within 5 %%): %d; beyond 5 %% where the reference's search does not bend at the gaining path's end-cell bend (re-flown in its conditions): %d", band, pessimistic, endSearch)
	for what, count := range bad {
		t.Errorf("%s: %d times", what, count)
	}
}

// squareDeficit flies the bend points pts (frame metres, start first) from
// h0 at the constant loss 1/ratio and samples every segment every 1/64 of
// a cell, reading the ground of the cell whose square holds the sample (a
// cell's value covers its whole square: the "RasterPixelIsArea" convention
// of the OGC GeoTIFF standard). It returns the worst deficit below the
// terrain floor t + min(clearance, h − eDest) of the samples, +Inf where a
// sample lies over a void or off the window. The cell squares of the
// segments' ends are left out (the solver checks a cell at its own value).
func squareDeficit(l *terrain.Local, pts [][2]float64, h0, ratio, clearance, eDest float64) float64 {
	worst := math.Inf(-1)
	h := h0
	for k := 0; k+1 < len(pts); k++ {
		ax, ay := (pts[k][0]-l.X0)/l.Cell, (pts[k][1]-l.Y0)/l.Cell
		bx, by := (pts[k+1][0]-l.X0)/l.Cell, (pts[k+1][1]-l.Y0)/l.Cell
		L := math.Hypot(bx-ax, by-ay)
		steps := int(math.Ceil(L * 64))
		ac, ar := int(math.Round(ax)), int(math.Round(ay))
		bc, br := int(math.Round(bx)), int(math.Round(by))
		for i := 1; i < steps; i++ {
			f := float64(i) / float64(steps)
			x, y := ax+(bx-ax)*f, ay+(by-ay)*f
			c, r := int(math.Round(x)), int(math.Round(y))
			if (c == ac && r == ar) || (c == bc && r == br) {
				continue
			}
			hh := h - f*L*l.Cell/ratio
			if c < 0 || r < 0 || c >= l.Cols || r >= l.Rows || l.Elev[r*l.Cols+c] != l.Elev[r*l.Cols+c] {
				return math.Inf(1)
			}
			t := float64(l.Elev[r*l.Cols+c])
			worst = math.Max(worst, t+math.Min(clearance, hh-eDest)-hh)
		}
		h -= L * l.Cell / ratio
	}
	return worst
}

func TestSightThinFeatureBetweenNeighbourLines(t *testing.T) {
	// Regression (issue 11): the O(1) line-of-sight test that read the two
	// cells beside a line one step back toward its parent (the "XDraw"
	// scheme) let straight lines thread a feature one cell thick lying
	// between the lines those cells were checked along: a single void cell,
	// a wall of five cells nearly parallel to the line, a diagonal wall of
	// four. These geometries were found by a search on that code; each
	// gave a straight glide from the start across the feature's square
	// (the void one: to cell 0,5 across void cell 13,15). Flat ground at
	// 100 m, 41 × 41 cells of 200 m, start 1500 m MSL at the centre, glide
	// ratio 30, reserve and clearance 100 m. Every reached cell's path must
	// keep the floor, re-flown by refly (ground linear between cell centres
	// at the crossings) and by squareDeficit (each cell's ground over its
	// whole square), within 1 m (float rounding of the bend points).
	nan := math.NaN()
	for _, tc := range []struct {
		name  string
		cells [][2]int
		elev  float64
	}{
		{"one void cell", [][2]int{{13, 15}}, nan},
		{"one wall cell", [][2]int{{30, 6}}, 1600},
		{"wall nearly along the line", [][2]int{{19, 26}, {19, 27}, {19, 28}, {19, 29}, {19, 30}}, 1600},
		{"diagonal wall", [][2]int{{30, 16}, {29, 17}, {28, 18}, {27, 19}}, 1600},
		{"diagonal void", [][2]int{{29, 20}, {28, 21}, {27, 22}}, nan},
	} {
		t.Run(tc.name, func(t *testing.T) {
			const n, cell, ratio, h0, clearance = 41, 200.0, 30.0, 1500.0, 100.0
			l := flatWindow(-0.5, -24.5, n, cell, 100)
			l.Flat = false
			for _, c := range tc.cells {
				l.Elev[c[1]*n+c[0]] = float32(tc.elev)
			}
			f, err := Footprint(context.Background(), l, Start{Lat: -0.5, Lon: -24.5, Alt: h0}, ConstantLoss(ratio), FootprintOptions{Reserve: 100, Clearance: clearance})
			if err != nil {
				t.Fatal(err)
			}
			sx, sy := l.XY(n/2, n/2)
			reached, bad := 0, 0
			for i := range f.Arrival {
				c, r := i%n, i/n
				if !(f.AGL(c, r) >= 0) {
					continue
				}
				reached++
				pts, ok := f.Path(c, r)
				if !ok {
					t.Fatalf("cell %d,%d reached without a path", c, r)
				}
				pts[0] = [2]float64{sx, sy}
				_, lin := refly(l, pts, h0, func(h, deg float64) float64 { return 1 / ratio }, clearance, l.At(c, r))
				sq := squareDeficit(l, pts, h0, ratio, clearance, l.At(c, r))
				if lin > 1 || sq > 1 {
					bad++
					if bad <= 3 {
						t.Errorf("cell %d,%d: path %v passes %.1f m (linear ground) / %.1f m (cell squares) below the floor", c, r, pts, lin, sq)
					}
				}
			}
			if bad > 0 {
				t.Errorf("%d of %d reached cells on paths below the floor", bad, reached)
			}
			if reached < n*n/2 {
				t.Errorf("only %d of %d cells reached", reached, n*n)
			}
		})
	}
}

// endBendMissed reports whether the path pts (frame metres, start first)
// of footprint gain bends at a cell that gain reached below its clearance
// (an end cell, searched straight and bent) and ref reached above its own
// (a closed cell, where ref bends only where a line of sight fails).
func endBendMissed(ref, gain *FootprintResult, pts [][2]float64) bool {
	prop := func(f *FootprintResult) *propagation {
		if f.members != nil {
			return f.members[0].prop
		}
		return f.prop
	}
	rp, gp := prop(ref), prop(gain)
	if rp == nil || gp == nil {
		return false
	}
	l := ref.Ground
	for _, v := range pts[1 : len(pts)-1] {
		c, r, ok := l.CellOf(v[0], v[1])
		if !ok {
			continue
		}
		i := r*l.Cols + c
		if st := gp.c[i].st(); (st == cellEnd || st == cellEndDone) && rp.c[i].st() == cellClosed {
			return true
		}
	}
	return false
}
