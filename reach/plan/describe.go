package plan

import (
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/paulmach/orb"

	"glidereach/reach"
	"glidereach/reach/tiling"
	"glidereach/reach/tiling/fgb"
	"glidereach/wind"
)

// The words that describe a run in its outputs: the warnings of settings
// below common practice, the wind, the assumptions a result rests on, and
// the tiled coverage's COG ImageDescription and FlatGeobuf header. Both
// glidereach and glidereach-pipeline write them from here, so the two
// commands give the same bytes for the same inputs (tested by the
// pipeline's TestSameAsGlidereachCoverageTiled). The flag names in the
// texts ("--air-sink", "--cell", …) are the commands' own, which both
// share.

// Settings below these are warned about (common practice, no source): a
// reserve under about 150 m (500 ft) leaves no room for a circuit or even
// a straight-in approach with a turn; an en-route clearance under about
// 50 m leaves nothing for sinking air, turbulence near a ridge or a DEM
// that misses trees and masts; a lowest speed under 1.3 × the stall speed
// (the usual approach speed margin, the same factor as reach.StallMargin)
// leaves no margin for gusts, turns or a heavier aircraft.
const (
	WarnReserve   = 150.0 // m above the field on arrival
	WarnClearance = 50.0  // m above terrain en route
	WarnMinSpeed  = 1.3   // × the stall speed
)

// SetupWarnings are the warnings of s's settings below common practice
// (WarnReserve, WarnClearance, WarnMinSpeed), in that order; resFrom and
// clrFrom say where the reserve and the clearance came from ("--reserve",
// "the aircraft profile", "the default").
func SetupWarnings(s *Setup, resFrom, clrFrom string) []string {
	var ws []string
	add := func(format string, args ...any) { ws = append(ws, fmt.Sprintf(format, args...)) }
	switch {
	case s.Reserve == 0:
		add("RESERVE 0 m (from %s): figures and rings reach the field at ground level with NO height for a circuit, an approach or a misjudgement; plan with a reserve of at least %.0f m (common practice, no source)", resFrom, WarnReserve)
	case s.Reserve < WarnReserve:
		add("reserve %.0f m (from %s) is below the %.0f m (about 500 ft) that common practice keeps for a circuit (no source)", s.Reserve, resFrom, WarnReserve)
	}
	switch {
	case s.Clearance == 0:
		add("CLEARANCE 0 m (from %s): glide lines may graze the terrain model with NO margin for sinking air, turbulence, trees, masts or DEM error; keep at least %.0f m (common practice, no source)", clrFrom, WarnClearance)
	case s.Clearance < WarnClearance:
		add("clearance %.0f m (from %s) is below the %.0f m above terrain that common practice keeps en route (no source)", s.Clearance, clrFrom, WarnClearance)
	}
	if w := MinSpeedWarning(s.Aircraft); w != "" {
		ws = append(ws, w)
	}
	return ws
}

// MinSpeedWarning is the warning for a profile whose min_speed is under
// WarnMinSpeed × its stall speed (speeds shown in kt), or "".
func MinSpeedWarning(ac *reach.Aircraft) string {
	if ac.MinIAS > 0 && ac.MinIAS < WarnMinSpeed*ac.StallIAS {
		return fmt.Sprintf("the profile's min_speed %.0f kt is only %.2f × its stall speed %.0f kt, below the %.1f × stall that common practice keeps as a margin (no source); the speed to fly may be held that close to the stall",
			ac.MinIAS/knot, ac.MinIAS/ac.StallIAS, ac.StallIAS/knot, WarnMinSpeed)
	}
	return ""
}

// WindStyle says how the user gave the wind, so that it is echoed in the
// user's terms: Feet shows layer altitudes in feet as well (when they were
// typed in feet; a coded forecast always is), Forecast shows a calm layer
// as "light and variable", which is what a forecast's group 9900 says.
type WindStyle struct {
	Feet, Forecast bool
}

// WindText describes wind profile p for people: "270°/14 kt" for one
// layer (direction the wind blows from, speed in kt); per layer "1500 m
// 270°/14 kt", "3000 ft (914 m) 270°/14 kt" in the Feet style, with the
// layer's temperature ("+5 °C") when it has one; "calm" for a calm or nil
// profile ("light and variable at every level" for a Forecast's).
func WindText(p *wind.Profile, st WindStyle) string {
	if p == nil || p.IsCalm() {
		if st.Forecast && p != nil && len(p.Layers()) > 0 {
			return "light and variable at every level"
		}
		return "calm"
	}
	ls := p.Layers()
	if len(ls) == 1 {
		return fmt.Sprintf("%03.0f°/%.0f kt", ls[0].Dir, ls[0].Speed/knot)
	}
	parts := make([]string, 0, len(ls))
	for _, l := range ls {
		alt := fmt.Sprintf("%.0f m", l.Alt)
		if st.Feet {
			alt = fmt.Sprintf("%.0f ft (%.0f m)", l.Alt/0.3048, l.Alt)
		}
		dirSpeed := fmt.Sprintf("%03.0f°/%.0f kt", l.Dir, l.Speed/knot)
		if l.Speed == 0 {
			dirSpeed = "calm"
			if st.Forecast {
				dirSpeed = "light and variable"
			}
		}
		s := alt + " " + dirSpeed
		if l.HasTemp {
			s += fmt.Sprintf(" %+.0f °C", l.Temp-273.15)
		}
		parts = append(parts, s)
	}
	return strings.Join(parts, ", ")
}

// WindErrorText is what the wind text gains with a wind uncertainty of
// ±dirDeg degrees and ±speed m/s (shown in kt) giving n winds:
// " (±20°, ±5 kt: worst of 9 winds)".
func WindErrorText(dirDeg, speed float64, n int) string {
	return fmt.Sprintf(" (±%.0f°, ±%.0f kt: worst of %d winds)", dirDeg, speed/knot, n)
}

// ConditionAssumptions lists the flying conditions of s that differ from
// the profile's: the mass, the contamination (bugs) and the sinking-air
// allowance, one line each, in that order.
func (s *Setup) ConditionAssumptions() []string {
	var a []string
	if s.Cond.Mass > 0 {
		a = append(a, fmt.Sprintf("mass %.0f kg", s.Cond.Mass))
	}
	if s.Cond.Bugs > 0 {
		a = append(a, fmt.Sprintf("contamination: sink +%.0f %%", s.Cond.Bugs*100))
	}
	if s.Cond.AirSink > 0 {
		a = append(a, fmt.Sprintf("sinking air allowance %.1f m/s", s.Cond.AirSink))
	}
	return a
}

// Assumptions lists the inputs a result of s rests on, for every output:
// the warnings (each "WARNING: …"), the aircraft, the wind (windText), the
// margins, the conditions, the atmosphere, the flying rule and, with more
// than one wind, the worst-of-winds rule.
func (s *Setup) Assumptions(windText string, warnings []string) []string {
	a := make([]string, 0, len(warnings)+8)
	for _, w := range warnings {
		a = append(a, "WARNING: "+w)
	}
	a = append(a,
		"aircraft: "+s.Aircraft.Name,
		"wind: "+windText,
		fmt.Sprintf("reserve %.0f m above the field on arrival, clearance %.0f m above terrain en route", s.Reserve, s.Clearance),
	)
	a = append(a, s.ConditionAssumptions()...)
	if s.Cond.AirSink == 0 {
		a = append(a, "no sinking-air allowance: the air is taken as neither rising nor sinking apart from the wind (add one with --air-sink)")
	}
	if s.Cond.MacCready > 0 {
		a = append(a, fmt.Sprintf("MacCready setting %.1f m/s", s.Cond.MacCready))
	}
	if s.Atm.ISADev != 0 {
		a = append(a, fmt.Sprintf("ISA %+.0f K", s.Atm.ISADev))
	}
	a = append(a, "no thrust, speed to fly for best range in the wind at each altitude, stall margin applied")
	if len(s.Winds) > 1 {
		a = append(a, fmt.Sprintf("wind uncertainty: every figure holds in each of the %d winds of the set; a point counts as covered only when the SAME field is in reach in all of them", len(s.Winds)))
	}
	return a
}

// AltFlownText says how the altitude flown alt (m) was given: above the
// terrain at each cell (agl) or MSL everywhere, in m and ft (0.3048 m).
func AltFlownText(agl bool, alt float64) string {
	if agl {
		return fmt.Sprintf("%.0f m (%.0f ft) above the terrain at each cell (--agl)", alt, alt/0.3048)
	}
	return fmt.Sprintf("%.0f m MSL (%.0f ft) everywhere (--alt)", alt, alt/0.3048)
}

// AltFlownIndicatedText is AltFlownText for a true altitude alt (m MSL)
// worked out from the altimeter reading (m) by the cold-temperature
// correction (--alt-indicated).
func AltFlownIndicatedText(alt, reading float64) string {
	return fmt.Sprintf("%.0f m MSL (%.0f ft) true everywhere (--alt-indicated %.0f m, corrected for the temperature)", alt, alt/0.3048, reading)
}

// Zone texts: the zone analysed, as the command line gave it.

// AreaText names an area file, path as typed.
func AreaText(path string) string { return "area " + path }

// BoxText names a box by its corners (degrees).
func BoxText(west, south, east, north float64) string {
	return fmt.Sprintf("box %.5f,%.5f to %.5f,%.5f (south-west to north-east corner, lat,lon)", south, west, north, east)
}

// CorridorText names a corridor of width m along route (as typed).
func CorridorText(width float64, route string) string {
	return fmt.Sprintf("corridor %.1f km wide along %s", width/1000, route)
}

// TiledCOGDescription is the ImageDescription of a tiled coverage's
// least-altitude COG (tiling.WriteCOG), with the caution.
const TiledCOGDescription = "glidereach: least altitude (m MSL) from which a landing field is reached with the reserve; NaN where none below the ceiling; overviews hold the highest value of the cells they cover. " + reach.Caution

// TiledText is what a tiled coverage's assumptions say about the run
// beyond the setup.
type TiledText struct {
	AltFlown string  // how the altitude flown was given (AltFlownText)
	Zone     string  // the zone analysed (AreaText, BoxText, CorridorText)
	Terrain  string  // the ground (Ground.Describe)
	Flat     bool    // no DEM: the solver cell is TiledFlatCell or --cell
	DEMCell  float64 // the DEM's resolution, m (TiledPlan.DEMCell)
}

// CellText says what plan p's solver cell is against the DEM's.
func (t TiledText) CellText(p *tiling.Plan) string {
	switch {
	case t.Flat:
		return fmt.Sprintf("%.1f m cells on flat ground (--cell sets them)", p.Cell)
	case p.Cell > 1.001*t.DEMCell:
		return fmt.Sprintf("%.1f m as asked with --cell, coarser than the DEM's %.1f m", p.Cell, t.DEMCell)
	}
	return fmt.Sprintf("the DEM's resolution, %.1f m", p.Cell)
}

// TiledAssumptions are a tiled coverage's assumptions: setup's (Setup.
// Assumptions and what the command adds), then the altitude flown, the
// covered rule, the ceiling, the lattice and solver cell, the zone and the
// terrain.
func TiledAssumptions(setup []string, p *tiling.Plan, t TiledText) []string {
	l := p.Lattice
	a := append([]string{}, setup...)
	return append(a, "altitude flown: "+t.AltFlown,
		"a cell is covered when some field is reached from its centre with the reserve; shares and areas count cells of the DEM's lattice, each with its area on the WGS84 ellipsoid",
		fmt.Sprintf("least altitudes computed up to %.0f m MSL (raster empty above)", p.Ceiling),
		fmt.Sprintf("tiled: output lattice %d × %d cells (EPSG:%d), %d tiles of %d cells; each field solved on its own window at %s; a cell's value is the highest of the four solver cells around it (conservative)", l.Cols, l.Rows, l.EPSG, len(p.Tiles()), p.TileSide(), t.CellText(p)),
		"analysed: "+t.Zone,
		"terrain: "+t.Terrain)
}

// FractionDown rounds a share down to 1e-4 (never optimistic).
func FractionDown(f float64) float64 { return math.Floor(f*1e4+1e-9) / 1e4 }

// WriteTiledFGB writes a tiled coverage as FlatGeobuf (EPSG:4326,
// lon/lat): the covered and uncovered parts (areas in m² on the WGS84
// ellipsoid from t, rounded; the covered share rounded down, FractionDown)
// and plan p's fields (the area each covers and covers alone), with the
// caution on every feature; the header's title names the zone and its
// description is the assumptions and the caution.
func WriteTiledFGB(w io.Writer, p *tiling.Plan, t *tiling.Totals, covered, uncovered orb.MultiPolygon, zone string, assumptions []string) error {
	h := fgb.Header{Name: "coverage", Title: "glidereach coverage of the " + zone, EPSG: 4326,
		Description: strings.Join(assumptions, "; ") + ". " + reach.Caution,
		Columns: []fgb.Column{{Name: "kind", Type: fgb.String}, {Name: "name", Type: fgb.String}, {Name: "area_m2", Type: fgb.Double},
			{Name: "covered_fraction", Type: fgb.Double}, {Name: "exclusive_m2", Type: fgb.Double}, {Name: "caution", Type: fgb.String}}}
	if covered == nil {
		covered = orb.MultiPolygon{}
	}
	if uncovered == nil {
		uncovered = orb.MultiPolygon{}
	}
	fs := []fgb.Feature{
		{Geometry: covered, Properties: []any{"covered", nil, math.Round(t.CoveredArea), FractionDown(t.CoveredFraction), nil, reach.Caution}},
		{Geometry: uncovered, Properties: []any{"uncovered", nil, math.Round(t.ZoneArea - t.CoveredArea), nil, nil, reach.Caution}},
	}
	for i, f := range p.Fields {
		fs = append(fs, fgb.Feature{Geometry: orb.Point{f.Lon, f.Lat}, Properties: []any{"field", f.Name, math.Round(t.Covers[i]), nil, math.Round(t.Exclusive[i]), reach.Caution}})
	}
	return fgb.Write(w, h, fs)
}
