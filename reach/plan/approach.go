package plan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"glidereach/reach/approach"
	"glidereach/reach/geodesy"
	"glidereach/terrain"
)

// MaxApproachDistance is the farthest a field may be from the aircraft for
// an approach plan (m).
const MaxApproachDistance = 150e3

// ApproachTerrain is the terrain of an approach plan: one DEM window read
// around the aircraft and the fields, sampled as the highest DEM sample
// around a point for clearances (the obstacle surface the solvers use) and
// the DEM's bilinear value for a field's elevation; or flat ground.
type ApproachTerrain struct {
	grid *terrain.Grid // nil on flat ground
	flat float64
	// Step is the planner's sampling step along its paths (m): the DEM's
	// cell size within 10..50 m, 50 m on flat ground.
	Step float64
}

// High is the obstacle surface at a point (m MSL): the highest DEM sample
// around it; ok false off the data or on a void.
func (s *ApproachTerrain) High(lat, lon float64) (float64, bool) {
	if s.grid == nil {
		return s.flat, true
	}
	return s.grid.HighAround(lat, lon)
}

// Elevation is the ground at a point (m MSL), the DEM's bilinear value, for
// the aircraft's and a field's elevation; ok false off the data or on a
// void.
func (s *ApproachTerrain) Elevation(lat, lon float64) (float64, bool) {
	if s.grid == nil {
		return s.flat, true
	}
	return s.grid.Elevation(lat, lon)
}

// ReadApproachTerrain reads one DEM window around the aircraft (lat, lon)
// and the field f (and the fields of others within 30 km of the aircraft,
// for the search of the next field that works), 10 km beyond them: room
// for the pattern, a long straight-in and the holding. Errors are
// *InputError naming "From" (outside the data) or "Terrain".
func ReadApproachTerrain(g Ground, lat, lon float64, f Field, others []Field) (*ApproachTerrain, error) {
	if g.Src == nil {
		return &ApproachTerrain{flat: g.Flat, Step: 50}, nil
	}
	w, e := math.Min(lon, f.Lon), math.Max(lon, f.Lon)
	s, n := math.Min(lat, f.Lat), math.Max(lat, f.Lat)
	for _, o := range others {
		if d, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: lat, Lon: lon}, geodesy.LatLon{Lat: o.Lat, Lon: o.Lon}); err == nil && d < 30e3 {
			w, e = math.Min(w, o.Lon), math.Max(e, o.Lon)
			s, n = math.Min(s, o.Lat), math.Max(n, o.Lat)
		}
	}
	const padM = 10000.0
	dLat := padM / 111000
	dLon := padM / (111000 * math.Max(0.1, math.Cos(f.Lat*math.Pi/180)))
	grid, err := g.Src.Window(w-dLon, s-dLat, e+dLon, n+dLat)
	if err != nil {
		if errors.Is(err, terrain.ErrOutside) {
			return nil, inputf("From", "the aircraft and the field lie outside the terrain data (%s)", g.Src.Describe())
		}
		return nil, &InputError{Field: "Terrain", Err: err}
	}
	step := math.Max(10, math.Min(50, g.Src.Resolution()))
	return &ApproachTerrain{grid: grid, Step: step}, nil
}

// CheckApproachDistance refuses, as an *InputError naming "From", a field
// f farther than MaxApproachDistance from the aircraft at lat, lon (or a
// distance that cannot be computed).
func CheckApproachDistance(lat, lon float64, f Field) error {
	dist, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: lat, Lon: lon}, geodesy.LatLon{Lat: f.Lat, Lon: f.Lon})
	if err != nil {
		return inputf("From", "%v", err)
	}
	if dist > MaxApproachDistance {
		return inputf("From", "the field is %.0f km away; an approach plan is for fields within 150 km", dist/1000)
	}
	return nil
}

// ApproachRequest asks for the pattern to one field from an engine
// failure (or from a glide at the speed to fly).
type ApproachRequest struct {
	Setup *Setup
	// Terrain is the terrain of the plan (ReadApproachTerrain).
	Terrain *ApproachTerrain
	// Lat, Lon, Alt: the aircraft (degrees; m MSL, true, above the ground
	// there).
	Lat, Lon, Alt float64
	// Field is the field to plan for, with its elevation (HasElevation
	// false: taken from Terrain).
	Field Field
	// Others are further fields: when no plan to Field holds, the nearest
	// ten of them within MaxApproachDistance are planned, nearest first,
	// and the first that works is named (Next).
	Others []Field
	// LandingDir is the landing direction (degrees true); NaN lets the
	// planner choose among the field's directions.
	LandingDir  float64
	Side        string  // pattern side, "left", "right" or "" (the field's, else the planner's choice)
	ApproachIAS float64 // m/s; 0 = the profile's
	Gust        float64 // m/s added to the approach speed
	Failure     *Failure
}

// ApproachNext is the first other field that works.
type ApproachNext struct {
	Field     Field
	DistanceM float64 // m from the aircraft
	Plan      *approach.Result
}

// ApproachResult is an approach plan, checked in every wind of the setup.
type ApproachResult struct {
	Plan  *approach.Result
	Field Field // the request's field, with its elevation
	// FieldFromTerrain is set when the field's elevation was taken from
	// the terrain.
	FieldFromTerrain bool
	StartElev        float64 // m MSL: the ground under the aircraft
	// FailedWind is the index in Setup.Winds of the wind in which Plan,
	// found in the forecast wind, does not hold (−1: it holds in all, or
	// none was found); WindReason is the planner's reason in that wind.
	FailedWind int
	WindReason string
	// LastFailedWind is the index of the last wind in which a plan found
	// in the forecast wind did not hold, Plan's or that of a field tried
	// after it; −1 when there was none.
	LastFailedWind int
	// Searched is set when Others were tried; Next is the first of them
	// that works (nil: none did).
	Searched bool
	Next     *ApproachNext
}

// Approach plans the pattern to req.Field (reach/approach.Plan) in the
// forecast wind and checks the same landing direction in every other wind
// of the setup: the plan holds only when it holds in all of them (in the
// first that breaks it, Plan.Feasible is false and Plan.Reason says why).
// When no plan holds, the other fields are tried.
//
// Errors: *InputError naming "From" (the field farther than
// MaxApproachDistance, the aircraft off the data or not above it), "Alt",
// "Field" (its elevation unknown); the planner's *approach.InputError as
// it is; ctx's error when cancelled.
func Approach(ctx context.Context, req ApproachRequest) (*ApproachResult, error) {
	t := req.Terrain
	if err := CheckApproachDistance(req.Lat, req.Lon, req.Field); err != nil {
		return nil, err
	}
	elev, ok := t.Elevation(req.Lat, req.Lon)
	if !ok {
		return nil, inputf("From", "%.5f,%.5f lies off the terrain data or on a void (unknown ground)", req.Lat, req.Lon)
	}
	if req.Alt <= elev {
		return nil, inputf("Alt", "%.0f m MSL is not above the terrain at the aircraft (%.0f m)", req.Alt, elev)
	}
	out := &ApproachResult{Field: req.Field, StartElev: elev, FailedWind: -1, LastFailedWind: -1}
	if !req.Field.HasElevation {
		e, ok := t.Elevation(req.Field.Lat, req.Field.Lon)
		if !ok {
			return nil, inputf("Field", "the field %.5f,%.5f lies off the terrain data or on a void; give its elevation", req.Field.Lat, req.Field.Lon)
		}
		out.Field.Elevation, out.FieldFromTerrain = e, true
	}
	s := req.Setup
	base := approach.Request{
		Aircraft: s.Aircraft, Cond: s.Cond, Atm: s.Atm, Wind: s.Wind, Ground: t.High,
		Clearance: s.Clearance, Lat: req.Lat, Lon: req.Lon, Alt: req.Alt,
		LandingDir: req.LandingDir, Side: req.Side, ApproachIAS: req.ApproachIAS, Gust: req.Gust, Step: t.Step,
	}
	if fs := req.Failure; fs != nil {
		base.Failure = &approach.Failure{HeadingDeg: fs.HeadingDeg, IAS: fs.IAS, ReactionTime: fs.Reaction, Efficiency: fs.Efficiency, Bank: fs.Bank}
	}
	r := base
	r.Field = ApproachField(out.Field)
	res, k, why, err := out.planWorst(ctx, s, r)
	if err != nil {
		return nil, err
	}
	out.Plan, out.FailedWind, out.WindReason = res, k, why
	if !res.Feasible && len(req.Others) > 0 {
		out.Searched = true
		if out.Next, err = out.nextField(ctx, s, t, base, req); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// planWorst plans in the forecast wind and checks the same landing
// direction in every other wind of s; it returns the index of the wind
// that breaks the plan (−1: none) and the planner's reason there.
func (out *ApproachResult) planWorst(ctx context.Context, s *Setup, req approach.Request) (*approach.Result, int, string, error) {
	res, err := approach.Plan(ctx, req)
	if err != nil {
		return nil, -1, "", err
	}
	if !res.Feasible || len(s.Winds) < 2 {
		return res, -1, "", nil
	}
	for k, w := range s.Winds[1:] {
		r2 := req
		r2.Wind = w
		r2.LandingDir = res.LandingDir
		alt, err := approach.Plan(ctx, r2)
		if err != nil {
			return nil, -1, "", err
		}
		if !alt.Feasible {
			res.Feasible = false
			res.Reason = fmt.Sprintf("in wind %d of the set: %s", k+2, alt.Reason)
			out.LastFailedWind = k + 1
			return res, k + 1, alt.Reason, nil
		}
	}
	return res, -1, "", nil
}

// ApproachField converts a field to the planner's.
func ApproachField(f Field) approach.Field {
	af := approach.Field{Name: f.Name, Lat: f.Lat, Lon: f.Lon, Elev: f.Elevation, Directions: f.LandingDirs, Side: f.PatternSide}
	if len(f.Strip) == 2 {
		af.Strip = &[2]geodesy.LatLon{{Lat: f.Strip[0][1], Lon: f.Strip[0][0]}, {Lat: f.Strip[1][1], Lon: f.Strip[1][0]}}
	}
	return af
}

// nextField plans the other fields, nearest first (at most ten within
// MaxApproachDistance), and returns the first that works. A field whose
// own data the planner refuses is skipped.
func (out *ApproachResult) nextField(ctx context.Context, s *Setup, t *ApproachTerrain, base approach.Request, req ApproachRequest) (*ApproachNext, error) {
	type cand struct {
		f Field
		d float64
	}
	var cs []cand
	for _, f := range req.Others {
		if strings.EqualFold(f.Name, req.Field.Name) {
			continue
		}
		d, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: req.Lat, Lon: req.Lon}, geodesy.LatLon{Lat: f.Lat, Lon: f.Lon})
		if err != nil || d > MaxApproachDistance {
			continue
		}
		cs = append(cs, cand{f, d})
	}
	sort.Slice(cs, func(i, j int) bool { return cs[i].d < cs[j].d })
	if len(cs) > 10 {
		cs = cs[:10]
	}
	for _, c := range cs {
		f := c.f
		if !f.HasElevation {
			e, ok := t.Elevation(f.Lat, f.Lon)
			if !ok {
				continue
			}
			f.Elevation = e
		}
		if !(base.Alt > f.Elevation) {
			continue
		}
		r := base
		r.LandingDir = math.NaN()
		r.Field = ApproachField(f)
		res, _, _, err := out.planWorst(ctx, s, r)
		if err != nil {
			var ie *approach.InputError
			if errors.As(err, &ie) {
				continue // that field's own data do not fit; not this run's fault
			}
			return nil, err
		}
		if res.Feasible {
			return &ApproachNext{Field: f, DistanceM: c.d, Plan: res}, nil
		}
	}
	return nil, nil
}
