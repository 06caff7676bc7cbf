package reach

import (
	"context"
	"errors"
	"fmt"
	"math"

	"glidereach/reach/geodesy"
)

// Performance is the aircraft and the air a final glide is flown in: the
// profile, the atmosphere, the wind by altitude (nil = still air) and the
// conditions, whose MacCready setting is the one flown. FinalGlide builds
// its speed-to-fly Tables from it (several, for the MacCready search).
type Performance struct {
	Aircraft *Aircraft
	Atm      Atmosphere
	Wind     WindField
	Cond     Conditions
}

// table builds the speed-to-fly table at MacCready setting mc for altitudes
// lo..hi (m MSL), clamped to the range NewTable accepts.
func (p Performance) table(mc, lo, hi float64) (*Table, error) {
	c := p.Cond
	c.MacCready = mc
	return NewTable(p.Aircraft, p.Atm, p.Wind, c, math.Max(lo, finalTableMin), math.Min(hi, finalTableMax))
}

// Altitude limits of the final-glide tables (m MSL), inside NewTable's range.
const (
	finalTableMin = -4900.0
	finalTableMax = 19900.0
)

// DefaultFinalStep is the sample spacing (m) of FinalGlide when
// FinalGlideOptions.Step is 0.
const DefaultFinalStep = 100.0

// DefaultMaxMacCready is the upper end (m/s) of the search for the highest
// affordable MacCready setting when FinalGlideOptions.MaxMacCready is 0.
const DefaultMaxMacCready = 10.0

// FinalGlideOptions tune FinalGlide. The zero value is a goal at sea level,
// no reserve, no clearance, no terrain check, samples every 100 m.
type FinalGlideOptions struct {
	// GoalElev is the elevation of the goal, m MSL.
	GoalElev float64
	// Reserve is the height above the goal (m) to arrive with; the required
	// altitude is the start altitude that arrives at GoalElev + Reserve.
	Reserve float64
	// Clearance is the least height above the terrain (m) the glide line
	// keeps en route. Close to the goal the demanded clearance tapers to the
	// reserve: at a point the floor is Terrain + min(Clearance, glide
	// altitude there − GoalElev) (floorAt; the footprint and the backward
	// solver use the same rule), so a reserve below the clearance does not
	// flag the landing itself as blocked, while ground higher than the goal
	// is always cleared by the full clearance.
	Clearance float64
	// Terrain, when not nil, gives the terrain elevation (m MSL) at a point
	// (degrees); ok is false where it is unknown (a void, off the data). It
	// is called once per sample, in order along the line.
	Terrain func(lat, lon float64) (elev float64, ok bool)
	// Step is the spacing (m) of the samples along the line at which the
	// glide is integrated and the terrain read; 0 means DefaultFinalStep.
	// With Terrain set it must not exceed the terrain's cell size, or a
	// narrow ridge could fall between two samples.
	Step float64
	// MaxMacCready bounds the search for the highest affordable setting
	// (m/s, 0 < MaxMacCready < 20); 0 means DefaultMaxMacCready.
	MaxMacCready float64
}

// FinalStatus sums up a final glide.
type FinalStatus int

const (
	// FinalOK: the glide arrives with at least the reserve and keeps the
	// clearance wherever the terrain is known (or no terrain was given).
	FinalOK FinalStatus = iota
	// FinalTerrainUnknown: as FinalOK, but the terrain is unknown at some
	// samples (voids or off the data), so the check is incomplete.
	FinalTerrainUnknown
	// FinalShort: the glide arrives below the reserve.
	FinalShort
	// FinalBlocked: the glide line passes the terrain with less than the
	// demanded clearance somewhere, and the terrain, not the reserve, sets
	// the altitude needed (it may be short too).
	FinalBlocked
	// FinalNoHeadway: on some leg the wind is stronger than the aircraft can
	// make good at any usable speed; no altitude is enough.
	FinalNoHeadway
)

// String returns "ok", "terrain_unknown", "short", "blocked" or "no_headway".
func (s FinalStatus) String() string {
	switch s {
	case FinalOK:
		return "ok"
	case FinalTerrainUnknown:
		return "terrain_unknown"
	case FinalShort:
		return "short"
	case FinalBlocked:
		return "blocked"
	case FinalNoHeadway:
		return "no_headway"
	}
	return fmt.Sprintf("FinalStatus(%d)", int(s))
}

// FinalLeg is one leg of a final glide, a held track along the geodesic
// from one point of the route to the next. Altitudes are those of the glide
// from the start altitude; figures "at the mean altitude" are taken halfway
// between the leg's start and end altitudes on the leg's mid-distance track.
type FinalLeg struct {
	From, To geodesy.LatLon
	Distance float64 // m, geodesic
	TrackDeg float64 // degrees true, initial track of the geodesic at From
	// MeanTrackDeg is the track at the leg's mid-distance (a geodesic's
	// track changes along it); the wind components and the speed to fly are
	// taken on it.
	MeanTrackDeg float64
	StartAlt     float64 // m MSL at From on the glide from the start altitude
	EndAlt       float64 // m MSL at To
	MeanAlt      float64 // (StartAlt + EndAlt)/2
	// LeastStartAlt is the least altitude at From that still arrives at the
	// goal with the reserve (terrain not considered), m MSL.
	LeastStartAlt float64
	// Tailwind (m/s, negative = headwind) and Crosswind (m/s, positive =
	// from the left) at MeanAlt on MeanTrackDeg.
	Tailwind, Crosswind float64
	// IAS, TAS (m/s) are the speed to fly for the MacCready setting at
	// MeanAlt; Clamp says whether it was held at a speed limit.
	IAS, TAS float64
	Clamp    Clamp
	// GroundSpeed (m/s) is Distance/Time, the leg's mean ground speed;
	// GroundRatio is Distance/HeightLost, its ground glide ratio through
	// the layers it descends.
	GroundSpeed, GroundRatio float64
	HeightLost               float64 // m, StartAlt − EndAlt
	Time                     float64 // s
	// NoHeadway is true when the aircraft cannot make good this leg's track
	// somewhere on it; the leg's altitudes and times are then NaN.
	NoHeadway bool
}

// GlidePoint is one sample of the line.
type GlidePoint struct {
	Dist       float64 // m from the start along the route
	Lat, Lon   float64 // degrees
	Leg        int     // index into FinalGlideResult.Legs
	BearingDeg float64 // track here, degrees true
	Alt        float64 // glide altitude from the start altitude, m MSL (NaN after no headway)
	// Least is the least altitude here that still arrives at the goal with
	// the reserve (terrain not considered), m MSL: the backward glide line.
	Least float64
	// Terrain is the elevation here (m MSL), NaN when unknown or no terrain
	// was given; Clearance = Alt − Terrain.
	Terrain, Clearance float64
	// Floor is the least altitude the terrain check demands here of the
	// glide from the start altitude: Terrain + min(Clearance option,
	// Alt − GoalElev) (see floorAt); NaN without terrain.
	Floor float64
	// Clear is the altitude (m MSL) here on the glide from Required, the
	// least start altitude that keeps the floor and arrives with the
	// reserve; equal to Alt when StartAlt = Required. NaN on no headway.
	Clear float64
}

// FinalTerrain is the terrain check along the line (nil when no terrain was
// given). Distances are from the start along the route.
type FinalTerrain struct {
	Step float64 // m, the sample spacing used
	// LowestClearance is the least height (m) of the glide line from the
	// start altitude above the terrain, at LowestDist (m) and LowestLat,
	// LowestLon (degrees); NaN when the terrain is unknown everywhere.
	LowestClearance                  float64
	LowestDist, LowestLat, LowestLon float64
	// Blocked is true when the glide line passes below the demanded floor
	// (see GlidePoint.Floor). BlockDist, BlockLat, BlockLon is the point of
	// the deepest intrusion and BlockClearance the clearance there.
	Blocked                       bool
	BlockDist, BlockLat, BlockLon float64
	BlockClearance                float64
	// Extra is the start altitude (m) to add so that the glide line keeps
	// the floor everywhere (0 when not blocked); Verified says that a glide
	// recomputed from StartAlt + Extra was found clear.
	Extra    float64
	Verified bool
	// LeastClearAlt is the least start altitude (m MSL) from which the
	// glide both arrives with the reserve and keeps the floor everywhere.
	LeastClearAlt float64
	// Unknown counts the samples without terrain; FirstUnknownDist is the
	// distance of the first (NaN when none).
	Unknown          int
	FirstUnknownDist float64
}

// FinalMacCready is the "how fast can I go home" answer.
type FinalMacCready struct {
	Setting float64 // m/s, the setting the glide was computed with
	// Affordable is the highest setting (m/s) with which the glide from
	// the start altitude still arrives with the reserve and, with a terrain
	// check, keeps the floor above the terrain everywhere (a setting whose
	// line cuts a ridge is not affordable), found by bisection so that its
	// tighter constraint is met within 1 m; NaN when even setting 0 fails. AtLimit says the search bound was reached
	// (the speed to fly is then mostly held at the maximum speed).
	Affordable float64
	AtLimit    bool
	// ArrivalAGL is the arrival height above the goal flying Affordable, m.
	ArrivalAGL float64
	// Time0 and TimeAffordable are the glide times (s) at setting 0 and at
	// Affordable; Saved = Time0 − TimeAffordable. NaN when not affordable.
	Time0, TimeAffordable, Saved float64
}

// FinalGlideResult is the outcome of FinalGlide.
type FinalGlideResult struct {
	Status   FinalStatus
	Route    []geodesy.LatLon // start, turn points, goal
	StartAlt float64          // m MSL the glide starts from
	GoalElev float64          // m MSL
	Reserve  float64          // m
	// Required is the headline: the least start altitude (m MSL) that
	// arrives at GoalElev + Reserve and, with a terrain check, keeps the
	// demanded floor above the terrain everywhere (Terrain.LeastClearAlt).
	// It is the higher of RequiredStraight and Terrain.LeastClearAlt;
	// +Inf on no headway.
	Required float64
	// RequiredStraight is the least start altitude (m MSL) that arrives at
	// GoalElev + Reserve along the line with the terrain NOT considered,
	// integrated backward from the goal through the wind and density
	// layers; +Inf on no headway. It equals Required when the terrain does
	// not set the altitude.
	RequiredStraight float64
	// Arrival is the altitude at the goal (m MSL) on the glide from
	// StartAlt; ArrivalAGL = Arrival − GoalElev; AboveReserve =
	// ArrivalAGL − Reserve. They are NaN when the glide from StartAlt does
	// not get to the goal: no headway, blocked by the terrain (Status
	// FinalBlocked) or passing below the terrain surface.
	Arrival, ArrivalAGL, AboveReserve float64
	// LineArrival is the altitude (m MSL) at which the glide line from
	// StartAlt reaches the goal when the terrain is ignored: Arrival when
	// the line gets there, otherwise what it would be without the terrain
	// in the way (never a headline figure). NaN on no headway.
	LineArrival float64
	// Margin is StartAlt − Required (m): the height to spare at the start
	// (negative: the height missing).
	Margin float64
	// Distance (m) along the route and Time (s) of the glide.
	Distance, Time float64
	Legs           []FinalLeg
	// Profile holds the samples, every Step metres along the route and at
	// each route point.
	Profile   []GlidePoint
	Terrain   *FinalTerrain
	MacCready FinalMacCready
	// NoHeadwayLeg is the first leg without headway, −1 when none.
	NoHeadwayLeg int
}

// ErrFinalTooHigh is returned when the required altitude lies above the
// highest altitude the tables cover (19 900 m): the goal is far out of reach.
var ErrFinalTooHigh = errors.New("reach: final glide: the required altitude is above 19900 m MSL")

// FinalGlide computes the final glide from route[0] at startAlt (m MSL;
// NaN means "at the required altitude") through the turn points
// route[1:len-1] to the goal route[len-1].
//
// Each leg is a held track along the geodesic (WGS84, Vincenty), sampled
// every opts.Step metres. Along a sample of length Δs on track θ the
// altitude obeys
//
//	dh/ds = −λ(h, θ),   λ = (w + s)/G from the speed-to-fly Table
//
// which is integrated with the classical fourth-order Runge–Kutta rule in
// s, so the loss follows the wind and density layers the glide descends
// through; each leg starts at the altitude the previous one ended at. The
// required altitude is the same equation integrated backward from
// GoalElev + Reserve at the goal, so it is exact through the layers rather
// than "goal + reserve + losses at one altitude". Times are ∫ ds/G
// (Simpson's rule per sample). The speed to fly is the one for
// perf.Cond.MacCready; the highest affordable setting is found by
// bisection with a Table per trial setting.
//
// With opts.Terrain the glide line from startAlt is checked against the
// terrain at every sample (see FinalGlideOptions.Clearance and
// FinalTerrain); the extra start altitude that clears a blocked line is
// found by bisection on the start altitude (the altitude along the line
// rises with it) and verified by recomputing the glide.
//
// It returns an error for a route of fewer than two points, an invalid
// coordinate, a zero-length leg, invalid options or performance, a
// cancelled ctx, or ErrFinalTooHigh. A leg without headway is not an
// error: the result has Status FinalNoHeadway and NoHeadwayLeg set.
//
// References: MacCready, "Optimum Airspeed Selector", Soaring, 1958 (date
// from memory) for the speed to fly; Vincenty, Survey Review 23(176), 1975
// for the geodesics; Runge–Kutta: any numerical-analysis text (e.g. Press
// et al., Numerical Recipes, ch. 16).
func FinalGlide(ctx context.Context, route []geodesy.LatLon, startAlt float64, perf Performance, opts FinalGlideOptions) (*FinalGlideResult, error) {
	if len(route) < 2 {
		return nil, fmt.Errorf("reach: final glide needs a start and a goal (got %d points)", len(route))
	}
	if perf.Aircraft == nil {
		return nil, errors.New("reach: final glide: no aircraft")
	}
	switch {
	case !(opts.GoalElev >= -1000 && opts.GoalElev <= 9000):
		return nil, fmt.Errorf("reach: final glide: goal elevation %v m is outside -1000..9000 m", opts.GoalElev)
	case !(opts.Reserve >= 0 && opts.Reserve <= 5000):
		return nil, fmt.Errorf("reach: final glide: reserve %v m is outside 0..5000 m", opts.Reserve)
	case !(opts.Clearance >= 0 && opts.Clearance <= 5000):
		return nil, fmt.Errorf("reach: final glide: clearance %v m is outside 0..5000 m", opts.Clearance)
	case !(opts.Step >= 0) || math.IsInf(opts.Step, 0):
		return nil, fmt.Errorf("reach: final glide: sample step %v m is not a positive distance", opts.Step)
	case !(opts.MaxMacCready >= 0 && opts.MaxMacCready < 20):
		return nil, fmt.Errorf("reach: final glide: MacCready search bound %v m/s is outside 0..20 m/s", opts.MaxMacCready)
	case !math.IsNaN(startAlt) && !(startAlt >= -1000 && startAlt <= finalTableMax):
		return nil, fmt.Errorf("reach: final glide: start altitude %v m is outside -1000..%v m", startAlt, finalTableMax)
	}
	step := opts.Step
	if step == 0 {
		step = DefaultFinalStep
	}
	mcMax := opts.MaxMacCready
	if mcMax == 0 {
		mcMax = DefaultMaxMacCready
	}
	g := &finalGlide{perf: perf, opts: opts, goalTop: opts.GoalElev + opts.Reserve}
	res := &FinalGlideResult{Route: append([]geodesy.LatLon(nil), route...), GoalElev: opts.GoalElev, Reserve: opts.Reserve, NoHeadwayLeg: -1}

	// Legs and samples.
	for i := 0; i+1 < len(route); i++ {
		s, az, _, err := geodesy.Inverse(route[i], route[i+1])
		if err != nil {
			return nil, fmt.Errorf("reach: final glide: leg %d: %w", i+1, err)
		}
		if s < 1 {
			return nil, fmt.Errorf("reach: final glide: leg %d has zero length (point %d repeats point %d)", i+1, i+2, i+1)
		}
		res.Legs = append(res.Legs, FinalLeg{From: route[i], To: route[i+1], Distance: s, TrackDeg: az})
		res.Distance += s
	}
	pts, err := geodesy.Sample(route, step)
	if err != nil {
		return nil, fmt.Errorf("reach: final glide: %w", err)
	}
	n := len(pts)
	g.ds = make([]float64, n-1)
	g.th = make([]float64, n-1)
	for k := 0; k+1 < n; k++ {
		g.ds[k] = pts[k+1].Dist - pts[k].Dist
		g.th[k] = pts[k].Bearing * math.Pi / 180
	}
	res.Profile = make([]GlidePoint, n)
	lowGround := opts.GoalElev
	highGround := opts.GoalElev
	for k, p := range pts {
		leg := min(p.Seg, len(res.Legs)-1)
		res.Profile[k] = GlidePoint{Dist: p.Dist, Lat: p.Lat, Lon: p.Lon, Leg: leg, BearingDeg: p.Bearing,
			Terrain: math.NaN(), Clearance: math.NaN(), Floor: math.NaN()}
	}
	if opts.Terrain != nil {
		res.Terrain = &FinalTerrain{Step: step, LowestClearance: math.NaN(), FirstUnknownDist: math.NaN(),
			LowestDist: math.NaN(), LowestLat: math.NaN(), LowestLon: math.NaN(),
			BlockDist: math.NaN(), BlockLat: math.NaN(), BlockLon: math.NaN(), BlockClearance: math.NaN()}
		for k := range res.Profile {
			if k%1024 == 0 {
				if err := ctx.Err(); err != nil {
					return nil, err
				}
			}
			p := &res.Profile[k]
			e, ok := opts.Terrain(p.Lat, p.Lon)
			if !ok || math.IsNaN(e) || math.IsInf(e, 0) {
				res.Terrain.Unknown++
				if math.IsNaN(res.Terrain.FirstUnknownDist) {
					res.Terrain.FirstUnknownDist = p.Dist
				}
				continue
			}
			p.Terrain = e
			lowGround, highGround = math.Min(lowGround, e), math.Max(highGround, e)
		}
	}

	// The table at the flown setting: from below the lowest ground up to
	// above everything the glide or the terrain check may need; grown when
	// the required altitude turns out higher.
	g.lo = lowGround - 300
	top := math.Max(g.goalTop, highGround+opts.Clearance)
	if !math.IsNaN(startAlt) {
		top = math.Max(top, startAlt)
	}
	g.hi = top + 1000
	mc := perf.Cond.MacCready
	least := make([]float64, n)
	for pass := 0; ; pass++ {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		if g.tab, err = perf.table(mc, g.lo, g.hi); err != nil {
			return nil, err
		}
		bad := g.backward(g.tab, least)
		if bad >= 0 {
			res.Status, res.Required = FinalNoHeadway, math.Inf(1)
			res.NoHeadwayLeg = res.Profile[bad].Leg
			break
		}
		res.Required = least[0]
		res.RequiredStraight = least[0]
		if res.Required <= g.hi-50 {
			break
		}
		if g.hi >= finalTableMax || pass > 4 {
			return nil, ErrFinalTooHigh
		}
		g.hi = math.Min(res.Required+1000, finalTableMax)
	}
	if res.Status == FinalNoHeadway {
		return g.noHeadway(res, startAlt), nil
	}
	startGiven := !math.IsNaN(startAlt)
	if !startGiven {
		startAlt = res.Required
	}
	res.StartAlt = startAlt
	res.Margin = startAlt - res.Required
	for k := range res.Profile {
		res.Profile[k].Least = least[k]
	}

	alt := make([]float64, n)
	if bad := g.forward(g.tab, startAlt, alt); bad >= 0 {
		// Cannot happen when the backward pass had headway everywhere, but
		// the table could differ at altitudes only the forward glide visits.
		res.Status, res.NoHeadwayLeg = FinalNoHeadway, res.Profile[bad].Leg
		return g.noHeadway(res, startAlt), nil
	}
	res.Arrival = alt[n-1]
	res.LineArrival = alt[n-1]
	res.ArrivalAGL = res.Arrival - opts.GoalElev
	res.AboveReserve = res.ArrivalAGL - opts.Reserve
	times := g.times(g.tab, alt)
	for k := range res.Profile {
		p := &res.Profile[k]
		p.Alt = alt[k]
		p.Clearance = alt[k] - p.Terrain
		if !math.IsNaN(p.Terrain) {
			p.Floor = floorAt(p.Terrain, alt[k], opts.Clearance, opts.GoalElev)
		}
	}
	res.Time = times[n-1]
	g.legStats(res, times)

	if res.Terrain != nil {
		if err := g.terrainCheck(ctx, res); err != nil {
			return nil, err
		}
	}
	if err := g.macCready(ctx, res, mcMax); err != nil {
		return nil, err
	}
	switch {
	// Blocked only where the terrain is the limit: the line arrives with
	// the reserve, or clearing the terrain needs more than the reserve
	// does. A glide that merely falls short (its line then meets the
	// ground, even flat ground) is short.
	case res.Terrain != nil && res.Terrain.Blocked && (res.AboveReserve >= -1e-6 || res.Terrain.LeastClearAlt > res.Required+0.5):
		res.Status = FinalBlocked
	case res.AboveReserve < -1e-6:
		res.Status = FinalShort
	case res.Terrain != nil && res.Terrain.Unknown > 0:
		res.Status = FinalTerrainUnknown
	default:
		res.Status = FinalOK
	}
	return g.headline(ctx, res, route, startGiven)
}

// headline makes every headline figure of res satisfy the terrain check
// too: Required becomes the least start altitude that also clears the
// terrain, the margin is taken against it, the arrival is withdrawn when
// the glide from the start does not get to the goal, and the Clear
// profile is the glide from Required. Without a start altitude the glide
// is recomputed from the clearing one.
func (g *finalGlide) headline(ctx context.Context, res *FinalGlideResult, route []geodesy.LatLon, startGiven bool) (*FinalGlideResult, error) {
	tr := res.Terrain
	for k := range res.Profile {
		res.Profile[k].Clear = res.Profile[k].Alt
	}
	if tr == nil || !(tr.LeastClearAlt > res.RequiredStraight) {
		return res, nil
	}
	if !startGiven && tr.LeastClearAlt > res.StartAlt+0.01 {
		// Start at the clearing altitude; keep this run's straight figure.
		r2, err := FinalGlide(ctx, route, tr.LeastClearAlt, g.perf, g.opts)
		if err != nil {
			return nil, err
		}
		r2.Required = math.Max(r2.Required, tr.LeastClearAlt)
		r2.Margin = r2.StartAlt - r2.Required
		return r2, nil
	}
	res.Required = tr.LeastClearAlt
	res.Margin = res.StartAlt - res.Required
	through := false // the line from the start passes below the surface
	for _, p := range res.Profile {
		if p.Clearance < 0 {
			through = true
			break
		}
	}
	if res.Status == FinalBlocked || through {
		nan := math.NaN()
		res.Arrival, res.ArrivalAGL, res.AboveReserve = nan, nan, nan
	}
	alt := make([]float64, len(res.Profile))
	if err := g.ensureTop(res.Required); err != nil {
		return nil, err
	}
	if g.forward(g.tab, res.Required, alt) >= 0 {
		for k := range alt {
			alt[k] = math.NaN()
		}
	}
	for k := range res.Profile {
		res.Profile[k].Clear = alt[k]
	}
	return res, nil
}

// finalGlide holds the samples and the table of one FinalGlide call.
type finalGlide struct {
	perf    Performance
	opts    FinalGlideOptions
	goalTop float64   // GoalElev + Reserve
	ds      []float64 // length of sample k → k+1, m
	th      []float64 // its track, radians
	tab     *Table    // at the flown MacCready setting
	lo, hi  float64   // its altitude range
}

// rk4 advances dh/ds = sign·λ(h, th) over ds; NaN when λ is infinite
// (no headway) anywhere it is evaluated.
func rk4(m LossModel, h, th, ds, sign float64) float64 {
	k1 := m.Loss(h, th)
	k2 := m.Loss(h+sign*ds/2*k1, th)
	k3 := m.Loss(h+sign*ds/2*k2, th)
	k4 := m.Loss(h+sign*ds*k3, th)
	if math.IsInf(k1+k2+k3+k4, 0) || math.IsNaN(k1+k2+k3+k4) {
		return math.NaN()
	}
	return h + sign*ds/6*(k1+2*k2+2*k3+k4)
}

// forward integrates the glide from h0 at the first sample and fills alt;
// it returns the sample whose segment has no headway, or −1.
func (g *finalGlide) forward(m LossModel, h0 float64, alt []float64) int {
	alt[0] = h0
	for k, ds := range g.ds {
		h := rk4(m, alt[k], g.th[k], ds, -1)
		if math.IsNaN(h) {
			for j := k + 1; j < len(alt); j++ {
				alt[j] = math.NaN()
			}
			return k
		}
		alt[k+1] = h
	}
	return -1
}

// backward integrates from GoalElev + Reserve at the goal back to the start
// and fills least; it returns the sample whose segment has no headway, or −1.
func (g *finalGlide) backward(m LossModel, least []float64) int {
	n := len(least)
	least[n-1] = g.goalTop
	for k := n - 2; k >= 0; k-- {
		h := rk4(m, least[k+1], g.th[k], g.ds[k], +1)
		if math.IsNaN(h) {
			for j := k; j >= 0; j-- {
				least[j] = math.Inf(1)
			}
			return k
		}
		least[k] = h
	}
	return -1
}

// groundSpeeder gives the ground speed (m/s) at altitude h on track th
// (radians) flying the speed to fly: *Table and *trackTable.
type groundSpeeder interface {
	groundSpeed(h, th float64) float64
}

func (t *Table) groundSpeed(h, th float64) float64 { return t.At(h, th).GroundSpeed }

// times returns the elapsed time (s) at each sample of the glide alt:
// ∫ ds/G by Simpson's rule on each segment (G at its ends and middle).
func (g *finalGlide) times(t groundSpeeder, alt []float64) []float64 {
	out := make([]float64, len(alt))
	for k, ds := range g.ds {
		th := g.th[k]
		g0 := t.groundSpeed(alt[k], th)
		gm := t.groundSpeed((alt[k]+alt[k+1])/2, th)
		g1 := t.groundSpeed(alt[k+1], th)
		out[k+1] = out[k] + ds*(1/g0+4/gm+1/g1)/6
	}
	return out
}

// trackTable is a Table filled lazily: the same altitude nodes, the same
// TableDirections direction nodes and the same bilinear interpolation as
// NewTable over hMin..hMax, but a direction column is computed only when a
// query needs it. A final glide meets a handful of tracks, so the MacCready
// search builds one per trial setting at a few per cent of a full Table's
// cost. Not safe for concurrent use.
type trackTable struct {
	ac   *Aircraft
	wind WindField
	c    Conditions
	tableGrid
	rho  []float64
	cols map[int][]SpeedToFly
}

// newTrackTable prepares a trackTable; ac and c must have passed Check.
func newTrackTable(p Performance, mc, lo, hi float64) *trackTable {
	c := p.Cond
	c.MacCready = mc
	lo, hi = math.Max(lo, finalTableMin), math.Min(hi, finalTableMax)
	if hi < lo {
		hi = lo
	}
	nh := int(math.Ceil((hi-lo)/TableBand)) + 1
	if nh < 2 {
		nh = 2
	}
	t := &trackTable{ac: p.Aircraft, wind: p.Wind, c: c, tableGrid: tableGrid{hMin: lo, hMax: hi, dh: (hi - lo) / float64(nh-1), nh: nh, nd: TableDirections}, cols: map[int][]SpeedToFly{}}
	if t.dh == 0 {
		t.dh = 1
	}
	t.rho = make([]float64, nh)
	for i := range t.rho {
		t.rho[i] = p.Atm.Density(lo + float64(i)*t.dh)
	}
	return t
}

// col returns direction column j, computing it on first use.
func (t *trackTable) col(j int) []SpeedToFly {
	if c, ok := t.cols[j]; ok {
		return c
	}
	c := make([]SpeedToFly, t.nh)
	deg := float64(j) * 360 / TableDirections
	for i := range c {
		var along, cross float64
		if t.wind != nil {
			along, cross = t.wind.Components(t.hMin+float64(i)*t.dh, deg)
		}
		c[i] = t.ac.SpeedToFly(t.rho[i], along, cross, t.c)
	}
	t.cols[j] = c
	return c
}

// Loss is Table.Loss on this grid.
func (t *trackTable) Loss(h, bearing float64) float64 {
	i0, th, j0, j1, tb, ok := t.cell(h, bearing)
	if !ok {
		return math.Inf(1)
	}
	c0, c1 := t.col(j0), t.col(j1)
	a, b, c, d := c0[i0].Loss, c1[i0].Loss, c0[i0+1].Loss, c1[i0+1].Loss
	if math.IsInf(a+b+c+d, 1) {
		return math.Inf(1)
	}
	return (1-th)*((1-tb)*a+tb*b) + th*((1-tb)*c+tb*d)
}

func (t *trackTable) groundSpeed(h, bearing float64) float64 {
	i0, th, j0, j1, tb, ok := t.cell(h, bearing)
	if !ok {
		return math.NaN()
	}
	c0, c1 := t.col(j0), t.col(j1)
	a, b, c, d := c0[i0].GroundSpeed, c1[i0].GroundSpeed, c0[i0+1].GroundSpeed, c1[i0+1].GroundSpeed
	return (1-th)*((1-tb)*a+tb*b) + th*((1-tb)*c+tb*d)
}

// arrivalAt returns the arrival altitude at the goal gliding from h0 with
// table m (NaN on no headway).
func (g *finalGlide) arrivalAt(m LossModel, h0 float64) float64 {
	h := h0
	for k, ds := range g.ds {
		h = rk4(m, h, g.th[k], ds, -1)
		if math.IsNaN(h) {
			return h
		}
	}
	return h
}

// legStats fills the per-leg figures from the profile and the times.
func (g *finalGlide) legStats(res *FinalGlideResult, times []float64) {
	first := make([]int, len(res.Legs)+1) // sample index of each leg's start; last = goal
	for i := range first {
		first[i] = -1
	}
	for k, p := range res.Profile {
		if first[p.Leg] < 0 {
			first[p.Leg] = k
		}
	}
	first[len(res.Legs)] = len(res.Profile) - 1
	for i := range res.Legs {
		l := &res.Legs[i]
		a, b := first[i], first[i+1]
		l.StartAlt, l.EndAlt = res.Profile[a].Alt, res.Profile[b].Alt
		l.MeanAlt = (l.StartAlt + l.EndAlt) / 2
		l.LeastStartAlt = res.Profile[a].Least
		l.HeightLost = l.StartAlt - l.EndAlt
		l.Time = times[b] - times[a]
		l.GroundSpeed = l.Distance / l.Time
		l.GroundRatio = l.Distance / l.HeightLost
		// Track at mid-distance: the sample nearest the leg's middle.
		mid := res.Profile[a].Dist + l.Distance/2
		km := a
		for k := a; k <= b && res.Profile[k].Dist <= mid; k++ {
			km = k
		}
		l.MeanTrackDeg = res.Profile[km].BearingDeg
		g.legAir(l)
	}
}

// legAir fills the wind components and the speed to fly at the leg's mean
// altitude on its mean track.
func (g *finalGlide) legAir(l *FinalLeg) {
	if g.perf.Wind != nil && !math.IsNaN(l.MeanAlt) {
		l.Tailwind, l.Crosswind = g.perf.Wind.Components(l.MeanAlt, l.MeanTrackDeg)
	}
	h := l.MeanAlt
	if math.IsNaN(h) {
		h = l.StartAlt
	}
	s := g.tab.At(h, l.MeanTrackDeg*math.Pi/180)
	l.IAS, l.TAS, l.Clamp = s.IAS, s.TAS, s.Clamp
	if s.NoHeadway {
		l.NoHeadway = true
	}
}

// noHeadway completes a result whose glide cannot be flown.
func (g *finalGlide) noHeadway(res *FinalGlideResult, startAlt float64) *FinalGlideResult {
	nan := math.NaN()
	res.StartAlt = startAlt
	res.Arrival, res.ArrivalAGL, res.AboveReserve, res.Margin, res.Time = nan, nan, nan, nan, nan
	res.Required, res.RequiredStraight, res.LineArrival = math.Inf(1), math.Inf(1), nan
	res.MacCready = FinalMacCready{Setting: g.perf.Cond.MacCready, Affordable: nan, ArrivalAGL: nan, Time0: nan, TimeAffordable: nan, Saved: nan}
	for k := range res.Profile {
		p := &res.Profile[k]
		p.Alt, p.Least, p.Clearance, p.Clear = nan, nan, nan, nan
	}
	for i := range res.Legs {
		l := &res.Legs[i]
		l.StartAlt, l.EndAlt, l.MeanAlt, l.LeastStartAlt = nan, nan, nan, nan
		l.HeightLost, l.Time, l.GroundSpeed, l.GroundRatio = nan, nan, nan, nan
		l.MeanTrackDeg = l.TrackDeg
		if i == res.NoHeadwayLeg {
			l.NoHeadway = true
		}
		// The air on each leg at the start altitude, to show why.
		h := startAlt
		if math.IsNaN(h) {
			h = g.goalTop
		}
		if g.perf.Wind != nil {
			l.Tailwind, l.Crosswind = g.perf.Wind.Components(h, l.TrackDeg)
		}
		s := g.tab.At(h, l.TrackDeg*math.Pi/180)
		l.IAS, l.TAS, l.Clamp = s.IAS, s.TAS, s.Clamp
	}
	return res
}

// floorAt is the terrain floor (m MSL) under a glide at altitude alt over
// terrain t toward a landing point of elevation goal with clearance c:
//
//	floor = t + min(c, alt − goal)
//
// the clearance en route, and below it, where the glide is within the
// clearance of the landing point's elevation, the ground must be no higher
// than the landing point (floor ≤ alt exactly when t ≤ goal). The footprint
// and the backward solver apply the same rule (DEVELOPERS.md "Reserve and
// clearance").
func floorAt(t, alt, c, goal float64) float64 {
	return t + math.Min(c, alt-goal)
}

// margin returns the least alt − floor of the glide alt over the samples
// with known terrain, the sample where it occurs (−1 when none), and the
// rise of the whole line that would give every sample in deficit the full
// clearance (the step of the search for the least clearing start).
func (g *finalGlide) margin(prof []GlidePoint, alt []float64) (worst float64, at int, rise float64) {
	worst, at = math.Inf(1), -1
	c, goal := g.opts.Clearance, g.opts.GoalElev
	for k, p := range prof {
		if math.IsNaN(p.Terrain) {
			continue
		}
		m := alt[k] - floorAt(p.Terrain, alt[k], c, goal)
		if math.IsNaN(m) {
			m = math.Inf(-1)
		}
		if m < worst {
			worst, at = m, k
		}
		if m < 0 {
			rise = math.Max(rise, p.Terrain+c-alt[k])
		}
	}
	if math.IsNaN(rise) || math.IsInf(worst, -1) {
		rise = math.Inf(1)
	}
	return worst, at, rise
}

// ensureTop grows the flown table so it covers altitude h.
func (g *finalGlide) ensureTop(h float64) error {
	if h <= g.hi-50 {
		return nil
	}
	if g.hi >= finalTableMax {
		return ErrFinalTooHigh
	}
	g.hi = math.Min(h+1000, finalTableMax)
	t, err := g.perf.table(g.perf.Cond.MacCready, g.lo, g.hi)
	if err != nil {
		return err
	}
	g.tab = t
	return nil
}

// terrainCheck finds the lowest clearance, whether the line is blocked,
// where, and the extra start altitude that clears it.
func (g *finalGlide) terrainCheck(ctx context.Context, res *FinalGlideResult) error {
	tr := res.Terrain
	prof := res.Profile
	for _, p := range prof {
		if !math.IsNaN(p.Clearance) && (math.IsNaN(tr.LowestClearance) || p.Clearance < tr.LowestClearance) {
			tr.LowestClearance, tr.LowestDist, tr.LowestLat, tr.LowestLon = p.Clearance, p.Dist, p.Lat, p.Lon
		}
	}
	alt := make([]float64, len(prof))
	for k, p := range prof {
		alt[k] = p.Alt
	}
	m, at, _ := g.margin(prof, alt)
	if at < 0 {
		tr.LeastClearAlt = res.Required
		tr.Verified = true
		return nil
	}
	if m < 0 {
		tr.Blocked = true
		p := prof[at]
		tr.BlockDist, tr.BlockLat, tr.BlockLon, tr.BlockClearance = p.Dist, p.Lat, p.Lon, p.Clearance
	}
	clears := func(h0 float64) (bool, float64, error) {
		if err := ctx.Err(); err != nil {
			return false, 0, err
		}
		if err := g.ensureTop(h0); err != nil {
			return false, 0, err
		}
		if g.forward(g.tab, h0, alt) >= 0 {
			return false, math.Inf(-1), nil
		}
		m, _, rise := g.margin(prof, alt)
		return m >= 0, rise, nil
	}
	// The least clearing start altitude S*: the altitude along the line
	// rises with the start altitude, so the margin is monotone in it. Step
	// up by the deficit (the altitude along the line changes nearly one for
	// one with the start altitude) until clear, then bisect to 5 cm.
	lo := math.Min(res.StartAlt, res.Required)
	ok, mlo, err := clears(lo)
	if err != nil {
		return err
	}
	hi := lo
	if ok {
		// Already clear from the lower of the two: S* ≤ lo.
		hi = lo
	} else {
		for i := 0; ; i++ {
			if i > 60 {
				return fmt.Errorf("reach: final glide: no start altitude below %.0f m clears the terrain", hi)
			}
			d := mlo // the rise that gives every point in deficit the full clearance
			if math.IsInf(d, 0) || math.IsNaN(d) {
				d = 500
			}
			cand := hi + d*1.05 + 0.1
			okc, mc, err := clears(cand)
			if err != nil {
				return err
			}
			if okc {
				lo, hi = hi, cand
				break
			}
			hi, mlo = cand, mc
		}
		for hi-lo > 0.05 {
			mid := (lo + hi) / 2
			okm, _, err := clears(mid)
			if err != nil {
				return err
			}
			if okm {
				hi = mid
			} else {
				lo = mid
			}
		}
	}
	tr.LeastClearAlt = math.Max(res.Required, hi)
	if tr.Blocked {
		tr.Extra = hi - res.StartAlt
		okv, _, err := clears(res.StartAlt + tr.Extra)
		if err != nil {
			return err
		}
		tr.Verified = okv
	} else {
		tr.Verified = true
	}
	return nil
}

// macCready finds the highest affordable setting and the time it saves.
func (g *finalGlide) macCready(ctx context.Context, res *FinalGlideResult, mcMax float64) error {
	nan := math.NaN()
	mc := &res.MacCready
	*mc = FinalMacCready{Setting: g.perf.Cond.MacCready, Affordable: nan, ArrivalAGL: nan, Time0: nan, TimeAffordable: nan, Saved: nan}
	h0 := res.StartAlt
	hi := h0 + 50
	tables := map[float64]*trackTable{}
	tableAt := func(m float64) (*trackTable, error) {
		if t, ok := tables[m]; ok {
			return t, nil
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		// The glides of the search end near GoalElev + Reserve; rows below
		// that matter only for trials that fail anyway.
		t := newTrackTable(g.perf, m, math.Max(g.lo, g.goalTop-200), hi)
		tables[m] = t
		return t, nil
	}
	// With a terrain check a setting is affordable only when its glide
	// also keeps the floor (floorAt: the terrain plus min(clearance,
	// altitude flown − goal)); the backward line of the setting is
	// integrated only to catch a leg without headway.
	var alt, least []float64
	if res.Terrain != nil {
		alt, least = make([]float64, len(res.Profile)), make([]float64, len(res.Profile))
	}
	surplus := func(m float64) (float64, error) {
		t, err := tableAt(m)
		if err != nil {
			return 0, err
		}
		a := g.arrivalAt(t, h0)
		if math.IsNaN(a) {
			return math.Inf(-1), nil
		}
		f := a - g.goalTop
		if res.Terrain == nil {
			return f, nil
		}
		if g.forward(t, h0, alt) >= 0 || g.backward(t, least) >= 0 {
			return math.Inf(-1), nil
		}
		for k, p := range res.Profile {
			if math.IsNaN(p.Terrain) {
				continue
			}
			fl := floorAt(p.Terrain, alt[k], g.opts.Clearance, g.opts.GoalElev)
			if d := alt[k] - fl; !(d >= f) {
				f = d
			}
		}
		if math.IsNaN(f) {
			f = math.Inf(-1)
		}
		return f, nil
	}
	f0, err := surplus(0)
	if err != nil {
		return err
	}
	if f0 < 0 {
		return nil // not even setting 0 arrives with the reserve
	}
	a, b := 0.0, mcMax
	fa := f0
	fb, err := surplus(b)
	if err != nil {
		return err
	}
	if fb >= 0 {
		a, fa = b, fb
		mc.AtLimit = true
	} else {
		// Bisection: fa ≥ 0 > fb. Stop once a's arrival is within 0.5 m of
		// the reserve (the check demands 1 m) or the bracket is tiny.
		for i := 0; i < 80 && fa > 0.5 && b-a > 1e-7; i++ {
			m := (a + b) / 2
			fm, err := surplus(m)
			if err != nil {
				return err
			}
			if fm >= 0 {
				a, fa = m, fm
			} else {
				b = m
			}
			delete(tables, m) // keep only what is reused
		}
	}
	mc.Affordable = a
	mc.ArrivalAGL = fa + g.opts.Reserve
	if res.Terrain != nil {
		// fa may be a floor margin; the arrival is the glide's own.
		t, err := tableAt(a)
		if err != nil {
			return err
		}
		mc.ArrivalAGL = g.arrivalAt(t, h0) - g.opts.GoalElev
	}
	for _, m := range []float64{0, a} {
		t, err := tableAt(m)
		if err != nil {
			return err
		}
		alt := make([]float64, len(g.ds)+1)
		g.forward(t, h0, alt)
		tm := g.times(t, alt)
		if m == 0 {
			mc.Time0 = tm[len(tm)-1]
		}
		if m == a {
			mc.TimeAffordable = tm[len(tm)-1]
		}
	}
	mc.Saved = mc.Time0 - mc.TimeAffordable
	return nil
}
