package reach

import "math"

// WindField gives the wind components along and across a held track.
// Components returns, at altitude alt (m MSL) on a track of trackDeg degrees
// true (clockwise from north), the along-track component (m/s, positive =
// tailwind) and the cross-track component (m/s, positive = wind from the
// left, pushing the aircraft to the right). A nil WindField is still air.
// wind.Profile implements it.
type WindField interface {
	Components(alt, trackDeg float64) (along, cross float64)
}

// Clamp says whether an optimum speed was held at a limit of the usable range.
type Clamp int8

const (
	Free     Clamp = iota // the optimum lies inside the usable range
	ClampMin              // the optimum wanted a slower speed; held at the usable minimum (stall margin)
	ClampMax              // the optimum wanted a faster speed; held at the maximum speed
)

// String returns "", "min" or "max".
func (c Clamp) String() string {
	switch c {
	case ClampMin:
		return "min"
	case ClampMax:
		return "max"
	}
	return ""
}

// SpeedToFly is the speed to fly on a held track and what it gives.
type SpeedToFly struct {
	IAS, TAS    float64 // m/s, the speed to fly
	GroundSpeed float64 // m/s along the track, G = √(V² − W_c²) + W_t; ≤ 0 when NoHeadway
	Sink        float64 // m/s, the aircraft's sink through the air at TAS (bugs included, sinking air not)
	// GroundRatio is metres over ground per metre of height lost,
	// G/(w + s) with s the sinking-air allowance; 0 when NoHeadway.
	GroundRatio float64
	// Loss is the height lost per metre over ground, (w + s)/G; +Inf when NoHeadway.
	Loss      float64
	Clamp     Clamp // which limit of the usable range held the optimum, if any
	NoHeadway bool  // G ≤ 0 at every usable speed: the track cannot be made good
}

// Clamped reports whether the speed-to-fly was held at a limit.
func (s SpeedToFly) Clamped() bool { return s.Clamp != Free }

// SpeedToFly returns the speed to fly on a held track at air density rho
// (kg/m³) with along-track wind along (m/s, + tailwind) and cross-track wind
// cross (m/s, either sign), for the mass, contamination, sinking air s and
// MacCready setting m of c. It maximises over true airspeed V in
// [UsableMinIAS, UsableMaxIAS]/√σ
//
//	G(V)/(w(V) + s + m),  G(V) = √(V² − W_c²) + W_t
//
// where the heading is corrected for drift so the track is held. With m = 0
// and s = 0 this is the tangent from (−W_t, 0) to the polar; with m > 0 it is
// the MacCready speed that maximises the average cross-country speed
// (MacCready, "Optimum Airspeed Selector", Soaring, 1958 — date from memory;
// Reichmann, Cross-Country Soaring, ch. on speed to fly — memory). The
// quotient of a concave G and a convex positive sink is quasi-concave, so a
// bounded one-dimensional maximiser (Brent's method) finds the single
// optimum; when it lies outside the usable range the speed is clamped and
// Clamp says so.
//
// c must be valid (Conditions.Validate); the result is undefined otherwise.
func (ac *Aircraft) SpeedToFly(rho, along, cross float64, c Conditions) SpeedToFly {
	sigma := rho / ISADensity0
	lo, hi := TAS(ac.UsableMinIAS(c), sigma), TAS(ac.UsableMaxIAS(c), sigma)
	wc2 := cross * cross
	ground := func(v float64) float64 {
		d := v*v - wc2
		if d < 0 {
			return math.Inf(-1)
		}
		return math.Sqrt(d) + along
	}
	if g := ground(hi); !(g > 0) {
		w := ac.Sink(hi, rho, c)
		if math.IsInf(g, -1) {
			g = along - math.Abs(cross) // cannot even hold the track
		}
		return SpeedToFly{IAS: IAS(hi, sigma), TAS: hi, GroundSpeed: g, Sink: w,
			Loss: math.Inf(1), Clamp: ClampMax, NoHeadway: true}
	}
	extra := c.AirSink + c.MacCready
	obj := func(v float64) float64 {
		d := v*v - wc2
		if d < 0 {
			// The track cannot be held: an increasing penalty keeps the
			// objective quasi-concave.
			return -1e9 + v
		}
		return (math.Sqrt(d) + along) / math.Max(ac.Sink(v, rho, c)+extra, 1e-9)
	}
	v, _, cl := maximizeClamped(obj, lo, hi)
	w := ac.Sink(v, rho, c)
	g := ground(v)
	s := SpeedToFly{IAS: IAS(v, sigma), TAS: v, GroundSpeed: g, Sink: w, Clamp: cl}
	if !(g > 0) {
		s.NoHeadway, s.Loss = true, math.Inf(1)
		return s
	}
	s.Loss = (w + c.AirSink) / g
	s.GroundRatio = g / (w + c.AirSink)
	return s
}

// SpeedToFlyAt is SpeedToFly at altitude h (m MSL) in atmosphere atm.
func (ac *Aircraft) SpeedToFlyAt(h float64, atm Atmosphere, along, cross float64, c Conditions) SpeedToFly {
	return ac.SpeedToFly(atm.Density(h), along, cross, c)
}

// speedTol is the absolute tolerance (m/s) of the speed optimisers; the
// objective is flat at its optimum, so the ratio is exact to ~1e-9.
const speedTol = 1e-4

// maximizeClamped maximises a quasi-concave f on [lo, hi] and reports
// whether the maximum sits at a bound because f still rises beyond it.
func maximizeClamped(f func(float64) float64, lo, hi float64) (x, fx float64, cl Clamp) {
	if !(hi > lo) {
		return lo, f(lo), ClampMin
	}
	h := 1e-6 * math.Max(1, hi)
	if fl := f(lo); fl >= f(lo+h) {
		return lo, fl, ClampMin
	}
	if fh := f(hi); fh >= f(hi-h) {
		return hi, fh, ClampMax
	}
	x, fx = brentMax(f, lo, hi, speedTol)
	return x, fx, Free
}

// brentMax finds the maximum of a unimodal f on [a, b] to within tol by
// Brent's method: golden-section steps combined with parabolic interpolation.
//
// Reference: R. P. Brent, Algorithms for Minimization without Derivatives
// (Prentice-Hall, 1973), ch. 5, procedure localmin (the netlib fmin).
func brentMax(f func(float64) float64, a, b, tol float64) (float64, float64) {
	const (
		c   = 0.3819660112501051 // (3 − √5)/2
		eps = 1.4901161193847656e-08
	)
	g := func(x float64) float64 { return -f(x) }
	v := a + c*(b-a)
	w, x := v, v
	e, d := 0.0, 0.0
	fx := g(x)
	fv, fw := fx, fx
	for iter := 0; iter < 200; iter++ {
		xm := 0.5 * (a + b)
		tol1 := eps*math.Abs(x) + tol/3
		tol2 := 2 * tol1
		if math.Abs(x-xm) <= tol2-0.5*(b-a) {
			break
		}
		golden := true
		if math.Abs(e) > tol1 {
			r := (x - w) * (fx - fv)
			q := (x - v) * (fx - fw)
			p := (x-v)*q - (x-w)*r
			q = 2 * (q - r)
			if q > 0 {
				p = -p
			} else {
				q = -q
			}
			r = e
			e = d
			if math.Abs(p) < math.Abs(0.5*q*r) && p > q*(a-x) && p < q*(b-x) {
				d = p / q
				u := x + d
				if u-a < tol2 || b-u < tol2 {
					d = math.Copysign(tol1, xm-x)
				}
				golden = false
			}
		}
		if golden {
			if x >= xm {
				e = a - x
			} else {
				e = b - x
			}
			d = c * e
		}
		var u float64
		switch {
		case math.Abs(d) >= tol1:
			u = x + d
		case d > 0:
			u = x + tol1
		default:
			u = x - tol1
		}
		fu := g(u)
		if fu <= fx {
			if u >= x {
				a = x
			} else {
				b = x
			}
			v, fv = w, fw
			w, fw = x, fx
			x, fx = u, fu
		} else {
			if u < x {
				a = u
			} else {
				b = u
			}
			if fu <= fw || w == x {
				v, fv = w, fw
				w, fw = u, fu
			} else if fu <= fv || v == x || v == w {
				v, fv = u, fu
			}
		}
	}
	return x, -fx
}
