package wind

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Sanity limits applied by NewProfile.
const (
	MaxSpeed = 120.0   // m/s; about 233 kt, above any jet-stream core on record
	MinAlt   = -1000.0 // m MSL
	MaxAlt   = 30000.0 // m MSL
	MinTemp  = 150.0   // K (−123 °C)
	MaxTemp  = 350.0   // K (+77 °C)
)

// ISA constants (ICAO Doc 7488/3, U.S. Standard Atmosphere 1976).
const (
	isaT0         = 288.15  // K, sea-level temperature
	isaLapse      = -0.0065 // K/m, troposphere
	isaTropopause = 11000.0 // m, geopotential
	isaT11        = 216.65  // K, 11–20 km (isothermal)
)

// Sentinel errors wrapped by *LayerError and returned by NewProfile.
var (
	ErrEmpty       = errors.New("wind: no layers")
	ErrNotFinite   = errors.New("wind: value is not a finite number")
	ErrAltitude    = errors.New("wind: altitude out of range")
	ErrDuplicate   = errors.New("wind: duplicate altitude")
	ErrUnsorted    = errors.New("wind: altitudes not in increasing order")
	ErrDirection   = errors.New("wind: direction out of range 0..360")
	ErrSpeed       = errors.New("wind: speed out of range")
	ErrTemperature = errors.New("wind: temperature out of range")
)

// Layer is the wind (and optionally the temperature) at one altitude.
type Layer struct {
	Alt     float64 // m MSL
	Dir     float64 // degrees true the wind blows FROM, 0..360 (0 and 360 are north)
	Speed   float64 // m/s, 0..MaxSpeed
	Temp    float64 // K, air temperature; meaningful only when HasTemp
	HasTemp bool
}

// LayerError reports which layer of a NewProfile call is wrong. Index is the
// position in the slice given to NewProfile (0-based); Err is one of the
// package's sentinel errors, possibly wrapped with detail.
type LayerError struct {
	Index int
	Layer Layer
	Err   error
}

func (e *LayerError) Error() string {
	return fmt.Sprintf("layer %d (at %g m): %v", e.Index+1, e.Layer.Alt, e.Err)
}

func (e *LayerError) Unwrap() error { return e.Err }

// Profile is a validated, immutable wind and temperature profile. Its methods
// are safe for concurrent use.
type Profile struct {
	layers      []Layer
	alt         []float64 // layer altitudes, strictly increasing
	east, north []float64 // air velocity components (towards), m/s
	tAlt        []float64 // altitudes of the layers that carry a temperature
	tVal        []float64 // their temperatures, K
	tDev        []float64 // their deviations from ISA, K
}

// NewProfile validates layers and builds a Profile. The layers must be in
// strictly increasing order of altitude; unsorted input and duplicate
// altitudes are refused, not sorted (see the package documentation for all
// limits). The slice is copied. On failure the error is a *LayerError (or
// ErrEmpty for an empty slice).
func NewProfile(layers []Layer) (*Profile, error) {
	if len(layers) == 0 {
		return nil, ErrEmpty
	}
	p := &Profile{
		layers: append([]Layer(nil), layers...),
		alt:    make([]float64, len(layers)),
		east:   make([]float64, len(layers)),
		north:  make([]float64, len(layers)),
	}
	for i, l := range layers {
		if err := checkLayer(l); err != nil {
			return nil, &LayerError{Index: i, Layer: l, Err: err}
		}
		if i > 0 {
			prev := layers[i-1].Alt
			if l.Alt == prev {
				return nil, &LayerError{Index: i, Layer: l, Err: fmt.Errorf("%w: %g m appears twice", ErrDuplicate, l.Alt)}
			}
			if l.Alt < prev {
				return nil, &LayerError{Index: i, Layer: l, Err: fmt.Errorf("%w: %g m comes after %g m", ErrUnsorted, l.Alt, prev)}
			}
		}
		p.alt[i] = l.Alt
		p.east[i], p.north[i] = velocity(l.Dir, l.Speed)
		if l.HasTemp {
			p.tAlt = append(p.tAlt, l.Alt)
			p.tVal = append(p.tVal, l.Temp)
			p.tDev = append(p.tDev, l.Temp-isaTemperature(l.Alt))
		}
	}
	return p, nil
}

func checkLayer(l Layer) error {
	for _, v := range []float64{l.Alt, l.Dir, l.Speed} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return ErrNotFinite
		}
	}
	if l.Alt < MinAlt || l.Alt > MaxAlt {
		return fmt.Errorf("%w: %g m is outside %g..%g m", ErrAltitude, l.Alt, MinAlt, MaxAlt)
	}
	if l.Dir < 0 || l.Dir > 360 {
		return fmt.Errorf("%w: %g°", ErrDirection, l.Dir)
	}
	if l.Speed < 0 || l.Speed > MaxSpeed {
		return fmt.Errorf("%w: %g m/s is outside 0..%g m/s", ErrSpeed, l.Speed, MaxSpeed)
	}
	if l.HasTemp {
		if math.IsNaN(l.Temp) || math.IsInf(l.Temp, 0) {
			return ErrNotFinite
		}
		if l.Temp < MinTemp || l.Temp > MaxTemp {
			return fmt.Errorf("%w: %g K (%.1f °C) is outside %g..%g K", ErrTemperature, l.Temp, l.Temp-273.15, MinTemp, MaxTemp)
		}
	}
	return nil
}

// velocity returns the east/north components (m/s) of the air's motion for a
// wind blowing from dirDeg at speed: the air moves towards dirDeg + 180°.
func velocity(dirDeg, speed float64) (east, north float64) {
	s, c := math.Sincos(dirDeg * math.Pi / 180)
	return -speed * s, -speed * c
}

// Calm returns a profile with no wind at any altitude and no temperatures
// (Temperature then gives ISA plus the deviation).
func Calm() *Profile {
	p, _ := NewProfile([]Layer{{Alt: 0}})
	return p
}

// At returns the air's velocity at alt (m MSL) as east and north components
// (m/s, the direction towards which the air moves), interpolated linearly in
// altitude on the components between layers and constant beyond the end
// layers. A NaN altitude gives NaN components.
func (p *Profile) At(alt float64) (east, north float64) {
	n := len(p.alt)
	switch {
	case math.IsNaN(alt):
		return math.NaN(), math.NaN()
	case alt <= p.alt[0]:
		return p.east[0], p.north[0]
	case alt >= p.alt[n-1]:
		return p.east[n-1], p.north[n-1]
	}
	i := sort.SearchFloat64s(p.alt, alt) // 1 <= i <= n-1, alt[i-1] < alt <= alt[i]
	f := (alt - p.alt[i-1]) / (p.alt[i] - p.alt[i-1])
	return p.east[i-1] + f*(p.east[i]-p.east[i-1]), p.north[i-1] + f*(p.north[i]-p.north[i-1])
}

// Components returns the wind at alt (m MSL) resolved on a track of bearing
// trackDeg (degrees true, clockwise from north), in m/s:
//
//	along = e·sin τ + n·cos τ   > 0 tailwind, < 0 headwind
//	cross = e·cos τ − n·sin τ   > 0 wind from the left of the track (the air
//	                            pushes the aircraft to the right of it)
//
// where (e, n) = At(alt). A wind from 270 on track 090 is a pure tailwind; a
// wind from 360 on track 090 is a pure crosswind from the left. The
// signature matches reach.WindField.
func (p *Profile) Components(alt, trackDeg float64) (along, cross float64) {
	e, n := p.At(alt)
	s, c := math.Sincos(trackDeg * math.Pi / 180)
	return e*s + n*c, e*c - n*s
}

// Temperature returns the air temperature (K) at alt (m MSL). Where the
// profile has layer temperatures (fromLayers is true) they are used and
// isaDev is ignored: interpolated linearly between the layers that carry
// one, and beyond the lowest and highest of them extended with the ISA lapse
// keeping the deviation of that end layer:
//
//	T(h) = T_end + ISA(h) − ISA(h_end)
//
// Without layer temperatures it is the ICAO standard atmosphere plus isaDev
// (K):
//
//	ISA(h) = 288.15 − 0.0065·h   for h ≤ 11 000 m
//	ISA(h) = 216.65              above (isothermal to 20 km)
//
// References: ICAO Doc 7488/3, Manual of the ICAO Standard Atmosphere;
// U.S. Standard Atmosphere, 1976.
func (p *Profile) Temperature(alt, isaDev float64) (T float64, fromLayers bool) {
	n := len(p.tAlt)
	if n == 0 {
		return isaTemperature(alt) + isaDev, false
	}
	switch {
	case math.IsNaN(alt):
		return math.NaN(), true
	case alt <= p.tAlt[0]:
		return isaTemperature(alt) + p.tDev[0], true
	case alt >= p.tAlt[n-1]:
		return isaTemperature(alt) + p.tDev[n-1], true
	}
	i := sort.SearchFloat64s(p.tAlt, alt)
	f := (alt - p.tAlt[i-1]) / (p.tAlt[i] - p.tAlt[i-1])
	return p.tVal[i-1] + f*(p.tVal[i]-p.tVal[i-1]), true
}

// isaTemperature is the ICAO standard atmosphere temperature (K) at
// geopotential altitude h (m): 288.15 − 0.0065·h up to 11 km, 216.65 above.
func isaTemperature(h float64) float64 {
	if h > isaTropopause {
		return isaT11
	}
	return isaT0 + isaLapse*h
}

// HasTemperatures reports whether any layer carries a temperature.
func (p *Profile) HasTemperatures() bool { return len(p.tAlt) > 0 }

// Layers returns a copy of the layers, in increasing altitude.
func (p *Profile) Layers() []Layer { return append([]Layer(nil), p.layers...) }

// IsCalm reports whether every layer has zero speed.
func (p *Profile) IsCalm() bool {
	for _, l := range p.layers {
		if l.Speed != 0 {
			return false
		}
	}
	return true
}

// String is a short human description in SI units, for example
// "calm", "from 270° at 10.3 m/s" or
// "3 layers 0–3000 m MSL: 240°/5.1 m/s … 280°/18.0 m/s".
func (p *Profile) String() string {
	var b strings.Builder
	first, last := p.layers[0], p.layers[len(p.layers)-1]
	switch {
	case p.IsCalm():
		b.WriteString("calm")
	case len(p.layers) == 1:
		fmt.Fprintf(&b, "from %s° at %.1f m/s", fmtNum(first.Dir), first.Speed)
	default:
		fmt.Fprintf(&b, "%d layers %s–%s m MSL: %s°/%.1f m/s … %s°/%.1f m/s", len(p.layers),
			fmtNum(first.Alt), fmtNum(last.Alt), fmtNum(first.Dir), first.Speed, fmtNum(last.Dir), last.Speed)
	}
	if n := len(p.tAlt); n > 0 {
		fmt.Fprintf(&b, ", temperatures at %d of %d layers", n, len(p.layers))
	}
	return b.String()
}

func fmtNum(v float64) string { return strconv.FormatFloat(math.Round(v*10)/10, 'f', -1, 64) }
