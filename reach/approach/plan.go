package approach

import (
	"context"
	"fmt"
	"math"
	"sort"

	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/reach/transition"
	"glidereach/terrain"
)

// Field is the field to land on.
type Field struct {
	Name           string
	Lat, Lon, Elev float64 // landing point (degrees) and elevation (m MSL)
	// Directions are the landing directions allowed (degrees true, the
	// track on final); nil means any direction. A strip's two directions
	// are used when Strip is set and Directions is nil.
	Directions []float64
	// Strip, when not nil, holds the two ends of a strip usable from both.
	Strip *[2]geodesy.LatLon
	// Side is the pattern side, "left" or "right"; "" means left.
	Side string
}

// Failure is the aircraft's state at the engine failure (nil in Request:
// already gliding at the speed to fly, on the direct track, no turn).
type Failure struct {
	HeadingDeg float64 // true
	// IAS is the airspeed at the failure (m/s); 0 = the speed to fly
	// (no energy credit).
	IAS float64
	// ReactionTime (s), Efficiency (0..1) and Bank (degrees) as in
	// transition.Failure; the caller fills the defaults.
	ReactionTime, Efficiency, Bank float64
}

// Request is everything a plan needs. Heights m MSL, speeds m/s.
type Request struct {
	Field    Field
	Aircraft *reach.Aircraft
	Cond     reach.Conditions
	Atm      reach.Atmosphere
	Wind     reach.WindField // nil = calm
	// Ground gives the terrain elevation (m MSL) at a point, ok false where
	// unknown; nil = flat at the field's elevation.
	Ground func(lat, lon float64) (elev float64, ok bool)
	// Clearance is the least height above terrain (m) of the join glide.
	Clearance float64
	// Lat, Lon, Alt is the aircraft's position and altitude.
	Lat, Lon, Alt float64
	Failure       *Failure
	// LandingDir forces the landing direction (degrees true); NaN chooses.
	LandingDir float64
	// Side overrides the field's pattern side when not "".
	Side string
	// ApproachIAS (m/s) overrides the profile's approach speed when > 0;
	// the wind addition is still added. Gust (m/s) is added in full.
	ApproachIAS, Gust float64
	// Params: zero fields take the kind's defaults.
	Params Params
	// Step is the terrain sampling step (m); 0 means 50 m.
	Step float64
}

// Direction is one candidate landing direction and why it was or was not
// taken.
type Direction struct {
	Deg       float64 // true
	Headwind  float64 // m/s surface component along final (negative = tailwind)
	Crosswind float64 // m/s, magnitude
	Refused   string  // "" when within the limits
	Tried     bool    // a pattern was planned for it
	Result    string  // what the plan gave ("chosen", or why not)
}

// Gate is a point of the plan a pilot can fly to.
type Gate struct {
	Name             string
	Lat, Lon         float64
	AltMSL           float64 // m, the altitude to be at on arrival (before the turn there)
	HeightAboveField float64 // m
	Track, Heading   float64 // degrees true, of the leg flown from here (touchdown: the final's)
	Drift            float64 // degrees, track − heading
	DistToTouchdown  float64 // m along the plan
	TimeToTouchdown  float64 // s
	TurnDeg          float64 // heading change at this gate (+ right), degrees
	TurnHeight       float64 // m lost in that turn
}

// Leg is a straight part of the plan.
type Leg struct {
	Name           string // "glide", "downwind", "base", "final"
	From, To       string
	Track, Heading float64 // degrees true
	Drift          float64 // degrees
	GroundSpeed    float64 // m/s (mean over the leg)
	TAS, IAS       float64 // m/s at the leg's mean height
	Length         float64 // m
	HeightLost     float64 // m
	Time           float64 // s
	GlideRatio     float64 // length / height lost (over the ground)
	LowestClear    float64 // m, least height above the terrain along the leg (NaN when all unknown)
}

// Holding describes the circles over the holding point (the entry gate)
// that lose a height excess.
type Holding struct {
	Circles        int
	HeightLost     float64 // m
	PerCircle      float64 // m lost per circle
	CircleTime     float64 // s per circle
	DriftPerCircle float64 // m the wind moves the aircraft per circle
	Lat, Lon       float64
}

// PathPoint is a point of the flown path with its altitude.
type PathPoint struct {
	Lat, Lon float64
	AltMSL   float64
	Dist     float64 // m along the path from the aircraft
	Ground   float64 // terrain m MSL, NaN unknown
	Part     string
}

// Result is the plan.
type Result struct {
	Feasible bool
	// Reason says why not, or notes that matter when feasible.
	Reason     string
	LandingDir float64 // degrees true; NaN when none could be taken
	Side       string
	Variant    string // "full pattern", "shorter downwind", "straight to base", "straight in"
	// ApproachIAS is the approach speed flown (m/s IAS) and how it was set:
	// ApproachFrom names the base speed, ApproachAdd (m/s) the part added
	// for the headwind and gust.
	ApproachIAS  float64
	ApproachFrom string
	ApproachAdd  float64
	Headwind     float64 // m/s surface, on final
	Crosswind    float64 // m/s surface
	Directions   []Direction
	Gates        []Gate
	Legs         []Leg
	// Sequence is the failure sequence before the glide (nil without a
	// failure state).
	Sequence *transition.Sequence
	// Arrival is the altitude (m MSL) on reaching the entry gate, Required
	// the altitude the plan needs there; Excess = Arrival − Required.
	Arrival, Required, Excess float64
	Holding                   Holding
	Extension                 float64 // m added to the downwind
	// FinalExcess is the height (m) above the clean glide on final that the
	// airbrakes, flaps or slip take off.
	FinalExcess float64
	// FinalGroundRise is the highest terrain under the final above the
	// field (m; ≤ 0 when the ground falls or is level).
	FinalGroundRise float64
	// DecideBy is the last point on the failure heading at which turning
	// for this plan still works (nil without a failure state or when the
	// plan does not hold even at once); DecideAfter its time (s) after the
	// failure.
	DecideBy    *Gate
	DecideAfter float64
	Unknown     int // terrain samples with unknown ground
	Path        []PathPoint
	Params      Params
	Kind        string
	Notes       []string
	// Rejected says, for each variant tried before the one taken (or all,
	// when none holds), why it was given up: the first attempt's reason.
	Rejected []string
	// TurnDecides is true when the plan does not hold but would, headed
	// for the field: the turn from the failure heading is the reason.
	TurnDecides bool
	turn, turnH float64 // the failure turn of the closest attempt
}

// planner holds a resolved request.
type planner struct {
	req     Request
	p       Params
	ac      *reach.Aircraft
	frame   terrain.Frame
	elev    float64
	ias     float64
	add     float64 // m/s of the approach speed added for wind and gust
	eff     float64
	sx, sy  float64 // aircraft in the frame
	step    float64
	side    float64 // +1 right, −1 left
	unknown int
}

func (q *planner) wind(h float64) (we, wn float64) {
	if q.req.Wind == nil {
		return 0, 0
	}
	we, _ = q.req.Wind.Components(h, 90)
	wn, _ = q.req.Wind.Components(h, 0)
	return we, wn
}

// app returns the approach TAS and the sink through the air (with the
// sinking-air allowance) at altitude h.
func (q *planner) app(h float64) (tas, sink float64) {
	rho := q.req.Atm.Density(h)
	tas = reach.TAS(q.ias, rho/reach.ISADensity0)
	return tas, q.ac.Sink(tas, rho, q.req.Cond) + q.req.Cond.AirSink
}

func (q *planner) latlon(x, y float64) (lat, lon float64) { return q.frame.Inverse(x, y) }

func (q *planner) ground(x, y float64) (float64, bool) {
	if q.req.Ground == nil {
		return q.elev, true
	}
	lat, lon := q.latlon(x, y)
	return q.req.Ground(lat, lon)
}

// Plan plans the approach. Errors are *InputError for values out of range
// (or the aircraft's and conditions' own errors); an infeasible plan is a
// Result with Feasible false and a Reason, not an error.
func Plan(ctx context.Context, req Request) (*Result, error) {
	res, err := plan(ctx, req)
	if err != nil || res.Feasible || req.Failure == nil || res.Sequence == nil && res.turn == 0 {
		return res, err
	}
	turn, turnH := res.turn, res.turnH
	if math.Abs(turn) < 30*deg {
		return res, nil
	}
	// Would it hold headed for the field? Then the turn decides it.
	alt := *req.Failure
	q, _, err := newPlanner(req)
	if err != nil {
		return nil, err
	}
	alt.HeadingDeg = bearingDeg(math.Atan2(-q.sx, -q.sy))
	r2 := req
	r2.Failure = &alt
	cf, err := plan(ctx, r2)
	if err != nil {
		return nil, err
	}
	if cf.Feasible {
		res.Reason = fmt.Sprintf("the turn of %.0f° toward the field decides it (%.0f m lost in the turn, and the ground flown away from the field before it): headed for the field on %03.0f° the plan would hold; %s",
			math.Abs(turn)/deg, turnH, alt.HeadingDeg, res.Reason)
		res.TurnDecides = true
	}
	return res, nil
}

func plan(ctx context.Context, req Request) (*Result, error) {
	q, dirs, err := newPlanner(req)
	if err != nil {
		return nil, err
	}
	res := &Result{LandingDir: math.NaN(), Params: q.p, Kind: kindOf(q.ac), Directions: dirs,
		Arrival: math.NaN(), Required: math.NaN(), Excess: math.NaN()}
	if q.side > 0 {
		res.Side = "right"
	} else {
		res.Side = "left"
	}
	order := make([]int, 0, len(dirs))
	for i, d := range dirs {
		if d.Refused == "" {
			order = append(order, i)
		}
	}
	if len(order) == 0 {
		res.Reason = "no landing direction is within the limits: " + refusals(dirs)
		return res, nil
	}
	// Most headwind first (to 0.05 m/s; ties keep the given order).
	sort.SliceStable(order, func(a, b int) bool {
		return dirs[order[a]].Headwind > dirs[order[b]].Headwind+0.05
	})
	if _, err := q.approachSpeed(0); err != nil {
		return nil, err
	}
	// Out of reach whatever the direction: even straight at the aim point,
	// with no pattern, the glide arrives below the field. (Only ever
	// declares a plan impossible, so it cannot flatter.)
	if j, err := q.join(0, 0, 0, 0, false); err != nil {
		return nil, err
	} else if !j.noHeadway && j.hEnd < q.elev {
		if j.seq != nil {
			res.turn, res.turnH = j.seq.TurnAngle, j.seq.Stages[len(j.seq.Stages)-1].Height
		}
		res.Reason = fmt.Sprintf("out of reach: even straight at the field, with no pattern, the glide arrives %.0f m below its elevation", q.elev-j.hEnd)
		if j.seq != nil && math.Abs(j.seq.TurnAngle) > 30*deg {
			res.Reason += fmt.Sprintf(" (after a turn of %.0f° costing %.0f m)", math.Abs(j.seq.TurnAngle)/deg, j.seq.Stages[len(j.seq.Stages)-1].Height)
		}
		return res, nil
	}
	var best *Result
	var chosen *Result
	chosenIdx, chosenHW := -1, 0.0
	for _, i := range order {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		if chosen != nil && dirs[i].Headwind < chosenHW-0.05 {
			break
		}
		d := &res.Directions[i]
		d.Tried = true
		r, err := q.planDirection(d.Deg)
		if err != nil {
			return nil, err
		}
		r.Directions, r.Params, r.Kind, r.Side = res.Directions, res.Params, res.Kind, res.Side
		r.Headwind, r.Crosswind = d.Headwind, d.Crosswind
		if r.Feasible {
			// Among directions with the same headwind (calm air, or a
			// wind across a symmetric set) the one with most height in
			// hand at the entry.
			if chosen != nil && !(r.Excess > chosen.Excess) {
				d.Result = "feasible, less height in hand than the chosen direction"
				continue
			}
			if chosen != nil {
				res.Directions[chosenIdx].Result = "feasible, less height in hand than the chosen direction"
			}
			d.Result = "chosen"
			r.LandingDir = d.Deg
			chosen, chosenIdx, chosenHW = r, i, d.Headwind
			continue
		}
		d.Result = r.Reason
		if best == nil || r.Excess > best.Excess || math.IsNaN(best.Excess) {
			best = r
			best.LandingDir = d.Deg
		}
	}
	if chosen != nil {
		chosen.Directions = res.Directions
		chosen.Unknown = q.unknown
		return chosen, nil
	}
	best.Unknown = q.unknown
	return best, nil
}

func refusals(dirs []Direction) string {
	s := ""
	for i, d := range dirs {
		if i > 0 {
			s += "; "
		}
		s += fmt.Sprintf("%03.0f°: %s", d.Deg, d.Refused)
		if i == 7 && len(dirs) > 9 {
			s += fmt.Sprintf("; and %d more", len(dirs)-8)
			break
		}
	}
	return s
}

func kindOf(ac *reach.Aircraft) string {
	if ac.Kind == reach.KindSailplane {
		return reach.KindSailplane
	}
	return reach.KindPowered
}

func newPlanner(req Request) (*planner, []Direction, error) {
	ac := req.Aircraft
	if ac == nil {
		return nil, nil, inputErr("aircraft", "no aircraft")
	}
	if err := ac.Check(req.Cond); err != nil {
		return nil, nil, err
	}
	f := req.Field
	if !(f.Lat >= -89 && f.Lat <= 89) || !(f.Lon >= -180 && f.Lon <= 180) || math.IsNaN(f.Elev) || math.IsInf(f.Elev, 0) {
		return nil, nil, inputErr("field", "field %q position %v,%v or elevation %v is not valid", f.Name, f.Lat, f.Lon, f.Elev)
	}
	if !(req.Alt > f.Elev) {
		return nil, nil, inputErr("alt", "the aircraft at %.0f m MSL is not above the field (%.0f m)", req.Alt, f.Elev)
	}
	if !(req.Clearance >= 0) {
		return nil, nil, inputErr("clearance", "clearance %v m is negative", req.Clearance)
	}
	q := &planner{req: req, ac: ac, elev: f.Elev, step: req.Step}
	if q.step <= 0 {
		q.step = 50
	}
	q.p = req.Params.fill(Defaults(kindOf(ac)))
	if ac.MaxCrosswind > 0 && req.Params.MaxCrosswind == 0 {
		q.p.MaxCrosswind = ac.MaxCrosswind
	}
	if err := q.p.validate(); err != nil {
		return nil, nil, err
	}
	q.frame = terrain.NewFrame(f.Lat, f.Lon)
	q.sx, q.sy = q.frame.Forward(req.Lat, req.Lon)
	side := req.Side
	if side == "" {
		side = f.Side
	}
	switch side {
	case "", "left":
		q.side = -1
	case "right":
		q.side = 1
	default:
		return nil, nil, inputErr("pattern_side", "pattern side %q: want left or right", side)
	}
	if fl := req.Failure; fl != nil {
		if !(fl.HeadingDeg >= 0 && fl.HeadingDeg <= 360) {
			return nil, nil, inputErr("heading", "heading %v° is outside 0..360", fl.HeadingDeg)
		}
		if !(fl.IAS >= 0) || math.IsInf(fl.IAS, 0) {
			return nil, nil, inputErr("speed", "speed %v m/s is not positive", fl.IAS)
		}
		if fl.IAS > 0 && fl.IAS < ac.StallIASAt(req.Cond) {
			return nil, nil, inputErr("speed", "speed at the failure %.1f m/s (%.0f kt) is below the stall speed %.1f m/s (%.0f kt)", fl.IAS, fl.IAS/knot, ac.StallIASAt(req.Cond), ac.StallIASAt(req.Cond)/knot)
		}
		if fl.IAS > 1.5*ac.MaxIAS {
			return nil, nil, inputErr("speed", "speed at the failure %.0f kt is far above the profile's maximum %.0f kt", fl.IAS/knot, ac.MaxIAS/knot)
		}
		t := transition.Failure{FailTAS: 1, GlideTAS: 1, ReactionTime: fl.ReactionTime, Efficiency: fl.Efficiency, Bank: fl.Bank}
		if err := t.Validate(); err != nil {
			name := "reaction_time"
			switch {
			case !(fl.Efficiency >= 0 && fl.Efficiency <= 1):
				name = "energy_efficiency"
			case !(fl.Bank >= transition.MinBank && fl.Bank <= transition.MaxBank):
				name = "bank"
			}
			return nil, nil, &InputError{Input: name, Err: err}
		}
		q.eff = fl.Efficiency
	}
	if !(req.Gust >= 0 && req.Gust <= 30) {
		return nil, nil, inputErr("gust", "gust addition %v m/s is outside 0..30 m/s", req.Gust)
	}
	dirs, err := q.candidates()
	if err != nil {
		return nil, nil, err
	}
	return q, dirs, nil
}

// candidates lists the landing directions with their surface wind
// components and refusals.
func (q *planner) candidates() ([]Direction, error) {
	f := q.req.Field
	var degs []float64
	switch {
	case !math.IsNaN(q.req.LandingDir):
		d := q.req.LandingDir
		if !(d >= 0 && d <= 360) {
			return nil, inputErr("landing_dir", "landing direction %v° is outside 0..360", d)
		}
		degs = []float64{math.Mod(d, 360)}
	case len(f.Directions) > 0:
		for _, d := range f.Directions {
			if !(d >= 0 && d <= 360) {
				return nil, inputErr("landing_directions", "landing direction %v° is outside 0..360", d)
			}
			degs = append(degs, math.Mod(d, 360))
		}
	case f.Strip != nil:
		s, az1, az2, err := geodesy.Inverse(f.Strip[0], f.Strip[1])
		if err != nil || !(s >= 1) {
			return nil, inputErr("strip", "strip of field %q has zero length", f.Name)
		}
		degs = []float64{math.Mod(az1+360, 360), math.Mod(az2+180+360, 360)}
	default:
		// Straight into the surface wind, when there is one, then every
		// 10° (less the one it repeats).
		we, wn := q.wind(q.elev)
		into := math.NaN()
		if math.Hypot(we, wn) > 0.1 {
			into = math.Mod(math.Round(math.Atan2(-we, -wn)*180/math.Pi*1e6)/1e6+360, 360)
			degs = append(degs, into)
		}
		for d := 0.0; d < 360; d += 10 {
			if !(math.Abs(transition.Wrap((d-into)*deg)) < 0.5*deg) {
				degs = append(degs, d)
			}
		}
	}
	we, wn := q.wind(q.elev)
	out := make([]Direction, 0, len(degs))
	for _, d := range degs {
		th := d * math.Pi / 180
		along := we*math.Sin(th) + wn*math.Cos(th)
		cross := math.Abs(we*math.Cos(th) - wn*math.Sin(th))
		dir := Direction{Deg: d, Headwind: -along, Crosswind: cross}
		switch {
		case cross > q.p.MaxCrosswind+1e-9:
			dir.Refused = fmt.Sprintf("crosswind %.0f kt is over the limit of %.0f kt", cross/knot, q.p.MaxCrosswind/knot)
		case along > q.p.MaxTailwind+1e-9:
			dir.Refused = fmt.Sprintf("tailwind %.0f kt is over the limit of %.0f kt", along/knot, q.p.MaxTailwind/knot)
		}
		out = append(out, dir)
	}
	return out, nil
}

// approachSpeed sets q.ias for a landing with headwind hw (m/s) and says
// how it was set.
func (q *planner) approachSpeed(hw float64) (string, error) {
	ac, c := q.ac, q.req.Cond
	base, from := ac.UsableMinIAS(c), fmt.Sprintf("%.1f × stall", reach.StallMargin)
	if ac.MinIAS > 0 {
		from = "profile min_speed"
	}
	if ac.ApproachIAS > 0 {
		base, from = ac.ApproachIAS*math.Sqrt(ac.MassAt(c)/ac.RefMass), "profile approach_speed"
	}
	if q.req.ApproachIAS > 0 {
		base, from = q.req.ApproachIAS, "given approach speed"
		if base < ac.UsableMinIAS(c) {
			return "", inputErr("approach_speed", "approach speed %.1f m/s (%.0f kt) is below the lowest usable speed %.1f m/s (%.0f kt; stall %.0f kt)",
				base, base/knot, ac.UsableMinIAS(c), ac.UsableMinIAS(c)/knot, ac.StallIASAt(c)/knot)
		}
	}
	add := q.p.WindFactor*math.Max(hw, 0) + q.req.Gust
	v := math.Min(base+add, ac.UsableMaxIAS(c))
	q.ias, q.add = v, add
	return from, nil
}

// pattern corner positions for landing direction th (radians) and downwind
// extension ext: entry E, base B, final F, aim A, threshold T.
type corners struct {
	E, B, F, A, T [2]float64
	th            float64
}

func (q *planner) corners(th, ext float64) corners {
	u := [2]float64{math.Sin(th), math.Cos(th)}
	v := [2]float64{math.Sin(th + q.side*math.Pi/2), math.Cos(th + q.side*math.Pi/2)}
	var c corners
	c.th = th
	f := q.req.Field
	aimBack := 0.0
	if f.Strip != nil {
		// Threshold: the strip end the final arrives over.
		x0, y0 := q.frame.Forward(f.Strip[0].Lat, f.Strip[0].Lon)
		x1, y1 := q.frame.Forward(f.Strip[1].Lat, f.Strip[1].Lon)
		if (x1-x0)*u[0]+(y1-y0)*u[1] < 0 {
			x0, y0, x1, y1 = x1, y1, x0, y0
		}
		L := math.Hypot(x1-x0, y1-y0)
		d := math.Min(q.p.AimDistance, L/3)
		c.T = [2]float64{x0, y0}
		c.A = [2]float64{x0 + d*u[0], y0 + d*u[1]}
	} else {
		aimBack = q.p.AimDistance
		c.A = [2]float64{0, 0}
		c.T = [2]float64{-aimBack * u[0], -aimBack * u[1]}
	}
	a := c.A
	lf := q.p.FinalLength
	c.F = [2]float64{a[0] - lf*u[0], a[1] - lf*u[1]}
	c.B = [2]float64{c.F[0] + q.p.Spacing*v[0], c.F[1] + q.p.Spacing*v[1]}
	c.E = [2]float64{a[0] + q.p.Spacing*v[0] + ext*u[0], a[1] + q.p.Spacing*v[1] + ext*u[1]}
	return c
}
