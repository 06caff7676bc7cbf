package input

import (
	"errors"
	"math"
	"strings"
	"testing"

	"glidereach/reach"
)

// The approach keys of a profile: kind, approach_speed, max_crosswind.
func TestParseAircraftApproachKeys(t *testing.T) {
	ac, err := ParseAircraft("p.yaml", []byte(okHead+"kind: Sailplane\napproach_speed: 70kt\nmax_crosswind: 12kt\n"+bgPolar))
	if err != nil {
		t.Fatal(err)
	}
	if ac.Kind != reach.KindSailplane || math.Abs(ac.ApproachIAS-70*kt) > 1e-12 || math.Abs(ac.MaxCrosswind-12*kt) > 1e-12 {
		t.Errorf("got kind %q, approach %v, crosswind %v", ac.Kind, ac.ApproachIAS, ac.MaxCrosswind)
	}
	for _, c := range []struct{ text, want string }{
		// 48 kt stall × 1.3 = 62.4 kt: an approach at 50 kt is below it.
		{"approach_speed: 50kt\n", "p.yaml:5: reach: t: approach speed"},
		{"approach_speed: 130kt\n", "above the maximum speed"},
		{"kind: helicopter\n", "kind \"helicopter\""},
		{"max_crosswind: 100kt\n", "crosswind limit"},
		{"max_crosswind: -3kt\n", "must be positive"},
	} {
		_, err := ParseAircraft("p.yaml", []byte(okHead+c.text+bgPolar))
		var ue *UsageError
		if !errors.As(err, &ue) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: %v; want a *UsageError containing %q", c.text, err, c.want)
		}
	}
}
