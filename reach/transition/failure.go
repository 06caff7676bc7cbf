package transition

import (
	"fmt"
	"math"
)

// Failure is the aircraft's state at the engine failure and how the pilot
// flies the first seconds. Speeds are true airspeeds at the failure
// altitude (the caller converts from IAS).
type Failure struct {
	Heading float64 // radians true, the heading held at the failure
	// FailTAS is the true airspeed at the failure (m/s); FailSink the
	// polar's sink at that speed (m/s), engine off.
	FailTAS, FailSink float64
	// GlideTAS and GlideSink are the straight glide the pilot settles on
	// after slowing down (m/s): the speed to fly or the approach speed.
	GlideTAS, GlideSink float64
	// ReactionTime (s, 0..MaxReactionTime) is flown on the heading at the
	// failure speed with its sink.
	ReactionTime float64
	// Efficiency (0..1) of the energy trade; 0 gives no credit.
	Efficiency float64
	// Bank is the bank angle of the turn, degrees (MinBank..MaxBank).
	Bank float64
	// Deceleration (m/s², > 0) while changing speed; 0 means
	// DefaultDeceleration.
	Deceleration float64
	// Delay (s, ≥ 0) is further straight flight on the heading at the glide
	// speed after the speed change, before the turn: how long the pilot
	// waits before turning. 0 for the plan; the approach planner varies it
	// to find the last moment a plan still holds.
	Delay float64
}

// Validate reports a Failure whose values are out of range, with the reason.
func (f Failure) Validate() error {
	pos := func(v float64) bool { return v > 0 && !math.IsInf(v, 0) }
	switch {
	case !pos(f.FailTAS) || !pos(f.GlideTAS):
		return fmt.Errorf("%w: failure %v m/s, glide %v m/s", ErrSpeed, f.FailTAS, f.GlideTAS)
	case !(f.FailSink >= 0) || !(f.GlideSink >= 0) || math.IsInf(f.FailSink, 0) || math.IsInf(f.GlideSink, 0):
		return fmt.Errorf("%w: sink %v / %v m/s", ErrSpeed, f.FailSink, f.GlideSink)
	case !(f.ReactionTime >= 0 && f.ReactionTime <= MaxReactionTime):
		return fmt.Errorf("%w: %v s (allowed 0..%g s)", ErrReaction, f.ReactionTime, MaxReactionTime)
	case !(f.Efficiency >= 0 && f.Efficiency <= 1):
		return fmt.Errorf("%w: %v (allowed 0..1)", ErrEff, f.Efficiency)
	case !(f.Bank >= MinBank && f.Bank <= MaxBank):
		return fmt.Errorf("%w: %v° (allowed %g..%g°)", ErrBank, f.Bank, MinBank, MaxBank)
	case !(f.Delay >= 0) || math.IsInf(f.Delay, 0):
		return fmt.Errorf("%w: delay %v s", ErrReaction, f.Delay)
	case !(f.Deceleration >= 0) || math.IsInf(f.Deceleration, 0):
		return fmt.Errorf("%w: deceleration %v m/s²", ErrSpeed, f.Deceleration)
	}
	return nil
}

// Stage is one part of the sequence from failure to straight glide.
type Stage struct {
	Name        string  // "reaction", "speed change", "delay" or "turn"
	East, North float64 // m, ground displacement during the stage
	Height      float64 // m, height lost (negative = gained)
	Time        float64 // s
}

// Sequence is what the failure costs before the straight glide starts.
type Sequence struct {
	Stages []Stage
	// East, North: where the straight glide starts, relative to the
	// failure point (m). Height: total height lost (m; negative when the
	// energy credit exceeds the losses). Time: s.
	East, North, Height, Time float64
	// TurnAngle is the signed heading change flown (radians, + right);
	// Heading the heading after it (radians true).
	TurnAngle, Heading float64
	Turn               Turn
}

// Before returns the reaction and speed-change stages, which do not depend on
// where the glide is going, in wind (we, wn).
func (f Failure) before(we, wn float64) []Stage {
	se, ce := math.Sin(f.Heading), math.Cos(f.Heading)
	t := f.ReactionTime
	react := Stage{Name: "reaction", Time: t,
		East: (f.FailTAS*se + we) * t, North: (f.FailTAS*ce + wn) * t, Height: f.FailSink * t}
	a := f.Deceleration
	if a <= 0 {
		a = DefaultDeceleration
	}
	td := math.Abs(f.FailTAS-f.GlideTAS) / a
	vm := (f.FailTAS + f.GlideTAS) / 2
	// Flown on the heading at the mean speed; the energy credit is net of
	// the drag over it (that is what η < 1 stands for).
	speed := Stage{Name: "speed change", Time: td,
		East: (vm*se + we) * td, North: (vm*ce + wn) * td,
		Height: -EnergyCredit(f.FailTAS, f.GlideTAS, f.Efficiency)}
	st := []Stage{react, speed}
	if f.Delay > 0 {
		d := f.Delay
		st = append(st, Stage{Name: "delay", Time: d,
			East: (f.GlideTAS*se + we) * d, North: (f.GlideTAS*ce + wn) * d, Height: f.GlideSink * d})
	}
	return st
}

// WithTurn returns the sequence with a turn of dpsi radians (+ right) after
// the speed change, in wind (we, wn) m/s. f must be valid.
func (f Failure) WithTurn(dpsi, we, wn float64) (Sequence, error) {
	turn, err := NewTurn(f.Bank, f.GlideTAS, f.GlideSink)
	if err != nil {
		return Sequence{}, err
	}
	st := f.before(we, wn)
	de, dn := turn.Displacement(f.Heading, dpsi, we, wn)
	st = append(st, Stage{Name: "turn", East: de, North: dn, Height: turn.HeightLost(dpsi), Time: turn.Time(dpsi)})
	s := Sequence{Stages: st, TurnAngle: dpsi, Heading: f.Heading + dpsi, Turn: turn}
	for _, x := range st {
		s.East += x.East
		s.North += x.North
		s.Height += x.Height
		s.Time += x.Time
	}
	return s, nil
}

// Toward returns the sequence that ends with the aircraft on the heading
// that makes good the track from the end of the turn to the point
// (east, north) m from the failure point, at the glide speed in wind
// (we, wn). The turn goes the shorter way; the roll-out is found by
// fixed-point iteration (the turn moves the aircraft, which moves the
// track). A point inside the turn circle may not be met exactly. ok is
// false when the track cannot be made good against the wind.
func (f Failure) Toward(east, north, we, wn float64) (seq Sequence, track float64, ok bool, err error) {
	return f.toward(east, north, we, wn, 0)
}

// toward is Toward with the turn's side forced when side is +1 (right) or
// −1 (left); 0 takes the shorter way first.
func (f Failure) toward(east, north, we, wn, force float64) (seq Sequence, track float64, ok bool, err error) {
	if err := f.Validate(); err != nil {
		return Sequence{}, 0, false, err
	}
	pre := f.before(we, wn)
	x, y := 0.0, 0.0
	for _, s := range pre {
		x += s.East
		y += s.North
	}
	track = math.Atan2(east-x, north-y)
	var dpsi, side float64
	for it := 0; it < 30; it++ {
		hd, _, _, hok := HeadingFor(track, f.GlideTAS, we, wn)
		ok = hok
		dpsi = Wrap(hd - f.Heading)
		// Keep the turn direction chosen first: near a half turn the
		// shorter way flips from side to side as the roll-out moves.
		switch {
		case force != 0:
			side = force
			if dpsi != 0 && math.Copysign(1, dpsi) != side {
				dpsi += side * 2 * math.Pi
			}
		case it == 0:
			side = math.Copysign(1, dpsi)
		case math.Copysign(1, dpsi) != side && math.Abs(dpsi) > math.Pi/2:
			dpsi += side * 2 * math.Pi
		}
		seq, err = f.WithTurn(dpsi, we, wn)
		if err != nil {
			return Sequence{}, 0, false, err
		}
		nt := math.Atan2(east-seq.East, north-seq.North)
		if math.Abs(Wrap(nt-track)) < 1e-9 {
			break
		}
		track = nt
	}
	return seq, track, ok, nil
}

// Sector is where the straight glide starts for the tracks of one sector
// of directions after the failure: the tracks TrackDeg ± HalfDeg (degrees
// true) are flown from (East, North) m of the failure point with Height m
// lost (negative = gained) before them.
type Sector struct {
	TrackDeg, HalfDeg float64
	East, North       float64
	Height            float64
	TurnDeg           float64 // the turn flown to the sector's centre track (+ right)
}

// Sectors returns the sectors of centre tracks 360°·k/n (n ≥ 4), each
// started after the reaction, the speed change and the turn onto its centre
// track in wind (we, wn). Each track is turned to both ways, right and
// left, up to 270° (a point straight behind needs more than a half turn
// either way: the half turn leaves the aircraft two radii to the side), so
// most tracks have two sectors. Each covers its centre ± one sector
// spacing, so neighbours overlap (the starts move along the turn circle
// from sector to sector, and cones of ± half a spacing from different
// starts would leave gaps). A track anywhere in the sector may need up to
// one spacing more turn than its centre; that turn's height is added to
// every sector, which keeps it on the safe side. f must be valid.
func (f Failure) Sectors(n int, we, wn float64) ([]Sector, error) {
	if n < 4 {
		return nil, fmt.Errorf("transition: %d sectors, want at least 4", n)
	}
	turn, err := NewTurn(f.Bank, f.GlideTAS, f.GlideSink)
	if err != nil {
		return nil, err
	}
	half := 2 * math.Pi / float64(n)
	extra := turn.HeightLost(half)
	var out []Sector
	const far = 1e7 // m: the track to a point this far is the sector's track
	for k := 0; k < n; k++ {
		th := 2 * math.Pi * float64(k) / float64(n)
		for _, side := range []float64{1, -1} {
			seq, _, _, err := f.toward(far*math.Sin(th), far*math.Cos(th), we, wn, side)
			if err != nil {
				return nil, err
			}
			if math.Abs(seq.TurnAngle) > 1.5*math.Pi || side < 0 && math.Abs(seq.TurnAngle) < 1e-9 {
				continue
			}
			out = append(out, Sector{TrackDeg: th * 180 / math.Pi, HalfDeg: half * 180 / math.Pi, East: seq.East, North: seq.North,
				Height: seq.Height + extra, TurnDeg: seq.TurnAngle * 180 / math.Pi})
		}
	}
	return out, nil
}
