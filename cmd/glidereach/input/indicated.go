package input

import (
	"fmt"
	"math"

	"github.com/spf13/pflag"

	"glidereach/reach"
)

// Indicated takes an altitude as the altimeter reads it, with the
// altimeter setting source it is corrected with (ICAO cold-temperature
// correction): --alt-indicated, --station-elev, --station-temp.
type Indicated struct {
	AltInd      *Quantity
	StationElev *Quantity
	StationTemp string
	done        bool    // apply has run (it sets the altitude once)
	note        string  // what apply returned
	TempK       float64 // the parsed --station-temp (K), once applied
}

// Reading returns the altimeter reading at which the aircraft is at true
// altitude alt (m MSL), for the source of --alt-indicated; ok is false when
// no reading was given.
func (f *Indicated) Reading(alt float64) (float64, bool) {
	if f == nil || !f.done || !f.AltInd.Given || math.IsNaN(alt) || math.IsInf(alt, 0) {
		return 0, false
	}
	v, err := reach.IndicatedFor(alt, f.StationElev.Value, f.TempK)
	return v, err == nil
}

// NewIndicated returns the flags unset, with the commands' ranges: a
// reading within -400..19000 m, a source elevation within -500..9000 m.
func NewIndicated() *Indicated {
	return &Indicated{AltInd: NewQuantity(Length, 0).Within(-400, 19000), StationElev: NewQuantity(Length, 0).Within(-500, 9000)}
}

// Register adds the three flags; what names the altitude ("start
// altitude", "planned altitude").
func (f *Indicated) Register(fs *pflag.FlagSet, what string) {
	fs.Var(f.AltInd, "alt-indicated", f.AltInd.Help(what+" as the altimeter reads it, set to the local QNH (m, ft); needs --station-elev and --station-temp, corrected for cold air by the ICAO rule (Doc 8168), instead of --alt"))
	fs.Var(f.StationElev, "station-elev", f.StationElev.Help("with --alt-indicated: elevation of the altimeter setting source, normally the aerodrome whose QNH is set (m, ft)"))
	fs.StringVar(&f.StationTemp, "station-temp", "", "with --alt-indicated: air temperature reported at the altimeter setting source (e.g. -15C, 258K)")
	// No "(default 0m)": an unset reading is not 0 m.
	fs.Lookup("alt-indicated").DefValue = ""
	fs.Lookup("station-elev").DefValue = ""
}

// Apply turns --alt-indicated into the true altitude in alt (marking it
// given) with the ICAO cold-temperature correction (reach.ColdCorrection)
// and returns the assumption that says so; "" and alt untouched when no
// reading was given.
func (f *Indicated) Apply(alt *Quantity) (string, error) {
	if f.done {
		return f.note, nil
	}
	note, err := f.convert(alt)
	if err == nil {
		f.done, f.note = true, note
	}
	return note, err
}

// AltitudeFlown is Apply for the altitude flown over a route or an area
// (route and coverage): --agl and --alt-indicated exclude each other, and
// a plain --alt is said to be the true altitude.
func (f *Indicated) AltitudeFlown(alt, agl *Quantity) (string, error) {
	if agl.Given && f.AltInd.Given {
		return "", Usagef("--agl", "give --agl or --alt-indicated, not both")
	}
	note, err := f.Apply(alt)
	if err != nil {
		return "", err
	}
	if note == "" && alt.Given {
		note = "altitude --alt taken as true altitude MSL (no altimeter temperature correction)"
	}
	return note, nil
}

func (f *Indicated) convert(alt *Quantity) (string, error) {
	if !f.AltInd.Given {
		if f.StationElev.Given || f.StationTemp != "" {
			return "", Usagef("--station-elev", "--station-elev and --station-temp go with --alt-indicated")
		}
		return "", nil
	}
	if alt.Given {
		return "", Usagef("--alt", "give --alt (true altitude) or --alt-indicated (the altimeter reading), not both")
	}
	ind := f.AltInd.Value
	if ind > 19000 || ind < -400 {
		return "", Usagef("--alt-indicated", "%v m is outside -400..19000 m", ind)
	}
	if !f.StationElev.Given || f.StationTemp == "" {
		return "", Usagef("--alt-indicated", "needs --station-elev and --station-temp (the altimeter setting source's elevation and temperature) for the cold-temperature correction")
	}
	if !(f.StationElev.Value >= -500 && f.StationElev.Value <= 9000) {
		return "", Usagef("--station-elev", "%v m is outside -500..9000 m", f.StationElev.Value)
	}
	tk, err := ParseTemperature(f.StationTemp)
	if err != nil {
		return "", FlagError("--station-temp", f.StationTemp, err)
	}
	if !(tk >= 183 && tk <= 333) {
		return "", Usagef("--station-temp", "%q is %.1f K, outside -90..+60 °C (give a unit: -15C or 258K)", f.StationTemp, tk)
	}
	corr, err := reach.ColdCorrection(ind, f.StationElev.Value, tk)
	if err != nil {
		return "", &UsageError{Where: "--alt-indicated", Err: err}
	}
	alt.Value, alt.Given = ind-corr, true
	f.TempK = tk
	isa := 15 - reach.ColdLapseRate*f.StationElev.Value
	if corr > 0 {
		return fmt.Sprintf("altitude: altimeter reads %.0f m (QNH of a source at %.0f m, %.1f °C, %.1f K below ISA there); true altitude %.0f m, %.0f m lower, by the ICAO cold-temperature correction (Doc 8168 PANS-OPS Vol I: H·(15−t0)/(273+t0−½·L0·(H+Hss)))",
			ind, f.StationElev.Value, tk-273.15, isa-(tk-273.15), ind-corr, corr), nil
	}
	return fmt.Sprintf("altitude: altimeter reads %.0f m (QNH of a source at %.0f m, %.1f °C); not colder than ISA or not above the source, so no correction (warmer air would put the aircraft higher; not credited)",
		ind, f.StationElev.Value, tk-273.15), nil
}
