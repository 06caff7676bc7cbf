package transition

import (
	"math"
	"testing"
)

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.Abs(got-want) > tol {
		t.Errorf("%s = %.6g, want %.6g (±%g)", what, got, want, tol)
	}
}

// The bank-angle table of REFERENCES.md §4: the example polar flown at its
// least-sink C_L (V0 = 17.1553 m/s, w0 = 0.70684 m/s). Source: the turn
// relations n = 1/cos φ, r = V²/(g tan φ) of Anderson, Introduction to
// Flight, ch. 6 (from memory) and the n^{3/2} sink rule of Welch, Welch and
// Irving, The Complete Soaring Pilot's Handbook; table values recomputed.
func TestTurnTable(t *testing.T) {
	v0, w0 := 17.1553, 0.70684
	for _, c := range []struct{ bank, n, v, r, w, t360, dh float64 }{
		{15, 1.03528, 17.4553, 115.952, 0.7446, 41.738, 31.077},
		{30, 1.15470, 18.4346, 60.021, 0.8771, 20.458, 17.942},
		{45, 1.41421, 20.4012, 42.441, 1.1888, 13.071, 15.539},
		{60, 2.00000, 24.2613, 34.653, 1.9993, 8.975, 17.942},
	} {
		tr, err := NewTurn(c.bank, v0, w0)
		if err != nil {
			t.Fatal(err)
		}
		near(t, "n", tr.N, c.n, 1e-5)
		near(t, "V", tr.TAS, c.v, 1e-3)
		near(t, "r", tr.Radius, c.r, 2e-3)
		near(t, "sink", tr.Sink, c.w, 1e-4)
		near(t, "T360", tr.Time(2*math.Pi), c.t360, 2e-3)
		near(t, "dh360", tr.HeightLost(2*math.Pi), c.dh, 2e-3)
		// Closed form of the loss per full turn: 4π·V0·w0/(g·sin 2φ).
		phi := c.bank * math.Pi / 180
		near(t, "dh360 closed form", tr.HeightLost(2*math.Pi), 4*math.Pi*v0*w0/(G0*math.Sin(2*phi)), 1e-9)
		// ω·r = V (kinematics of a circle).
		near(t, "ω r", tr.Rate*tr.Radius, tr.TAS, 1e-9)
	}
}

// The imperial table quoted on the St Olaf College soaring pages from Welch,
// Welch and Irving (REFERENCES.md §4): L/D 26 at 46 mph, 30° bank: radius
// 283 ft, 25 s per turn, 79 ft lost per turn.
func TestTurnImperialTable(t *testing.T) {
	const ft, mph = 0.3048, 0.44704
	v0 := 46 * mph
	tr, err := NewTurn(30, v0, v0/26)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "radius ft", tr.Radius/ft, 283, 0.6)
	near(t, "time s", tr.Time(2*math.Pi), 25, 0.6)
	near(t, "loss ft", tr.HeightLost(2*math.Pi)/ft, 79, 0.6)
}

func TestNewTurnRange(t *testing.T) {
	for _, b := range []float64{0, 9.9, 60.1, math.NaN()} {
		if _, err := NewTurn(b, 30, 1); err == nil {
			t.Errorf("bank %v accepted", b)
		}
	}
	if _, err := NewTurn(30, 0, 1); err == nil {
		t.Error("zero speed accepted")
	}
}

// Geometry of a circle (no source needed beyond the definition): a full
// turn in calm air ends where it began; a half turn to the right from north
// ends 2r east; in wind the end moves by W·t.
func TestTurnDisplacement(t *testing.T) {
	tr, _ := NewTurn(30, 30, 1.5)
	e, n := tr.Displacement(0, 2*math.Pi, 0, 0)
	near(t, "full turn east", e, 0, 1e-9)
	near(t, "full turn north", n, 0, 1e-9)
	e, n = tr.Displacement(0, math.Pi, 0, 0)
	near(t, "half turn right east", e, 2*tr.Radius, 1e-9)
	near(t, "half turn right north", n, 0, 1e-9)
	e, n = tr.Displacement(0, -math.Pi, 0, 0)
	near(t, "half turn left east", e, -2*tr.Radius, 1e-9)
	e, n = tr.Displacement(0, math.Pi/2, 0, 0)
	near(t, "quarter east", e, tr.Radius, 1e-9)
	near(t, "quarter north", n, tr.Radius, 1e-9)
	e, n = tr.Displacement(math.Pi/2, math.Pi, 3, -4)
	tt := tr.Time(math.Pi)
	near(t, "drift east", e, 0+3*tt, 1e-9)
	near(t, "drift north", n, -2*tr.Radius-4*tt, 1e-9)
}

// Energy height h + V²/(2g) (Anderson, Introduction to Flight, ch. 6, energy
// height, from memory): slowing from 60 to 30 m/s frees (3600 − 900)/(2g).
func TestEnergy(t *testing.T) {
	near(t, "energy height", EnergyHeight(1000, 50), 1000+2500/(2*9.80665), 1e-9)
	full := (3600.0 - 900) / (2 * 9.80665)
	near(t, "credit η=1", EnergyCredit(60, 30, 1), full, 1e-9)
	near(t, "credit η=0.5", EnergyCredit(60, 30, 0.5), full/2, 1e-9)
	near(t, "credit η=0", EnergyCredit(60, 30, 0), 0, 0)
	// Speeding up is charged in full whatever η.
	near(t, "speed-up", EnergyCredit(30, 60, 0.2), -full, 1e-9)
}

// The wind triangle (common practice of air navigation, no source): drift
// asin(crosswind/TAS), ground speed √(V² − Wc²) + Wt.
func TestHeadingFor(t *testing.T) {
	// Track north, wind blowing towards the east at 10 m/s (from the west,
	// i.e. from the left), TAS 30.
	hd, dr, g, ok := HeadingFor(0, 30, 10, 0)
	if !ok {
		t.Fatal("not ok")
	}
	near(t, "drift", dr, math.Asin(10.0/30), 1e-12)
	near(t, "heading", hd, -math.Asin(10.0/30), 1e-12)
	near(t, "ground", g, math.Sqrt(800), 1e-12)
	// Headwind: air moving south at 10 on a north track.
	_, dr, g, _ = HeadingFor(0, 30, 0, -10)
	near(t, "drift head", dr, 0, 1e-12)
	near(t, "ground head", g, 20, 1e-12)
	if _, _, _, ok := HeadingFor(0, 30, 0, -31); ok {
		t.Error("no headway accepted")
	}
}

func TestWrap(t *testing.T) {
	for _, c := range [][2]float64{{0, 0}, {math.Pi, math.Pi}, {-math.Pi, math.Pi}, {3 * math.Pi / 2, -math.Pi / 2}, {-5 * math.Pi / 2, -math.Pi / 2}} {
		near(t, "wrap", Wrap(c[0]), c[1], 1e-12)
	}
}
