package input

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestParseQuantityUnits(t *testing.T) {
	// Exact definitions: 1 ft = 0.3048 m (international yard and pound
	// agreement, 1959); 1 nm = 1852 m (International Hydrographic Conference,
	// 1929); 1 kt = 1852/3600 m/s; 1 mph = 1609.344/3600 m/s; 1 lb =
	// 0.45359237 kg (1959 agreement); 1 fpm = 0.3048/60 m/s.
	cases := []struct {
		s    string
		k    Kind
		want float64
	}{
		{"5000ft", Length, 1524},
		{"1500m", Length, 1500},
		{"1500", Length, 1500},
		{"2.5km", Length, 2500},
		{"1nm", Length, 1852},
		{" 10 NM ", Length, 18520},
		{"20kt", Speed, 20 * 1852.0 / 3600},
		{"100km/h", Speed, 100 / 3.6},
		{"60mph", Speed, 60 * 1609.344 / 3600},
		{"12.5", Speed, 12.5},
		{"500fpm", VerticalSpeed, 500 * 0.3048 / 60},
		{"2kt", VerticalSpeed, 2 * 1852.0 / 3600},
		{"1.5m/s", VerticalSpeed, 1.5},
		{"1000lb", Mass, 453.59237},
		{"720kg", Mass, 720},
		{"-5C", TempDelta, -5},
		{"+10K", TempDelta, 10},
		{"10%", Fraction, 0.1},
		{"0.1", Fraction, 0.1},
		{"1e3m", Length, 1000},
		{"10.5m2", Area, 10.5},
	}
	for _, c := range cases {
		got, err := ParseQuantity(c.s, c.k)
		if err != nil || math.Abs(got-c.want) > 1e-9*math.Max(1, math.Abs(c.want)) {
			t.Errorf("ParseQuantity(%q, %v) = %v, %v; want %v", c.s, c.k, got, err, c.want)
		}
	}
}

func TestParseQuantityBad(t *testing.T) {
	cases := []struct {
		s    string
		k    Kind
		want string // part of the message
	}{
		{"", Length, "empty"},
		{"   ", Speed, "empty"},
		{"ft", Length, "not a length"},
		{"abc", Mass, "not a mass"},
		{"5000 furlongs", Length, "unknown length unit"},
		{"20knots", Speed, "unknown speed unit"},
		{"20kt", Length, "unknown length unit"},
		{"5000ft", Speed, "unknown speed unit"},
		{"3fpm", Speed, "unknown speed unit"},
		{"720kgs", Mass, "unknown mass unit"},
		{"NaN", Length, "not a length"},
		{"Inf", Speed, "not a speed"},
		{"1e999m", Length, "bad number"},
		{"--5m", Length, "not a length"},
		{"5..0m", Length, "unknown length unit"},
		{"5e", Length, "unknown length unit"},
		{"1,5m", Length, "unknown length unit"},
		{"0x10", Length, "unknown length unit"},
		{"10F", TempDelta, "unknown temperature difference unit"},
		{"1/2", Fraction, "unknown fraction unit"},
		{"+", Length, "not a length"},
		{"m5", Length, "not a length"},
		{"1e308nm", Length, "out of range"},
		{"5 m m", Length, "unknown length unit"},
	}
	if len(cases) < 20 {
		t.Fatal("need at least 20 bad cases")
	}
	for _, c := range cases {
		v, err := ParseQuantity(c.s, c.k)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("ParseQuantity(%q, %v) = %v, %v; want an error containing %q", c.s, c.k, v, err, c.want)
		}
	}
}

func TestQuantityFlag(t *testing.T) {
	q := NewQuantity(Length, 0)
	if err := q.Set("5000ft"); err != nil || q.Value != 1524 || !q.Given || q.String() != "5000ft" {
		t.Errorf("Set: %v %+v", err, q)
	}
	if err := NewQuantity(Speed, 0).Set("fast"); err == nil {
		t.Error("bad speed accepted")
	}
	if err := FlagError("--alt", "x", errors.New("bad")); !strings.Contains(err.Error(), "--alt") {
		t.Errorf("FlagError %v", err)
	}
}

// FuzzParseQuantity: never panics; a success is finite, and an SI value
// printed and parsed again round-trips.
func FuzzParseQuantity(f *testing.F) {
	for _, s := range []string{"5000ft", "20kt", "-5C", "1e3m", "100km/h", "10%", "", "5e", "1e999", "0.1", "720kg", "1,5"} {
		f.Add(s, 0)
		f.Add(s, 1)
	}
	f.Fuzz(func(t *testing.T, s string, k int) {
		kind := Kind(((k % 8) + 8) % 8)
		v, err := ParseQuantity(s, kind)
		if err != nil {
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("ParseQuantity(%q) = %v with no error", s, v)
		}
		q := NewQuantity(kind, v)
		w, err := ParseQuantity(q.String(), kind)
		if err != nil || w != v {
			t.Fatalf("round trip of %v via %q: %v, %v", v, q.String(), w, err)
		}
	})
}
