package reach

import (
	"errors"
	"fmt"
	"math"
)

// StallMargin is the factor on the stall speed that gives the lowest usable
// speed when a profile does not set one (common practice, no source: the
// approach-speed margin of 1.3 × V_S taught for light aircraft).
const StallMargin = 1.3

// Aircraft is a glide performance profile. Speeds are indicated (equal to
// equivalent) airspeeds in m/s at the reference mass; masses in kg; heights
// in m. Build one with a profile loader or Builtin and call Validate before
// use (the loaders do).
type Aircraft struct {
	Name    string
	RefMass float64 // kg, the mass the polar and the stall speed are stated for
	Mass    float64 // kg, the actual mass; 0 means RefMass

	// StallIAS is the clean stall speed at RefMass (m/s IAS).
	StallIAS float64
	// MinIAS, when > 0, is the lowest speed to fly at RefMass (the profile's
	// min_speed); it replaces StallMargin × StallIAS and must be above the
	// stall. 0 means StallMargin × StallIAS.
	MinIAS float64
	// MaxIAS is the highest speed to fly (m/s IAS). It is a structural or
	// handling limit and does not scale with mass or altitude.
	MaxIAS float64

	Polar Polar

	// Reserve and Clearance are the profile's defaults for the commands (m):
	// the height above a field to arrive with, and the least height above
	// terrain en route. 0 means the command's own default unless
	// HasReserve / HasClearance says the profile set 0 on purpose.
	Reserve, Clearance float64
	// HasReserve and HasClearance say that the profile gave Reserve and
	// Clearance, so a 0 is a setting (a "touch the ground" planning ring)
	// and not "unset".
	HasReserve, HasClearance bool

	// Kind is the kind of aircraft for the approach plan's pattern
	// defaults: KindSailplane, KindPowered, or "" (treated as powered, the
	// larger pattern). Profile key kind.
	Kind string
	// ApproachIAS, when > 0, is the calm-air approach speed at RefMass
	// (m/s IAS; profile key approach_speed); 0 means StallMargin × the
	// stall speed. It must not be below the usable minimum.
	ApproachIAS float64
	// MaxCrosswind, when > 0, is the largest crosswind component (m/s) a
	// landing direction may have (profile key max_crosswind); 0 means the
	// kind's default in reach/approach.
	MaxCrosswind float64
}

// Kinds of aircraft for the approach pattern defaults.
const (
	KindSailplane = "sailplane"
	KindPowered   = "powered"
)

// Conditions are the flight conditions a performance figure is computed for.
// The zero value is the conservative-neutral case: the aircraft's Mass, clean
// wing, still air, MacCready 0 (best range).
type Conditions struct {
	Mass      float64 // kg; 0 means the aircraft's Mass (which defaults to RefMass)
	Bugs      float64 // contamination factor f ≥ 0: sink × (1 + f); 0.1 is a dirty wing or light rain
	AirSink   float64 // m/s ≥ 0, allowance for sinking air along the glide
	MacCready float64 // m/s ≥ 0, expected climb rate; 0 flies for best range
}

// Validate reports values a user could give by mistake: negative or
// non-finite mass, contamination outside [0, 2], negative sinking air or
// MacCready setting.
func (c Conditions) Validate() error {
	switch {
	case !(c.Mass >= 0) || math.IsInf(c.Mass, 0):
		return fmt.Errorf("reach: mass %v kg is not a positive mass", c.Mass)
	case !(c.Bugs >= 0 && c.Bugs <= 2):
		return fmt.Errorf("reach: contamination factor %v is outside 0..2 (0.1 = sink 10 %% higher)", c.Bugs)
	case !(c.AirSink >= 0 && c.AirSink < 20):
		return fmt.Errorf("reach: sinking-air allowance %v m/s is outside 0..20 m/s", c.AirSink)
	case !(c.MacCready >= 0 && c.MacCready < 20):
		return fmt.Errorf("reach: MacCready setting %v m/s is outside 0..20 m/s", c.MacCready)
	}
	return nil
}

// MaxGlideRatio is the largest still-air glide ratio a profile may give
// anywhere in its usable range. The best open-class sailplanes reach about
// 60–70 (common practice, from memory); a polar beyond 100 is a typing or
// fitting error, not an aircraft. The best_glide form has the same bound.
const MaxGlideRatio = 100.0

// Bounds of a profile that Validate enforces: light aircraft and gliders
// weigh well under 10 t and fly below 300 kt (common practice, no source;
// the largest light aircraft certified under CS-23/FAR 23 normal category
// stay below 5.7 t, from memory), and the margins are those of the command
// line's --reserve and --clearance.
const (
	MaxProfileMass   = 10000.0    // kg, reference_mass and mass
	MaxProfileSpeed  = 300 * knot // m/s, max_speed (IAS)
	MaxProfileMargin = 3000.0     // m, reserve and clearance
)

// ProfileError is the error of Aircraft.Validate: Field names the profile
// key at fault as written in profile files ("reference_mass", "mass",
// "stall_speed", "min_speed", "max_speed", "reserve", "clearance",
// "kind", "approach_speed", "max_crosswind" or "polar"), so a loader can point at its line.
type ProfileError struct {
	Field string
	Err   error
}

func (e *ProfileError) Error() string { return e.Err.Error() }
func (e *ProfileError) Unwrap() error { return e.Err }

// Validate checks that the profile is physical: positive reference mass,
// stall speed below the maximum speed, a usable minimum above the stall and
// below the maximum, and a polar whose sink is positive and whose glide ratio
// is at most MaxGlideRatio over the whole usable range at the reference
// mass. The error is a *ProfileError whose message says what is wrong.
func (ac *Aircraft) Validate() error {
	name := ac.Name
	if name == "" {
		name = "aircraft"
	}
	fail := func(field, format string, args ...any) error {
		return &ProfileError{Field: field, Err: fmt.Errorf("reach: %s: %s", name, fmt.Sprintf(format, args...))}
	}
	kt := func(v float64) string { return fmt.Sprintf("%.1f m/s (%.1f kt)", v, v/knot) }
	finitePos := func(v float64) bool { return v > 0 && !math.IsInf(v, 0) }
	minField := "stall_speed"
	if ac.MinIAS > 0 {
		minField = "min_speed"
	}
	switch {
	case !finitePos(ac.RefMass):
		return fail("reference_mass", "reference mass %v kg is not positive", ac.RefMass)
	case !(ac.Mass >= 0) || math.IsInf(ac.Mass, 0):
		return fail("mass", "mass %v kg is not positive", ac.Mass)
	case ac.Mass > 0 && (ac.Mass < 0.3*ac.RefMass || ac.Mass > 3*ac.RefMass):
		return fail("mass", "mass %.0f kg is far from the reference mass %.0f kg (allowed 0.3..3 times); the polar would not apply", ac.Mass, ac.RefMass)
	case !finitePos(ac.StallIAS):
		return fail("stall_speed", "stall speed %v m/s is not positive", ac.StallIAS)
	case !finitePos(ac.MaxIAS):
		return fail("max_speed", "maximum speed %v m/s is not positive", ac.MaxIAS)
	case ac.StallIAS >= ac.MaxIAS:
		return fail("stall_speed", "stall speed %s is not below the maximum speed %s", kt(ac.StallIAS), kt(ac.MaxIAS))
	case !(ac.MinIAS >= 0) || math.IsInf(ac.MinIAS, 0):
		return fail("min_speed", "minimum speed %v m/s is not positive", ac.MinIAS)
	case ac.MinIAS > 0 && ac.MinIAS <= ac.StallIAS:
		return fail("min_speed", "minimum speed %s is not above the stall speed %s", kt(ac.MinIAS), kt(ac.StallIAS))
	case ac.baseMinIAS() >= ac.MaxIAS:
		return fail(minField, "lowest usable speed %s (%s) is not below the maximum speed %s", kt(ac.baseMinIAS()), ac.minSource(), kt(ac.MaxIAS))
	case ac.RefMass > MaxProfileMass:
		return fail("reference_mass", "reference mass %.0f kg is more than %.0f kg: not a light aircraft or glider", ac.RefMass, MaxProfileMass)
	case ac.Mass > MaxProfileMass:
		return fail("mass", "mass %.0f kg is more than %.0f kg: not a light aircraft or glider", ac.Mass, MaxProfileMass)
	case ac.MaxIAS > MaxProfileSpeed:
		return fail("max_speed", "maximum speed %s is more than %s: not a light aircraft or glider (a typing or unit error?)", kt(ac.MaxIAS), kt(MaxProfileSpeed))
	case ac.Polar == nil:
		return fail("polar", "no polar")
	case !(ac.Reserve >= 0) || math.IsInf(ac.Reserve, 0):
		return fail("reserve", "reserve %v m is negative", ac.Reserve)
	case ac.Reserve > MaxProfileMargin:
		return fail("reserve", "reserve %.0f m is more than %.0f m", ac.Reserve, MaxProfileMargin)
	case !(ac.Clearance >= 0) || math.IsInf(ac.Clearance, 0):
		return fail("clearance", "clearance %v m is negative", ac.Clearance)
	case ac.Clearance > MaxProfileMargin:
		return fail("clearance", "clearance %.0f m is more than %.0f m", ac.Clearance, MaxProfileMargin)
	case ac.Kind != "" && ac.Kind != KindSailplane && ac.Kind != KindPowered:
		return fail("kind", "kind %q: want %s or %s", ac.Kind, KindSailplane, KindPowered)
	case !(ac.ApproachIAS >= 0) || math.IsInf(ac.ApproachIAS, 0):
		return fail("approach_speed", "approach speed %v m/s is not positive", ac.ApproachIAS)
	case ac.ApproachIAS > 0 && ac.ApproachIAS < ac.baseMinIAS():
		return fail("approach_speed", "approach speed %s is below the lowest usable speed %s (%s, above the stall %s)", kt(ac.ApproachIAS), kt(ac.baseMinIAS()), ac.minSource(), kt(ac.StallIAS))
	case ac.ApproachIAS > ac.MaxIAS:
		return fail("approach_speed", "approach speed %s is above the maximum speed %s", kt(ac.ApproachIAS), kt(ac.MaxIAS))
	case !(ac.MaxCrosswind >= 0 && ac.MaxCrosswind <= 40):
		return fail("max_crosswind", "crosswind limit %v m/s is outside 0..40 m/s", ac.MaxCrosswind)
	}
	if bg, ok := ac.Polar.(*BestGlidePolar); ok && !(bg.Speed > ac.StallIAS && bg.Speed <= ac.MaxIAS) {
		return fail("polar", "best_glide_speed %s is not between the stall speed %s and the maximum speed %s", kt(bg.Speed), kt(ac.StallIAS), kt(ac.MaxIAS))
	}
	if err := ac.checkSink(ac.baseMinIAS(), ac.MaxIAS); err != nil {
		return fail("polar", "%v", err)
	}
	if err := ac.checkRatio(ac.baseMinIAS(), ac.MaxIAS); err != nil {
		return fail("polar", "%v", err)
	}
	return nil
}

// checkRatio samples the still-air glide ratio v/w₀(v) over [lo, hi] at the
// reference mass and fails where it exceeds MaxGlideRatio.
func (ac *Aircraft) checkRatio(lo, hi float64) error {
	const n = 256
	for i := 0; i <= n; i++ {
		v := lo + (hi-lo)*float64(i)/n
		if r := v / ac.Polar.Sink(v); r > MaxGlideRatio {
			return fmt.Errorf("%s polar gives a glide ratio of %.0f at %.1f m/s (%.0f kt), more than %.0f: no aircraft glides that well; check the polar's figures", ac.Polar.Form(), r, v, v/knot, MaxGlideRatio)
		}
	}
	return nil
}

func (ac *Aircraft) minSource() string {
	if ac.MinIAS > 0 {
		return "min_speed"
	}
	return fmt.Sprintf("%.1f x stall speed", StallMargin)
}

// checkSink samples w₀ over the equivalent-speed range [lo, hi] at the
// reference mass and fails where it is not positive and finite.
func (ac *Aircraft) checkSink(lo, hi float64) error {
	const n = 256
	for i := 0; i <= n; i++ {
		v := lo + (hi-lo)*float64(i)/n
		w := ac.Polar.Sink(v)
		if !(w > 0) || math.IsInf(w, 0) {
			return fmt.Errorf("%s polar gives sink %.3f m/s at %.1f m/s (%.0f kt), inside the usable range %.1f..%.1f m/s; sink must be positive (downwards) at every usable speed", ac.Polar.Form(), w, v, v/knot, lo, hi)
		}
	}
	return nil
}

// Check validates c and that the polar stays physical over the usable range
// at c's mass (a lighter aircraft flies the reference polar at speeds up to
// MaxIAS·√(m₀/m), beyond its reference range).
func (ac *Aircraft) Check(c Conditions) error {
	if err := c.Validate(); err != nil {
		return err
	}
	if ac.Polar == nil {
		return errors.New("reach: aircraft has no polar")
	}
	k := ac.massRatio(c)
	if k < 0.3 || k > 3 {
		return fmt.Errorf("reach: mass %.0f kg is far from the reference mass %.0f kg (allowed 0.3..3 times)", ac.mass(c), ac.RefMass)
	}
	if err := ac.checkSink(ac.baseMinIAS(), ac.MaxIAS/math.Sqrt(k)); err != nil {
		return fmt.Errorf("reach: %s at %.0f kg: %w", ac.Name, ac.mass(c), err)
	}
	return nil
}

func (ac *Aircraft) baseMinIAS() float64 {
	if ac.MinIAS > 0 {
		return ac.MinIAS
	}
	return StallMargin * ac.StallIAS
}

// mass returns the mass flown under c (kg).
func (ac *Aircraft) mass(c Conditions) float64 {
	switch {
	case c.Mass > 0:
		return c.Mass
	case ac.Mass > 0:
		return ac.Mass
	}
	return ac.RefMass
}

// massRatio returns k = m/m₀.
func (ac *Aircraft) massRatio(c Conditions) float64 { return ac.mass(c) / ac.RefMass }

// MassAt returns the mass flown under c (kg): c.Mass, else ac.Mass, else RefMass.
func (ac *Aircraft) MassAt(c Conditions) float64 { return ac.mass(c) }

// StallIASAt returns the stall speed (m/s IAS) at the mass of c:
// V_S·√(m/m₀) (at a fixed C_Lmax the stall speed scales with √W).
func (ac *Aircraft) StallIASAt(c Conditions) float64 {
	return ac.StallIAS * math.Sqrt(ac.massRatio(c))
}

// UsableMinIAS returns the lowest speed ever flown (m/s IAS) at the mass of
// c: MinIAS if set, else StallMargin × StallIAS, scaled by √(m/m₀) like the
// stall speed. Every speed-to-fly is clamped to at least this.
func (ac *Aircraft) UsableMinIAS(c Conditions) float64 {
	return ac.baseMinIAS() * math.Sqrt(ac.massRatio(c))
}

// UsableMaxIAS returns MaxIAS, or UsableMinIAS when a heavy mass pushes the
// minimum above it (then the aircraft flies its minimum speed only).
func (ac *Aircraft) UsableMaxIAS(c Conditions) float64 {
	return math.Max(ac.MaxIAS, ac.UsableMinIAS(c))
}

// Sink returns the sink rate through the air (m/s, positive down) at true
// airspeed tas (m/s), air density rho (kg/m³) and the mass and contamination
// of c:
//
//	w(V) = √(k/σ) · w₀(V·√(σ/k)) · (1 + bugs),  σ = ρ/ρ₀, k = m/m₀
//
// At a fixed lift coefficient, lift = weight gives V ∝ √(W/(ρS)) and the
// sink w = V·C_D/C_L scales by the same factor, so the whole polar is
// stretched by √(k/σ) along both axes (Anderson, Introduction to Flight,
// ch. 6; FAA Glider Flying Handbook, ch. 5 on ballast: the same best glide
// ratio at a higher speed). V·√(σ/k) is the equivalent speed at reference
// mass, the argument of the Polar. Sinking air is not included.
func (ac *Aircraft) Sink(tas, rho float64, c Conditions) float64 {
	s := math.Sqrt(ac.massRatio(c) / (rho / ISADensity0))
	return s * ac.Polar.Sink(tas/s) * (1 + c.Bugs)
}

// Figures are the derived still-air performance figures at one altitude and
// mass, after the stall clamp. Speeds in m/s, sink in m/s.
type Figures struct {
	Density  float64 // kg/m³
	Sigma    float64 // ρ/ρ₀
	Mass     float64 // kg
	StallIAS float64 // at this mass
	MinIAS   float64 // usable minimum at this mass
	MaxIAS   float64

	BestGlideRatio float64 // largest V/w over the usable range
	BestGlideIAS   float64
	BestGlideTAS   float64
	BestGlideSink  float64
	BestGlideClamp Clamp // ClampMin when the polar's best glide speed is below the usable minimum

	LeastSink      float64 // smallest w over the usable range
	LeastSinkIAS   float64
	LeastSinkTAS   float64
	LeastSinkRatio float64 // V/w at LeastSinkTAS
	LeastSinkClamp Clamp   // ClampMin when the polar's least-sink speed is below the usable minimum
}

// Figures returns the best glide ratio and its speed and the least sink and
// its speed at air density rho (kg/m³), mass and contamination of c (sinking
// air and MacCready do not apply), each optimum clamped into
// [UsableMinIAS, UsableMaxIAS] with the clamp reported.
//
// In still air the glide ratio V/w does not depend on density and, at a
// given C_L, not on mass either: altitude and mass move the speeds by
// √(k/σ) and leave the ratio unchanged unless the clamp bites.
func (ac *Aircraft) Figures(rho float64, c Conditions) Figures {
	sigma := rho / ISADensity0
	f := Figures{
		Density: rho, Sigma: sigma, Mass: ac.mass(c),
		StallIAS: ac.StallIASAt(c), MinIAS: ac.UsableMinIAS(c), MaxIAS: ac.UsableMaxIAS(c),
	}
	lo, hi := TAS(f.MinIAS, sigma), TAS(f.MaxIAS, sigma)
	v, r, cl := maximizeClamped(func(v float64) float64 { return v / ac.Sink(v, rho, c) }, lo, hi)
	f.BestGlideTAS, f.BestGlideIAS, f.BestGlideRatio, f.BestGlideClamp = v, IAS(v, sigma), r, cl
	f.BestGlideSink = ac.Sink(v, rho, c)
	v, negw, cl := maximizeClamped(func(v float64) float64 { return -ac.Sink(v, rho, c) }, lo, hi)
	f.LeastSinkTAS, f.LeastSinkIAS, f.LeastSink, f.LeastSinkClamp = v, IAS(v, sigma), -negw, cl
	f.LeastSinkRatio = v / f.LeastSink
	return f
}
