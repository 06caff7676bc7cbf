package reach

import "math"

// Constants of the ICAO Standard Atmosphere (ICAO Doc 7488/3, 1993), identical
// to the U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562) below 32 km.
const (
	ISATemp0     = 288.15    // K, sea-level temperature
	ISAPressure0 = 101325.0  // Pa, sea-level pressure
	ISADensity0  = 1.225     // kg/m³, sea-level density
	ISALapse     = -0.0065   // K/m, temperature gradient 0–11 km
	G0           = 9.80665   // m/s², standard gravity
	RAir         = 287.05287 // J/(kg·K), specific gas constant of dry air (ICAO)
	Tropopause   = 11000.0   // m geopotential
	ISATemp11    = 216.65    // K, temperature from 11 to 20 km
	isaLapse20   = 0.001     // K/m, temperature gradient 20–32 km
	isaMin       = -5000.0   // m, lowest altitude of the tables
	isaMax       = 32000.0   // m, highest altitude modelled
)

var (
	isaP11 = ISAPressure0 * math.Pow(ISATemp11/ISATemp0, -G0/(RAir*ISALapse))
	isaP20 = isaP11 * math.Exp(-G0*(20000-Tropopause)/(RAir*ISATemp11))
)

// ISA returns the temperature T (K), pressure p (Pa) and density rho (kg/m³)
// of the ICAO standard atmosphere at geopotential altitude h (m):
//
//	h ≤ 11 km:       T = T₀ + L·h,  p = p₀·(T/T₀)^(−g₀/(R·L)),  L = −6.5 K/km
//	11 km < h ≤ 20 km: T = 216.65 K, p = p₁₁·exp(−g₀·(h − 11000)/(R·T))
//	20 km < h ≤ 32 km: T = 216.65 K + 1 K/km·(h − 20000), power law as above
//	rho = p/(R·T)
//
// The model is specified from 0 to 20 km; the troposphere law is continued
// down to −5 km (as the ICAO tables are) and h is clamped to [−5 km, 32 km].
//
// References: ICAO Doc 7488/3, Manual of the ICAO Standard Atmosphere (1993);
// U.S. Standard Atmosphere, 1976, NOAA-S/T 76-1562.
func ISA(h float64) (T, p, rho float64) {
	h = math.Max(isaMin, math.Min(isaMax, h))
	switch {
	case h <= Tropopause:
		T = ISATemp0 + ISALapse*h
		p = ISAPressure0 * math.Pow(T/ISATemp0, -G0/(RAir*ISALapse))
	case h <= 20000:
		T = ISATemp11
		p = isaP11 * math.Exp(-G0*(h-Tropopause)/(RAir*ISATemp11))
	default:
		T = ISATemp11 + isaLapse20*(h-20000)
		p = isaP20 * math.Pow(T/ISATemp11, -G0/(RAir*isaLapse20))
	}
	return T, p, p / (RAir * T)
}

// Atmosphere is the air the aircraft glides through: pressure from the
// standard atmosphere at the altitude (the altitude is used as pressure
// altitude), temperature from Temp where it knows one (wind layers with
// temperatures supply it), otherwise the ISA temperature plus ISADev.
//
// The zero value is the ICAO standard atmosphere.
type Atmosphere struct {
	// ISADev is the temperature deviation from ISA in kelvin (default 0).
	ISADev float64
	// Temp, when not nil, returns the air temperature in kelvin at altitude h
	// (m) and true, or false where it has none (then ISA + ISADev is used).
	Temp func(h float64) (float64, bool)
}

// Temperature returns the air temperature (K) at altitude h (m).
func (a Atmosphere) Temperature(h float64) float64 {
	if a.Temp != nil {
		if t, ok := a.Temp(h); ok && t > 0 && !math.IsInf(t, 0) {
			return t
		}
	}
	t, _, _ := ISA(h)
	return t + a.ISADev
}

// Density returns the air density (kg/m³) at altitude h (m):
//
//	rho = p_ISA(h) / (R·T(h))
//
// with T from Temperature. A warmer atmosphere is thinner at the same
// pressure altitude, so true speeds and sink rates rise.
func (a Atmosphere) Density(h float64) float64 {
	_, p, _ := ISA(h)
	return p / (RAir * a.Temperature(h))
}

// Sigma returns the density ratio σ = ρ/ρ₀ at altitude h (m), ρ₀ = 1.225 kg/m³.
func (a Atmosphere) Sigma(h float64) float64 { return a.Density(h) / ISADensity0 }

// TAS converts an indicated (equivalent) airspeed to true airspeed at
// density ratio sigma: TAS = IAS/√σ (m/s).
func TAS(ias, sigma float64) float64 { return ias / math.Sqrt(sigma) }

// IAS converts a true airspeed to indicated (equivalent) airspeed at density
// ratio sigma: IAS = TAS·√σ (m/s).
func IAS(tas, sigma float64) float64 { return tas * math.Sqrt(sigma) }
