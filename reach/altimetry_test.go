package reach

import (
	"math"
	"testing"
)

func TestColdCorrectionAgainstPANSOPSTable(t *testing.T) {
	// ICAO Doc 8168 (PANS-OPS) Vol I, the table of values to be added to
	// published heights (ft) for an aerodrome at sea level: its entries are
	// the formula rounded up to the next 10 ft. Table values from memory.
	const ft = 0.3048
	cases := []struct {
		tempC, heightFt, tableFt float64
	}{
		{0, 1000, 60}, {0, 5000, 280},
		{-10, 1000, 100}, {-10, 3000, 290},
		{-20, 500, 70}, {-20, 2000, 280},
		{-30, 3000, 570}, {-30, 1000, 190},
		{-40, 4000, 970},
		{-50, 5000, 1500}, {-50, 200, 60},
	}
	for _, c := range cases {
		got, err := ColdCorrection(c.heightFt*ft, 0, c.tempC+273.15)
		if err != nil {
			t.Fatal(err)
		}
		up := math.Ceil(got/ft/10-1e-9) * 10
		if up != c.tableFt {
			t.Errorf("%v °C, %v ft above the station: %.1f ft, rounded up %v ft, table %v ft", c.tempC, c.heightFt, got/ft, up, c.tableFt)
		}
	}
}

func TestColdCorrectionRules(t *testing.T) {
	// The simple rule of PANS-OPS (about 4 % of the height above the
	// station per 10 K below ISA): 1000 m above a sea-level station at
	// -5 °C (20 K below ISA) is about 80 m low; the formula gives a little
	// less (the rule is a rounded-up approximation), within 10 %.
	got, _ := ColdCorrection(1000, 0, 273.15-5)
	if !(got > 0.9*80 && got < 80) {
		t.Errorf("1000 m, 20 K below ISA: %.1f m, want a little under the 80 m of the 4 %% rule", got)
	}
	// A station at 1000 m reporting -1.5 °C: t0 = -1.5 + 6.5 = 5 °C at sea
	// level, 10 K below ISA; 1000 m above it the formula gives
	// 1000·10/(278 − 6.5) ≈ 36.8 m, about 4 % of the height above the
	// station (not above sea level).
	got, _ = ColdCorrection(2000, 1000, 273.15-1.5)
	if !(got > 30 && got < 40) {
		t.Errorf("1000 m above a 1000 m station, 10 K below ISA: %.1f m, want about 37 m", got)
	}
	// Warmer than ISA, at or below the station: no correction (not credited).
	for _, c := range [][3]float64{{2000, 0, 273.15 + 25}, {300, 500, 273.15 - 20}, {500, 500, 260}} {
		if got, _ := ColdCorrection(c[0], c[1], c[2]); got != 0 {
			t.Errorf("ColdCorrection%v = %v, want 0", c, got)
		}
	}
	if _, err := ColdCorrection(1000, 0, 20); err == nil {
		t.Error("20 K accepted as a station temperature")
	}
}

func TestIndicatedForInvertsTheCorrection(t *testing.T) {
	// Round trip of the ICAO Doc 8168 formula: the reading IndicatedFor
	// returns, corrected, gives back the true altitude within 1 cm, and is
	// above it in cold air (the altimeter over-reads).
	for _, c := range [][3]float64{{2445, 300, 273.15 - 20}, {800, 0, 273.15 - 45}, {3000, 1200, 273.15 + 5}, {1500, 0, 273.15 + 30}} {
		ind, err := IndicatedFor(c[0], c[1], c[2])
		if err != nil {
			t.Fatal(err)
		}
		corr, _ := ColdCorrection(ind, c[1], c[2])
		if math.Abs(ind-corr-c[0]) > 0.01 || ind < c[0] {
			t.Errorf("IndicatedFor%v = %.2f m, corrected back %.2f m", c, ind, ind-corr)
		}
	}
}
