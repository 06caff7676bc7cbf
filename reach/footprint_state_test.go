package reach

import (
	"context"
	"fmt"
	"math"
	"testing"

	"glidereach/reach/transition"
	"glidereach/terrain"
)

// stateSectors converts transition sectors to sector starts around
// (lat0, lon0) at altitude alt.
func stateSectors(l *terrain.Local, lat0, lon0, alt float64, ss []transition.Sector) []SectorStart {
	x0, y0 := l.Frame.Forward(lat0, lon0)
	out := make([]SectorStart, len(ss))
	for i, s := range ss {
		lat, lon := l.Frame.Inverse(x0+s.East, y0+s.North)
		out[i] = SectorStart{TrackDeg: s.TrackDeg, HalfDeg: s.HalfDeg, Start: Start{Lat: lat, Lon: lon, Alt: alt - s.Height}}
	}
	return out
}

// reachAlong returns the farthest distance (m) from the start's cell
// straight south (bearing 180) or north at which the arrival keeps agl.
func reachAlong(f *FootprintResult, north bool, agl float64) float64 {
	g := f.Ground
	c := int(math.Round(f.StartX))
	r0 := int(math.Round(f.StartY))
	best := 0.0
	for r := 0; r < g.Rows; r++ {
		if north != (r > r0) {
			continue
		}
		if f.AGL(c, r) >= agl {
			best = math.Max(best, math.Abs(float64(r)-f.StartY)*g.Cell)
		}
	}
	return best
}

// With every sector starting where the failure is, at its altitude (no
// reaction, no turn loss, no credit), the footprint is today's, cell for
// cell.
func TestFootprintFromStateNoLossEqualsFootprint(t *testing.T) {
	l := flatWindow(0, 0, 301, 60, 0)
	st := Start{Lat: 0, Lon: 0, Alt: 1000}
	opts := FootprintOptions{Reserve: 300}
	plain, err := Footprint(context.Background(), l, st, ConstantLoss(9), opts)
	if err != nil {
		t.Fatal(err)
	}
	var secs []SectorStart
	for k := 0; k < 12; k++ {
		secs = append(secs, SectorStart{TrackDeg: float64(k) * 30, HalfDeg: 15, Start: st})
	}
	got, err := FootprintFromState(context.Background(), l, st, secs, ConstantLoss(9), opts)
	if err != nil {
		t.Fatal(err)
	}
	diff := 0
	for i := range plain.Arrival {
		a, b := plain.Arrival[i], got.Arrival[i]
		if a != b && !(a != a && b != b) {
			diff++
		}
	}
	if diff > 1 { // the start cell itself has no bearing
		t.Errorf("%d cells differ", diff)
	}
	if a, _ := plain.ArrivalAt(0.03, 0.02); true {
		b, _ := got.ArrivalAt(0.03, 0.02)
		if math.Abs(a-b) > 1e-3 {
			t.Errorf("ArrivalAt %v vs %v", b, a)
		}
	}
}

// A field lower than the ground the grid has there (a quarry floor, a
// surveyed field elevation): the terrain floor takes the field's elevation
// for a footprint from a failure state as for a plain one. Where the glide
// is below the 100 m clearance, a landing 50 m below the grid's ground is
// not reached by a glide whose low part is over that ground (DEVELOPERS.md
// "Reserve and clearance").
func TestFootprintFromStateFieldBelowGround(t *testing.T) {
	l := flatWindow(0, 0, 301, 60, 0)
	st := Start{Lat: 0, Lon: 0, Alt: 1000}
	opts := FootprintOptions{Reserve: 0, Clearance: 100}
	plain, err := Footprint(context.Background(), l, st, ConstantLoss(9), opts)
	if err != nil {
		t.Fatal(err)
	}
	secs := []SectorStart{{TrackDeg: 90, HalfDeg: 180, Start: st}}
	got, err := FootprintFromState(context.Background(), l, st, secs, ConstantLoss(9), opts)
	if err != nil {
		t.Fatal(err)
	}
	lat, lon := l.Frame.Inverse((1000-60)*9, 0) // 60 m above the flat ground
	for _, tc := range []struct {
		elev float64
		ok   bool
	}{{0, true}, {-50, false}} {
		a, aok := plain.ArrivalAtField(lat, lon, tc.elev)
		b, bok := got.ArrivalAtField(lat, lon, tc.elev)
		if aok != tc.ok || bok != tc.ok || aok && math.Abs(a-b) > 1e-3 {
			t.Errorf("field at %.0f m: from the state %.1f m (%v), plain %.1f m (%v); want reached %v", tc.elev, b, bok, a, aok, tc.ok)
		}
	}
}

// A failure heading north in calm air over flat ground: the reach behind
// (south) is today's less exactly the turn's loss (the half turn, plus the
// half-sector charge) times the glide ratio and the displacement of the
// reaction, speed change and turn; ahead it is today's plus the forward
// displacement and the energy credit. Closed forms: the energy height and
// turn relations of Anderson, Introduction to Flight, ch. 6 (from memory),
// checked in reach/transition; the circle of radius (h − reserve)·E around
// each sector start (flat still air, E constant).
func TestFootprintFromStateHalfTurn(t *testing.T) {
	const E, alt, reserve = 9.0, 1500.0, 300.0
	l := flatWindow(0, 0, 461, 60, 0)
	st := Start{Lat: 0, Lon: 0, Alt: alt}
	opts := FootprintOptions{Reserve: reserve}
	v := 33.4
	f := transition.Failure{Heading: 0, FailTAS: 50, FailSink: 50 / 6.0, GlideTAS: v, GlideSink: v / E,
		ReactionTime: 3, Efficiency: 0.5, Bank: 30}
	ss, err := f.Sectors(12, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	got, err := FootprintFromState(context.Background(), l, st, stateSectors(l, 0, 0, alt, ss), ConstantLoss(E), opts)
	if err != nil {
		t.Fatal(err)
	}
	plain, err := Footprint(context.Background(), l, st, ConstantLoss(E), opts)
	if err != nil {
		t.Fatal(err)
	}
	// Behind: the sector of track 180 turning right (the first of them).
	var s transition.Sector
	for _, x := range ss {
		if x.TrackDeg == 180 {
			s = x
			break
		}
	}
	R := (alt - s.Height - reserve) * E
	wantBehind := math.Sqrt(R*R-s.East*s.East) - s.North
	today := reachAlong(plain, false, reserve)
	behind := reachAlong(got, false, reserve)
	cell := l.Cell
	if math.Abs(behind-wantBehind) > 1.5*cell {
		t.Errorf("behind %.0f m, want %.0f m (today %.0f m; turn and half-sector %.1f m of height, displacement %.0f m north %.0f m east)",
			behind, wantBehind, today, s.Height, s.North, s.East)
	}
	if math.Abs((today-behind)-(today-wantBehind)) > 1.5*cell || !(today-behind > s.Height*E) {
		t.Errorf("shortened by %.0f m, want %.0f m", today-behind, today-wantBehind)
	}
	// Ahead: the sector of track 000, no turn.
	a := ss[0]
	if a.TrackDeg != 0 || math.Abs(a.TurnDeg) > 1e-6 {
		t.Errorf("turn ahead %v°", a.TurnDeg)
	}
	Ra := (alt - a.Height - reserve) * E
	wantAhead := math.Sqrt(Ra*Ra-a.East*a.East) + a.North
	if ahead := reachAlong(got, true, reserve); math.Abs(ahead-wantAhead) > 1.5*cell || !(ahead > today) {
		t.Errorf("ahead %.0f m, want %.0f m (today %.0f m)", ahead, wantAhead, today)
	}
}

// The classic case: a failure climbing out at 150–300 m above the runway
// (heading 360, the runway behind). Turning back needs the half turn's
// loss and the distance flown out; from 150 m it is not possible, from
// higher it may be. The footprint decides at the runway threshold behind
// the aircraft, and the result agrees with the closed form of the sector.
func TestTurnBackAfterTakeOff(t *testing.T) {
	const E = 9.0
	l := flatWindow(0, 0, 201, 20, 0)
	v := 33.4
	// Climbing out at the glide speed (no energy to trade), 3 s reaction.
	f := transition.Failure{Heading: 0, FailTAS: v, FailSink: v / E, GlideTAS: v, GlideSink: v / E, ReactionTime: 3, Bank: 30}
	ss, err := f.Sectors(12, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	// The runway: 1500 m behind the failure point (the climb-out so far).
	rwLat, rwLon := l.Frame.Inverse(0, -1500)
	possible := func(h float64) bool {
		st := Start{Lat: 0, Lon: 0, Alt: h}
		res, err := FootprintFromState(context.Background(), l, st, stateSectors(l, 0, 0, h, ss), ConstantLoss(E), FootprintOptions{Reserve: 0})
		if err != nil {
			t.Fatal(err)
		}
		a, ok := res.ArrivalAt(rwLat, rwLon)
		return ok && a >= 0
	}
	// Closed form: the least, over the sectors whose cone holds the
	// runway as seen from their start, of the sector's loss plus the glide
	// from its start to the runway, |(0, −1500) − (E_s, N_s)| / E. (After a
	// half turn the aircraft is 2r to the side, so the sector that points at
	// the runway has turned a little more than 180°.)
	need := math.Inf(1)
	for _, s := range ss {
		b := math.Atan2(0-s.East, -1500-s.North) * 180 / math.Pi
		if d := math.Mod(b-s.TrackDeg+540, 360) - 180; math.Abs(d) <= s.HalfDeg {
			need = math.Min(need, s.Height+math.Hypot(s.East, -1500-s.North)/E)
		}
	}
	if need < 150 || need > 400 {
		t.Fatalf("turn-back height %.0f m outside the plausible 150..400 m", need)
	}
	if possible(150) {
		t.Errorf("turn back possible from 150 m (needs %.0f m)", need)
	}
	if !possible(need + 5) {
		t.Errorf("turn back not possible from %.0f m (needs %.0f m)", need+5, need)
	}
	if possible(need - 5) {
		t.Errorf("turn back possible from %.0f m (needs %.0f m)", need-5, need)
	}
}

// BenchmarkFootprintFromState: the footprint from a failure state (24
// tracks each way, as the command builds them) on a 600×600 window of the
// synthetic landscape in layered wind. Each sector runs on the box its
// cone can hold, not on the whole window.
func BenchmarkFootprintFromState(b *testing.B) {
	const n = 600
	l, tab := benchSetup(b, n)
	v := 45.0
	f := transition.Failure{Heading: 250 * math.Pi / 180, FailTAS: v, FailSink: 1.2, GlideTAS: 30, GlideSink: 0.8, ReactionTime: 3, Efficiency: 0.5, Bank: 30}
	ss, err := f.Sectors(24, 0, 0)
	if err != nil {
		b.Fatal(err)
	}
	st := Start{Lat: terrain.SyntheticLat, Lon: terrain.SyntheticLon, Alt: 1200}
	secs := stateSectors(l, st.Lat, st.Lon, st.Alt, ss)
	b.ReportAllocs()
	b.ResetTimer()
	stop := cpuMeter(b, n*n)
	for i := 0; i < b.N; i++ {
		if _, err := FootprintFromState(context.Background(), l, st, secs, tab, FootprintOptions{Reserve: 300, Clearance: 100}); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	stop()
	b.ReportMetric(float64(len(secs)), "sectors")
}

// fullWindowFromState is FootprintFromState as it was first written, each
// sector run on the whole window: the reference the cropped runs are
// checked against.
func fullWindowFromState(t *testing.T, l *terrain.Local, secs []SectorStart, model LossModel, opts FootprintOptions) []float32 {
	t.Helper()
	out := make([]float32, len(l.Elev))
	for i := range out {
		out[i] = float32(math.NaN())
	}
	for _, s := range secs {
		m, err := Footprint(context.Background(), l, s.Start, model, opts)
		if err != nil {
			continue
		}
		for r := 0; r < l.Rows; r++ {
			for c := 0; c < l.Cols; c++ {
				i := r*l.Cols + c
				a := m.Arrival[i]
				dx, dy := float64(c)-m.StartX, float64(r)-m.StartY
				if a != a || dx == 0 && dy == 0 || !s.inCone(math.Atan2(dx, dy)*180/math.Pi) {
					continue
				}
				if cur := out[i]; cur != cur || a > cur {
					out[i] = a
				}
			}
		}
	}
	return out
}

// neverAboveWholeWindow compares a FootprintFromState result's arrivals
// (got) with those of whole-window runs of the same sectors (want, from
// fullWindowFromState): it fails the test at a cell reached where want
// reaches nothing or arriving higher than want, and returns, over the cells
// want reaches, how many arrive the same, how many got does not reach and
// the largest drop (m).
func neverAboveWholeWindow(t *testing.T, name string, got, want []float32) (same, n, lost int, drop float64) {
	t.Helper()
	for i, w := range want {
		g := got[i]
		if w != w {
			if g == g {
				t.Fatalf("%s: cell %d reached (%.1f m) where whole-window runs reach nothing", name, i, g)
			}
			continue
		}
		n++
		switch {
		case g != g:
			lost++
		case g > w:
			t.Fatalf("%s: cell %d arrives at %.2f m, above the whole-window runs' %.2f m", name, i, g, w)
		case g == w:
			same++
		default:
			drop = math.Max(drop, float64(w-g))
		}
	}
	return same, n, lost, drop
}

// Each sector runs on the box its cone can hold (speed); that may only
// lower an arrival, never raise one, and on flat ground (straight glides
// only) it changes nothing. The reference is the same sectors run on the
// whole window.
func TestFootprintFromStateCropIsConservative(t *testing.T) {
	f := transition.Failure{Heading: 250 * math.Pi / 180, FailTAS: 50, FailSink: 2, GlideTAS: 33, GlideSink: 33.0 / 9, ReactionTime: 3, Efficiency: 0.5, Bank: 30}
	ss, err := f.Sectors(24, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	opts := FootprintOptions{Reserve: 100, Clearance: 100}
	for _, tc := range []struct {
		name  string
		l     *terrain.Local
		alt   float64
		exact bool
	}{
		{"flat", flatWindow(-0.5, -24.5, 181, 60, 0), 800, true},
		{"hills", hillyWindow(181, 60, 3), 900, false},
	} {
		if raceEnabled && !tc.exact {
			continue // under -race the flat case exercises the sectors' goroutines; the hills run in the plain go test
		}
		lat, lon := tc.l.Frame.Inverse(tc.l.X0+90*60, tc.l.Y0+90*60)
		st := Start{Lat: lat, Lon: lon, Alt: tc.alt}
		secs := stateSectors(tc.l, lat, lon, tc.alt, ss)
		got, err := FootprintFromState(context.Background(), tc.l, st, secs, ConstantLoss(9), opts)
		if err != nil {
			t.Fatal(err)
		}
		want := fullWindowFromState(t, tc.l, secs, ConstantLoss(9), opts)
		same, n, _, _ := neverAboveWholeWindow(t, tc.name, got.Arrival, want)
		if n == 0 {
			t.Fatalf("%s: nothing reached", tc.name)
		}
		if tc.exact && same != n {
			t.Errorf("%s: %d of %d cells differ from the whole-window runs", tc.name, n-same, n)
		}
		if !tc.exact && float64(same) < 0.999*float64(n) {
			t.Errorf("%s: only %d of %d cells equal the whole-window runs", tc.name, same, n)
		}
		t.Logf("%s: %d of %d reached cells equal the whole-window runs", tc.name, same, n)
	}
}

// TestFootprintFromStateBehindWallNeverHigher is the never-optimistic
// property of the sectors' crop (each sector searched only on its cone's
// box, widened by coneBoxPad) where it matters most: three hilly
// landscapes, each with a wall 700 m high a few cells from the failure
// point that glides must bend around, two failure headings each. No cell
// may arrive higher than the whole-window runs of the same sectors, nor be
// reached where they reach nothing. The crop does lose bent glides that
// leave the box: on these cases up to 5.7 % of the reached cells arrive
// lower (by up to 149 m) and up to 0.5 % are not reached (measured when
// the test was written; DEVELOPERS.md "Footprint from a failure state"),
// so the test also holds the crop to those losses, a guard against a
// tighter crop that loses more (a crop to the cone itself, widened by the
// same pad, lost up to 27 % and was not kept).
func TestFootprintFromStateBehindWallNeverHigher(t *testing.T) {
	if raceEnabled {
		t.Skip("whole-window reference runs are slow under -race; the plain go test runs this")
	}
	opts := FootprintOptions{Reserve: 100, Clearance: 100}
	for seed := 1; seed <= 3; seed++ {
		l := hillyWindow(121, 60, seed)
		// A wall 700 m high across the middle half of the window's rows, a
		// few cells east of the failure point, open at both ends.
		for r := 40; r < 100; r++ {
			l.Elev[r*l.Cols+70+seed] = 900
		}
		lat, lon := l.Frame.Inverse(l.X0+60*60, l.Y0+60*60)
		for _, hdg := range []float64{80, 200 + 30*float64(seed)} {
			f := transition.Failure{Heading: hdg * math.Pi / 180, FailTAS: 50, FailSink: 2, GlideTAS: 33, GlideSink: 33.0 / 9, ReactionTime: 3, Efficiency: 0.5, Bank: 30}
			ss, err := f.Sectors(24, 0, 0)
			if err != nil {
				t.Fatal(err)
			}
			secs := stateSectors(l, lat, lon, 950, ss)
			got, err := FootprintFromState(context.Background(), l, Start{Lat: lat, Lon: lon, Alt: 950}, secs, ConstantLoss(9), opts)
			if err != nil {
				t.Fatal(err)
			}
			want := fullWindowFromState(t, l, secs, ConstantLoss(9), opts)
			name := fmt.Sprintf("seed %d heading %v", seed, hdg)
			same, n, lost, drop := neverAboveWholeWindow(t, name, got.Arrival, want)
			t.Logf("seed %d heading %v: %d of %d equal, %d lost, largest drop %.1f m", seed, hdg, same, n, lost, drop)
			if n == 0 || float64(same) < 0.93*float64(n) || float64(lost) > 0.01*float64(n) {
				t.Errorf("seed %d heading %v: %d of %d reached cells equal the whole-window runs, %d not reached", seed, hdg, same, n, lost)
			}
		}
	}
}
