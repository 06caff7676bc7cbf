package approach

import (
	"fmt"
	"math"
	"strings"

	"glidereach/reach"
	"glidereach/reach/transition"
)

// joined is the forward glide from the aircraft's state to a join point.
type joined struct {
	seq       *transition.Sequence
	rx, ry    float64 // where the straight glide starts
	rh        float64
	track     float64 // radians, of the glide
	length    float64 // m, of the straight glide
	time      float64 // s, of the straight glide
	hEnd      float64 // altitude at the join point, after the speed change to the approach speed
	turnAng   float64 // join turn onto the first leg (radians)
	turnH     float64
	turnT     float64
	blocked   string // why the terrain refuses the glide
	noHeadway bool
	lowest    float64 // least clearance over the glide
	stfIAS    float64
	path      []PathPoint
}

// glide flies straight from (x0, y0, h0) to (x1, y1) at the speed to fly
// through the wind at each altitude: dh/ds = −(w + s)/G with the speed to
// fly re-optimised at each RK4 stage (reach.Aircraft.SpeedToFly). It checks
// the terrain every step against the en-route clearance, tapering to the
// height above the field.
func (q *planner) glide(j *joined, x0, y0, h0, x1, y1 float64, record bool) {
	L := math.Hypot(x1-x0, y1-y0)
	th := math.Atan2(x1-x0, y1-y0)
	thDeg := bearingDeg(th)
	j.track, j.length, j.lowest = th, L, math.Inf(1)
	ac, c := q.ac, q.req.Cond
	stf := func(h float64) reach.SpeedToFly {
		var along, cross float64
		if q.req.Wind != nil {
			along, cross = q.req.Wind.Components(h, thDeg)
		}
		return ac.SpeedToFly(q.req.Atm.Density(h), along, cross, c)
	}
	f := func(h float64) (float64, float64, bool) {
		s := stf(h)
		if s.NoHeadway {
			return 0, 0, false
		}
		return -(s.Sink + c.AirSink) / s.GroundSpeed, s.GroundSpeed, true
	}
	// RK4 in steps of at most 500 m (the wind and density change slowly
	// with height); the terrain is checked every q.step in between, at
	// the altitude interpolated linearly within the step.
	n := int(math.Ceil(L / 500))
	if n < 1 {
		n = 1
	}
	ds := L / float64(n)
	sub := int(math.Ceil(ds / q.step))
	h := h0
	check := func(fr, h float64) {
		x, y := x0+fr*(x1-x0), y0+fr*(y1-y0)
		te, ok := q.ground(x, y)
		if record {
			lat, lon := q.latlon(x, y)
			g := te
			if !ok {
				g = math.NaN()
			}
			j.path = append(j.path, PathPoint{Lat: lat, Lon: lon, AltMSL: h, Ground: g, Part: "glide"})
		}
		if !ok {
			q.unknown++
			return
		}
		clear := h - te
		j.lowest = math.Min(j.lowest, clear)
		need := math.Min(q.req.Clearance, h-q.elev)
		if clear < need-1e-6 && j.blocked == "" {
			lat, lon := q.latlon(x, y)
			j.blocked = fmt.Sprintf("terrain at %.5f,%.5f (%.0f m) is %.0f m below the glide to the entry, %.0f m needed", lat, lon, te, clear, need)
		}
	}
	check(0, h)
	for i := 0; i < n; i++ {
		k1, g1, ok1 := f(h)
		k2, _, ok2 := f(h + ds/2*k1)
		k3, _, ok3 := f(h + ds/2*k2)
		k4, g4, ok4 := f(h + ds*k3)
		if !(ok1 && ok2 && ok3 && ok4) {
			j.noHeadway = true
			j.hEnd = math.Inf(-1)
			return
		}
		hn := h + ds/6*(k1+2*k2+2*k3+k4)
		j.time += ds * (1/g1 + 1/g4) / 2
		for k := 1; k <= sub; k++ {
			a := float64(k) / float64(sub)
			check((float64(i)+a)/float64(n), h+a*(hn-h))
		}
		h = hn
	}
	s := stf(h)
	j.stfIAS = s.IAS
	// Slowing from the speed to fly to the approach speed at the join.
	app, _ := q.app(h)
	j.hEnd = h + transition.EnergyCredit(s.TAS, app, q.eff)
}

// join flies from the aircraft's state to point p, turning there onto a
// leg of heading legHd (radians). delay is extra straight flight on the
// failure heading before the turn (for the decide-by point).
func (q *planner) join(px, py, legHd, delay float64, record bool) (*joined, error) {
	r := q.req
	j := &joined{rx: q.sx, ry: q.sy, rh: r.Alt}
	ac, c := q.ac, r.Cond
	if r.Failure != nil {
		fl := r.Failure
		rho := r.Atm.Density(r.Alt)
		sigma := rho / reach.ISADensity0
		th0 := bearingDeg(math.Atan2(px-q.sx, py-q.sy))
		var along, cross float64
		if r.Wind != nil {
			along, cross = r.Wind.Components(r.Alt, th0)
		}
		s := ac.SpeedToFly(rho, along, cross, c)
		tf := transition.Failure{Heading: fl.HeadingDeg * deg, GlideTAS: s.TAS, GlideSink: s.Sink + c.AirSink,
			ReactionTime: fl.ReactionTime, Efficiency: fl.Efficiency, Bank: fl.Bank, Delay: delay}
		tf.FailTAS, tf.FailSink = tf.GlideTAS, tf.GlideSink
		if fl.IAS > 0 {
			tf.FailTAS = reach.TAS(fl.IAS, sigma)
			tf.FailSink = ac.Sink(tf.FailTAS, rho, c) + c.AirSink
		}
		we, wn := q.wind(r.Alt)
		seq, _, _, err := tf.Toward(px-q.sx, py-q.sy, we, wn)
		if err != nil {
			return nil, err
		}
		j.seq = &seq
		j.rx, j.ry, j.rh = q.sx+seq.East, q.sy+seq.North, r.Alt-seq.Height
		// The failure's stages over the terrain (their end points and the
		// turn's middle).
		x, y, h := q.sx, q.sy, r.Alt
		if record {
			q.recordPoint(j, x, y, h, "failure")
		}
		for _, st := range seq.Stages {
			if st.Name == "turn" && seq.TurnAngle != 0 {
				// Sample the arc for the path and the terrain check.
				const m = 12
				for i := 1; i < m; i++ {
					a := seq.TurnAngle * float64(i) / m
					de, dn := seq.Turn.Displacement(seq.Heading-seq.TurnAngle, a, we, wn)
					hh := h - seq.Turn.HeightLost(a)
					q.checkPoint(j, x+de, y+dn, hh)
					if record {
						q.recordPoint(j, x+de, y+dn, hh, "turn")
					}
				}
			}
			x, y, h = x+st.East, y+st.North, h-st.Height
			q.checkPoint(j, x, y, h)
			if record {
				q.recordPoint(j, x, y, h, st.Name)
			}
		}
	}
	q.glide(j, j.rx, j.ry, j.rh, px, py, record)
	if j.noHeadway {
		return j, nil
	}
	// The turn at the join point onto the first leg, at the approach speed.
	tas, _ := q.app(j.hEnd)
	we, wn := q.wind(j.hEnd)
	arrHd, _, _, _ := transition.HeadingFor(j.track, tas, we, wn)
	j.turnAng = transition.Wrap(legHd - arrHd)
	tr, err := q.turnAt(j.hEnd)
	if err != nil {
		return nil, err
	}
	j.turnH, j.turnT = tr.HeightLost(j.turnAng), tr.Time(j.turnAng)
	return j, nil
}

func (q *planner) recordPoint(j *joined, x, y, h float64, part string) {
	lat, lon := q.latlon(x, y)
	te, ok := q.ground(x, y)
	if !ok {
		te = math.NaN()
	}
	j.path = append(j.path, PathPoint{Lat: lat, Lon: lon, AltMSL: h, Ground: te, Part: part})
}

func (q *planner) checkPoint(j *joined, x, y, h float64) {
	te, ok := q.ground(x, y)
	if !ok {
		q.unknown++
		return
	}
	clear := h - te
	need := math.Min(q.req.Clearance, h-q.elev)
	if clear < need-1e-6 && j.blocked == "" {
		lat, lon := q.latlon(x, y)
		j.blocked = fmt.Sprintf("terrain at %.5f,%.5f (%.0f m) is %.0f m below the path after the failure, %.0f m needed", lat, lon, te, clear, need)
	}
}

// attempt is one variant with its join.
type attempt struct {
	b      *built
	j      *joined
	excess float64 // arrival − required at the first gate
	why    string  // "" when it holds
	// Holding circles over the entry gate (full pattern only).
	circles            int
	perCircle, circleT float64
}

func (q *planner) try(c chain) (*attempt, error) {
	b, err := q.build(c)
	if err != nil {
		if e, ok := err.(errNoHeadway); ok {
			return &attempt{excess: math.Inf(-1), why: e.Error()}, nil
		}
		return nil, err
	}
	j, err := q.join(c.pts[0][0], c.pts[0][1], b.heading[0], 0, false)
	if err != nil {
		return nil, err
	}
	a := &attempt{b: b, j: j}
	switch {
	case j.noHeadway:
		a.excess, a.why = math.Inf(-1), "no headway against the wind on the glide to the field"
	default:
		a.excess = j.hEnd - j.turnH - b.startAlt[0]
	}
	switch {
	case a.why != "":
	case b.terrain != "":
		a.why = b.terrain
	case j.blocked != "":
		a.why = j.blocked
	case a.excess < 0:
		a.why = fmt.Sprintf("%.0f m short at the entry of the %s", -a.excess, c.variant)
	}
	return a, nil
}

// planDirection plans the landing in direction d (degrees true).
func (q *planner) planDirection(d float64) (*Result, error) {
	th := d * deg
	res := &Result{LandingDir: d, Arrival: math.NaN(), Required: math.NaN(), Excess: math.NaN()}
	hw := 0.0
	we, wn := q.wind(q.elev)
	hw = -(we*math.Sin(th) + wn*math.Cos(th))
	from, err := q.approachSpeed(hw)
	if err != nil {
		return nil, err
	}
	res.ApproachIAS, res.ApproachFrom, res.ApproachAdd = q.ias, from, q.add
	cr := q.corners(th, 0)
	var best *attempt
	var rejected []string
	seen := map[string]bool{}
	consider := func(a *attempt) bool {
		if best == nil || a.why == "" && best.why != "" || (a.why == "") == (best.why == "") && a.excess > best.excess {
			best = a
		}
		if a.why != "" && a.b != nil && !seen[a.b.variant] {
			// The first reason each variant was given up for.
			seen[a.b.variant] = true
			rejected = append(rejected, a.b.variant+": "+a.why)
		}
		return a.why == ""
	}
	defer func() {
		// The variant taken is not "not taken", though its first tries were.
		for _, r := range rejected {
			if !(res.Feasible && strings.HasPrefix(r, res.Variant+": ")) {
				res.Rejected = append(res.Rejected, r)
			}
		}
	}()
	// 1. The full pattern.
	full := chain{variant: "full pattern", pts: [][2]float64{cr.E, cr.B, cr.F, cr.A},
		names: []string{"entry", "base", "final", "touchdown"}, legs: []string{"downwind", "base", "final"}}
	a, err := q.try(full)
	if err != nil {
		return nil, err
	}
	if consider(a) {
		return q.finish(res, q.loseExcess(a, th))
	}
	// 2. Shorter downwind: joined part way along it, longest first.
	eb := math.Hypot(cr.B[0]-cr.E[0], cr.B[1]-cr.E[1])
	for dist := eb - 100; dist >= 100; dist -= 100 {
		f := dist / eb
		j := [2]float64{cr.B[0] + f*(cr.E[0]-cr.B[0]), cr.B[1] + f*(cr.E[1]-cr.B[1])}
		a, err := q.try(chain{variant: "shorter downwind", pts: [][2]float64{j, cr.B, cr.F, cr.A},
			names: []string{"entry", "base", "final", "touchdown"}, legs: []string{"downwind", "base", "final"}})
		if err != nil {
			return nil, err
		}
		if consider(a) {
			return q.finish(res, a)
		}
	}
	// 3. Straight to base: joined on the base leg.
	bf := q.p.Spacing
	for dist := bf; dist >= 100; dist -= 100 {
		f := dist / bf
		j := [2]float64{cr.F[0] + f*(cr.B[0]-cr.F[0]), cr.F[1] + f*(cr.B[1]-cr.F[1])}
		a, err := q.try(chain{variant: "straight to base", pts: [][2]float64{j, cr.F, cr.A},
			names: []string{"entry", "final", "touchdown"}, legs: []string{"base", "final"}})
		if err != nil {
			return nil, err
		}
		if consider(a) {
			return q.finish(res, a)
		}
	}
	// 4. Straight in: a final of at least FinalLength; the one with the
	// most height in hand.
	u := [2]float64{math.Sin(th), math.Cos(th)}
	var in *attempt
	for dist := q.p.FinalLength; dist <= q.p.FinalLength+8000; dist += 200 {
		j := [2]float64{cr.A[0] - dist*u[0], cr.A[1] - dist*u[1]}
		a, err := q.try(chain{variant: "straight in", pts: [][2]float64{j, cr.A},
			names: []string{"entry", "touchdown"}, legs: []string{"final"}})
		if err != nil {
			return nil, err
		}
		if a.why == "" && (in == nil || a.excess > in.excess) {
			in = a
		}
		consider(a)
	}
	if in != nil {
		return q.finish(res, in)
	}
	res.Feasible = false
	res.Reason = q.reason(best)
	if best.b != nil {
		q.fill(res, best)
		res.Feasible = false
		res.Reason = q.reason(best)
	}
	return res, nil
}

// reason explains an attempt that does not hold.
func (q *planner) reason(a *attempt) string {
	return "no variant of the pattern holds; the closest: " + a.why
}

// loseExcess turns a height excess at the full pattern's entry into whole
// circles over the entry gate and a longer downwind.
func (q *planner) loseExcess(a *attempt, th float64) *attempt {
	h := a.b.startAlt[0]
	tr, err := q.turnAt(h)
	if err != nil {
		return a
	}
	per := tr.HeightLost(2 * math.Pi)
	excess := a.excess
	circles := int(math.Floor(excess / per))
	rest := excess - float64(circles)*per
	out := a
	// The rest, when worth it, as a longer downwind at its ground glide ratio.
	if rest > 10 {
		_, w, _, _, g, ok := q.appGround(th+math.Pi, h)
		if ok {
			ext := math.Min(0.9*rest*g/w, q.p.MaxExtension)
			cr := q.corners(th, ext)
			b, err := q.try(chain{variant: "full pattern", pts: [][2]float64{cr.E, cr.B, cr.F, cr.A},
				names: []string{"entry", "base", "final", "touchdown"}, legs: []string{"downwind", "base", "final"}})
			if err == nil && b.why == "" {
				circles = int(math.Floor(b.excess / per))
				out = b
				out.b.ext = ext
			}
		}
	}
	out.circles, out.perCircle, out.circleT = circles, per, tr.Time(2*math.Pi)
	return out
}
