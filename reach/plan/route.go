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

// RouteSearchAbove is how far above the highest planned altitude a route's
// least altitudes are searched (m), so that the altitude that closes a gap
// is found when it is up to that much higher.
const RouteSearchAbove = 1500.0

// RouteRequest asks for the forced-landing options along a planned route.
type RouteRequest struct {
	Setup  *Setup
	Ground Ground
	// Points are the route's samples in flying order: position (degrees),
	// distance along the route (m) and planned altitude (m MSL, true,
	// −400..19 000 m).
	Points []reach.RoutePoint
	Fields []Field
	// Step is the spacing of Points along the route (m), for the warning
	// that a gap shorter than it can fall between two samples.
	Step float64
	// Failure is a failure state flown on the route's course at each point
	// (its HeadingDeg is not used); nil: the glide starts at the speed to
	// fly, already on its track.
	Failure *Failure
	// Progress, if not nil, receives the share of the solver work done
	// (0..1).
	Progress func(done float64)
}

// RouteField is a landing field as a route used it.
type RouteField struct {
	Field
	Elev   float64 // m MSL, from the field or the terrain; NaN when unknown
	Target int     // index into RouteResult.Targets; −1 when not used
	Note   string  // why a field is not used, "" otherwise
	BestM  float64 // m of route along which it is the best field and in reach
}

// RouteResult is the least altitude around a route and the route judged
// against it.
type RouteResult struct {
	// Required is the least altitude (m MSL) per cell of the window from
	// which one field is reached with the reserve in every wind of the
	// setup; Elevation reports the DEM's own ground (not the obstacle
	// surface) when there is a DEM.
	Required *reach.RequiredResult
	// Profile is the route judged at its points: least altitude, best
	// field, covered or not, the gaps and the covered fraction.
	Profile     *reach.RouteProfile
	Ceiling     float64 // m MSL, the highest altitude searched
	Fields      []RouteField
	Targets     []reach.Target // the fields on the window, in the order of Fields
	TargetField []int          // index into Fields of each target
	Grid        *terrain.Grid  // the DEM window read; nil on flat ground
	// Notes are what the figures rest on beyond the request: no field in
	// reach, sparse sampling, a planned altitude below the clearance.
	Notes []string
}

// Route computes the least altitude to reach a field with the reserve
// around the route and judges the route's points against it.
//
// The window covers the points' box plus the glide radius from the ceiling
// (the highest planned altitude + RouteSearchAbove, at most 19 000 m) in
// the forecast wind: with a wind uncertainty the window may be a little
// smaller than the strongest tailwind's radius, which can only leave out
// fields (less coverage, never more). With one wind the least altitude is
// one backward run from all fields (reach.Required); with several, a cell
// counts only from the least altitude at which ONE field is in reach in
// every wind (reach.Coverage with the other winds as Also). From a failure
// state, each point's least altitude is flown again from the failure on
// the route's course (routeFromState) and the worst over the winds kept.
//
// Errors: *InputError naming "Route" (a route across the antimeridian, a
// window too large), "Alt" (the planned altitude below the lowest ground or
// field), "Terrain", "Aircraft" or "Speed"; ctx's error when cancelled.
func Route(ctx context.Context, req RouteRequest) (*RouteResult, error) {
	s, pts := req.Setup, req.Points
	if len(pts) == 0 {
		return nil, inputf("Route", "no points to judge")
	}
	hi := math.Inf(-1)
	for _, p := range pts {
		if p.Alt < -400 || p.Alt > 19000 {
			return nil, inputf("Alt", "planned altitude %.0f m at %.1f km is outside -400..19000 m", p.Alt, p.Dist/1000)
		}
		hi = math.Max(hi, p.Alt)
	}
	out := &RouteResult{Ceiling: math.Min(hi+RouteSearchAbove, 19000)}
	ceiling := out.Ceiling

	// Window: the samples' box plus the reach radius from the ceiling down
	// to the lowest ground (a first guess of 0 m, then corrected once).
	minLat, minLon, maxLat, maxLon := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, p := range pts {
		minLat, maxLat = math.Min(minLat, p.Lat), math.Max(maxLat, p.Lat)
		minLon, maxLon = math.Min(minLon, p.Lon), math.Max(maxLon, p.Lon)
	}
	if maxLon-minLon > 180 {
		return nil, inputf("Route", "the route crosses the antimeridian, which is not supported")
	}
	bottom := 0.0
	if req.Ground.Src == nil {
		bottom = req.Ground.Flat
	}
	nominal := *s
	nominal.Winds = []*wind.Profile{s.Wind}
	l, grid, err := nominal.SizeWindow(WindowSize{Top: ceiling, TableTop: ceiling + 60, Bottom: bottom, Below: 60},
		func(radius float64) (*terrain.Local, *terrain.Grid, error) {
			return req.Ground.AreaWindow(minLat, minLon, maxLat, maxLon, radius*1.02+1000, "Route")
		})
	if err != nil {
		return nil, err
	}
	lo := Lowest(l)
	if math.IsInf(lo, 1) {
		return nil, inputf("Terrain", "the terrain around the route is all voids")
	}
	out.Grid = grid

	// Fields.
	for _, f := range req.Fields {
		rf := RouteField{Field: f, Target: -1, Elev: math.NaN()}
		te, on := PointElevation(l, grid, f.Lat, f.Lon)
		switch {
		case !on:
			rf.Note = "beyond the computed window (too far from the route to matter) or on unknown ground"
		case f.HasElevation:
			rf.Elev = f.Elevation
		default:
			rf.Elev = te
		}
		if on {
			rf.Target = len(out.Targets)
			out.Targets = append(out.Targets, reach.Target{Name: f.Name, Lat: f.Lat, Lon: f.Lon, Elev: rf.Elev, Reserve: s.Reserve})
			out.TargetField = append(out.TargetField, len(out.Fields))
			lo = math.Min(lo, rf.Elev)
		}
		out.Fields = append(out.Fields, rf)
	}
	if lo >= ceiling {
		return nil, inputf("Alt", "the planned altitude is below the lowest ground or field (%.0f m)", lo)
	}
	// With several winds every wind of the set is flown and a cell counts
	// only from the least altitude at which ONE field is in reach in every
	// wind of the set — the rule coverage uses: per field the highest least
	// altitude over the winds, then the lowest over the fields
	// (reach.Coverage with Also).
	winds := s.Winds
	if len(winds) == 0 {
		winds = []*wind.Profile{s.Wind}
	}
	progress := req.Progress
	var res *reach.RequiredResult
	if len(winds) > 1 {
		var err error
		if res, err = sameFieldRequired(ctx, s, l, out.Targets, lo, ceiling, winds, progress); err != nil {
			return nil, err
		}
		winds = nil
	}
	for k, w := range winds {
		tab, err := s.TableFor(w, lo-60, ceiling+60)
		if err != nil {
			return nil, &InputError{Field: "Aircraft", Err: err}
		}
		opts := reach.RequiredOptions{Clearance: s.Clearance, Ceiling: ceiling}
		if progress != nil {
			n := float64(len(winds))
			opts.Progress = func(d float64) { progress((float64(k) + d) / n) }
		}
		r, err := reach.Required(ctx, l, out.Targets, tab, opts)
		if err != nil {
			res = nil
			if errors.Is(err, reach.ErrNoTargets) {
				break
			}
			return nil, err
		}
		res = worstRequired(res, r)
	}
	if res == nil {
		res = emptyRequired(l)
		out.Notes = append(out.Notes, "no landing field lies within reach of the route: all of it is a gap")
	}
	if grid != nil {
		res.Elevation = grid.Elevation // report the DEM's own ground, not the obstacle surface
	}
	out.Required = res
	if req.Step > 2.5*l.Cell && req.Step > 250 {
		// The headline (covered fraction, gaps) is judged at the samples
		// only: say so when they are much sparser than the solver grid.
		out.Notes = append(out.Notes, fmt.Sprintf("WARNING: the route is judged every %.0f m on a %.0f m solver grid: a gap shorter than the step can fall between two samples and be missed (the covered fraction may then be too high); use --step %.0f m or less",
			req.Step, l.Cell, math.Max(250, math.Floor(2.5*l.Cell))))
	}
	prof, err := res.Route(pts, ceiling)
	if err != nil {
		return nil, err
	}
	if req.Failure != nil {
		if err := routeFromState(ctx, s, req.Failure, out.Targets, res, prof); err != nil {
			return nil, err
		}
	}
	out.Profile = prof
	// Length of route along which each field is the best one in reach.
	for i := 1; i < len(prof.Samples); i++ {
		a, b := prof.Samples[i-1], prof.Samples[i]
		if a.Covered && b.Covered && a.Best == b.Best && a.Best >= 0 {
			out.Fields[out.TargetField[a.Best]].BestM += b.Dist - a.Dist
		}
	}
	for _, sm := range prof.Samples {
		if !math.IsNaN(sm.Terrain) && sm.Alt < sm.Terrain+s.Clearance {
			out.Notes = append(out.Notes, fmt.Sprintf("the planned altitude is below the clearance above the terrain at %.1f km (%.0f m MSL over %.0f m terrain)", sm.Dist/1000, sm.Alt, sm.Terrain))
			break
		}
	}
	return out, nil
}

// sameFieldRequired is the least altitude per cell from which one field is
// in reach with its reserve in every wind of winds (nil when no field lies
// on the window): reach.Coverage's Least with the other winds as Also,
// searched up to ceiling.
func sameFieldRequired(ctx context.Context, s *Setup, l *terrain.Local, targets []reach.Target, lo, ceiling float64, winds []*wind.Profile, progress func(float64)) (*reach.RequiredResult, error) {
	models := make([]reach.LossModel, 0, len(winds))
	for _, w := range winds {
		tab, err := s.TableFor(w, lo-60, ceiling+60)
		if err != nil {
			return nil, &InputError{Field: "Aircraft", Err: err}
		}
		models = append(models, tab)
	}
	const margin = 300.0
	opts := reach.CoverageOptions{Alt: ceiling - margin, Margin: margin, Clearance: s.Clearance, Also: models[1:]}
	if progress != nil {
		opts.Progress = progress
	}
	cov, err := reach.Coverage(ctx, l, targets, models[0], opts)
	switch {
	case errors.Is(err, reach.ErrNoTargets):
		return nil, nil
	case err != nil:
		return nil, err
	}
	return &reach.RequiredResult{Ground: l, Targets: targets, Required: cov.Least, Best: cov.Best}, nil
}

// worstRequired folds b into a (nil on the first wind): each cell keeps the
// higher least altitude and that wind's best field; NaN (no field in reach
// below the ceiling) in either wind stays NaN.
func worstRequired(a, b *reach.RequiredResult) *reach.RequiredResult {
	if a == nil {
		return b
	}
	for i, v := range b.Required {
		switch {
		case a.Required[i] != a.Required[i]:
		case v != v:
			a.Required[i], a.Best[i] = v, -1
		case v > a.Required[i]:
			a.Required[i], a.Best[i] = v, b.Best[i]
		}
	}
	return a
}

// emptyRequired is a RequiredResult with no field in reach anywhere.
func emptyRequired(l *terrain.Local) *reach.RequiredResult {
	n := l.Cols * l.Rows
	r := &reach.RequiredResult{Ground: l, Required: make([]float32, n), Best: make([]int16, n)}
	for i := range r.Required {
		r.Required[i], r.Best[i] = float32(math.NaN()), -1
	}
	return r
}

// routeFromState replaces each covered point's least altitude by the one
// from a failure on the route's course there: the reaction, the energy
// trade and the turn toward the point's best field (transition), then the
// straight glide from where the turn ends to that field with its reserve,
// over the solver's obstacle surface (the clearing altitude when the line
// is blocked), plus what the failure cost. That is one way the aircraft can
// fly, so the figure is an upper bound of the least altitude from the
// state: never optimistic, though a detour around terrain that the raster
// would find is not searched for. Every wind of the set is flown and the
// highest is kept. Gaps and the covered fraction are then recomputed.
func routeFromState(ctx context.Context, s *Setup, fail *Failure, targets []reach.Target, res *reach.RequiredResult, prof *reach.RouteProfile) error {
	if _, err := fail.Credit(s, 0); err != nil {
		return err
	}
	g := res.Ground
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
		tg := targets[sm.Best]
		worst := math.Inf(-1)
		for _, w := range winds {
			least, err := stateLeast(ctx, s, fail, w, ter, g.Cell, sm.Lat, sm.Lon, sm.Alt, course, tg)
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
func stateLeast(ctx context.Context, s *Setup, fail *Failure, w reach.WindField, ter func(lat, lon float64) (float64, bool), step, lat, lon, alt, course float64, tg reach.Target) (float64, error) {
	fs := *fail
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
