package plan

import (
	"context"
	"math"

	"glidereach/reach"
	"glidereach/wind"
)

// Conservative defaults of the use cases (m): height above a field on
// arrival, and least height above terrain en route, used when neither the
// request nor the aircraft profile sets one (common practice, no source).
const (
	DefaultReserve   = 300.0
	DefaultClearance = 100.0
)

// Setup is the aircraft and the air a use case flies in: the profile and
// its conditions, the atmosphere, the wind and the winds a conservative
// result must hold for, and the margins. All values SI: Reserve and
// Clearance in metres, the wind in m/s by altitude (m MSL).
type Setup struct {
	Aircraft *reach.Aircraft
	Cond     reach.Conditions
	// Atm is the atmosphere without a wind's temperatures (ISA with
	// Atm.ISADev); TableFor applies each wind's own temperatures, as the
	// temperatures given with wind layers override ISA.
	Atm  reach.Atmosphere
	Wind *wind.Profile // never nil; wind.Calm() when no wind was given
	// Winds are the wind scenarios a conservative result must hold for:
	// Wind alone, or Wind and its perturbations (Wind first, as
	// WithWindError builds them). The worst-of-winds rule: a footprint
	// keeps per cell the lowest arrival over Winds (reach.Intersect), a
	// required altitude the highest over Winds, a final glide or a route
	// the case needing the most altitude.
	Winds     []*wind.Profile
	Reserve   float64 // m above the field on arrival, ≥ 0
	Clearance float64 // m above terrain en route, ≥ 0
}

// NewSetup returns the Setup of aircraft ac in conditions c, atmosphere
// ISA + isaDev (K) unless w gives temperatures, wind w (nil: calm), with the
// margins: reserve and clearance in m, NaN for "not given", which takes the
// profile's own (when it has one) or DefaultReserve / DefaultClearance.
// Winds holds w alone. Errors are *InputError naming "Mass", "Bugs",
// "AirSink" or "MacCready" (a condition out of range) or "Mass" (the
// profile cannot fly at that mass), "Reserve" or "Clearance" (negative or
// not finite).
func NewSetup(ac *reach.Aircraft, c reach.Conditions, isaDev float64, w *wind.Profile, reserve, clearance float64) (*Setup, error) {
	if w == nil {
		w = wind.Calm()
	}
	s := &Setup{Aircraft: ac, Cond: c, Wind: w, Winds: []*wind.Profile{w}}
	// Check each condition alone so the error names its field.
	for _, k := range []struct {
		field string
		cond  reach.Conditions
	}{
		{"Mass", reach.Conditions{Mass: c.Mass}},
		{"Bugs", reach.Conditions{Bugs: c.Bugs}},
		{"AirSink", reach.Conditions{AirSink: c.AirSink}},
		{"MacCready", reach.Conditions{MacCready: c.MacCready}},
	} {
		if err := k.cond.Validate(); err != nil {
			return nil, &InputError{Field: k.field, Err: err}
		}
	}
	if err := ac.Check(c); err != nil {
		return nil, &InputError{Field: "Mass", Err: err}
	}
	s.Atm = reach.Atmosphere{ISADev: isaDev}
	if w.HasTemperatures() {
		s.Atm.Temp = func(h float64) (float64, bool) { return w.Temperature(h, isaDev) }
	}
	s.Reserve, s.Clearance = ProfileMargins(ac)
	if !math.IsNaN(reserve) {
		s.Reserve = reserve
	}
	if !math.IsNaN(clearance) {
		s.Clearance = clearance
	}
	if !(s.Reserve >= 0) || math.IsInf(s.Reserve, 0) {
		return nil, inputf("Reserve", "%v m is not a height (want 0 m or more)", s.Reserve)
	}
	if !(s.Clearance >= 0) || math.IsInf(s.Clearance, 0) {
		return nil, inputf("Clearance", "%v m is not a height (want 0 m or more)", s.Clearance)
	}
	return s, nil
}

// ProfileMargins returns the reserve and clearance (m) an aircraft profile
// sets, or DefaultReserve / DefaultClearance where it sets none.
func ProfileMargins(ac *reach.Aircraft) (reserve, clearance float64) {
	reserve, clearance = DefaultReserve, DefaultClearance
	if ac.HasReserve || ac.Reserve > 0 {
		reserve = ac.Reserve
	}
	if ac.HasClearance || ac.Clearance > 0 {
		clearance = ac.Clearance
	}
	return reserve, clearance
}

// WithWindError sets Winds to Wind and its perturbations by ±dirDeg
// (degrees) and ±speed (m/s) (wind.Perturb: 1, 3 or 9 profiles, Wind
// first), for results that hold for every wind within the uncertainty.
func (s *Setup) WithWindError(dirDeg, speed float64) {
	s.Winds = wind.Perturb(s.Wind, dirDeg, speed)
}

// Table builds the speed-to-fly table in the forecast wind (Wind) for
// altitudes lo..hi (m MSL).
func (s *Setup) Table(lo, hi float64) (*reach.Table, error) {
	return s.TableFor(s.Wind, lo, hi)
}

// TableFor builds the speed-to-fly table in wind w (one of Winds) for
// altitudes lo..hi (m MSL), clamped to −4900..19900 m (the atmosphere's
// range): w's own temperatures, when it has any, override ISA + Atm.ISADev.
// Errors are the profile's (reach.NewTable), not wrapped.
func (s *Setup) TableFor(w *wind.Profile, lo, hi float64) (*reach.Table, error) {
	atm := s.Atm
	if w.HasTemperatures() {
		dev := atm.ISADev
		atm.Temp = func(h float64) (float64, bool) { return w.Temperature(h, dev) }
	}
	return reach.NewTable(s.Aircraft, atm, w, s.Cond, math.Max(lo, -4900), math.Min(hi, 19900))
}

// Tables builds the speed-to-fly table of every wind of Winds over lo..hi
// (m MSL), two at a time, in the order of Winds. A table that cannot be
// built is an *InputError naming "Aircraft".
func (s *Setup) Tables(ctx context.Context, lo, hi float64) ([]*reach.Table, error) {
	tabs := make([]*reach.Table, len(s.Winds))
	err := ForEach(ctx, len(tabs), 2, func(k int) error {
		t, err := s.TableFor(s.Winds[k], lo, hi)
		if err != nil {
			return &InputError{Field: "Aircraft", Err: err}
		}
		tabs[k] = t
		return nil
	})
	return tabs, err
}

// GlideRadius is the worst-of-winds bound of how far a glide reaches: the
// largest reach.ReachRadius (m, the best downwind glide from top down to
// bottom, m MSL) over Winds, each wind's table built over tabLo..tabHi (m
// MSL, which must hold top and bottom). A table that cannot be built is an
// *InputError naming "Aircraft"; a radius that cannot be found one with no
// field. The tables are built two at a time.
func (s *Setup) GlideRadius(top, bottom, tabLo, tabHi float64) (float64, error) {
	// The winds' tables two at a time (ForEach: the first error by wind,
	// as one after another would give).
	radii := make([]float64, len(s.Winds))
	err := ForEach(context.Background(), len(s.Winds), 2, func(k int) error {
		tab, err := s.TableFor(s.Winds[k], tabLo, tabHi)
		if err != nil {
			return &InputError{Field: "Aircraft", Err: err}
		}
		if radii[k], err = reach.ReachRadius(tab, top, bottom); err != nil {
			return &InputError{Err: err}
		}
		return nil
	})
	if err != nil {
		return 0, err
	}
	radius := 0.0
	for _, r := range radii {
		radius = math.Max(radius, r)
	}
	return radius, nil
}
