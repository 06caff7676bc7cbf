package main

import (
	"fmt"
	"math"

	"github.com/spf13/pflag"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach/plan"
	"glidereach/reach/transition"
)

// failureFlags give the aircraft's state at an engine failure: heading,
// airspeed, and how the first seconds are flown.
type failureFlags struct {
	heading    *input.Quantity
	speed      *input.Quantity
	reaction   float64
	efficiency float64
	bank       *input.Quantity
}

func newFailureFlags() *failureFlags {
	return &failureFlags{heading: input.NewQuantity(input.Angle, 0).Within(0, 360), speed: input.NewQuantity(input.Speed, 0).Within(0, 150),
		reaction: transition.DefaultReactionTime, efficiency: transition.DefaultEfficiency,
		bank: input.NewQuantity(input.Angle, transition.DefaultBank).Within(transition.MinBank, transition.MaxBank)}
}

func (f *failureFlags) register(fs *pflag.FlagSet) {
	fs.Var(f.heading, "heading", f.heading.Help("aircraft heading at the engine failure (degrees true): the glide starts with the turn from it; default: no failure state"))
	fs.Var(f.speed, "speed", f.speed.Help("indicated airspeed at the failure (kt, km/h, m/s): slowing to the glide speed is credited as height; needs --heading"))
	f.registerCommon(fs)
	hideDefault(fs, "heading", "speed")
}

// registerCommon registers the flags shared by register and
// registerSpeedOnly.
func (f *failureFlags) registerCommon(fs *pflag.FlagSet) {
	fs.Float64Var(&f.reaction, "reaction-time", transition.DefaultReactionTime, fmt.Sprintf("seconds flown on the heading at the failure speed before the pilot acts (common practice, no source); range 0..%g s", transition.MaxReactionTime))
	fs.Float64Var(&f.efficiency, "energy-efficiency", transition.DefaultEfficiency, "share of the kinetic energy above the glide speed credited as height (0 = no credit); range 0..1")
	fs.Var(f.bank, "bank", f.bank.Help("bank angle of the turns (degrees)"))
}

// hideDefault drops pflag's "(default …)" from the named flags' help,
// where the zero value means "not given" rather than a setting.
func hideDefault(fs *pflag.FlagSet, names ...string) {
	for _, n := range names {
		if fl := fs.Lookup(n); fl != nil {
			fl.DefValue = ""
		}
	}
}

// registerSpeedOnly registers the flags of a command whose heading at
// each point is given by the command itself (route: the route's course).
func (f *failureFlags) registerSpeedOnly(fs *pflag.FlagSet) {
	fs.Var(f.speed, "speed", f.speed.Help("indicated airspeed at a failure (kt, km/h, m/s), on the route's course at each point: the reaction, energy trade and turn toward the best field count"))
	f.registerCommon(fs)
	hideDefault(fs, "speed")
}

// resolveCourse resolves the flags of registerSpeedOnly: nil without
// --speed; HeadingDeg is NaN (each point's course is used).
func (f *failureFlags) resolveCourse() (*failureState, error) {
	if !f.speed.Given {
		return nil, nil
	}
	f.heading.Given, f.heading.Value = true, 0
	s, err := f.resolve()
	if err != nil {
		return nil, err
	}
	s.HeadingDeg = math.NaN()
	return s, nil
}

// failureState is the resolved state (the library's plan.Failure); nil
// when no --heading was given.
type failureState = plan.Failure

// resolve checks the flags: --speed alone is refused (a speed without a
// heading says nothing about the turn), ranges are named by flag.
func (f *failureFlags) resolve() (*failureState, error) {
	if !(f.reaction >= 0 && f.reaction <= transition.MaxReactionTime) {
		return nil, input.Usagef("--reaction-time", "%v s is outside 0..%g s", f.reaction, transition.MaxReactionTime)
	}
	if !(f.efficiency >= 0 && f.efficiency <= 1) {
		return nil, input.Usagef("--energy-efficiency", "%v is outside 0..1", f.efficiency)
	}
	if b := f.bank.Value; !(b >= transition.MinBank && b <= transition.MaxBank) {
		return nil, input.Usagef("--bank", "%v° is outside %g..%g°", b, transition.MinBank, transition.MaxBank)
	}
	if f.speed.Given && !f.heading.Given {
		return nil, input.Usagef("--speed", "needs --heading: the airspeed at the failure is used only with the heading it was flown on")
	}
	if !f.heading.Given {
		return nil, nil
	}
	h := f.heading.Value
	if !(h >= 0 && h <= 360) {
		return nil, input.Usagef("--heading", "%v° is outside 0..360", h)
	}
	s := &failureState{HeadingDeg: math.Mod(h, 360), Reaction: f.reaction, Efficiency: f.efficiency, Bank: f.bank.Value}
	if f.speed.Given {
		if !(f.speed.Value > 0 && f.speed.Value < 150) {
			return nil, input.Usagef("--speed", "%v m/s is outside 0..150 m/s", f.speed.Value)
		}
		s.IAS = f.speed.Value
	}
	return s, nil
}

// assumption describes the state for the assumptions list.
func failureAssumption(s *failureState) string {
	if s == nil {
		return "no failure state given (--heading/--speed): the glide starts at the speed to fly, already on its track, with no reaction time, energy credit or turn"
	}
	hd := fmt.Sprintf("on heading %03.0f°", s.HeadingDeg)
	if math.IsNaN(s.HeadingDeg) {
		hd = "on the route's course at each point"
	}
	sp := "at the speed to fly (no --speed: no energy credit)"
	if s.IAS > 0 {
		sp = fmt.Sprintf("at %.0f kt IAS, %.0f %% of the energy above the glide speed credited", s.IAS/input.Knot, s.Efficiency*100)
	}
	return fmt.Sprintf("engine failure %s %s; %.0f s reaction on the heading; turns at %.0f° bank at the same lift coefficient (speed × √n, sink × n^1.5)",
		hd, sp, s.Reaction, s.Bank)
}
