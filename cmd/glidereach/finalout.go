package main

import (
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"text/tabwriter"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"glidereach/cmd/glidereach/input"
	"glidereach/cmd/glidereach/render"
	"glidereach/reach"
	"glidereach/reach/geodesy"
)

// finalProfileMax is the most profile points written to GeoJSON and drawn
// in the report chart; the line is thinned evenly beyond that, keeping the
// route points, the lowest-clearance and the blocked points.
const finalProfileMax = 800

// soaringGlideRatio is the best glide ratio from which an aircraft is taken
// for a sailplane or motorglider, for which the MacCready setting (the climb
// expected in the next thermal) means something: powered light aircraft
// glide about 1:8 to 1:12, sailplanes 1:30 and better, motorgliders about
// 1:20 to 1:30 (common practice, no source; from memory).
const soaringGlideRatio = 20

// showMacCready reports whether the final glide's MacCready line is shown:
// for a sailplane or motorglider (best glide 1:20 or better at sea level),
// or when a MacCready setting was given.
func showMacCready(s *glideSetup) bool {
	if s.Cond.MacCready > 0 {
		return true
	}
	return s.Aircraft.Figures(1.225, reach.Conditions{}).BestGlideRatio >= soaringGlideRatio
}

// finalStatusText says in words what the status means for the pilot.
func finalStatusText(run *finalRun) string {
	r := run.res
	switch r.Status {
	case reach.FinalNoHeadway:
		l := r.Legs[r.NoHeadwayLeg]
		return fmt.Sprintf("NO HEADWAY on leg %d (track %03.0f°): the wind is stronger than the aircraft can make good at any usable speed; no altitude is enough", r.NoHeadwayLeg+1, l.TrackDeg)
	case reach.FinalBlocked:
		t := r.Terrain
		txt := fmt.Sprintf("BLOCKED: the glide line passes %s at %.1f km, less than the %.0f m clearance; start %.0f m higher (%.0f m MSL) to clear it",
			aboveTerrain(t.BlockClearance), t.BlockDist/1000, run.setup.Clearance, math.Ceil(t.Extra), math.Ceil(r.StartAlt+t.Extra))
		if r.AboveReserve < 0 || t.LeastClearAlt > r.StartAlt+t.Extra+0.5 {
			txt += fmt.Sprintf("; to clear it and arrive with the reserve start at %.0f m MSL", math.Ceil(t.LeastClearAlt))
		}
		return txt
	case reach.FinalShort:
		return fmt.Sprintf("SHORT: arrives %s m below the reserve; %s m more altitude at the start is needed", fmtMUp(-r.AboveReserve), fmtMUp(-r.Margin))
	case reach.FinalTerrainUnknown:
		return fmt.Sprintf("arrives with the reserve, but the terrain is unknown at %d samples (from %.1f km): the clearance is not checked there", r.Terrain.Unknown, r.Terrain.FirstUnknownDist/1000)
	}
	return "OK: arrives with the reserve and keeps the clearance above the terrain"
}

// aboveTerrain says how far the line passes above (or below) the terrain.
func aboveTerrain(c float64) string {
	if c < 0 {
		return fmt.Sprintf("%.0f m below the terrain surface", -c)
	}
	return fmt.Sprintf("%.0f m above the terrain", c)
}

// finalPointName names route point i (0 = start).
func finalPointName(run *finalRun, i int) string {
	switch {
	case i == 0:
		return "start"
	case i == len(run.res.Route)-1:
		return run.goalName
	}
	return fmt.Sprintf("TP%d", i)
}

func fmtDuration(s float64) string {
	if math.IsNaN(s) || math.IsInf(s, 0) {
		return "-"
	}
	s = math.Round(s)
	h, m, sec := int(s)/3600, int(s)%3600/60, int(s)%60
	if h > 0 {
		return fmt.Sprintf("%dh%02dm%02ds", h, m, sec)
	}
	return fmt.Sprintf("%dm%02ds", m, sec)
}

func fmtSigned(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "-"
	}
	v = math.Round(v)
	if v == 0 {
		v = 0 // no "-0"
	}
	return fmt.Sprintf("%+.0f", v)
}

func fmtRatio(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
		return "-"
	}
	return fmt.Sprintf("1:%.1f", v)
}

func fmtKt(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "-"
	}
	return fmt.Sprintf("%.0f", v/input.Knot)
}

// writeFinalText prints the human summary: legs table, totals, terrain,
// MacCready, status, assumptions and the caution.
func writeFinalText(w io.Writer, run *finalRun) {
	r := run.res
	s := run.setup
	alt := "at the required altitude"
	if run.altGiven {
		alt = fmt.Sprintf("at %.0f m MSL (%.0f ft, %.0f m above the ground)", r.StartAlt, r.StartAlt/input.Foot, r.StartAlt-run.startElev)
	}
	fmt.Fprintf(w, "Final glide from %.5f, %.5f %s\n", run.startLat, run.startLon, alt)
	g := r.Route[len(r.Route)-1]
	fmt.Fprintf(w, "to %s at %.5f, %.5f, elevation %.0f m (from %s), %.1f km (%.1f nm)",
		run.goalName, g.Lat, g.Lon, r.GoalElev, run.goalFrom, r.Distance/1000, r.Distance/input.NauticalMile)
	if len(r.Legs) > 1 {
		fmt.Fprintf(w, " in %d legs", len(r.Legs))
	}
	fmt.Fprintln(w)
	if run.goalNote != "" {
		fmt.Fprintln(w, "NOTE:", run.goalNote)
	}
	fmt.Fprintf(w, "Aircraft: %s   Wind: %s   MacCready %.1f m/s\n", s.Aircraft.Name, s.WindText, s.Cond.MacCready)
	fmt.Fprintf(w, "Terrain: %s\n\n", run.ground.Describe())

	legs := r.Legs
	if run.fromRequired != nil {
		// A short glide's own legs continue below the ground (negative mean
		// altitudes); show the glide that makes it instead, and say so.
		legs = run.fromRequired.Legs
		fmt.Fprintf(w, "Legs as flown from the required %.0f m MSL (from %.0f m MSL the glide is short):\n", run.fromRequired.StartAlt, r.StartAlt)
	}
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "LEG\tTO\tDIST km\tTRACK°\tTAIL kt\tCROSS kt\tMEAN ALT m\tIAS kt\tTAS kt\tGS kt\tGLIDE\tLOST m\tTIME\t")
	for i, l := range legs {
		note := ""
		if l.NoHeadway {
			note = "  no headway"
		} else if l.Clamp != reach.Free {
			note = "  speed held at " + l.Clamp.String()
		}
		fmt.Fprintf(tw, "%d\t%s\t%.1f\t%03.0f\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", i+1, finalPointName(run, i+1),
			l.Distance/1000, l.TrackDeg, fmtSigned(l.Tailwind/input.Knot), fmtSigned(l.Crosswind/input.Knot), fmtM(l.MeanAlt),
			fmtKt(l.IAS), fmtKt(l.TAS), fmtKt(l.GroundSpeed), fmtRatio(l.GroundRatio), fmtMUp(l.HeightLost), fmtDuration(l.Time), note)
	}
	tw.Flush()
	if math.IsNaN(r.ArrivalAGL) && r.Status != reach.FinalNoHeadway {
		fmt.Fprintf(w, "(legs of the line from %.0f m, which does not get there; see below)\n", r.StartAlt)
	}
	fmt.Fprintln(w)
	if r.Status == reach.FinalNoHeadway {
		fmt.Fprintln(w, "Required at the start: none (no headway)")
	} else {
		if terrainSetsAltitude(r) {
			fmt.Fprintf(w, "Required at the start: %.0f m MSL (%.0f ft), set by the terrain: the least start that keeps the %.0f m clearance and arrives with the reserve\n",
				math.Ceil(r.Required), math.Ceil(r.Required)/input.Foot, run.setup.Clearance)
			fmt.Fprintf(w, "  (the straight line without the terrain would need %s m: goal %.0f m + reserve %.0f m + %s m lost on the way)\n",
				fmtMUp(r.RequiredStraight), r.GoalElev, r.Reserve, fmtMUp(r.RequiredStraight-r.GoalElev-r.Reserve))
		} else {
			// Required up, arrival and margins down (see numUp).
			fmt.Fprintf(w, "Required at the start: %s m MSL (%s ft): goal %.0f m + reserve %.0f m + %s m lost on the way\n",
				fmtMUp(r.Required), fmtMUp(r.Required/input.Foot), r.GoalElev, r.Reserve, fmtMUp(r.Required-r.GoalElev-r.Reserve))
		}
		if v, ok := run.ind.Reading(r.Required); ok {
			fmt.Fprintf(w, "  on the altimeter (QNH of the %.0f m source at %.1f °C) that is a reading of at least %.0f m\n",
				run.ind.StationElev.Value, run.ind.TempK-273.15, math.Ceil(v))
		}
		if math.IsNaN(r.ArrivalAGL) {
			fmt.Fprintf(w, "Arrival: NONE from %.0f m: the glide line meets the terrain before the goal; start margin %s m\n",
				r.StartAlt, fmtSigned(math.Floor(r.Margin)))
			if c, ok := clearArrivalAGL(r); ok {
				fmt.Fprintf(w, "  from the required %.0f m it arrives %.0f m above the goal\n", math.Ceil(r.Required), c)
			}
		} else {
			fmt.Fprintf(w, "Arrival: %s m above the goal, %s m against the reserve; start margin %s m\n",
				fmtMDown(r.ArrivalAGL), fmtSigned(math.Floor(r.AboveReserve+1e-6)), fmtSigned(math.Floor(r.Margin+1e-6)))
			fmt.Fprintf(w, "Time: %s\n", fmtDuration(r.Time))
		}
	}
	if t := r.Terrain; t != nil && r.Status != reach.FinalNoHeadway {
		if !math.IsNaN(t.LowestClearance) {
			fmt.Fprintf(w, "Terrain: lowest clearance %.0f m at %.1f km (%.5f, %.5f), sampled every %.0f m\n",
				t.LowestClearance, t.LowestDist/1000, t.LowestLat, t.LowestLon, t.Step)
		}
		if t.Blocked {
			v := "verified"
			if !t.Verified {
				v = "NOT verified"
			}
			label := "Blocked at"
			if r.Status != reach.FinalBlocked {
				// Short: the line meets the ground because the glide is
				// short; the reserve, not the terrain, sets the altitude.
				label = "Below the clearance (the glide is short) at"
			}
			if r.Status == reach.FinalShort {
				// One figure for "how much higher": the reserve's, in
				// the status; the clearance needs less here.
				fmt.Fprintf(w, "%s %.1f km (%.5f, %.5f): %s; the altitude needed is the reserve's (Status)\n",
					label, t.BlockDist/1000, t.BlockLat, t.BlockLon, aboveTerrain(t.BlockClearance))
			} else {
				fmt.Fprintf(w, "%s %.1f km (%.5f, %.5f): %s; +%.0f m at the start clears it (%s)\n",
					label, t.BlockDist/1000, t.BlockLat, t.BlockLon, aboveTerrain(t.BlockClearance), math.Ceil(t.Extra), v)
			}
		}
	}
	if mc := r.MacCready; r.Status != reach.FinalNoHeadway && showMacCready(s) {
		switch {
		case math.IsNaN(mc.Affordable) && r.Terrain != nil:
			fmt.Fprintln(w, "MacCready: no setting affordable (even setting 0 does not both clear the terrain and arrive with the reserve)")
		case math.IsNaN(mc.Affordable):
			fmt.Fprintln(w, "MacCready: no setting affordable (even setting 0 arrives below the reserve)")
		default:
			lim := ""
			if mc.AtLimit {
				lim = " (search limit; speeds held at the maximum)"
			}
			if r.Terrain != nil {
				lim += " (keeps the clearance above the terrain)"
			}
			fmt.Fprintf(w, "MacCready: highest affordable %.1f m/s%s, arrives %.0f m above the goal in %s, %s sooner than at setting 0\n",
				math.Floor(mc.Affordable*10)/10, lim, mc.ArrivalAGL, fmtDuration(mc.TimeAffordable), fmtDuration(mc.Saved))
		}
	}
	fmt.Fprintln(w, "\nStatus:", finalStatusText(run))
	fmt.Fprintln(w, "\nAssumptions:")
	for _, a := range finalAssumptions(run) {
		fmt.Fprintln(w, "  -", a)
	}
	fmt.Fprintln(w, "\nCAUTION:", reach.Caution)
}

// terrainSetsAltitude reports whether the terrain, not the reserve, sets
// the required altitude (so the headline differs from the straight line's).
func terrainSetsAltitude(r *reach.FinalGlideResult) bool {
	return r.Terrain != nil && r.Required > r.RequiredStraight+0.5
}

// clearArrivalAGL is the arrival height above the goal on the glide from
// the required (terrain-clearing) altitude.
func clearArrivalAGL(r *reach.FinalGlideResult) (float64, bool) {
	c := r.Profile[len(r.Profile)-1].Clear - r.GoalElev
	return c, !math.IsNaN(c)
}

// finalAssumptions adds the final glide's own assumptions to the setup's.
func finalAssumptions(run *finalRun) []string {
	a := run.setup.assumptions()
	a = append(a, "each leg flown on its geodesic track at the speed to fly for the MacCready setting, altitude integrated through the wind and density layers",
		"terrain: "+run.ground.Describe())
	if run.worstWind != "" {
		a = append(a, "figures for the wind of the --wind-error set that needs the most altitude: "+run.worstWind)
	}
	if !run.altGiven {
		a = append(a, "no start altitude given: the glide starts at the required altitude")
	}
	return a
}

// requiredSetBy names what sets the required altitude: "terrain",
// "reserve", or "none" (no headway).
func requiredSetBy(r *reach.FinalGlideResult) string {
	switch {
	case math.IsInf(r.Required, 1):
		return "none"
	case terrainSetsAltitude(r):
		return "terrain"
	}
	return "reserve"
}

// finalIndices picks at most finalProfileMax samples of the profile, evenly,
// always keeping the route points and the lowest and blocked points.
func finalIndices(r *reach.FinalGlideResult) []int {
	n := len(r.Profile)
	keep := map[int]bool{0: true, n - 1: true}
	for k := 1; k < n; k++ {
		if r.Profile[k].Leg != r.Profile[k-1].Leg {
			keep[k] = true
		}
	}
	if t := r.Terrain; t != nil {
		for k, p := range r.Profile {
			if p.Dist == t.LowestDist || (t.Blocked && p.Dist == t.BlockDist) {
				keep[k] = true
			}
		}
	}
	every := max(1, (n+finalProfileMax-1)/finalProfileMax)
	for k := 0; k < n; k += every {
		keep[k] = true
	}
	out := make([]int, 0, len(keep))
	for k := range keep {
		out = append(out, k)
	}
	sort.Ints(out)
	return out
}

func latLonJSON(p geodesy.LatLon) map[string]any {
	return map[string]any{"lat": round6(p.Lat), "lon": round6(p.Lon)}
}

// finalLegJSON is one leg in the JSON and GeoJSON outputs.
func finalLegJSON(run *finalRun, i int, l reach.FinalLeg) map[string]any {
	return map[string]any{
		"leg":                               i + 1,
		"to":                                finalPointName(run, i+1),
		"from_point":                        latLonJSON(l.From),
		"to_point":                          latLonJSON(l.To),
		"distance_m":                        num(l.Distance),
		"track_deg":                         num(l.TrackDeg),
		"mean_track_deg":                    num(l.MeanTrackDeg),
		"start_msl_m":                       num(l.StartAlt),
		"end_msl_m":                         num(l.EndAlt),
		"mean_msl_m":                        num(l.MeanAlt),
		"least_start_without_terrain_msl_m": numUp(l.LeastStartAlt),
		"tailwind_m_s":                      num(l.Tailwind),
		"crosswind_m_s":                     num(l.Crosswind),
		"ias_m_s":                           num(l.IAS),
		"tas_m_s":                           num(l.TAS),
		"speed_clamp":                       l.Clamp.String(),
		"ground_speed_m_s":                  num(l.GroundSpeed),
		"ground_glide_ratio":                num(l.GroundRatio),
		"height_lost_m":                     numUp(l.HeightLost),
		"time_s":                            num(l.Time),
		"no_headway":                        l.NoHeadway,
	}
}

// finalSummary holds the figures shared by the JSON document and the
// GeoJSON line's properties.
func finalSummary(run *finalRun) map[string]any {
	r := run.res
	s := run.setup
	legs := make([]map[string]any, len(r.Legs))
	for i, l := range r.Legs {
		legs[i] = finalLegJSON(run, i, l)
	}
	var noHeadway any
	if r.NoHeadwayLeg >= 0 {
		noHeadway = r.NoHeadwayLeg + 1
	}
	mc := r.MacCready
	out := map[string]any{
		"caution":                        reach.Caution,
		"status":                         r.Status.String(),
		"status_text":                    finalStatusText(run),
		"required_msl_m":                 numUp(r.Required),
		"required_set_by":                requiredSetBy(r),
		"required_without_terrain_msl_m": numUp(r.RequiredStraight),
		"arrival_without_terrain_agl_m":  numDown(r.LineArrival - r.GoalElev),
		"arrival_agl_m":                  numDown(r.ArrivalAGL),
		"arrival_msl_m":                  numDown(r.Arrival),
		"arrival_above_reserve_m":        numDown(r.AboveReserve),
		"margin_m":                       numDown(r.Margin),
		"start_msl_m":                    num(r.StartAlt),
		"start_given":                    run.altGiven,
		"goal_elevation_m":               num(r.GoalElev),
		"goal_elevation_from":            run.goalFrom,
		"reserve_m":                      s.Reserve,
		"clearance_m":                    s.Clearance,
		"distance_m":                     num(r.Distance),
		"time_s":                         num(r.Time),
		"mac_cready_m_s":                 s.Cond.MacCready,
		"affordable_mac_cready_m_s":      num4(mc.Affordable),
		"affordable_at_limit":            mc.AtLimit,
		"affordable_arrival_agl_m":       numDown(mc.ArrivalAGL),
		"time_mc0_s":                     num(mc.Time0),
		"time_affordable_s":              num(mc.TimeAffordable),
		"time_saved_s":                   num(mc.Saved),
		"no_headway_leg":                 noHeadway,
		"legs":                           legs,
		"aircraft":                       s.Aircraft.Name,
		"wind":                           s.WindText,
		"terrain":                        run.ground.Describe(),
		"assumptions":                    finalAssumptions(run),
	}
	if run.worstWind != "" {
		out["worst_wind"] = run.worstWind
	}
	if v, ok := run.ind.Reading(r.Required); ok {
		out["required_indicated_m"] = num(v)
	}
	if run.goalNote != "" {
		out["goal_note"] = run.goalNote
	}
	if t := r.Terrain; t != nil {
		out["terrain_check"] = map[string]any{
			"step_m":                   num(t.Step),
			"lowest_clearance_m":       numDown(t.LowestClearance),
			"lowest_distance_m":        num(t.LowestDist),
			"lowest_lat":               num6(t.LowestLat),
			"lowest_lon":               num6(t.LowestLon),
			"blocked":                  t.Blocked,
			"blocked_distance_m":       num(t.BlockDist),
			"blocked_lat":              num6(t.BlockLat),
			"blocked_lon":              num6(t.BlockLon),
			"blocked_clearance_m":      num(t.BlockClearance),
			"extra_alt_m":              numUp(t.Extra),
			"extra_verified":           t.Verified,
			"least_clear_msl_m":        numUp(t.LeastClearAlt),
			"unknown_samples":          t.Unknown,
			"first_unknown_distance_m": num(t.FirstUnknownDist),
		}
	}
	return out
}

func num6(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return round6(v)
}

func num4(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return math.Round(v*1e4) / 1e4
}

// finalJSON is the machine-readable result (DESIGN.md keys: required_msl_m,
// arrival_agl_m, legs).
func finalJSON(run *finalRun) ([]byte, error) {
	out := finalSummary(run)
	out["start"] = map[string]any{"lat": run.startLat, "lon": run.startLon, "alt_msl_m": num(run.res.StartAlt), "ground_m": num(run.startElev)}
	g := run.res.Route[len(run.res.Route)-1]
	out["goal"] = map[string]any{"name": run.goalName, "lat": g.Lat, "lon": g.Lon, "elevation_m": num(run.res.GoalElev)}
	tps := []map[string]any{}
	for _, p := range run.res.Route[1 : len(run.res.Route)-1] {
		tps = append(tps, latLonJSON(p))
	}
	out["turn_points"] = tps
	return jsonDoc(out, "  ")
}

// finalGeoJSON writes an RFC 7946 FeatureCollection: the glide line (a
// LineString through the thinned profile, the profile as parallel arrays in
// its properties with the summary and the caution), the start, the turn
// points, the goal, the lowest-clearance point and, when blocked, the
// blocking point.
func finalGeoJSON(run *finalRun) ([]byte, error) {
	r := run.res
	fc := geojson.NewFeatureCollection()
	idx := finalIndices(r)
	line := make(orb.LineString, 0, len(idx))
	var dist, alt, least, terr, clear, fromReq []any
	for _, k := range idx {
		p := r.Profile[k]
		line = append(line, orb.Point{round6(p.Lon), round6(p.Lat)})
		dist = append(dist, num(p.Dist))
		alt = append(alt, num(p.Alt))
		least = append(least, num(p.Least))
		terr = append(terr, num(p.Terrain))
		clear = append(clear, num(p.Clearance))
		fromReq = append(fromReq, num(p.Clear))
	}
	lf := geojson.NewFeature(line)
	lf.Properties = finalSummary(run)
	lf.Properties["kind"] = "glide_line"
	lf.Properties["profile_distance_m"] = dist
	lf.Properties["profile_alt_msl_m"] = alt
	lf.Properties["profile_least_without_terrain_msl_m"] = least
	lf.Properties["profile_from_required_msl_m"] = fromReq
	lf.Properties["profile_terrain_m"] = terr
	lf.Properties["profile_clearance_m"] = clear
	fc.Append(lf)

	st := geojson.NewFeature(orb.Point{round6(run.startLon), round6(run.startLat)})
	st.Properties = map[string]any{"kind": "start", "caution": reach.Caution, "alt_msl_m": num(r.StartAlt),
		"ground_m": num(run.startElev), "required_msl_m": numUp(r.Required), "margin_m": numDown(r.Margin)}
	fc.Append(st)
	for i := 1; i < len(r.Route)-1; i++ {
		f := geojson.NewFeature(orb.Point{round6(r.Route[i].Lon), round6(r.Route[i].Lat)})
		f.Properties = map[string]any{"kind": "turn_point", "name": finalPointName(run, i), "alt_msl_m": num(r.Legs[i].StartAlt),
			"least_without_terrain_msl_m": num(r.Legs[i].LeastStartAlt), "distance_m": num(sumDist(r.Legs[:i]))}
		fc.Append(f)
	}
	g := r.Route[len(r.Route)-1]
	gf := geojson.NewFeature(orb.Point{round6(g.Lon), round6(g.Lat)})
	gf.Properties = map[string]any{"kind": "goal", "name": run.goalName, "elevation_m": num(r.GoalElev),
		"arrival_agl_m": numDown(r.ArrivalAGL), "arrival_above_reserve_m": numDown(r.AboveReserve),
		"required_msl_m": numUp(r.Required), "reachable": r.Status == reach.FinalOK || r.Status == reach.FinalTerrainUnknown,
		"distance_m": num(r.Distance)}
	fc.Append(gf)
	if t := r.Terrain; t != nil && !math.IsNaN(t.LowestClearance) {
		f := geojson.NewFeature(orb.Point{round6(t.LowestLon), round6(t.LowestLat)})
		f.Properties = map[string]any{"kind": "lowest_clearance", "clearance_m": numDown(t.LowestClearance), "distance_m": num(t.LowestDist)}
		fc.Append(f)
	}
	if t := r.Terrain; t != nil && t.Blocked {
		f := geojson.NewFeature(orb.Point{round6(t.BlockLon), round6(t.BlockLat)})
		f.Properties = map[string]any{"kind": "blocked", "clearance_m": num(t.BlockClearance), "distance_m": num(t.BlockDist),
			"extra_alt_m": numUp(t.Extra), "caution": reach.Caution}
		fc.Append(f)
	}
	return jsonDoc(fc, " ")
}

func sumDist(legs []reach.FinalLeg) float64 {
	s := 0.0
	for _, l := range legs {
		s += l.Distance
	}
	return s
}

// finalScene builds the map scene: the terrain around the line, the glide
// line with its lowest clearance, the start and the goal.
func finalScene(run *finalRun) (*render.Scene, error) {
	r := run.res
	var b orb.Bound
	for i, p := range r.Route {
		pt := orb.Point{p.Lon, p.Lat}
		if i == 0 {
			b = orb.Bound{Min: pt, Max: pt}
		} else {
			b = b.Extend(pt)
		}
	}
	c := b.Center()
	radius := 0.0
	for _, p := range r.Route {
		s, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: c[1], Lon: c[0]}, p)
		if err == nil {
			radius = math.Max(radius, s)
		}
	}
	l, _, err := run.ground.Window(c[1], c[0], radius*1.15+3000)
	if err != nil {
		return nil, usage(err)
	}
	s := &render.Scene{
		Title:      fmt.Sprintf("Final glide to %s - %s", run.goalName, run.setup.Aircraft.Name),
		Terrain:    displayTerrain(l, run.ground),
		Bounds:     mapBounds(l, run.ground),
		DataSource: "terrain: " + run.ground.Describe(),
		Caution:    reach.Caution,
	}
	s.WindLayers, s.WindSource = windMarks(run.setup)
	idx := finalIndices(r)
	gl := &render.GlideLine{LowestClearance: math.NaN()}
	for _, k := range idx {
		gl.Line = append(gl.Line, orb.Point{r.Profile[k].Lon, r.Profile[k].Lat})
	}
	if t := r.Terrain; t != nil && !math.IsNaN(t.LowestClearance) {
		gl.Lowest, gl.LowestClearance = orb.Point{t.LowestLon, t.LowestLat}, t.LowestClearance
	}
	s.Glide = gl
	m := render.NewMarker(orb.Point{run.startLon, run.startLat}, "Start")
	m.AltMSL = r.StartAlt
	if len(r.Legs) > 0 {
		m.HeadingDeg = r.Legs[0].TrackDeg
	}
	s.Start = m
	g := r.Route[len(r.Route)-1]
	reachable := r.Status == reach.FinalOK || r.Status == reach.FinalTerrainUnknown
	goal := render.FieldMark{Name: run.goalName, Point: orb.Point{g.Lon, g.Lat}, Reachable: reachable, ArrivalAGL: r.ArrivalAGL}
	switch r.Status {
	case reach.FinalShort:
		goal.Note = fmt.Sprintf("below the %.0f m reserve", run.setup.Reserve)
	case reach.FinalBlocked:
		goal.Note = fmt.Sprintf("blocked by terrain: needs %.0f m", math.Ceil(r.Required))
	case reach.FinalNoHeadway:
		goal.Note = "no headway against the wind"
	}
	s.Fields = append(s.Fields, goal)
	for i := 1; i < len(r.Route)-1; i++ {
		gl.Turns = append(gl.Turns, render.TurnPoint{Name: finalPointName(run, i), Point: orb.Point{r.Route[i].Lon, r.Route[i].Lat}})
	}
	s.Inputs = []string{
		"Aircraft: " + run.setup.Aircraft.Name,
		fmt.Sprintf("Start: %.0f m MSL, required %s m", r.StartAlt, fmtM(math.Ceil(r.Required))),
		"Wind: " + run.setup.WindText,
		fmt.Sprintf("MacCready %.1f m/s", run.setup.Cond.MacCready),
		fmt.Sprintf("Reserve: %.0f m, clearance %.0f m", run.setup.Reserve, run.setup.Clearance),
	}
	return s, nil
}

// finalProfile is the report's altitude chart: terrain, the glide line from
// the start altitude, the least altitude that still arrives with the
// reserve, and the floor the terrain check demands.
func finalProfile(run *finalRun) *render.Profile {
	r := run.res
	idx := finalIndices(r)
	mk := func(name string, kind render.SeriesKind, f func(p reach.GlidePoint) float64) render.Series {
		s := render.Series{Name: name, Kind: kind}
		for _, k := range idx {
			s.DistM = append(s.DistM, r.Profile[k].Dist)
			s.AltMSL = append(s.AltMSL, f(r.Profile[k]))
		}
		return s
	}
	p := &render.Profile{Title: fmt.Sprintf("Final glide to %s: altitude along the line", run.goalName)}
	if r.Terrain != nil {
		p.Series = append(p.Series, mk("terrain", render.SeriesTerrain, func(g reach.GlidePoint) float64 { return g.Terrain }))
	}
	last := r.Profile[len(r.Profile)-1]
	least := "least altitude (arrive with reserve)"
	if r.Terrain != nil {
		least = "least altitude, terrain ignored (arrive with reserve)"
	}
	if math.IsNaN(r.ArrivalAGL) {
		// The glide from the start does not get there: draw the one from
		// the required altitude as the line to fly, and the start's only
		// up to where it meets the terrain.
		blocked := false
		p.Series = append(p.Series,
			mk(fmt.Sprintf("glide from %.0f m (least that clears the terrain)", math.Ceil(r.Required)), render.SeriesGlide, func(g reach.GlidePoint) float64 { return g.Clear }),
			mk(fmt.Sprintf("glide from %.0f m: blocked", r.StartAlt), render.SeriesBlocked, func(g reach.GlidePoint) float64 {
				if blocked || g.Clearance < 0 {
					blocked = true
					return math.NaN()
				}
				return g.Alt
			}))
		if c, ok := clearArrivalAGL(r); ok {
			p.Marks = append(p.Marks, render.ProfileMark{DistM: last.Dist, AltMSL: last.Clear, Label: fmt.Sprintf("%s: arrive %s m AGL from %.0f m", run.goalName, fmtM(c), math.Ceil(r.Required))})
		}
	} else {
		p.Series = append(p.Series, mk(fmt.Sprintf("glide from %.0f m", r.StartAlt), render.SeriesGlide, func(g reach.GlidePoint) float64 { return g.Alt }))
		p.Marks = append(p.Marks, render.ProfileMark{DistM: last.Dist, AltMSL: last.Alt, Label: fmt.Sprintf("%s: arrive %s m AGL", run.goalName, fmtM(r.ArrivalAGL))})
	}
	p.Series = append(p.Series, mk(least, render.SeriesLeast, func(g reach.GlidePoint) float64 { return g.Least }))
	if r.Terrain != nil {
		p.Series = append(p.Series, mk("terrain + clearance / reserve", render.SeriesReserve, func(g reach.GlidePoint) float64 { return g.Floor }))
	}
	for i := 1; i < len(r.Route)-1; i++ {
		p.Marks = append(p.Marks, render.ProfileMark{DistM: sumDist(r.Legs[:i]), AltMSL: r.Legs[i].StartAlt, Label: finalPointName(run, i)})
	}
	if t := r.Terrain; t != nil {
		if t.Blocked {
			p.Marks = append(p.Marks, render.ProfileMark{DistM: t.BlockDist, AltMSL: altAtDist(r, t.BlockDist),
				Label: "blocked: " + aboveTerrain(t.BlockClearance)})
		} else if !math.IsNaN(t.LowestClearance) {
			p.Marks = append(p.Marks, render.ProfileMark{DistM: t.LowestDist, AltMSL: altAtDist(r, t.LowestDist), Label: fmt.Sprintf("lowest clearance %.0f m", t.LowestClearance)})
		}
	}
	return p
}

// altAtDist returns the glide altitude at the sample at distance d.
func altAtDist(r *reach.FinalGlideResult, d float64) float64 {
	for _, p := range r.Profile {
		if p.Dist >= d {
			return p.Alt
		}
	}
	return math.NaN()
}

// drawFinal writes the map and/or the report of a final glide.
func drawFinal(run *finalRun, mapPath, reportPath string) error {
	scene, err := finalScene(run)
	if err != nil {
		return err
	}
	pngData, err := drawMap(scene, mapPath)
	if err != nil {
		return err
	}
	if reportPath == "" {
		return nil
	}
	r := run.res
	rep := &render.Report{
		Title:    scene.Title,
		Subtitle: fmt.Sprintf("From %.5f, %.5f at %.0f m MSL - %s", run.startLat, run.startLon, r.StartAlt, run.ground.Describe()),
		Scene:    scene,
		Caution:  reach.Caution,
		Summary:  []string{finalStatusText(run)},
	}
	if r.Status != reach.FinalNoHeadway {
		if terrainSetsAltitude(r) {
			rep.Summary = append(rep.Summary, fmt.Sprintf("Required at the start: %.0f m MSL, set by the terrain (the straight line without the terrain would need %s m)", math.Ceil(r.Required), fmtMUp(r.RequiredStraight)))
		} else {
			rep.Summary = append(rep.Summary, fmt.Sprintf("Required at the start: %.0f m MSL (goal %.0f m + reserve %.0f m + losses)", r.Required, r.GoalElev, r.Reserve))
		}
		if math.IsNaN(r.ArrivalAGL) {
			rep.Summary = append(rep.Summary, fmt.Sprintf("Arrival: none from %.0f m: the glide line meets the terrain; start margin %s m", r.StartAlt, fmtSigned(math.Floor(r.Margin))))
		} else {
			rep.Summary = append(rep.Summary, fmt.Sprintf("Arrival: %.0f m above the goal (%s m against the reserve), time %s", r.ArrivalAGL, fmtSigned(math.Floor(r.AboveReserve)), fmtDuration(r.Time)))
		}
		rep.Profile = finalProfile(run)
	}
	if mc := r.MacCready; !math.IsNaN(mc.Affordable) && showMacCready(run.setup) {
		rep.Summary = append(rep.Summary, fmt.Sprintf("Highest affordable MacCready setting %.1f m/s, %s sooner than setting 0", math.Floor(mc.Affordable*10)/10, fmtDuration(mc.Saved)))
	}
	t := render.Table{Title: "Legs", Header: []string{"Leg", "To", "Distance (km)", "Track (°)", "Tailwind (kt)", "Crosswind (kt)", "Mean alt (m)", "IAS (kt)", "TAS (kt)", "Ground speed (kt)", "Glide", "Height lost (m)", "Time"}}
	for i, l := range r.Legs {
		t.Rows = append(t.Rows, []string{fmt.Sprint(i + 1), finalPointName(run, i+1), fmt.Sprintf("%.1f", l.Distance/1000), fmt.Sprintf("%03.0f", l.TrackDeg),
			fmtSigned(l.Tailwind / input.Knot), fmtSigned(l.Crosswind / input.Knot), fmtM(l.MeanAlt), fmtKt(l.IAS), fmtKt(l.TAS), fmtKt(l.GroundSpeed),
			fmtRatio(l.GroundRatio), fmtM(l.HeightLost), fmtDuration(l.Time)})
	}
	rep.Tables = append(rep.Tables, t, render.Table{Title: "Assumptions", Header: []string{"Input"}, Rows: rowsOf(finalAssumptions(run))})
	rep.MapPNG = pngData
	return writeFileAtomic(reportPath, func(f *os.File) error { return render.WriteReport(f, rep) })
}
