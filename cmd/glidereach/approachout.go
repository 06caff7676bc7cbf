package main

import (
	"fmt"
	"io"
	"math"
	"os"
	"strings"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"glidereach/cmd/glidereach/input"
	"glidereach/cmd/glidereach/render"
	"glidereach/reach"
	"glidereach/reach/approach"
	"glidereach/reach/geodesy"
)

// displayUnits are the units of the approach's text, map and report (the
// JSON and GeoJSON stay SI).
type displayUnits struct {
	name           string
	hUnit, vUnit   string
	hFactor, vFact float64 // metres and m/s per display unit
	feet           bool
}

var unitSets = map[string]displayUnits{
	"m-kt":  {name: "m-kt", hUnit: "m", vUnit: "kt", hFactor: 1, vFact: input.Knot},
	"ft-kt": {name: "ft-kt", hUnit: "ft", vUnit: "kt", hFactor: 0.3048, vFact: input.Knot, feet: true},
	"m-kmh": {name: "m-kmh", hUnit: "m", vUnit: "km/h", hFactor: 1, vFact: input.KMH},
}

func (u displayUnits) h(m float64) string {
	if math.IsNaN(m) || math.IsInf(m, 0) {
		return "-"
	}
	return fmt.Sprintf("%.0f %s", m/u.hFactor, u.hUnit)
}

func (u displayUnits) hn(m float64) string {
	if math.IsNaN(m) || math.IsInf(m, 0) {
		return "-"
	}
	return fmt.Sprintf("%.0f", m/u.hFactor)
}

func (u displayUnits) v(mps float64) string {
	if math.IsNaN(mps) || math.IsInf(mps, 0) {
		return "-"
	}
	v := math.Round(mps / u.vFact)
	if v == 0 {
		v = 0 // no "-0"
	}
	return fmt.Sprintf("%.0f %s", v, u.vUnit)
}

func (u displayUnits) vn(mps float64) string {
	if math.IsNaN(mps) || math.IsInf(mps, 0) {
		return "-"
	}
	return fmt.Sprintf("%.0f", mps/u.vFact)
}

// magnetic returns the magnetic heading for a true one, NaN without a
// variation (east variation: magnetic = true − variation).
func (run *approachRun) magnetic(trueDeg float64) float64 {
	if math.IsNaN(run.variation) || math.IsNaN(trueDeg) {
		return math.NaN()
	}
	return math.Mod(trueDeg-run.variation+720, 360)
}

func fmtDeg(d float64) string {
	if math.IsNaN(d) || math.IsInf(d, 0) {
		return "-"
	}
	v := math.Mod(math.Round(d)+360, 360)
	return fmt.Sprintf("%03.0f", v)
}

func fmtTurn(d float64) string {
	switch {
	case math.IsNaN(d) || math.Abs(d) < 0.5:
		return "-"
	case d > 0:
		return fmt.Sprintf("%.0f° R", d)
	}
	return fmt.Sprintf("%.0f° L", -d)
}

func approachTitle(run *approachRun) string {
	return fmt.Sprintf("Approach plan to %s - %s", run.field.Name, run.setup.Aircraft.Name)
}

// approachStatus is the headline.
func approachStatus(run *approachRun) string {
	r := run.res
	if r.Feasible {
		return fmt.Sprintf("PLAN HOLDS: %s, landing %s° true, %s-hand pattern", r.Variant, fmtDeg(r.LandingDir), r.Side)
	}
	s := "NO PLAN HOLDS: " + r.Reason
	if run.next != "" {
		s += "\nNext field that works: " + run.next
	} else if run.searched {
		s += "\nNo other field of the file within 150 km (nearest ten) gives a plan that holds."
	}
	return s
}

func approachAssumptions(run *approachRun) []string {
	s := run.setup
	r := run.res
	a := []string{
		"aircraft: " + s.Aircraft.Name + " (" + r.Kind + " pattern defaults)",
		"wind: " + s.WindText,
		fmt.Sprintf("clearance %.0f m above terrain on the way to the pattern; %.0f m under the pattern legs, tapering to the height above the field", s.Clearance, r.Params.Clearance),
		fmt.Sprintf("pattern: final at least %.0f m long and %.0f m above the field after the turn onto it, its clean-glide height +%.0f %% kept for airbrakes, flaps or a slip; base leg %.0f m; turns at %.0f° bank",
			r.Params.FinalLength, r.Params.FinalHeight, r.Params.Margin*100, r.Params.Spacing, r.Params.Bank),
		fmt.Sprintf("landing direction limits: crosswind %.0f kt, tailwind %.0f kt", r.Params.MaxCrosswind/input.Knot, r.Params.MaxTailwind/input.Knot),
		"the pattern replaces the reserve: --reserve is not used by approach",
		failureAssumption(run.fail),
		"field elevation from " + run.fieldFrom,
		"terrain: " + run.ground.Describe(),
		"gate heights are to be reached on arrival at the gate, before the turn there; legs are straight between gates (the rounded path flown is shorter)",
	}
	a = append(a, s.ConditionAssumptions()...)
	if !math.IsNaN(run.variation) {
		a = append(a, fmt.Sprintf("magnetic variation %.1f° %s (from --variation): magnetic = true %+.1f°", math.Abs(run.variation), map[bool]string{true: "E", false: "W"}[run.variation >= 0], -run.variation))
	}
	if r.Unknown > 0 {
		a = append(a, fmt.Sprintf("the terrain data do not cover all of the ground planned over (%d samples over all the attempts): unknown ground is not checked", r.Unknown))
	}
	return a
}

func writeApproachText(w io.Writer, run *approachRun) {
	r := run.res
	u := run.units
	fmt.Fprintln(w, approachTitle(run))
	fmt.Fprintf(w, "From %.5f, %.5f at %s MSL (%s above the field); field %.5f, %.5f, elevation %s\n",
		run.startLat, run.startLon, u.h(run.startAlt), u.h(run.startAlt-run.field.Elevation), run.field.Lat, run.field.Lon, u.h(run.field.Elevation))
	fmt.Fprintln(w)
	fmt.Fprintln(w, approachStatus(run))
	if !math.IsNaN(r.LandingDir) {
		mag := ""
		if m := run.magnetic(r.LandingDir); !math.IsNaN(m) {
			mag = fmt.Sprintf(" (%s° magnetic)", fmtDeg(m))
		}
		from := r.ApproachFrom
		if r.ApproachAdd > 0 {
			from += " + " + u.v(r.ApproachAdd) + " for wind and gust"
		}
		fmt.Fprintf(w, "Landing %s° true%s; surface headwind %s, crosswind %s; approach speed %s IAS (%s)\n",
			fmtDeg(r.LandingDir), mag, u.v(r.Headwind), u.v(r.Crosswind), u.v(r.ApproachIAS), from)
	}
	if seq := r.Sequence; seq != nil {
		parts := []string{}
		for _, st := range seq.Stages {
			d := math.Hypot(st.East, st.North)
			switch st.Name {
			case "turn":
				parts = append(parts, fmt.Sprintf("turn %s: %s lost, %.0f s", fmtTurn(seq.TurnAngle*180/math.Pi), u.h(st.Height), st.Time))
			case "speed change":
				if st.Height <= 0 {
					parts = append(parts, fmt.Sprintf("slowing to the glide speed: %s gained, %.0f m flown", u.h(-st.Height), d))
				} else {
					parts = append(parts, fmt.Sprintf("speeding up to the glide speed: %s lost", u.h(st.Height)))
				}
			default:
				parts = append(parts, fmt.Sprintf("%s %.0f s: %s lost, %.0f m flown", st.Name, st.Time, u.h(st.Height), d))
			}
		}
		fmt.Fprintf(w, "After the failure: %s; total %s in %.0f s\n", strings.Join(parts, "; "), u.h(seq.Height), seq.Time)
	}
	if !math.IsNaN(r.Arrival) {
		fmt.Fprintf(w, "At the entry: arrive %s MSL, %s needed (%s)\n", u.h(r.Arrival), u.h(r.Required), signedH(u, r.Excess))
	}
	if h := r.Holding; h.Circles > 0 {
		fmt.Fprintf(w, "Holding: %d circle(s) over the entry gate, %s each (%.0f s, drift %.0f m per circle)\n", h.Circles, u.h(h.PerCircle), h.CircleTime, h.DriftPerCircle)
	}
	if r.Extension > 0 {
		fmt.Fprintf(w, "Downwind lengthened by %.0f m\n", r.Extension)
	}
	if r.DecideBy != nil {
		fmt.Fprintf(w, "Decide by: %.5f, %.5f at %s MSL, %.0f s after the failure (the last point on the heading at which turning for this plan still works)\n",
			r.DecideBy.Lat, r.DecideBy.Lon, u.h(r.DecideBy.AltMSL), r.DecideAfter)
	}
	if len(r.Gates) > 0 {
		fmt.Fprintln(w)
		if !r.Feasible {
			fmt.Fprintln(w, "The closest attempt (does not hold):")
		}
		mh := !math.IsNaN(run.variation)
		hdr := fmt.Sprintf("%-10s %10s %11s %9s %9s %6s %8s", "gate", "lat", "lon", "above fld", "MSL", "track", "heading")
		if mh {
			hdr += fmt.Sprintf(" %5s", "MH")
		}
		hdr += fmt.Sprintf(" %7s %9s %7s %9s", "drift", "to touch", "time", "turn")
		fmt.Fprintln(w, hdr)
		for _, g := range r.Gates {
			line := fmt.Sprintf("%-10s %10.5f %11.5f %9s %9s %6s %8s", g.Name, g.Lat, g.Lon, u.hn(g.HeightAboveField), u.hn(g.AltMSL), fmtDeg(g.Track), fmtDeg(g.Heading))
			if mh {
				line += fmt.Sprintf(" %5s", fmtDeg(run.magnetic(g.Heading)))
			}
			line += fmt.Sprintf(" %7s %7.2fkm %7s %9s", fmtDrift(g.Drift), g.DistToTouchdown/1000, fmtDuration(g.TimeToTouchdown), fmtTurn(g.TurnDeg))
			fmt.Fprintln(w, line)
		}
		fmt.Fprintf(w, "(heights in %s, speeds in %s)\n", u.hUnit, u.vUnit)
		fmt.Fprintln(w)
		fmt.Fprintf(w, "%-9s %-18s %6s %8s %6s %7s %6s %8s %9s %6s %7s %9s\n", "leg", "to", "track", "heading", "drift", "ground", "IAS", "length", "lost", "glide", "time", "clearance")
		for _, l := range r.Legs {
			fmt.Fprintf(w, "%-9s %-18s %6s %8s %6s %7s %6s %7.2fkm %9s %6s %7s %9s\n", l.Name, l.To, fmtDeg(l.Track), fmtDeg(l.Heading),
				fmtDrift(l.Drift), u.vn(l.GroundSpeed), u.vn(l.IAS), l.Length/1000, u.hn(l.HeightLost), fmtRatio(l.GlideRatio), fmtDuration(l.Time), u.hn(l.LowestClear))
		}
	}
	for _, n := range r.Notes {
		fmt.Fprintln(w, "Note:", n)
	}
	for _, n := range r.Rejected {
		fmt.Fprintln(w, "Not taken:", n)
	}
	if len(r.Directions) > 1 || len(r.Directions) == 1 && r.Directions[0].Refused != "" {
		fmt.Fprintln(w)
		fmt.Fprintln(w, "Landing directions considered:")
		var refused []approach.Direction
		tried := 0
		for _, d := range r.Directions {
			if d.Tried {
				tried++
			}
		}
		others := map[string]int{}
		for _, d := range r.Directions {
			switch {
			case d.Refused != "":
				refused = append(refused, d)
			case d.Tried && (tried <= 8 || d.Result == "chosen"):
				fmt.Fprintf(w, "  %s°  headwind %s, crosswind %s: %s\n", fmtDeg(d.Deg), u.v(d.Headwind), u.v(d.Crosswind), d.Result)
			case d.Tried:
				others[d.Result]++
			}
		}
		feasible, notHeld := 0, 0
		for res, n := range others {
			if strings.HasPrefix(res, "feasible") {
				feasible += n
			} else {
				notHeld += n
			}
		}
		if feasible > 0 {
			fmt.Fprintf(w, "  %d other directions hold with less height in hand\n", feasible)
		}
		if notHeld > 0 {
			fmt.Fprintf(w, "  %d other directions do not hold (the reasons are in --format json)\n", notHeld)
		}
		if len(refused) <= 6 {
			for _, d := range refused {
				fmt.Fprintf(w, "  %s°  headwind %s, crosswind %s: refused: %s\n", fmtDeg(d.Deg), u.v(d.Headwind), u.v(d.Crosswind), d.Refused)
			}
		} else {
			fmt.Fprintf(w, "  %d directions refused by the crosswind or tailwind limit (listed in --format json)\n", len(refused))
		}
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Assumptions:")
	for _, a := range approachAssumptions(run) {
		fmt.Fprintln(w, "  -", a)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, cautionText)
}

func fmtDrift(d float64) string {
	if math.IsNaN(d) {
		return "-"
	}
	v := math.Round(d)
	if v == 0 {
		return "0°" // no "-0°"
	}
	return fmt.Sprintf("%+.0f°", v)
}

func signedH(u displayUnits, m float64) string {
	if math.IsNaN(m) {
		return "-"
	}
	if m >= 0 {
		return "+" + u.h(m) + " in hand"
	}
	return u.h(-m) + " short"
}

// approachSummary is the JSON document (SI).
func approachSummary(run *approachRun) map[string]any {
	r := run.res
	gates := make([]map[string]any, len(r.Gates))
	for i, g := range r.Gates {
		gates[i] = gateJSON(run, g)
	}
	legs := make([]map[string]any, len(r.Legs))
	for i, l := range r.Legs {
		legs[i] = map[string]any{"name": l.Name, "from": l.From, "to": l.To, "track_deg": num(l.Track), "heading_deg": num(l.Heading),
			"heading_magnetic_deg": num(run.magnetic(l.Heading)), "drift_deg": num(l.Drift), "ground_speed_m_s": num(l.GroundSpeed),
			"ias_m_s": num(l.IAS), "tas_m_s": num(l.TAS), "length_m": num(l.Length), "height_lost_m": num(l.HeightLost),
			"time_s": num(l.Time), "glide_ratio": num(l.GlideRatio), "lowest_clearance_m": num(l.LowestClear)}
	}
	dirs := make([]map[string]any, 0, len(r.Directions))
	for _, d := range r.Directions {
		if !d.Tried && d.Refused == "" {
			continue
		}
		dirs = append(dirs, map[string]any{"direction_deg": num(d.Deg), "headwind_m_s": num(d.Headwind), "crosswind_m_s": num(d.Crosswind),
			"refused": d.Refused, "result": d.Result})
	}
	out := map[string]any{
		"caution":                        reach.Caution,
		"feasible":                       r.Feasible,
		"reason":                         r.Reason,
		"status_text":                    approachStatus(run),
		"field":                          map[string]any{"name": run.field.Name, "lat": round6(run.field.Lat), "lon": round6(run.field.Lon), "elevation_m": num(run.field.Elevation), "elevation_from": run.fieldFrom},
		"aircraft":                       map[string]any{"lat": round6(run.startLat), "lon": round6(run.startLon), "alt_msl_m": num(run.startAlt), "ground_m": num(run.startElev), "profile": run.setup.Aircraft.Name, "kind": r.Kind},
		"landing_direction_deg":          num(r.LandingDir),
		"landing_direction_magnetic_deg": num(run.magnetic(r.LandingDir)),
		"pattern_side":                   r.Side,
		"variant":                        r.Variant,
		"approach_ias_m_s":               num(r.ApproachIAS),
		"approach_speed_from":            r.ApproachFrom,
		"headwind_m_s":                   num(r.Headwind),
		"crosswind_m_s":                  num(r.Crosswind),
		"arrival_msl_m":                  num(r.Arrival),
		"required_msl_m":                 num(r.Required),
		"excess_m":                       num(r.Excess),
		"downwind_extension_m":           num(r.Extension),
		"final_excess_m":                 num(r.FinalExcess),
		"final_ground_rise_m":            num(r.FinalGroundRise),
		"gates":                          gates,
		"legs":                           legs,
		"directions":                     dirs,
		"notes":                          r.Notes,
		"assumptions":                    approachAssumptions(run),
		"next_field":                     run.next,
		"units":                          "SI (m, m/s, degrees true)",
	}
	if run.worstWind != "" {
		out["worst_wind"] = run.worstWind
	}
	if h := r.Holding; h.Circles > 0 {
		out["holding"] = map[string]any{"circles": h.Circles, "height_lost_m": num(h.HeightLost), "per_circle_m": num(h.PerCircle),
			"circle_time_s": num(h.CircleTime), "drift_per_circle_m": num(h.DriftPerCircle), "lat": round6(h.Lat), "lon": round6(h.Lon)}
	}
	if r.DecideBy != nil {
		out["decide_by"] = map[string]any{"lat": round6(r.DecideBy.Lat), "lon": round6(r.DecideBy.Lon), "alt_msl_m": num(r.DecideBy.AltMSL),
			"height_above_field_m": num(r.DecideBy.HeightAboveField), "time_after_failure_s": num(r.DecideAfter)}
	}
	if seq := r.Sequence; seq != nil {
		st := make([]map[string]any, len(seq.Stages))
		for i, s := range seq.Stages {
			st[i] = map[string]any{"name": s.Name, "east_m": num(s.East), "north_m": num(s.North), "height_lost_m": num(s.Height), "time_s": num(s.Time)}
		}
		out["failure"] = map[string]any{"heading_deg": run.fail.HeadingDeg, "ias_m_s": num(run.fail.IAS), "reaction_time_s": run.fail.Reaction,
			"energy_efficiency": run.fail.Efficiency, "bank_deg": run.fail.Bank, "turn_deg": num(seq.TurnAngle * 180 / math.Pi),
			"height_lost_m": num(seq.Height), "time_s": num(seq.Time), "stages": st,
			"turn_radius_m": num(seq.Turn.Radius), "turn_load_factor": num4(seq.Turn.N)}
	}
	return out
}

func gateJSON(run *approachRun, g approach.Gate) map[string]any {
	return map[string]any{"name": g.Name, "lat": round6(g.Lat), "lon": round6(g.Lon), "alt_msl_m": num(g.AltMSL),
		"height_above_field_m": num(g.HeightAboveField), "track_deg": num(g.Track), "heading_deg": num(g.Heading),
		"heading_magnetic_deg": num(run.magnetic(g.Heading)), "drift_deg": num(g.Drift),
		"distance_to_touchdown_m": num(g.DistToTouchdown), "time_to_touchdown_s": num(g.TimeToTouchdown),
		"turn_deg": num(g.TurnDeg), "turn_height_m": num(g.TurnHeight)}
}

func approachJSON(run *approachRun) ([]byte, error) { return jsonDoc(approachSummary(run), "  ") }

// approachGeoJSON: the path as a LineString with its altitudes in
// properties (a third coordinate would be height above the ellipsoid, RFC
// 7946 §3.1.1), the gates, the aircraft, the field, the decide-by and
// holding points, each with the caution.
func approachGeoJSON(run *approachRun) ([]byte, error) {
	r := run.res
	fc := geojson.NewFeatureCollection()
	if len(r.Path) >= 2 {
		line := make(orb.LineString, 0, len(r.Path))
		var dist, alt, terr, parts []any
		for _, p := range r.Path {
			line = append(line, orb.Point{round6(p.Lon), round6(p.Lat)})
			dist, alt, terr, parts = append(dist, num(p.Dist)), append(alt, num(p.AltMSL)), append(terr, num(p.Ground)), append(parts, p.Part)
		}
		f := geojson.NewFeature(line)
		f.Properties = map[string]any{"kind": "approach_path", "caution": reach.Caution, "feasible": r.Feasible, "reason": r.Reason,
			"variant": r.Variant, "landing_direction_deg": num(r.LandingDir), "profile_distance_m": dist, "profile_alt_msl_m": alt,
			"profile_terrain_m": terr, "profile_part": parts, "altitudes": "m MSL in profile_alt_msl_m; the coordinates carry none"}
		fc.Append(f)
	}
	for _, g := range r.Gates {
		f := geojson.NewFeature(orb.Point{round6(g.Lon), round6(g.Lat)})
		f.Properties = gateJSON(run, g)
		f.Properties["kind"] = "gate"
		f.Properties["caution"] = reach.Caution
		fc.Append(f)
	}
	st := geojson.NewFeature(orb.Point{round6(run.startLon), round6(run.startLat)})
	st.Properties = map[string]any{"kind": "aircraft", "caution": reach.Caution, "alt_msl_m": num(run.startAlt), "ground_m": num(run.startElev)}
	if run.fail != nil {
		st.Properties["heading_deg"] = run.fail.HeadingDeg
	}
	fc.Append(st)
	ff := geojson.NewFeature(orb.Point{round6(run.field.Lon), round6(run.field.Lat)})
	ff.Properties = map[string]any{"kind": "field", "name": run.field.Name, "elevation_m": num(run.field.Elevation), "feasible": r.Feasible, "caution": reach.Caution}
	fc.Append(ff)
	if r.DecideBy != nil {
		f := geojson.NewFeature(orb.Point{round6(r.DecideBy.Lon), round6(r.DecideBy.Lat)})
		f.Properties = map[string]any{"kind": "decide_by", "alt_msl_m": num(r.DecideBy.AltMSL), "time_after_failure_s": num(r.DecideAfter), "caution": reach.Caution}
		fc.Append(f)
	}
	if h := r.Holding; h.Circles > 0 {
		f := geojson.NewFeature(orb.Point{round6(h.Lon), round6(h.Lat)})
		f.Properties = map[string]any{"kind": "holding", "circles": h.Circles, "height_lost_m": num(h.HeightLost), "caution": reach.Caution}
		fc.Append(f)
	}
	return jsonDoc(fc, " ")
}

// approachScene draws the path and the gates over the terrain.
func approachScene(run *approachRun) (*render.Scene, error) {
	r := run.res
	pts := []orb.Point{{run.startLon, run.startLat}, {run.field.Lon, run.field.Lat}}
	for _, p := range r.Path {
		pts = append(pts, orb.Point{p.Lon, p.Lat})
	}
	b := orb.Bound{Min: pts[0], Max: pts[0]}
	for _, p := range pts {
		b = b.Extend(p)
	}
	c := b.Center()
	radius := 0.0
	for _, p := range pts {
		if s, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: c[1], Lon: c[0]}, geodesy.LatLon{Lat: p[1], Lon: p[0]}); err == nil {
			radius = math.Max(radius, s)
		}
	}
	l, _, err := run.ground.Window(c[1], c[0], radius*1.15+1500)
	if err != nil {
		return nil, usage(err)
	}
	s := &render.Scene{Title: approachTitle(run), Terrain: l, Bounds: mapBounds(l, run.ground),
		DataSource: "terrain: " + run.ground.Describe(), Caution: reach.Caution, HeightFeet: run.units.feet}
	gl := &render.GlideLine{LowestClearance: math.NaN(), LineLabel: "Planned path: failure, pattern, touchdown", TurnLabel: "Gate (height above the field)"}
	for _, p := range r.Path {
		gl.Line = append(gl.Line, orb.Point{p.Lon, p.Lat})
	}
	for _, g := range r.Gates {
		if g.Name == "touchdown" {
			continue
		}
		gl.Turns = append(gl.Turns, render.TurnPoint{Name: fmt.Sprintf("%s %s", g.Name, run.units.h(g.HeightAboveField)), Point: orb.Point{g.Lon, g.Lat}})
	}
	if r.DecideBy != nil {
		gl.Turns = append(gl.Turns, render.TurnPoint{Name: "decide by", Point: orb.Point{r.DecideBy.Lon, r.DecideBy.Lat}})
	}
	if len(gl.Line) >= 2 {
		s.Glide = gl
	}
	m := render.NewMarker(orb.Point{run.startLon, run.startLat}, "Aircraft")
	m.AltMSL = run.startAlt
	if run.fail != nil {
		m.HeadingDeg = run.fail.HeadingDeg
	}
	s.Start = m
	fm := render.FieldMark{Name: run.field.Name, Point: orb.Point{run.field.Lon, run.field.Lat}, Reachable: r.Feasible, ArrivalAGL: math.NaN()}
	if !r.Feasible {
		fm.Note = "no plan holds"
	} else {
		fm.Note = fmt.Sprintf("landing %s°, %s", fmtDeg(r.LandingDir), r.Variant)
	}
	s.Fields = append(s.Fields, fm)
	s.Inputs = []string{"wind: " + run.setup.WindText, failureAssumption(run.fail)}
	if we, wn := run.setup.Wind.At(run.field.Elevation); math.Hypot(we, wn) > 0.05 {
		from := math.Mod(math.Atan2(-we, -wn)*180/math.Pi+360, 360)
		s.Wind = &render.WindArrow{FromDeg: from, Label: fmt.Sprintf("wind %s°/%s at the field", fmtDeg(from), run.units.v(math.Hypot(we, wn)))}
	}
	return s, nil
}

func approachProfile(run *approachRun) *render.Profile {
	r := run.res
	p := &render.Profile{Title: fmt.Sprintf("Approach to %s: planned altitude along the path", run.field.Name), HeightFeet: run.units.feet}
	ter := render.Series{Name: "terrain", Kind: render.SeriesTerrain}
	plan := render.Series{Name: "planned altitude", Kind: render.SeriesGlide}
	fieldS := render.Series{Name: "field elevation", Kind: render.SeriesReserve}
	for _, q := range r.Path {
		if !math.IsNaN(q.Ground) {
			ter.DistM = append(ter.DistM, q.Dist)
			ter.AltMSL = append(ter.AltMSL, q.Ground)
		}
		plan.DistM = append(plan.DistM, q.Dist)
		plan.AltMSL = append(plan.AltMSL, q.AltMSL)
		fieldS.DistM = append(fieldS.DistM, q.Dist)
		fieldS.AltMSL = append(fieldS.AltMSL, run.field.Elevation)
	}
	if len(ter.DistM) > 1 {
		p.Series = append(p.Series, ter)
	}
	p.Series = append(p.Series, plan, fieldS)
	// Gates on the chart: the first path point at each gate's position.
	total := 0.0
	if n := len(r.Path); n > 0 {
		total = r.Path[n-1].Dist
	}
	for _, g := range r.Gates {
		p.Marks = append(p.Marks, render.ProfileMark{DistM: total - g.DistToTouchdown, AltMSL: g.AltMSL, Label: fmt.Sprintf("%s %s", g.Name, run.units.h(g.HeightAboveField))})
	}
	return p
}

func drawApproach(run *approachRun, mapPath, reportPath string) error {
	scene, err := approachScene(run)
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
	u := run.units
	rep := &render.Report{Title: scene.Title,
		Subtitle: fmt.Sprintf("From %.5f, %.5f at %s MSL - %s", run.startLat, run.startLon, u.h(run.startAlt), run.ground.Describe()),
		Scene:    scene, Caution: reach.Caution, Summary: strings.Split(approachStatus(run), "\n")}
	if len(r.Path) >= 2 {
		rep.Profile = approachProfile(run)
	}
	rep.Summary = append(rep.Summary, r.Notes...)
	gt := render.Table{Title: "Gates", Header: []string{"Gate", "Lat", "Lon", "Above field (" + u.hUnit + ")", "MSL (" + u.hUnit + ")", "Track (°T)", "Heading (°T)", "Heading (°M)", "To touchdown (km)", "Time", "Turn"}}
	for _, g := range r.Gates {
		gt.Rows = append(gt.Rows, []string{g.Name, fmt.Sprintf("%.5f", g.Lat), fmt.Sprintf("%.5f", g.Lon), u.hn(g.HeightAboveField), u.hn(g.AltMSL),
			fmtDeg(g.Track), fmtDeg(g.Heading), fmtDeg(run.magnetic(g.Heading)), fmt.Sprintf("%.2f", g.DistToTouchdown/1000), fmtDuration(g.TimeToTouchdown), fmtTurn(g.TurnDeg)})
	}
	lt := render.Table{Title: "Legs", Header: []string{"Leg", "To", "Track (°T)", "Heading (°T)", "Drift", "Ground speed (" + u.vUnit + ")", "IAS (" + u.vUnit + ")", "Length (km)", "Height lost (" + u.hUnit + ")", "Glide", "Time"}}
	for _, l := range r.Legs {
		lt.Rows = append(lt.Rows, []string{l.Name, l.To, fmtDeg(l.Track), fmtDeg(l.Heading), fmtDrift(l.Drift), u.vn(l.GroundSpeed), u.vn(l.IAS),
			fmt.Sprintf("%.2f", l.Length/1000), u.hn(l.HeightLost), fmtRatio(l.GlideRatio), fmtDuration(l.Time)})
	}
	rep.Tables = append(rep.Tables, gt, lt, render.Table{Title: "Assumptions", Header: []string{"Input"}, Rows: rowsOf(approachAssumptions(run))})
	rep.MapPNG = pngData
	return writeFileAtomic(reportPath, func(f *os.File) error { return render.WriteReport(f, rep) })
}
