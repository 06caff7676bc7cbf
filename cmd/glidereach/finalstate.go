package main

import (
	"context"
	"fmt"
	"math"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/reach/transition"
	"glidereach/terrain"
)

// computeFinalFrom is computeFinal from an engine failure's state: the
// reaction, the speed change and the turn toward the first point are flown
// first (transition.Failure.Toward, in the wind at the failure altitude),
// and the final glide starts where the turn ends, lower (or higher, by the
// energy credit) by what they cost. The required altitude and the least
// clearing altitude are those of the glide plus that cost, so they are
// altitudes at the failure point; the margin is unchanged by the shift.
// The failure's own stages (a few hundred metres to a few km) are not
// checked against the terrain; the assumptions say so.
func computeFinalFrom(ctx context.Context, run *finalRun, route []geodesy.LatLon, startAlt, goalElev float64, step *input.Quantity, fs *failureState) (*reach.FinalGlideResult, error) {
	s := run.setup
	if _, err := fs.credit(s, startAlt); err != nil {
		return nil, err
	}
	ac, c := s.Aircraft, s.Cond
	rho := s.Atm.Density(startAlt)
	fig := ac.Figures(rho, c)
	tf := transition.Failure{Heading: fs.HeadingDeg * math.Pi / 180, GlideTAS: fig.BestGlideTAS, GlideSink: fig.BestGlideSink + c.AirSink,
		ReactionTime: fs.Reaction, Efficiency: fs.Efficiency, Bank: fs.Bank}
	tf.FailTAS, tf.FailSink = tf.GlideTAS, tf.GlideSink
	if fs.IAS > 0 {
		tf.FailTAS = reach.TAS(fs.IAS, rho/reach.ISADensity0)
		tf.FailSink = ac.Sink(tf.FailTAS, rho, c) + c.AirSink
	}
	we, _ := s.Wind.Components(startAlt, 90)
	wn, _ := s.Wind.Components(startAlt, 0)
	fr := terrain.NewFrame(route[0].Lat, route[0].Lon)
	tx, ty := fr.Forward(route[1].Lat, route[1].Lon)
	seq, _, _, err := tf.Toward(tx, ty, we, wn)
	if err != nil {
		return nil, &input.UsageError{Where: "--speed", Err: err}
	}
	if math.Hypot(tx-seq.East, ty-seq.North) < 1 || (tx-seq.East)*tx+(ty-seq.North)*ty <= 0 {
		return nil, input.Usagef("--to", "the first point lies within the ground the failure's reaction and turn cover (%.0f m); it cannot be glided to from there", math.Hypot(seq.East, seq.North))
	}
	lat, lon := fr.Inverse(seq.East, seq.North)
	shifted := append([]geodesy.LatLon{{Lat: lat, Lon: lon}}, route[1:]...)
	s.State = fs.assumption() + fmt.Sprintf("; before the glide: %.0f m lost (negative: gained) in %.0f s, turn %.0f°, the glide starting %.0f m from the failure point (the failure's own path is not checked against the terrain)",
		seq.Height, seq.Time, seq.TurnAngle*180/math.Pi, math.Hypot(seq.East, seq.North))
	res, err := computeFinal(ctx, run, shifted, startAlt-seq.Height, goalElev, step)
	if err != nil {
		return nil, err
	}
	res.Required += seq.Height
	res.StartAlt = startAlt
	if t := res.Terrain; t != nil && !math.IsNaN(t.LeastClearAlt) {
		t.LeastClearAlt += seq.Height
	}
	return res, nil
}
