package main

import (
	"fmt"
	"os"
	"strings"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach/plan"
	"glidereach/wind"
)

// The texts that describe a run in its outputs (the FlatGeobuf's
// description, the warnings). They are glidereach coverage --tiled's, word
// for word, so that both commands write the same FlatGeobuf bytes for the
// same inputs; package main of glidereach cannot be imported, so they are
// written again here, and TestSameAsGlidereachCoverageTiled fails when the
// two drift apart.

// Settings below these are warned about (common practice, no source; the
// same thresholds as glidereach's glideflags.go).
const (
	warnReserve   = 150.0 // m: about 500 ft for a circuit
	warnClearance = 50.0  // m above terrain en route
	warnMinSpeed  = 1.3   // × the stall speed
)

// setupWarnings are the warnings of settings below common practice;
// resFrom and clrFrom say where the reserve and the clearance came from
// ("--reserve", "the aircraft profile", "the default").
func setupWarnings(s *plan.Setup, resFrom, clrFrom string) []string {
	var ws []string
	add := func(format string, args ...any) { ws = append(ws, fmt.Sprintf(format, args...)) }
	switch {
	case s.Reserve == 0:
		add("RESERVE 0 m (from %s): figures and rings reach the field at ground level with NO height for a circuit, an approach or a misjudgement; plan with a reserve of at least %.0f m (common practice, no source)", resFrom, warnReserve)
	case s.Reserve < warnReserve:
		add("reserve %.0f m (from %s) is below the %.0f m (about 500 ft) that common practice keeps for a circuit (no source)", s.Reserve, resFrom, warnReserve)
	}
	switch {
	case s.Clearance == 0:
		add("CLEARANCE 0 m (from %s): glide lines may graze the terrain model with NO margin for sinking air, turbulence, trees, masts or DEM error; keep at least %.0f m (common practice, no source)", clrFrom, warnClearance)
	case s.Clearance < warnClearance:
		add("clearance %.0f m (from %s) is below the %.0f m above terrain that common practice keeps en route (no source)", s.Clearance, clrFrom, warnClearance)
	}
	if ac := s.Aircraft; ac.MinIAS > 0 && ac.MinIAS < warnMinSpeed*ac.StallIAS {
		add("the profile's min_speed %.0f kt is only %.2f × its stall speed %.0f kt, below the %.1f × stall that common practice keeps as a margin (no source); the speed to fly may be held that close to the stall",
			ac.MinIAS/input.Knot, ac.MinIAS/ac.StallIAS, ac.StallIAS/input.Knot, warnMinSpeed)
	}
	return ws
}

// setupAssumptions lists the inputs a result rests on (glidereach's
// glideSetup.assumptions for the flags this command has).
func setupAssumptions(s *plan.Setup, windText string, warnings []string) []string {
	a := make([]string, 0, len(warnings)+8)
	for _, w := range warnings {
		a = append(a, "WARNING: "+w)
	}
	a = append(a,
		"aircraft: "+s.Aircraft.Name,
		"wind: "+windText,
		fmt.Sprintf("reserve %.0f m above the field on arrival, clearance %.0f m above terrain en route", s.Reserve, s.Clearance),
	)
	if s.Cond.Mass > 0 {
		a = append(a, fmt.Sprintf("mass %.0f kg", s.Cond.Mass))
	}
	if s.Cond.Bugs > 0 {
		a = append(a, fmt.Sprintf("contamination: sink +%.0f %%", s.Cond.Bugs*100))
	}
	if s.Cond.AirSink > 0 {
		a = append(a, fmt.Sprintf("sinking air allowance %.1f m/s", s.Cond.AirSink))
	} else {
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

// tiledAssumptions are coverage --tiled's assumptions: the setup's, then
// the altitude flown, the rule, the ceiling, the lattice and solver cell,
// the zone and the terrain.
func tiledAssumptions(setup []string, p *tilingPlanInfo) []string {
	a := append([]string{}, setup...)
	return append(a, "altitude flown: "+p.altMode,
		"a cell is covered when some field is reached from its centre with the reserve; shares and areas count cells of the DEM's lattice, each with its area on the WGS84 ellipsoid",
		fmt.Sprintf("least altitudes computed up to %.0f m MSL (raster empty above)", p.ceiling),
		fmt.Sprintf("tiled: output lattice %d × %d cells (EPSG:%d), %d tiles of %d cells; each field solved on its own window at %s; a cell's value is the highest of the four solver cells around it (conservative)", p.cols, p.rows, p.epsg, p.tiles, p.tileSide, p.cellText),
		"analysed: "+p.zoneText,
		"terrain: "+p.terrain)
}

// tilingPlanInfo is what tiledAssumptions says about the plan.
type tilingPlanInfo struct {
	altMode, zoneText, terrain, cellText string
	ceiling                              float64
	cols, rows, epsg, tiles, tileSide    int
}

// cellText says what the solver cell is against the DEM's (glidereach's
// tiledRun.cellText).
func cellText(flat bool, cell, demCell float64) string {
	switch {
	case flat:
		return fmt.Sprintf("%.1f m cells on flat ground (--cell sets them)", cell)
	case cell > 1.001*demCell:
		return fmt.Sprintf("%.1f m as asked with --cell, coarser than the DEM's %.1f m", cell, demCell)
	}
	return fmt.Sprintf("the DEM's resolution, %.1f m", cell)
}

// altModeText says how the altitude flown was given.
func altModeText(agl bool, v float64) string {
	if agl {
		return fmt.Sprintf("%.0f m (%.0f ft) above the terrain at each cell (--agl)", v, v/0.3048)
	}
	return fmt.Sprintf("%.0f m MSL (%.0f ft) everywhere (--alt)", v, v/0.3048)
}

// zoneText names the zone as the flags gave it (paths as typed).
func zoneText(area, box, corridor string, z input.Zone) string {
	switch {
	case area != "":
		return "area " + area
	case box != "":
		b := z.Bounds()
		return fmt.Sprintf("box %.5f,%.5f to %.5f,%.5f (south-west to north-east corner, lat,lon)", b.Min[1], b.Min[0], b.Max[1], b.Max[0])
	}
	w := 0.0
	if c, ok := z.(*input.Corridor); ok {
		w = c.Width
	}
	return fmt.Sprintf("corridor %.1f km wide along %s", w/1000, corridor[:strings.LastIndex(corridor, ",")])
}

// windText describes wind profile p as glidereach does: "270°/14 kt" for
// one layer; per layer "1500 m 270°/14 kt", in feet ("3000 ft (914 m)")
// when the wind was given in feet or as a forecast, "light and variable"
// for a forecast's calm layer.
func windText(p *wind.Profile, windSpec, aloftSpec string) string {
	feet, forecast := false, false
	if strings.TrimSpace(aloftSpec) != "" {
		feet, forecast = true, true
	} else {
		text := windSpec
		if st, err := os.Stat(strings.TrimSpace(windSpec)); err == nil && st.Mode().IsRegular() && st.Size() < 1<<20 {
			if b, err := os.ReadFile(strings.TrimSpace(windSpec)); err == nil {
				text = string(b)
			}
		}
		feet = strings.Contains(strings.ToLower(text), "ft")
	}
	if p == nil || p.IsCalm() {
		if forecast && p != nil && len(p.Layers()) > 0 {
			return "light and variable at every level"
		}
		return "calm"
	}
	ls := p.Layers()
	if len(ls) == 1 {
		return fmt.Sprintf("%03.0f°/%.0f kt", ls[0].Dir, ls[0].Speed/input.Knot)
	}
	parts := make([]string, 0, len(ls))
	for _, l := range ls {
		alt := fmt.Sprintf("%.0f m", l.Alt)
		if feet {
			alt = fmt.Sprintf("%.0f ft (%.0f m)", l.Alt/0.3048, l.Alt)
		}
		dirSpeed := fmt.Sprintf("%03.0f°/%.0f kt", l.Dir, l.Speed/input.Knot)
		if l.Speed == 0 {
			dirSpeed = "calm"
			if forecast {
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
