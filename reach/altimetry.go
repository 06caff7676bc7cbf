package reach

import (
	"fmt"
	"math"
)

// ColdLapseRate is the standard temperature lapse rate L0 of the
// cold-temperature correction, 0.0065 K/m (ICAO standard atmosphere).
const ColdLapseRate = 0.0065

// ColdCorrection returns the height (m, ≥ 0) by which an aircraft is lower
// than a pressure altimeter set to the local QNH reads, in air colder than
// standard: the ICAO cold-temperature correction of ICAO Doc 8168
// (PANS-OPS) Volume I, Part III, Section 1, Chapter 4 ("Altimeter
// corrections"), section and amendment numbers from memory:
//
//	correction = H · (15 − t0) / (273 + t0 − ½ · L0 · (H + Hss))
//	t0 = tss + L0 · Hss
//
// with H = indicated − stationElev the height above the altimeter setting
// source per the altimeter (m), Hss = stationElev (m MSL) the elevation of
// that source (normally the aerodrome), tss = stationTemp − 273.15 the
// temperature reported there (°C; stationTemp is in K), t0 that
// temperature brought to sea level along the standard lapse rate L0 =
// ColdLapseRate. Its "simple rule" is about 4 % of H per 10 K below ISA.
// The result is the true altitude indicated − ColdCorrection(...).
//
// Air warmer than standard (t0 ≥ 15 °C) puts the aircraft higher than it
// reads; that height is not credited (0 is returned), which is
// conservative. It is 0 when indicated ≤ stationElev. It returns an error
// for a station temperature outside 183..333 K (−90..+60 °C), a station
// elevation outside −500..9000 m, or non-finite input.
func ColdCorrection(indicated, stationElev, stationTemp float64) (float64, error) {
	switch {
	case math.IsNaN(indicated) || math.IsInf(indicated, 0):
		return 0, fmt.Errorf("reach: cold correction: indicated altitude %v m is not finite", indicated)
	case !(stationElev >= -500 && stationElev <= 9000):
		return 0, fmt.Errorf("reach: cold correction: station elevation %v m is outside -500..9000 m", stationElev)
	case !(stationTemp >= 183 && stationTemp <= 333):
		return 0, fmt.Errorf("reach: cold correction: station temperature %v K is outside 183..333 K (-90..+60 °C)", stationTemp)
	}
	h := indicated - stationElev
	t0 := stationTemp - 273.15 + ColdLapseRate*stationElev
	if h <= 0 || t0 >= 15 {
		return 0, nil
	}
	return h * (15 - t0) / (273 + t0 - 0.5*ColdLapseRate*(h+stationElev)), nil
}

// IndicatedFor is the inverse of the cold-temperature correction: the
// altimeter reading (m, on the QNH of a source at stationElev m MSL
// reporting stationTemp K) at which the aircraft is at true altitude
// trueAlt (m MSL), so that
//
//	indicated − ColdCorrection(indicated, stationElev, stationTemp) = trueAlt.
//
// The correction grows with the indicated height more slowly than one for
// one (by about (15 − t0)/(273 + t0) per metre), so the fixed-point
// iteration indicated ← trueAlt + ColdCorrection(indicated, …) converges;
// it stops at 1 mm. In air warmer than ISA it returns trueAlt (the
// correction is 0). Errors are those of ColdCorrection.
func IndicatedFor(trueAlt, stationElev, stationTemp float64) (float64, error) {
	ind := trueAlt
	for i := 0; i < 100; i++ {
		c, err := ColdCorrection(ind, stationElev, stationTemp)
		if err != nil {
			return 0, err
		}
		next := trueAlt + c
		if math.Abs(next-ind) < 1e-3 {
			return next, nil
		}
		ind = next
	}
	return ind, nil
}
