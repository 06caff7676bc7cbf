package main

import (
	"context"
	"errors"
	"math"

	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/reach/transition"
	"glidereach/terrain"
)

// routeFromState replaces each route sample's least altitude by the least
// altitude from an engine failure there, on the route's course at the
// failure speed: the reaction, the speed change and the turn toward the
// sample's best field (the backward raster's), then the straight final
// glide from where the turn ends to that field with its reserve, over the
// solver's obstacle surface (the clearing altitude when the line is
// blocked), plus what the failure cost. That is one way the aircraft can
// fly, so the figure is an upper bound of the least altitude from the
// state: never optimistic, though a detour around terrain that the
// raster would find is not searched for. Every wind of the set is flown
// and the highest is kept. Gaps and the covered fraction are then
// recomputed.
func routeFromState(ctx context.Context, run *routeRun, prof *reach.RouteProfile) error {
	s := run.setup
	if _, err := run.fail.credit(s, 0); err != nil {
		return err
	}
	g := run.res.Ground
	ter := func(lat, lon float64) (float64, bool) {
		x, y := g.Frame.Forward(lat, lon)
		return g.Sample(x, y)
	}
	winds := s.Winds
	n := len(prof.Samples)
	for i := range prof.Samples {
		if err := ctx.Err(); err != nil {
			return err
		}
		sm := &prof.Samples[i]
		if sm.Best < 0 || math.IsNaN(sm.Least) {
			continue // no field in reach at all: a gap either way
		}
		a, b := i, i+1
		if b >= n {
			a, b = i-1, i
		}
		if a < 0 {
			continue // a one-point route has no course
		}
		_, course, _, err := geodesy.Inverse(geodesy.LatLon{Lat: prof.Samples[a].Lat, Lon: prof.Samples[a].Lon}, geodesy.LatLon{Lat: prof.Samples[b].Lat, Lon: prof.Samples[b].Lon})
		if err != nil {
			return err
		}
		tg := run.targets[sm.Best]
		worst := math.Inf(-1)
		for _, w := range winds {
			least, err := stateLeast(ctx, run, w, ter, g.Cell, sm.Lat, sm.Lon, sm.Alt, course, tg)
			if err != nil {
				return err
			}
			worst = math.Max(worst, least) // NaN stays NaN through Max
		}
		sm.Least = worst
	}
	prof.Recompute()
	return nil
}

// stateLeast is the least altitude (m MSL) at (lat, lon) from which a
// failure on course (degrees) at alt reaches target tg in wind w; NaN when
// the straight glide after the turn has no headway or the target lies in
// the turn.
func stateLeast(ctx context.Context, run *routeRun, w reach.WindField, ter func(lat, lon float64) (float64, bool), step, lat, lon, alt, course float64, tg reach.Target) (float64, error) {
	s := run.setup
	fs := *run.fail
	fs.HeadingDeg = math.Mod(course+360, 360)
	ac, c := s.Aircraft, s.Cond
	rho := s.Atm.Density(alt)
	fig := ac.Figures(rho, c)
	tf := transition.Failure{Heading: fs.HeadingDeg * math.Pi / 180, GlideTAS: fig.BestGlideTAS, GlideSink: fig.BestGlideSink + c.AirSink,
		ReactionTime: fs.Reaction, Efficiency: fs.Efficiency, Bank: fs.Bank, FailSink: fig.BestGlideSink + c.AirSink}
	tf.FailTAS = reach.TAS(fs.IAS, rho/reach.ISADensity0)
	tf.FailSink = ac.Sink(tf.FailTAS, rho, c) + c.AirSink
	we, _ := w.Components(alt, 90)
	wn, _ := w.Components(alt, 0)
	fr := terrain.NewFrame(lat, lon)
	tx, ty := fr.Forward(tg.Lat, tg.Lon)
	seq, _, _, err := tf.Toward(tx, ty, we, wn)
	if err != nil {
		return 0, err
	}
	if math.Hypot(tx-seq.East, ty-seq.North) < 1 || (tx-seq.East)*tx+(ty-seq.North)*ty <= 0 {
		return math.NaN(), nil
	}
	rl, ro := fr.Inverse(seq.East, seq.North)
	perf := reach.Performance{Aircraft: ac, Atm: s.Atm, Wind: w, Cond: c}
	res, err := reach.FinalGlide(ctx, []geodesy.LatLon{{Lat: rl, Lon: ro}, {Lat: tg.Lat, Lon: tg.Lon}}, math.NaN(), perf,
		reach.FinalGlideOptions{GoalElev: tg.Elev, Reserve: tg.Reserve, Clearance: s.Clearance, Terrain: ter, Step: step, MaxMacCready: 0.01})
	switch {
	case errors.Is(err, reach.ErrFinalTooHigh):
		return math.NaN(), nil
	case err != nil:
		return 0, err
	case res.Status == reach.FinalNoHeadway:
		return math.NaN(), nil
	}
	need := res.Required
	if t := res.Terrain; t != nil && !math.IsNaN(t.LeastClearAlt) {
		need = math.Max(need, t.LeastClearAlt)
	}
	return need + seq.Height, nil
}
