package reach

import (
	"math"
	"testing"
)

// relClose reports |got−want| ≤ rel·|want|.
func relClose(got, want, rel float64) bool { return math.Abs(got-want) <= rel*math.Abs(want) }

func TestISATable(t *testing.T) {
	// Geopotential altitudes. Temperatures, pressures and densities are the
	// table values of the ICAO Standard Atmosphere (ICAO Doc 7488/3, 1993) and
	// the U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562), identical below
	// 32 km; compared to 4 significant figures as the issue asks.
	cases := []struct {
		h, T, p, rho float64
	}{
		// ICAO/USSA76 sea-level defining values.
		{0, 288.15, 101325, 1.225},
		// USSA76 table at 1000 m: 281.65 K, 8.9875e4 Pa, 1.1116 kg/m³.
		{1000, 281.65, 89875, 1.1116},
		// ICAO table at 2000 m: 275.15 K, 795.0 hPa, 1.0065 kg/m³.
		{2000, 275.15, 79495, 1.0065},
		// ICAO table at 3000 m: 268.65 K, 701.1 hPa, 0.9091 kg/m³.
		{3000, 268.65, 70109, 0.9091},
		// ICAO table at 5000 m: 255.65 K, 540.2 hPa, 0.7361 kg/m³.
		{5000, 255.65, 54020, 0.7361},
		// USSA76 at the tropopause, 11 km: 216.65 K, 22632.1 Pa, 0.363918 kg/m³.
		{11000, 216.65, 22632.1, 0.363918},
		// USSA76 at the top of the isothermal layer, 20 km: 216.65 K, 5474.89 Pa.
		{20000, 216.65, 5474.89, 5474.89 / (287.05287 * 216.65)},
	}
	for _, c := range cases {
		T, p, rho := ISA(c.h)
		if math.Abs(T-c.T) > 0.01 || !relClose(p, c.p, 5e-4) || !relClose(rho, c.rho, 5e-4) {
			t.Errorf("ISA(%v) = %.3f K, %.1f Pa, %.5f kg/m³; want %.2f K, %.1f Pa, %.5f kg/m³", c.h, T, p, rho, c.T, c.p, c.rho)
		}
	}
}

func TestISASigmaInFeet(t *testing.T) {
	// Standard-atmosphere table by pressure altitude in feet (ICAO Doc 7488/3
	// in feet; the same figures are printed in common performance handbooks):
	// 5000 ft σ = 0.8617, 10000 ft σ = 0.7385.
	for _, c := range []struct{ ft, sigma float64 }{{5000, 0.8617}, {10000, 0.7385}} {
		got := Atmosphere{}.Sigma(c.ft * 0.3048)
		if math.Abs(got-c.sigma) > 1e-4 {
			t.Errorf("σ(%v ft) = %.5f, want %.4f", c.ft, got, c.sigma)
		}
	}
}

func TestAtmosphereTemperature(t *testing.T) {
	h := 1524.0
	_, p, rho := ISA(h)
	// Ideal gas law rho = p/(R T) (USSA76 eq. 42): warmer air at the same
	// pressure is thinner by the ratio of temperatures.
	warm := Atmosphere{ISADev: 20}
	T0, _, _ := ISA(h)
	if got, want := warm.Density(h), p/(RAir*(T0+20)); !relClose(got, want, 1e-12) {
		t.Errorf("ISA+20 density %v, want %v", got, want)
	}
	if got := (Atmosphere{}).Density(h); !relClose(got, rho, 1e-12) {
		t.Errorf("ISA density %v, want %v", got, rho)
	}
	// A layer temperature overrides ISA+dev; a false ok falls back.
	layered := Atmosphere{ISADev: 20, Temp: func(h float64) (float64, bool) { return 250, h > 1000 }}
	if got := layered.Temperature(h); got != 250 {
		t.Errorf("temperature from layers %v, want 250", got)
	}
	if got := layered.Temperature(500); math.Abs(got-(288.15-0.0065*500+20)) > 1e-9 {
		t.Errorf("fallback temperature %v", got)
	}
}

func TestTASFromIAS(t *testing.T) {
	// TAS = EAS/√σ (standard relation; memory) with σ from the ICAO tables;
	// REFERENCES.md §2b: EAS 100 kt is 116.08 kt TAS at 3000 m and 107.73 kt at
	// 5000 ft (own calculation from the table σ).
	atm := Atmosphere{}
	if got := TAS(100, atm.Sigma(3000)); math.Abs(got-116.08) > 0.01 {
		t.Errorf("TAS at 3000 m = %.3f, want 116.08", got)
	}
	if got := TAS(100, atm.Sigma(1524)); math.Abs(got-107.73) > 0.01 {
		t.Errorf("TAS at 5000 ft = %.3f, want 107.73", got)
	}
	if got := IAS(TAS(50, 0.7), 0.7); math.Abs(got-50) > 1e-12 {
		t.Errorf("IAS(TAS) round trip %v", got)
	}
}
