package approach

import (
	"fmt"
	"math"

	"glidereach/reach"
	"glidereach/reach/transition"
)

const deg = math.Pi / 180

// chain is the part of the pattern flown from a join point to the aim
// point: corners pts (the last is the aim point), gate names, leg names.
type chain struct {
	variant string
	pts     [][2]float64
	names   []string
	legs    []string
}

// built is a chain with its heights worked backward from the aim point.
type built struct {
	chain
	startAlt    []float64 // altitude at the start of leg k, after the turn at gate k
	gateAlt     []float64 // altitude arriving at gate k, before its turn (last: field elevation)
	heading     []float64 // radians, of leg k
	track       []float64 // radians, of leg k
	turnAng     []float64 // radians at gate k (0 at the first and last)
	turnH       []float64
	turnT       []float64
	legs        []Leg
	finalExcess float64
	terrain     string // "" or why the terrain under the pattern refuses it
	finalRise   float64
	ext         float64 // m the downwind was lengthened
	kept        float64 // m added at the base and entry gates for the least pattern heights
}

// ground speed and figures of the approach on track th at altitude h.
func (q *planner) appGround(th, h float64) (tas, sink, heading, drift, g float64, ok bool) {
	tas, sink = q.app(h)
	we, wn := q.wind(h)
	heading, drift, g, ok = transition.HeadingFor(th, tas, we, wn)
	return
}

// legBack integrates a leg of ground length L on track th backward from
// its end altitude hEnd: dh/ds = w/G, RK4 in steps ≤ 50 m. It returns the
// start altitude and the time flown; ok false when the track has no
// headway.
func (q *planner) legBack(th, L, hEnd float64) (hStart, t float64, ok bool) {
	n := int(math.Ceil(L / 50))
	if n < 1 {
		n = 1
	}
	ds := L / float64(n)
	f := func(h float64) (float64, float64, bool) {
		_, w, _, _, g, ok := q.appGround(th, h)
		if !ok {
			return 0, 0, false
		}
		return w / g, g, true
	}
	h := hEnd
	for i := 0; i < n; i++ {
		k1, g1, ok1 := f(h)
		k2, _, ok2 := f(h + ds/2*k1)
		k3, _, ok3 := f(h + ds/2*k2)
		k4, g4, ok4 := f(h + ds*k3)
		if !(ok1 && ok2 && ok3 && ok4) {
			return math.NaN(), math.NaN(), false
		}
		h += ds / 6 * (k1 + 2*k2 + 2*k3 + k4)
		t += ds * (1/g1 + 1/g4) / 2
	}
	return h, t, true
}

// turnAt returns the turn flown at the approach speed at altitude h.
func (q *planner) turnAt(h float64) (transition.Turn, error) {
	tas, w := q.app(h)
	return transition.NewTurn(q.p.Bank, tas, w)
}

// build works the heights of c backward from the aim point at the field's
// elevation, and checks the terrain under its legs.
func (q *planner) build(c chain) (*built, error) {
	n := len(c.pts)
	b := &built{chain: c, startAlt: make([]float64, n), gateAlt: make([]float64, n),
		heading: make([]float64, n), track: make([]float64, n), turnAng: make([]float64, n),
		turnH: make([]float64, n), turnT: make([]float64, n), legs: make([]Leg, n-1)}
	for k := 0; k < n-1; k++ {
		p0, p1 := c.pts[k], c.pts[k+1]
		b.track[k] = math.Atan2(p1[0]-p0[0], p1[1]-p0[1])
	}
	b.track[n-1] = b.track[n-2]
	b.gateAlt[n-1] = q.elev
	b.startAlt[n-1] = q.elev
	for k := n - 2; k >= 0; k-- {
		p0, p1 := c.pts[k], c.pts[k+1]
		L := math.Hypot(p1[0]-p0[0], p1[1]-p0[1])
		hEnd := b.gateAlt[k+1]
		h0, t, ok := q.legBack(b.track[k], L, hEnd)
		if !ok {
			return nil, errNoHeadway{leg: c.legs[k]}
		}
		if k == n-2 {
			// The final: at least FinalHeight after the turn onto it, and
			// its clean height plus the margin for airbrakes, flaps or slip.
			clean := h0 - q.elev
			need := math.Max(q.p.FinalHeight, clean*(1+q.p.Margin))
			b.finalExcess = need - clean
			h0 = q.elev + need
		}
		b.startAlt[k] = h0
		hm := (h0 + hEnd) / 2
		tas, _, hd, dr, _, _ := q.appGround(b.track[k], hm)
		rho := q.req.Atm.Density(hm)
		b.heading[k] = hd
		lost := h0 - hEnd
		if k == n-2 {
			lost -= b.finalExcess
		}
		b.legs[k] = Leg{Name: c.legs[k], From: c.names[k], To: c.names[k+1], Track: bearingDeg(b.track[k]),
			Heading: bearingDeg(hd), Drift: dr / deg, GroundSpeed: L / t, TAS: tas, IAS: reach.IAS(tas, rho/reach.ISADensity0),
			Length: L, HeightLost: lost, Time: t, GlideRatio: L / lost, LowestClear: math.NaN()}
		if k > 0 {
			// The turn at gate k, from the previous leg's heading onto this
			// one: its heading is known only after the previous leg, so take
			// it from that leg's track and the wind at this gate.
			tprev := math.Atan2(c.pts[k][0]-c.pts[k-1][0], c.pts[k][1]-c.pts[k-1][1])
			_, _, hprev, _, _, ok := q.appGround(tprev, h0)
			if !ok {
				return nil, errNoHeadway{leg: c.legs[k-1]}
			}
			ang := transition.Wrap(hd - hprev)
			tr, err := q.turnAt(h0)
			if err != nil {
				return nil, err
			}
			b.turnAng[k], b.turnH[k], b.turnT[k] = ang, tr.HeightLost(ang), tr.Time(ang)
			b.gateAlt[k] = h0 + b.turnH[k]
		} else {
			b.gateAlt[k] = h0
		}
		// The kind's least pattern heights: at the base gate always, at the
		// entry of the full pattern. What they add over the glide's need is
		// kept (airbrakes, slip or a wider pattern take it off).
		least := math.Inf(-1)
		switch {
		case c.names[k] == "base":
			least = q.elev + q.p.BaseHeight
		case k == 0 && c.variant == "full pattern":
			least = q.elev + q.p.EntryHeight
		}
		if b.gateAlt[k] < least {
			b.kept += least - b.gateAlt[k]
			b.startAlt[k] += least - b.gateAlt[k]
			b.gateAlt[k] = least
		}
	}
	q.checkPattern(b)
	return b, nil
}

type errNoHeadway struct{ leg string }

func (e errNoHeadway) Error() string {
	return fmt.Sprintf("no headway against the wind on the %s leg at the approach speed", e.leg)
}

// checkPattern samples the terrain under each leg against the planned
// altitude (linear between the leg's ends): at least Params.Clearance,
// tapering to the height above the field, except over the landing area
// (the last AimDistance + 100 m before the aim point).
func (q *planner) checkPattern(b *built) {
	n := len(b.pts)
	b.finalRise = math.Inf(-1)
	guard := q.p.AimDistance + 100
	for k := 0; k < n-1; k++ {
		p0, p1 := b.pts[k], b.pts[k+1]
		L := math.Hypot(p1[0]-p0[0], p1[1]-p0[1])
		m := int(math.Ceil(L/q.step)) + 1
		low := math.Inf(1)
		for i := 0; i <= m; i++ {
			f := float64(i) / float64(m)
			x, y := p0[0]+f*(p1[0]-p0[0]), p0[1]+f*(p1[1]-p0[1])
			alt := b.startAlt[k] + f*(b.gateAlt[k+1]-b.startAlt[k])
			if k == n-2 {
				// On final the path descends from the final gate's height
				// to the field; the airbrakes' excess is taken evenly.
				alt = b.startAlt[k] + f*(q.elev-b.startAlt[k])
			}
			te, ok := q.ground(x, y)
			if !ok {
				q.unknown++
				continue
			}
			toAim := (1 - f) * L
			if k == n-2 {
				b.finalRise = math.Max(b.finalRise, te-q.elev)
				if toAim < guard {
					continue
				}
			}
			clear := alt - te
			low = math.Min(low, clear)
			// The least clearance tapers to half the height above the
			// field: ground may rise under the final to no more than half
			// the planned height there.
			need := math.Min(q.p.Clearance, (alt-q.elev)/2)
			if clear < need-1e-6 && b.terrain == "" {
				lat, lon := q.latlon(x, y)
				b.terrain = fmt.Sprintf("terrain under the %s leg at %.5f,%.5f rises to %.0f m, %.0f m below the pattern (%.0f m needed)",
					b.legs[k].Name, lat, lon, te, clear, need)
			}
		}
		if !math.IsInf(low, 1) {
			b.legs[k].LowestClear = low
		}
	}
	if math.IsInf(b.finalRise, -1) {
		b.finalRise = math.NaN()
	}
}

func bearingDeg(rad float64) float64 { return math.Mod(rad/deg+720, 360) }
