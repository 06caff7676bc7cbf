package approach

import (
	"fmt"
	"math"
)

// finish fills the result of an attempt that holds, with its decide-by
// point.
func (q *planner) finish(res *Result, a *attempt) (*Result, error) {
	if err := q.fill(res, a); err != nil {
		return nil, err
	}
	res.Feasible = true
	if q.req.Failure != nil {
		if err := q.decide(res, a); err != nil {
			return nil, err
		}
	}
	return res, nil
}

// fill writes an attempt's gates, legs, path and figures into res.
func (q *planner) fill(res *Result, a *attempt) error {
	b := a.b
	j, err := q.join(b.pts[0][0], b.pts[0][1], b.heading[0], 0, true)
	if err != nil {
		return err
	}
	res.Variant = b.variant
	res.Sequence = j.seq
	if j.seq != nil {
		for _, st := range j.seq.Stages {
			if st.Name == "turn" {
				res.turn, res.turnH = j.seq.TurnAngle, st.Height
			}
		}
	}
	res.Arrival = j.hEnd
	res.Required = b.startAlt[0] + j.turnH
	res.Excess = res.Arrival - res.Required
	res.Extension = b.ext
	res.FinalExcess = b.finalExcess
	res.FinalGroundRise = b.finalRise
	n := len(b.pts)
	gl := Leg{Name: "glide", From: "aircraft", To: b.names[0], Track: bearingDeg(j.track), Heading: math.NaN(),
		Drift: math.NaN(), Length: j.length, Time: j.time, HeightLost: j.rh - j.hEnd, IAS: j.stfIAS,
		TAS: math.NaN(), LowestClear: j.lowest}
	if j.time > 0 {
		gl.GroundSpeed = j.length / j.time
	}
	if gl.HeightLost > 0 {
		gl.GlideRatio = j.length / gl.HeightLost
	}
	if math.IsInf(gl.LowestClear, 1) {
		gl.LowestClear = math.NaN()
	}
	res.Legs = append([]Leg{gl}, b.legs...)
	res.Gates = make([]Gate, n)
	dist, tim := 0.0, 0.0
	for k := n - 1; k >= 0; k-- {
		lat, lon := q.latlon(b.pts[k][0], b.pts[k][1])
		g := Gate{Name: b.names[k], Lat: lat, Lon: lon, AltMSL: b.gateAlt[k]}
		if k < n-1 {
			dist += b.legs[k].Length
			tim += b.legs[k].Time
			g.Track, g.Heading, g.Drift = b.legs[k].Track, b.legs[k].Heading, b.legs[k].Drift
		} else {
			last := b.legs[n-2]
			g.Track, g.Heading, g.Drift = last.Track, last.Heading, last.Drift
		}
		ang, h, t := b.turnAng[k], b.turnH[k], b.turnT[k]
		if k == 0 {
			ang, h, t = j.turnAng, j.turnH, j.turnT
			g.AltMSL = res.Required
		}
		tim += t
		g.TurnDeg, g.TurnHeight = ang/deg, h
		g.DistToTouchdown, g.TimeToTouchdown = dist, tim
		g.HeightAboveField = g.AltMSL - q.elev
		res.Gates[k] = g
	}
	if a.circles > 0 {
		we, wn := q.wind(b.startAlt[0])
		res.Holding = Holding{Circles: a.circles, HeightLost: float64(a.circles) * a.perCircle, PerCircle: a.perCircle,
			CircleTime: a.circleT, DriftPerCircle: math.Hypot(we, wn) * a.circleT, Lat: res.Gates[0].Lat, Lon: res.Gates[0].Lon}
	}
	// The path: the failure and glide, then the pattern sampled every
	// ~100 m at its planned altitude.
	path := j.path
	for k := 0; k < n-1; k++ {
		p0, p1 := b.pts[k], b.pts[k+1]
		L := b.legs[k].Length
		m := int(math.Ceil(L/100)) + 1
		h0, h1 := b.startAlt[k], b.gateAlt[k+1]
		if k == n-2 {
			h1 = q.elev
		}
		for i := 0; i <= m; i++ {
			f := float64(i) / float64(m)
			x, y := p0[0]+f*(p1[0]-p0[0]), p0[1]+f*(p1[1]-p0[1])
			alt := h0 + f*(h1-h0)
			if i == 0 {
				alt = b.gateAlt[k]
				if k == 0 {
					alt = res.Required
				}
			}
			lat, lon := q.latlon(x, y)
			te, ok := q.ground(x, y)
			if !ok {
				te = math.NaN()
			}
			path = append(path, PathPoint{Lat: lat, Lon: lon, AltMSL: alt, Ground: te, Part: b.legs[k].Name})
		}
	}
	d := 0.0
	for i := range path {
		if i > 0 {
			x0, y0 := q.frame.Forward(path[i-1].Lat, path[i-1].Lon)
			x1, y1 := q.frame.Forward(path[i].Lat, path[i].Lon)
			d += math.Hypot(x1-x0, y1-y0)
		}
		path[i].Dist = d
	}
	res.Path = path
	res.Notes = nil
	if res.Excess > 1 && res.Variant != "full pattern" {
		res.Notes = append(res.Notes, fmt.Sprintf("arrives %.0f m above the entry height: lose it on the way in", res.Excess))
	} else if a.circles > 0 || b.ext > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("arrives %.0f m high: %d circle(s) over the entry gate (%.0f m each), downwind lengthened by %.0f m",
			res.Excess, a.circles, a.perCircle, b.ext))
	}
	if b.kept > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("the pattern is flown %.0f m above the glide's need at the base and entry gates, to keep the least pattern heights (base %.0f m, entry %.0f m above the field)", b.kept, q.p.BaseHeight, q.p.EntryHeight))
	}
	if res.FinalExcess > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("the final is planned %.0f m above the clean glide: airbrakes, flaps or a slip take it off", res.FinalExcess))
	}
	if res.FinalGroundRise > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("the ground rises by up to %.0f m under the final", res.FinalGroundRise))
	}
	return nil
}

// decide finds the last point on the failure heading at which turning
// for this plan still holds: delays in steps of 5 s up to 10 min.
func (q *planner) decide(res *Result, a *attempt) error {
	b := a.b
	last := -1.0
	for d := 0.0; d <= 600; d += 5 {
		j, err := q.join(b.pts[0][0], b.pts[0][1], b.heading[0], d, false)
		if err != nil {
			return err
		}
		if j.noHeadway || j.blocked != "" || j.hEnd-j.turnH < b.startAlt[0] {
			break
		}
		last = d
	}
	if last < 0 {
		return nil
	}
	j, err := q.join(b.pts[0][0], b.pts[0][1], b.heading[0], last, false)
	if err != nil {
		return err
	}
	x, y, h, t := q.sx, q.sy, q.req.Alt, 0.0
	for _, st := range j.seq.Stages {
		if st.Name == "turn" {
			break
		}
		x, y, h, t = x+st.East, y+st.North, h-st.Height, t+st.Time
	}
	lat, lon := q.latlon(x, y)
	res.DecideBy = &Gate{Name: "decide by", Lat: lat, Lon: lon, AltMSL: h, HeightAboveField: h - q.elev,
		Track: math.NaN(), Heading: q.req.Failure.HeadingDeg, Drift: math.NaN()}
	res.DecideAfter = t
	return nil
}
