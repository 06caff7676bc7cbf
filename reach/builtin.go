package reach

import (
	"fmt"
	"sort"
	"strings"
)

// Unit factors used to state the built-in profiles in the units their
// invented handbooks would use (exact definitions).
const (
	knot = 1852.0 / 3600 // m/s
	kmh  = 1000.0 / 3600 // m/s
)

// builtins are generic, invented profiles; no real aircraft type is meant.
// Each returns a fresh Aircraft.
var builtins = map[string]func() *Aircraft{
	// A light two-seat single, handbook-style figures: best glide 65 kt IAS
	// at a glide ratio of 9, clean stall 48 kt.
	"trainer": func() *Aircraft {
		return &Aircraft{
			Name: "Generic two-seat trainer", RefMass: 750,
			StallIAS: 48 * knot, MaxIAS: 120 * knot,
			Polar:   &BestGlidePolar{Speed: 65 * knot, Ratio: 9},
			Reserve: 300, Clearance: 100,
		}
	},
	// A four-seat single described by a parabolic drag polar (invented
	// coefficients): (L/D)max ≈ 10.1 at about 73 kt, C_Lmax 1.6 → stall ≈ 52 kt.
	"tourer": func() *Aircraft {
		p := &DragPolar{CD0: 0.040, AspectRatio: 7.5, Oswald: 0.70, WingArea: 16, Mass: 1150}
		return &Aircraft{
			Name: "Generic four-seat tourer", RefMass: 1150,
			StallIAS: p.StallSpeed(1.6), MaxIAS: 140 * knot,
			Polar: p, Reserve: 300, Clearance: 150,
		}
	},
	// A standard-class-like single seater with an invented but realistic
	// measured polar: glide ratio about 40 near 100 km/h, least sink about
	// 0.62 m/s.
	"sailplane": func() *Aircraft {
		p, err := NewPointsPolar([]PolarPoint{
			{75 * kmh, 0.64}, {85 * kmh, 0.62}, {100 * kmh, 0.69},
			{130 * kmh, 1.00}, {160 * kmh, 1.58}, {200 * kmh, 2.75},
		})
		if err != nil {
			panic("reach: built-in sailplane polar: " + err.Error()) // a bug in this table
		}
		return &Aircraft{
			Name: "Generic standard-class sailplane", RefMass: 380,
			StallIAS: 65 * kmh, MaxIAS: 250 * kmh,
			Polar: p, Reserve: 200, Clearance: 100, Kind: KindSailplane,
		}
	},
	// A two-seat touring motorglider, propeller stopped: best glide 55 kt at
	// a glide ratio of 27, stall 40 kt.
	"motorglider": func() *Aircraft {
		return &Aircraft{
			Name: "Generic touring motorglider", RefMass: 800,
			StallIAS: 40 * knot, MaxIAS: 110 * knot,
			Polar:   &BestGlidePolar{Speed: 55 * knot, Ratio: 27},
			Reserve: 250, Clearance: 100,
		}
	},
}

// BuiltinNames returns the names of the built-in profiles, sorted.
func BuiltinNames() []string {
	names := make([]string, 0, len(builtins))
	for n := range builtins {
		names = append(names, n)
	}
	sort.Strings(names)
	return names
}

// Builtin returns a fresh copy of the built-in profile name (case-insensitive):
// "trainer", "tourer", "sailplane" or "motorglider". These are generic,
// invented profiles for planning practice, not any real type's figures.
func Builtin(name string) (*Aircraft, error) {
	f, ok := builtins[strings.ToLower(strings.TrimSpace(name))]
	if !ok {
		return nil, fmt.Errorf("reach: no built-in aircraft %q (have %s)", name, strings.Join(BuiltinNames(), ", "))
	}
	return f(), nil
}
