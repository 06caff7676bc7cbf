package transition

import (
	"errors"
	"fmt"
	"math"
)

// G0 is standard gravity, m/s² (exact by definition; ICAO Doc 7488/3).
const G0 = 9.80665

// Defaults and limits of the tunables. The values are common practice, no
// source, and lean conservative.
const (
	// DefaultReactionTime is the time (s) from the failure to the first
	// deliberate control input: recognising the failure and deciding to
	// glide. 3 s is common practice, no source; a startled pilot may take
	// longer, which the flag allows.
	DefaultReactionTime = 3.0
	// MaxReactionTime bounds the reaction time (s).
	MaxReactionTime = 30.0
	// DefaultEfficiency is the share of the kinetic energy above the glide
	// speed that is credited as height, η in Δh = η·(V₁² − V₂²)/(2g). The
	// pull-up is not free of drag and pilots rarely fly it ideally; 0.5
	// credits half (common practice, no source). 0 gives no credit.
	DefaultEfficiency = 0.5
	// DefaultBank is the bank angle of a turn, degrees: 30° is the bank
	// taught for gliding turns near the ground (common practice, no source).
	DefaultBank = 30.0
	// MinBank and MaxBank bound the bank angle, degrees. Below 10° a turn
	// takes so long the model of a quick turn breaks down; above 60° the
	// load factor (2 g) and the stall speed rise (×1.41) beyond what a
	// planning tool should assume of a pilot in an emergency.
	MinBank = 10.0
	MaxBank = 60.0
	// DefaultDeceleration is the deceleration (m/s²) while slowing from the
	// failure speed to the glide speed on the old heading: a gentle
	// pitch-up of about 0.1 g (common practice, no source). Acceleration,
	// when the failure speed is below the glide speed, uses the same rate.
	DefaultDeceleration = 1.0
)

// Errors of the constructors; callers may test them with errors.Is.
var (
	ErrBank     = errors.New("transition: bank angle out of range")
	ErrSpeed    = errors.New("transition: speed is not positive")
	ErrReaction = errors.New("transition: reaction time out of range")
	ErrEff      = errors.New("transition: energy efficiency out of range")
)

// EnergyHeight returns the energy height (m) of an aircraft at altitude h
// (m) and true airspeed v (m/s):
//
//	h_E = h + V²/(2g)
//
// the altitude it would reach if all its kinetic energy became height
// (Anderson, Introduction to Flight, ch. 6, energy height — from memory).
func EnergyHeight(h, v float64) float64 { return h + v*v/(2*G0) }

// EnergyCredit returns the height (m) gained by slowing from true airspeed
// v1 to v2 (m/s) with efficiency eta (0..1):
//
//	Δh = η·(V₁² − V₂²)/(2g)        when V₁ > V₂
//	Δh = −(V₂² − V₁²)/(2g)         when V₁ < V₂ (speeding up costs height, uncredited)
//
// The credit is a difference of energy heights scaled by η; a speed-up is
// charged in full, never at a discount, so the figure never flatters.
func EnergyCredit(v1, v2, eta float64) float64 {
	d := (v1*v1 - v2*v2) / (2 * G0)
	if d > 0 {
		return eta * d
	}
	return d
}

// Turn is a steady gliding turn at bank angle φ flown at the same lift
// coefficient as the straight glide it starts from.
//
// Same C_L, not held speed: at the same C_L the margin above the stall
// (which rises by √n in the turn) is kept, the turning sink follows from the
// straight-flight polar at the speed flown without extrapolating it below
// the usable minimum, and at any speed at or above least sink it gives the
// larger height loss per degree of turn of the two choices — the
// conservative one. The speed rise V₀ → V₀·√n and its return on rolling out
// are an exchange of height and speed that cancels; it is not counted.
//
//	n = 1/cos φ                      load factor
//	V_φ = V₀·√n                      true airspeed in the turn
//	w_φ = w₀·n^{3/2}                 sink in the turn
//	r = V_φ²/(g·tan φ)               radius in the air mass
//	ω = g·tan φ/V_φ                  rate of turn, rad/s
//	Δh(Δψ) = w_φ·|Δψ|/ω              height lost for a heading change Δψ
//
// References: Anderson, Introduction to Flight, ch. 6, turning flight
// (from memory); Welch, Welch and Irving, The Complete Soaring Pilot's
// Handbook, bank-angle table (via the St Olaf College soaring pages).
type Turn struct {
	Bank   float64 // φ, radians
	N      float64 // load factor
	TAS    float64 // m/s, V_φ
	Sink   float64 // m/s, w_φ
	Radius float64 // m
	Rate   float64 // rad/s, ω > 0
}

// NewTurn returns the turn at bankDeg degrees (MinBank..MaxBank) starting
// from a straight glide at true airspeed v0 (m/s) with sink w0 (m/s).
func NewTurn(bankDeg, v0, w0 float64) (Turn, error) {
	if !(bankDeg >= MinBank && bankDeg <= MaxBank) {
		return Turn{}, fmt.Errorf("%w: %v° (allowed %g..%g°)", ErrBank, bankDeg, MinBank, MaxBank)
	}
	if !(v0 > 0) || math.IsInf(v0, 0) || !(w0 >= 0) || math.IsInf(w0, 0) {
		return Turn{}, fmt.Errorf("%w: glide %v m/s, sink %v m/s", ErrSpeed, v0, w0)
	}
	phi := bankDeg * math.Pi / 180
	n := 1 / math.Cos(phi)
	v := v0 * math.Sqrt(n)
	return Turn{
		Bank: phi, N: n, TAS: v, Sink: w0 * math.Pow(n, 1.5),
		Radius: v * v / (G0 * math.Tan(phi)),
		Rate:   G0 * math.Tan(phi) / v,
	}, nil
}

// Time returns the time (s) to change heading by angle (radians, either sign).
func (t Turn) Time(angle float64) float64 { return math.Abs(angle) / t.Rate }

// HeightLost returns the height (m) lost changing heading by angle radians.
func (t Turn) HeightLost(angle float64) float64 { return t.Sink * t.Time(angle) }

// Displacement returns the ground displacement (m east, m north) of a turn
// from heading psi0 by the signed angle dpsi (radians, + right) in wind
// (we, wn) m/s: the arc in the air mass plus the drift W·t,
//
//	Δe = R·(cos ψ₀ − cos ψ₁) + W_e·t,   Δn = R·(sin ψ₁ − sin ψ₀) + W_n·t
//
// with R = +r for a right turn and −r for a left one, ψ₁ = ψ₀ + Δψ.
func (t Turn) Displacement(psi0, dpsi, we, wn float64) (de, dn float64) {
	r := t.Radius
	if dpsi < 0 {
		r = -r
	}
	psi1 := psi0 + dpsi
	tt := t.Time(dpsi)
	return r*(math.Cos(psi0)-math.Cos(psi1)) + we*tt, r*(math.Sin(psi1)-math.Sin(psi0)) + wn*tt
}

// Wrap returns angle a (radians) in (−π, π].
func Wrap(a float64) float64 {
	a = math.Mod(a, 2*math.Pi)
	if a <= -math.Pi {
		a += 2 * math.Pi
	} else if a > math.Pi {
		a -= 2 * math.Pi
	}
	return a
}

// HeadingFor returns the heading (radians) that makes good track theta
// (radians) at true airspeed v in wind (we, wn), the drift angle
// track − heading, and the ground speed along the track:
//
//	W_c = cross-track wind (from the left +),  W_t = along-track wind
//	heading = θ − asin(W_c/V),  G = √(V² − W_c²) + W_t
//
// (the wind triangle). ok is false when |W_c| ≥ V or G ≤ 0: the track
// cannot be made good.
func HeadingFor(theta, v, we, wn float64) (heading, drift, ground float64, ok bool) {
	st, ct := math.Sin(theta), math.Cos(theta)
	along := we*st + wn*ct
	cross := we*ct - wn*st // positive = air moving to the right of the track = wind from the left
	if math.Abs(cross) >= v {
		return theta, 0, along - math.Abs(cross), false
	}
	drift = math.Asin(cross / v)
	ground = math.Sqrt(v*v-cross*cross) + along
	return theta - drift, drift, ground, ground > 0
}
