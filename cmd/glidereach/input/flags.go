package input

import (
	"fmt"
	"strconv"
)

// Quantity is a pflag.Value holding an SI value parsed from a number with a
// unit of its Kind. Set records whether the flag was given.
type Quantity struct {
	Kind  Kind
	Value float64 // SI
	Given bool
	text  string
	// min and max (SI) bound what Set accepts when ranged.
	min, max float64
	ranged   bool
}

// Within makes Set refuse values outside the physical range min..max (SI,
// inclusive), naming the value and the range, and returns q.
func (q *Quantity) Within(min, max float64) *Quantity {
	q.min, q.max, q.ranged = min, max, true
	return q
}

// Range returns the range given to Within; ok is false when there is none.
func (q *Quantity) Range() (min, max float64, ok bool) { return q.min, q.max, q.ranged }

// RangeText describes the range for help and error texts, e.g.
// "-500..9000 m"; "" without a range.
func (q *Quantity) RangeText() string {
	if !q.ranged {
		return ""
	}
	t := strconv.FormatFloat(q.min, 'g', -1, 64) + ".." + strconv.FormatFloat(q.max, 'g', -1, 64)
	if u := siUnit[q.Kind]; u != "" {
		t += " " + u
	}
	return t
}

// Help returns usage followed by the range, for flag registration:
// "usage; range -500..9000 m".
func (q *Quantity) Help(usage string) string {
	if !q.ranged {
		return usage
	}
	return usage + "; range " + q.RangeText()
}

// NewQuantity returns a Quantity flag value of kind k with default def (SI).
func NewQuantity(k Kind, def float64) *Quantity {
	return &Quantity{Kind: k, Value: def}
}

func (q *Quantity) String() string {
	if q.text != "" {
		return q.text
	}
	return strconv.FormatFloat(q.Value, 'g', -1, 64) + siUnit[q.Kind]
}

var siUnit = map[Kind]string{Length: "m", Speed: "m/s", VerticalSpeed: "m/s", Mass: "kg", TempDelta: "K", Angle: "deg", Area: "m2"}

// Set parses s; pflag wraps the error with the flag's name.
func (q *Quantity) Set(s string) error {
	v, err := ParseQuantity(s, q.Kind)
	if err != nil {
		return err
	}
	if q.ranged && !(v >= q.min && v <= q.max) {
		return fmt.Errorf("%s is outside the range %s", s, q.RangeText())
	}
	q.Value, q.Given, q.text = v, true, s
	return nil
}

// Type names the value in help output.
func (q *Quantity) Type() string {
	switch q.Kind {
	case Length:
		return "length"
	case Speed:
		return "speed"
	case VerticalSpeed:
		return "vspeed"
	case Mass:
		return "mass"
	case TempDelta:
		return "kelvin"
	case Angle:
		return "deg"
	}
	return "value"
}

// LatLon is a pflag.Value for "LAT,LON" in decimal degrees.
type LatLon struct {
	Lat, Lon float64
	Given    bool
	text     string
}

func (p *LatLon) String() string { return p.text }

func (p *LatLon) Set(s string) error {
	lat, lon, err := ParseLatLon(s)
	if err != nil {
		return err
	}
	p.Lat, p.Lon, p.Given, p.text = lat, lon, true, s
	return nil
}

func (p *LatLon) Type() string { return "lat,lon" }

// RequireGiven returns a usage error naming flag when q was not given.
func RequireGiven(given bool, flag string) error {
	if !given {
		return Usagef(flag, "is required")
	}
	return nil
}

// FlagError wraps err as a usage error naming the flag and the value.
func FlagError(flag, value string, err error) error {
	return &UsageError{Where: flag, Err: fmt.Errorf("%q: %w", value, err)}
}
