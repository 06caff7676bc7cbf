package input

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Exact conversion factors to SI.
const (
	Foot         = 0.3048          // m, international foot
	NauticalMile = 1852.0          // m
	StatuteMile  = 1609.344        // m
	Knot         = 1852.0 / 3600   // m/s
	MPH          = 1609.344 / 3600 // m/s
	FPM          = 0.3048 / 60     // m/s, feet per minute
	KMH          = 1000.0 / 3600   // m/s
	Pound        = 0.45359237      // kg
)

// Kind is the physical dimension of a quantity; it selects the units accepted.
type Kind int

const (
	Length        Kind = iota // m, ft, km, nm
	Speed                     // m/s, kt, km/h, mph
	VerticalSpeed             // m/s, fpm, kt
	Mass                      // kg, lb
	TempDelta                 // K or °C difference (C, degC, °C)
	Angle                     // deg (returned in degrees)
	Area                      // m2, km2
	Fraction                  // bare number or percent
)

var kindNames = [...]string{"length", "speed", "vertical speed", "mass", "temperature difference", "angle", "area", "fraction"}

func (k Kind) String() string {
	if int(k) < len(kindNames) {
		return kindNames[k]
	}
	return "quantity"
}

// units per kind: suffix → factor to SI. Suffixes are matched case-insensitively.
var units = map[Kind]map[string]float64{
	Length:        {"m": 1, "ft": Foot, "km": 1000, "nm": NauticalMile, "mi": StatuteMile},
	Speed:         {"m/s": 1, "mps": 1, "kt": Knot, "kts": Knot, "km/h": KMH, "kmh": KMH, "kph": KMH, "mph": MPH},
	VerticalSpeed: {"m/s": 1, "mps": 1, "fpm": FPM, "ft/min": FPM, "kt": Knot, "kts": Knot},
	Mass:          {"kg": 1, "lb": Pound, "lbs": Pound},
	TempDelta:     {"k": 1, "c": 1, "degc": 1, "°c": 1},
	Angle:         {"deg": 1, "°": 1},
	Area:          {"m2": 1, "km2": 1e6},
	Fraction:      {"%": 0.01},
}

// UnitNames lists the unit suffixes accepted for kind, for help texts.
func UnitNames(k Kind) string {
	switch k {
	case Length:
		return "m, ft, km, nm"
	case Speed:
		return "m/s, kt, km/h, mph"
	case VerticalSpeed:
		return "m/s, fpm, kt"
	case Mass:
		return "kg, lb"
	case TempDelta:
		return "K or C (a difference)"
	case Angle:
		return "deg"
	case Area:
		return "m2, km2"
	case Fraction:
		return "a number or a percentage"
	}
	return ""
}

// ParseQuantity parses a number with an optional unit suffix of the given
// kind ("1500m", "5000ft", "20kt", "-5C", "0.1") and returns its SI value.
// A bare number is SI. It refuses NaN, infinities and unknown units.
func ParseQuantity(s string, k Kind) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, fmt.Errorf("empty %s", k)
	}
	// Split at the end of the numeric part.
	i := numberPrefix(t)
	if i == 0 {
		return 0, fmt.Errorf("%q is not a %s (want a number with one of: %s)", s, k, UnitNames(k))
	}
	num, unit := t[:i], strings.ToLower(strings.TrimSpace(t[i:]))
	v, err := strconv.ParseFloat(num, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q is not a %s: bad number %q", s, k, num)
	}
	if unit == "" {
		return v, nil
	}
	f, ok := units[k][unit]
	if !ok {
		return 0, fmt.Errorf("%q: unknown %s unit %q (want one of: %s)", s, k, t[i:], UnitNames(k))
	}
	if r := v * f; !math.IsInf(r, 0) {
		return r, nil
	}
	return 0, fmt.Errorf("%q is out of range for a %s", s, k)
}

// numberPrefix returns the length of the leading decimal number of s
// (sign, digits, point, exponent). An exponent is taken only when digits
// follow it, so "5e" is not a number.
func numberPrefix(s string) int {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			digits++
		}
	}
	if digits == 0 {
		return 0
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for k < len(s) && s[k] >= '0' && s[k] <= '9' {
			k++
		}
		if k > j {
			i = k
		}
	}
	return i
}

// ParseLatLon parses "LAT,LON" in decimal degrees (north and east positive)
// and checks the ranges.
func ParseLatLon(s string) (lat, lon float64, err error) {
	parts := strings.Split(s, ",")
	if len(parts) != 2 {
		return 0, 0, fmt.Errorf("%q is not LAT,LON in decimal degrees", s)
	}
	lat, err1 := strconv.ParseFloat(strings.TrimSpace(parts[0]), 64)
	lon, err2 := strconv.ParseFloat(strings.TrimSpace(parts[1]), 64)
	if err1 != nil || err2 != nil || math.IsNaN(lat) || math.IsNaN(lon) {
		return 0, 0, fmt.Errorf("%q is not LAT,LON in decimal degrees", s)
	}
	if lat < -90 || lat > 90 {
		return 0, 0, fmt.Errorf("latitude %v out of range -90..90", lat)
	}
	if lon < -180 || lon > 180 {
		return 0, 0, fmt.Errorf("longitude %v out of range -180..180", lon)
	}
	return lat, lon, nil
}
