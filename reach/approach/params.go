package approach

import (
	"fmt"
	"math"

	"glidereach/reach"
)

const knot = 1852.0 / 3600 // m/s

// Params are the pattern's dimensions and limits. A zero field takes the
// default of the aircraft's kind (Defaults). All values are common
// practice, no source, chosen on the side of a larger pattern and more
// height.
type Params struct {
	// FinalLength is the least length of the final (m, ground).
	FinalLength float64
	// FinalHeight is the least height above the field (m) after the turn
	// onto final.
	FinalHeight float64
	// BaseHeight is the least height above the field (m) on arrival at the
	// base gate, and EntryHeight at the entry of the full pattern (the
	// shortened variants, flown when low, keep only the final's).
	BaseHeight, EntryHeight float64
	// Spacing is the lateral distance (m) of the downwind from the final's
	// line: the length of the base leg.
	Spacing float64
	// Margin is the share of the final's clean-glide height added on top
	// and kept for airbrakes, flaps or a slip (0.5 = half as much again).
	Margin float64
	// AimDistance is how far past a strip's threshold the aim point lies (m);
	// at most a third of the strip is used. A Point field is its aim point.
	AimDistance float64
	// MaxCrosswind and MaxTailwind (m/s) refuse a landing direction whose
	// surface wind components exceed them.
	MaxCrosswind, MaxTailwind float64
	// Clearance is the least height (m) above the terrain under the pattern
	// legs, tapering to the height above the field on final.
	Clearance float64
	// Bank is the bank angle of the pattern's turns and of the holding
	// circles, degrees (transition.MinBank..MaxBank).
	Bank float64
	// WindFactor is the share of the headwind on final added to the
	// approach speed (0.5 = half the headwind).
	WindFactor float64
	// MaxExtension is the longest the downwind is lengthened (m) to lose
	// height less than one holding circle.
	MaxExtension float64
}

// Defaults returns the pattern defaults of an aircraft kind
// (reach.KindSailplane or reach.KindPowered; anything else is powered, the
// larger pattern). Common practice, no source:
//
//	                sailplane    powered
//	FinalLength     500 m        800 m
//	FinalHeight     100 m        150 m
//	BaseHeight      150 m        200 m
//	EntryHeight     250 m        300 m
//	Spacing         400 m        800 m
//	Margin          0.5          0.3
//	AimDistance     100 m        150 m
//	MaxCrosswind    10 kt        15 kt
//	MaxTailwind     5 kt         5 kt
//	Clearance       50 m         50 m
//	Bank            30°          30°
//	WindFactor      0.5          0.5
//	MaxExtension    2000 m       3000 m
func Defaults(kind string) Params {
	if kind == reach.KindSailplane {
		return Params{FinalLength: 500, FinalHeight: 100, BaseHeight: 150, EntryHeight: 250, Spacing: 400, Margin: 0.5, AimDistance: 100,
			MaxCrosswind: 10 * knot, MaxTailwind: 5 * knot, Clearance: 50, Bank: 30, WindFactor: 0.5, MaxExtension: 2000}
	}
	return Params{FinalLength: 800, FinalHeight: 150, BaseHeight: 200, EntryHeight: 300, Spacing: 800, Margin: 0.3, AimDistance: 150,
		MaxCrosswind: 15 * knot, MaxTailwind: 5 * knot, Clearance: 50, Bank: 30, WindFactor: 0.5, MaxExtension: 3000}
}

// fill returns p with its zero fields taken from d.
func (p Params) fill(d Params) Params {
	set := func(v *float64, def float64) {
		if *v == 0 {
			*v = def
		}
	}
	set(&p.FinalLength, d.FinalLength)
	set(&p.FinalHeight, d.FinalHeight)
	set(&p.BaseHeight, d.BaseHeight)
	set(&p.EntryHeight, d.EntryHeight)
	set(&p.Spacing, d.Spacing)
	set(&p.Margin, d.Margin)
	set(&p.AimDistance, d.AimDistance)
	set(&p.MaxCrosswind, d.MaxCrosswind)
	set(&p.MaxTailwind, d.MaxTailwind)
	set(&p.Clearance, d.Clearance)
	set(&p.Bank, d.Bank)
	set(&p.WindFactor, d.WindFactor)
	set(&p.MaxExtension, d.MaxExtension)
	return p
}

// InputError is a request value out of range; Input names it as the
// command line or profile calls it ("approach_speed", "landing_dir",
// "bank", "strip", …).
type InputError struct {
	Input string
	Err   error
}

func (e *InputError) Error() string { return e.Err.Error() }
func (e *InputError) Unwrap() error { return e.Err }

func inputErr(input, format string, args ...any) error {
	return &InputError{Input: input, Err: fmt.Errorf("approach: "+format, args...)}
}

func (p Params) validate() error {
	type r struct {
		name      string
		v, lo, hi float64
	}
	for _, c := range []r{
		{"final_length", p.FinalLength, 100, 10000},
		{"final_height", p.FinalHeight, 10, 1000},
		{"base_height", p.BaseHeight, 10, 1500},
		{"entry_height", p.EntryHeight, 10, 2000},
		{"spacing", p.Spacing, 100, 5000},
		{"margin", p.Margin, 0, 2},
		{"aim_distance", p.AimDistance, 0, 2000},
		{"max_crosswind", p.MaxCrosswind, 0, 40},
		{"max_tailwind", p.MaxTailwind, 0, 40},
		{"pattern_clearance", p.Clearance, 0, 1000},
		{"bank", p.Bank, 10, 60},
		{"wind_factor", p.WindFactor, 0, 1},
		{"max_extension", p.MaxExtension, 0, 20000},
	} {
		if !(c.v >= c.lo && c.v <= c.hi) || math.IsInf(c.v, 0) {
			return inputErr(c.name, "%s %v is outside %g..%g", c.name, c.v, c.lo, c.hi)
		}
	}
	return nil
}
