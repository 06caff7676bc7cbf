package transition

import (
	"math"
	"testing"
)

func failure() Failure {
	return Failure{Heading: 0, FailTAS: 55, FailSink: 6, GlideTAS: 34, GlideSink: 3.6,
		ReactionTime: 3, Efficiency: 0.5, Bank: 30}
}

// The stages add up to their closed forms (Anderson, ch. 6: energy height
// and turn relations, from memory): reaction V·t ahead and w·t lost; the
// speed change (V₁ − V₂)/a long at the mean speed with η(V₁² − V₂²)/(2g)
// credited; a half turn at the glide's C_L.
func TestSequenceStraightBack(t *testing.T) {
	f := failure()
	seq, err := f.WithTurn(math.Pi, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	td := (55.0 - 34) / DefaultDeceleration
	tr, _ := NewTurn(30, 34, 3.6)
	wantN := 55*3 + (55.0+34)/2*td
	near(t, "north", seq.North, wantN, 1e-9)
	near(t, "east", seq.East, 2*tr.Radius, 1e-9)
	wantH := 6*3 - 0.5*(55*55-34*34)/(2*G0) + tr.HeightLost(math.Pi)
	near(t, "height", seq.Height, wantH, 1e-9)
	near(t, "time", seq.Time, 3+td+math.Pi/tr.Rate, 1e-9)
}

// Toward a point straight ahead there is no turn; toward a point behind, a
// half turn (the track back passes 2r to the side of the failure point, so
// the turn is a little short of 180°).
func TestToward(t *testing.T) {
	f := failure()
	seq, track, ok, err := f.Toward(0, 20000, 0, 0)
	if err != nil || !ok {
		t.Fatal(err, ok)
	}
	near(t, "turn ahead", seq.TurnAngle, 0, 1e-9)
	near(t, "track ahead", track, 0, 1e-9)
	seq, track, ok, err = f.Toward(0, -20000, 0, 0)
	if err != nil || !ok {
		t.Fatal(err, ok)
	}
	if math.Abs(seq.TurnAngle) < 0.95*math.Pi {
		t.Errorf("turn back %v rad, want near π", seq.TurnAngle)
	}
	// The glide after roll-out points at the target.
	want := math.Atan2(0-seq.East, -20000-seq.North)
	near(t, "track back", Wrap(track-want), 0, 1e-6)
	near(t, "heading = track in calm", Wrap(seq.Heading-track), 0, 1e-6)
	// In a crosswind the heading is corrected by asin(Wc/V) and the track
	// still points at the target.
	seq, track, ok, _ = f.Toward(0, 20000, 5, 0)
	if !ok {
		t.Fatal("crosswind not ok")
	}
	near(t, "crosswind drift", Wrap(track-seq.Heading), math.Asin(5*math.Cos(track)/34), 1e-6)
}

func TestFailureValidate(t *testing.T) {
	for name, mod := range map[string]func(*Failure){
		"bank":       func(f *Failure) { f.Bank = 70 },
		"reaction":   func(f *Failure) { f.ReactionTime = -1 },
		"efficiency": func(f *Failure) { f.Efficiency = 1.5 },
		"speed":      func(f *Failure) { f.FailTAS = 0 },
	} {
		f := failure()
		mod(&f)
		if f.Validate() == nil {
			t.Errorf("%s: accepted", name)
		}
	}
}
