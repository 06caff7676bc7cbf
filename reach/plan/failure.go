package plan

import (
	"math"

	"glidereach/reach"
	"glidereach/reach/transition"
	"glidereach/terrain"
)

// Failure is the aircraft's state at an engine failure: what the first
// seconds after it cost or give before the glide (reach/transition).
type Failure struct {
	// HeadingDeg is the heading at the failure, degrees true 0..360; NaN
	// when each point's own course is used (a route).
	HeadingDeg float64
	IAS        float64 // indicated airspeed at the failure, m/s; 0 = at the speed to fly
	Reaction   float64 // s flown on the heading at IAS before the pilot acts, 0..transition.MaxReactionTime
	Efficiency float64 // share of the kinetic energy above the glide speed credited as height, 0..1
	Bank       float64 // bank angle of the turns, degrees, transition.MinBank..MaxBank
}

// Credit returns the most height (m) the energy trade can give at altitude
// alt (m MSL), for sizing tables: the kinetic energy between IAS and the
// still-air best-glide speed there, times Efficiency
// (transition.EnergyCredit), never negative. A failure speed far above the
// profile's maximum (1.5 × max speed: a typing error) or below its stall
// speed is an *InputError naming "Speed".
func (f *Failure) Credit(s *Setup, alt float64) (float64, error) {
	ac := s.Aircraft
	if f.IAS > 1.5*ac.MaxIAS {
		return 0, inputf("Speed", "%.0f kt is far above the profile's maximum speed %.0f kt", f.IAS/knot, ac.MaxIAS/knot)
	}
	if f.IAS > 0 && f.IAS < ac.StallIASAt(s.Cond) {
		return 0, inputf("Speed", "%.0f kt is below the stall speed %.0f kt", f.IAS/knot, ac.StallIASAt(s.Cond)/knot)
	}
	rho := s.Atm.Density(alt)
	sigma := rho / reach.ISADensity0
	fig := ac.Figures(rho, s.Cond)
	return math.Max(0, transition.EnergyCredit(reach.TAS(f.IAS, sigma), fig.BestGlideTAS, f.Efficiency)), nil
}

// knot is one international knot in m/s (1852 m / 3600 s), for messages
// in the pilot's unit.
const knot = 1852.0 / 3600

// FailureSectorCount is the number of centre tracks of a footprint from a
// failure state (every 15°; each turned both ways where useful): the
// one-spacing turn charged per sector is then about 10 m for the trainer.
const FailureSectorCount = 24

// Sectors returns the sector starts of a footprint from failure state f at
// (lat, lon, alt m MSL) in wind w, on the frame of l. The glide after the
// turn is the still-air best glide at alt (the speed a pilot settles on),
// the failure speed's sink is the polar's there. A state the transition
// cannot fly is an *InputError naming "Speed".
func (f *Failure) Sectors(s *Setup, w reach.WindField, l *terrain.Local, lat, lon, alt float64) ([]reach.SectorStart, error) {
	ac, c := s.Aircraft, s.Cond
	atm := s.Atm
	rho := atm.Density(alt)
	fig := ac.Figures(rho, c)
	tf := transition.Failure{Heading: f.HeadingDeg * math.Pi / 180, GlideTAS: fig.BestGlideTAS, GlideSink: fig.BestGlideSink + c.AirSink,
		ReactionTime: f.Reaction, Efficiency: f.Efficiency, Bank: f.Bank}
	tf.FailTAS, tf.FailSink = tf.GlideTAS, tf.GlideSink
	if f.IAS > 0 {
		tf.FailTAS = reach.TAS(f.IAS, rho/reach.ISADensity0)
		tf.FailSink = ac.Sink(tf.FailTAS, rho, c) + c.AirSink
	}
	var we, wn float64
	if w != nil {
		we, _ = w.Components(alt, 90)
		wn, _ = w.Components(alt, 0)
	}
	if err := tf.Validate(); err != nil {
		return nil, &InputError{Field: "Speed", Err: err}
	}
	ss, err := tf.Sectors(FailureSectorCount, we, wn)
	if err != nil {
		return nil, err
	}
	x0, y0 := l.Frame.Forward(lat, lon)
	out := make([]reach.SectorStart, len(ss))
	for i, q := range ss {
		la, lo := l.Frame.Inverse(x0+q.East, y0+q.North)
		out[i] = reach.SectorStart{TrackDeg: q.TrackDeg, HalfDeg: q.HalfDeg, Start: reach.Start{Lat: la, Lon: lo, Alt: alt - q.Height}}
	}
	return out, nil
}

// SectorFor returns, of the sector starts whose cone holds the point, the
// one with the highest start: where the glide to the point begins. ok is
// false when no cone holds it (inside the turn after the failure).
func SectorFor(l *terrain.Local, secs []reach.SectorStart, lat, lon float64) (reach.SectorStart, bool) {
	x, y := l.Frame.Forward(lat, lon)
	best, ok := reach.SectorStart{}, false
	for _, s := range secs {
		sx, sy := l.Frame.Forward(s.Start.Lat, s.Start.Lon)
		b := math.Atan2(x-sx, y-sy) * 180 / math.Pi
		if d := math.Mod(b-s.TrackDeg+540, 360) - 180; math.Abs(d) <= s.HalfDeg && (!ok || s.Start.Alt > best.Start.Alt) {
			best, ok = s, true
		}
	}
	return best, ok
}
