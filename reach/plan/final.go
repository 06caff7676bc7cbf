package plan

import (
	"context"
	"errors"
	"fmt"
	"math"

	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/reach/transition"
	"glidereach/terrain"
	"glidereach/wind"
)

// FinalRequest asks for a final glide along a line: from the start through
// any turn points to the goal.
type FinalRequest struct {
	Setup  *Setup
	Ground Ground
	// Route is the start, the turn points and the goal (degrees), legs of
	// at least 1 m and at most 2000 km.
	Route []geodesy.LatLon
	// Alt is the start altitude, m MSL (true); NaN when the glide is to
	// start at the altitude it requires.
	Alt      float64
	GoalElev float64 // m MSL
	// Step is the sample spacing along the line (m); 0 takes the DEM's cell
	// size (reach.DefaultFinalStep on flat ground), the most it may be.
	Step float64
	// Failure is the state at an engine failure the glide starts from (it
	// needs Alt); nil when already gliding at the speed to fly.
	Failure *Failure
}

// FinalResult is a final glide in the wind of Setup.Winds that needs the
// most altitude.
type FinalResult struct {
	Glide *reach.FinalGlideResult
	// Worst is the index in Setup.Winds of the wind Glide was flown in.
	Worst int
	// FromRequired is the glide flown again from the required altitude
	// (rounded up to the metre), without the failure state, when Glide is
	// short from Alt and the required altitude is at most 19 000 m: the
	// legs as they would be flown. nil otherwise, or when its legs do not
	// match Glide's. FromRequiredWorst is the index of the wind it was
	// flown in (−1 when it was not flown, or failed).
	FromRequired      *reach.FinalGlideResult
	FromRequiredWorst int
	// Before is what the failure costs before the straight glide (nil
	// without a Failure): Glide's Required and its least clearing altitude
	// include Before.Height, its StartAlt is the request's Alt.
	Before *transition.Sequence
}

// FinalGlide flies the glide of req in every wind of Setup.Winds, two at a
// time, and keeps the one that needs the most altitude (no headway first,
// then the highest required altitude, then the lowest arrival): its legs,
// arrival, terrain check and MacCready figures belong together. The
// terrain is sampled along the line through small DEM windows (the highest
// sample around each point, the obstacle surface).
//
// Errors: *InputError naming "Step" (coarser than the DEM's cell), "To"
// (the goal far out of reach, or the first point inside the failure's
// turn), "Speed" (a failure state that cannot be flown) or "Terrain" (a
// failed read); ctx's error when cancelled.
func FinalGlide(ctx context.Context, req FinalRequest) (*FinalResult, error) {
	out := &FinalResult{FromRequiredWorst: -1}
	var err error
	if req.Failure != nil {
		out.Glide, out.Worst, out.Before, err = finalFrom(ctx, req)
	} else {
		out.Glide, out.Worst, err = finalAll(ctx, req, req.Route, req.Alt)
	}
	if err != nil {
		return nil, err
	}
	res := out.Glide
	if res.Status == reach.FinalShort && !math.IsNaN(req.Alt) && res.Required <= 19000 {
		if need, k, err := finalAll(ctx, req, req.Route, math.Ceil(res.Required)); err == nil {
			out.FromRequiredWorst = k
			if len(need.Legs) == len(res.Legs) {
				out.FromRequired = need
			}
		}
	}
	return out, nil
}

// finalAll flies the glide along route from startAlt in every wind and
// returns the most demanding, with its wind's index.
func finalAll(ctx context.Context, req FinalRequest, route []geodesy.LatLon, startAlt float64) (*reach.FinalGlideResult, int, error) {
	s := req.Setup
	opts := reach.FinalGlideOptions{GoalElev: req.GoalElev, Reserve: s.Reserve, Clearance: s.Clearance}
	if req.Ground.Src == nil {
		flat := req.Ground.Flat
		opts.Terrain = func(lat, lon float64) (float64, bool) { return flat, true }
		opts.Step = reach.DefaultFinalStep
	} else {
		cell := req.Ground.Src.Resolution()
		if !(cell > 0) || math.IsInf(cell, 0) {
			cell = 30
		}
		opts.Step = cell
	}
	if req.Step > 0 {
		if req.Step > opts.Step*1.0001 {
			return nil, 0, inputf("Step", "%.0f m is coarser than the terrain's cell size (%.1f m); a ridge could fall between samples", req.Step, opts.Step)
		}
		opts.Step = req.Step
	}
	winds := s.Winds
	if len(winds) == 0 {
		winds = []*wind.Profile{s.Wind}
	}
	// The winds are independent glides: two at a time, each with its own
	// terrain reader (lineTerrain keeps its current window), then judged in
	// the winds' order, so the result does not depend on the cores.
	results := make([]*reach.FinalGlideResult, len(winds))
	err := ForEach(ctx, len(winds), 2, func(i int) error {
		o := opts
		var lt *lineTerrain
		if req.Ground.Src != nil {
			lt = &lineTerrain{src: req.Ground.Src}
			o.Terrain = lt.sample
		}
		perf := reach.Performance{Aircraft: s.Aircraft, Atm: s.Atm, Wind: winds[i], Cond: s.Cond}
		res, err := reach.FinalGlide(ctx, route, startAlt, perf, o)
		if lt != nil && lt.err != nil {
			return &InputError{Field: "Terrain", Err: lt.err}
		}
		switch {
		case errors.Is(err, reach.ErrFinalTooHigh):
			return &InputError{Field: "To", Err: fmt.Errorf("the goal is far out of reach: %w", err)}
		case err != nil:
			return err
		}
		results[i] = res
		return nil
	})
	if err != nil {
		return nil, 0, err
	}
	var worst *reach.FinalGlideResult
	k := 0
	for i, res := range results {
		if worst == nil || FinalWorse(res, worst) {
			worst, k = res, i
		}
	}
	return worst, k, nil
}

// FinalWorse reports whether a is the more demanding glide: no headway, or
// a higher required altitude, or (equal) a lower arrival.
func FinalWorse(a, b *reach.FinalGlideResult) bool {
	an, bn := a.Status == reach.FinalNoHeadway, b.Status == reach.FinalNoHeadway
	switch {
	case an != bn:
		return an
	case an:
		return false
	case a.Required != b.Required:
		return a.Required > b.Required
	}
	return a.Arrival < b.Arrival
}

// finalFrom is finalAll from an engine failure's state: the reaction,
// the energy trade and the turn toward the first point
// (transition.Failure.Toward, in the forecast wind at the start) come
// first, and the glide starts where they end, that much lower (or higher).
// The required and clearing altitudes are those of the glide plus that
// cost, so they are altitudes at the failure point; the margin is unchanged
// by the shift. The failure's own stages (a few hundred metres to a few km)
// are not checked against the terrain.
func finalFrom(ctx context.Context, req FinalRequest) (*reach.FinalGlideResult, int, *transition.Sequence, error) {
	s, fs, route, startAlt := req.Setup, req.Failure, req.Route, req.Alt
	if _, err := fs.Credit(s, startAlt); err != nil {
		return nil, 0, nil, err
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
		return nil, 0, nil, &InputError{Field: "Speed", Err: err}
	}
	if math.Hypot(tx-seq.East, ty-seq.North) < 1 || (tx-seq.East)*tx+(ty-seq.North)*ty <= 0 {
		return nil, 0, nil, inputf("To", "the first point lies within the ground the failure's reaction and turn cover (%.0f m); it cannot be glided to from there", math.Hypot(seq.East, seq.North))
	}
	lat, lon := fr.Inverse(seq.East, seq.North)
	shifted := append([]geodesy.LatLon{{Lat: lat, Lon: lon}}, route[1:]...)
	res, k, err := finalAll(ctx, req, shifted, startAlt-seq.Height)
	if err != nil {
		return nil, 0, nil, err
	}
	res.Required += seq.Height
	res.StartAlt = startAlt
	if t := res.Terrain; t != nil && !math.IsNaN(t.LeastClearAlt) {
		t.LeastClearAlt += seq.Height
	}
	return res, k, &seq, nil
}

// lineTerrain samples a DEM along a line through small windows read as the
// line goes (about 11 km square each), so a long line never reads the whole
// box around it.
type lineTerrain struct {
	src  terrain.Source
	grid *terrain.Grid
	box  [4]float64 // west, south, east, north of the current window (or of the last miss)
	miss bool       // the current box lies outside the data
	err  error      // a read failure other than "outside"
}

// lineWindow is the half-size (degrees) of the windows lineTerrain reads.
const lineWindow = 0.05

func (t *lineTerrain) sample(lat, lon float64) (float64, bool) {
	if t.err != nil {
		return math.NaN(), false
	}
	in := func() bool {
		// Keep a margin of a tenth of the window so bilinear sampling never
		// needs cells beyond it.
		m := lineWindow / 10
		return lon >= t.box[0]+m && lat >= t.box[1]+m && lon <= t.box[2]-m && lat <= t.box[3]-m
	}
	if (t.grid == nil && !t.miss) || !in() {
		t.box = [4]float64{lon - lineWindow, lat - lineWindow, lon + lineWindow, lat + lineWindow}
		g, err := t.src.Window(t.box[0], t.box[1], t.box[2], t.box[3])
		switch {
		case errors.Is(err, terrain.ErrOutside):
			t.grid, t.miss = nil, true
		case err != nil:
			t.err = err
			return math.NaN(), false
		default:
			t.grid, t.miss = g, false
		}
	}
	if t.grid == nil {
		return math.NaN(), false
	}
	// The obstacle height: the highest DEM sample around the point, so a
	// ridge crest between samples is not cut down (see terrain.ResampleHigh).
	return t.grid.HighAround(lat, lon)
}
