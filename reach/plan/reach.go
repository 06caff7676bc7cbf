package plan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"sync"

	"github.com/paulmach/orb"

	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/terrain"
)

// ReachRequest asks for the footprint from a start: the ground reachable
// without thrust with the reserve (and at further arrival heights), and
// the landing fields judged one by one.
type ReachRequest struct {
	Setup  *Setup
	Ground Ground
	// Lat, Lon is the start (degrees); Alt its true altitude, m MSL, above
	// the ground there (StartElevation gives the ground, for a height
	// above it).
	Lat, Lon, Alt float64
	// Levels are further arrival heights above the ground to contour (m,
	// 0..5000), beside Setup.Reserve.
	Levels []float64
	Fields []Field
	// Failure is the state at an engine failure the glides start from; nil
	// when the aircraft is already gliding at the speed to fly, on track.
	Failure *Failure
	// FieldName, if not nil, names a request field in the notes of the
	// result ("required altitude not computed: From: …"), so that a command
	// line can give its own flag names there; nil keeps the field's name.
	FieldName func(field string) string
	// Progress, if not nil, receives the share of the footprint runs done
	// (0..1), from the solvers' goroutines one at a time.
	Progress func(done float64)
}

// ReachResult is a footprint and its fields.
type ReachResult struct {
	StartElev float64 // m MSL: the ground at the start (ElevationAt)
	// Footprint is the footprint holding in every wind of Setup.Winds (per
	// cell the lowest arrival over Members, reach.Intersect).
	Footprint *reach.FootprintResult
	Members   []*reach.FootprintResult // one per wind of Setup.Winds, in order
	// Levels are the contoured rings, highest arrival height first: the
	// reserve and the request's Levels, each once.
	Levels []reach.Level
	// Fields are the request's fields judged: reachable ones first (most
	// arrival height first), then by required altitude (unknown last).
	Fields []FieldResult
	// Farthest is the geodesic distance (m) from the start to FarPoint, the
	// reserve ring's vertex farthest from it (lon, lat), at FarBearing
	// (degrees true); 0 when nothing is reached with the reserve.
	Farthest, FarBearing float64
	FarPoint             orb.Point
	Grid                 *terrain.Grid // the DEM window read; nil on flat ground
	// Edge is set when the footprint runs into the edge of the terrain
	// data (TerrainEdge): the ground beyond was not computed.
	Edge *EdgeCut
	// Sectors are the failure's sector starts in the forecast wind (nil
	// without a Failure).
	Sectors []reach.SectorStart
}

// StartElevation returns the ground (m MSL) at a start: Ground.ElevationAt
// with its failures as *InputError, naming "Terrain" (a sample outside
// MinGround..MaxGround, a failed read) or "From" (off the data or on a void).
func StartElevation(g Ground, lat, lon float64) (float64, error) {
	elev, ok, err := g.ElevationAt(lat, lon)
	if err != nil {
		return 0, &InputError{Field: "Terrain", Err: err}
	}
	if !ok {
		return 0, inputf("From", "%.5f,%.5f lies off the terrain data or on a void (unknown ground)", lat, lon)
	}
	return elev, nil
}

// Reach computes the footprint from req's start and judges its fields.
//
// The window is sized for the farthest glide of any wind (SizeWindow, from
// the start altitude plus any energy credit of the failure state, down to
// the lowest ground); one forward run per wind of Setup.Winds, two at a
// time, and the footprint keeps per cell the lowest arrival. A field is
// reachable when the footprint arrives over it with at least the reserve;
// its required altitude is the highest over the winds of the least start
// altitude that reaches it with the reserve (a backward run per field and
// wind over the window, made to agree with the forward verdict by a
// bisection on forward runs where the two disagree). A field beyond any
// glide from its ceiling (start + 4000 m) is decided without a solver run.
//
// Errors: *InputError naming "From", "Alt", "Terrain", "Aircraft" or
// "Speed" for a request that cannot be flown; ctx's error when cancelled.
func Reach(ctx context.Context, req ReachRequest) (*ReachResult, error) {
	// The fields' backward runs (one per field and wind) reuse each
	// other's buffers (reach.WithScratch).
	ctx = reach.WithScratch(ctx)
	setup, gr, lat, lon, alt := req.Setup, req.Ground, req.Lat, req.Lon, req.Alt
	elev, err := StartElevation(gr, lat, lon)
	if err != nil {
		return nil, err
	}
	if alt <= elev {
		return nil, inputf("Alt", "%.0f m MSL is not above the terrain at the start (%.0f m)", alt, elev)
	}
	res := &ReachResult{StartElev: elev}
	fstate := req.Failure
	// From a failure state the glides start up to a few km away and may
	// start higher (the energy credit): widen the window and the tables.
	pad, topExtra := 0.0, 0.0
	if fstate != nil {
		credit, err := fstate.Credit(setup, alt)
		if err != nil {
			return nil, err
		}
		pad, topExtra = 3000, credit+100
	}
	// Size the window from the best downwind glide down to the lowest ground
	// it meets (a first guess below the start's ground, then corrected).
	l, grid, err := setup.SizeWindow(WindowSize{Top: alt + topExtra, TableTop: alt + 50 + topExtra, Bottom: math.Min(elev-300, 0), Below: 50},
		func(radius float64) (*terrain.Local, *terrain.Grid, error) {
			return gr.Window(lat, lon, radius*1.02+1000+pad)
		})
	if err != nil {
		return nil, err
	}
	res.Grid = grid
	lo := Lowest(l)
	if math.IsInf(lo, 1) {
		return nil, inputf("Terrain", "the terrain around the start is all voids")
	}
	extraLevels := req.Levels
	minLevel := setup.Reserve
	for _, v := range extraLevels {
		minLevel = math.Min(minLevel, v)
	}
	// The failure's sector starts in the forecast wind: the fields' glides
	// start there (and wind 0's footprint runs from them).
	var secs0 []reach.SectorStart
	if fstate != nil {
		if secs0, err = fstate.Sectors(setup, setup.Winds[0], l, lat, lon, alt); err != nil {
			return nil, err
		}
		res.Sectors = secs0
	}
	// The fields' backward runs need the window, the fields and the
	// sectors, not the footprint: they are set up now and run beside the
	// footprints. An error setting them up is returned after the
	// footprints' (as when the fields were judged after them).
	jd := &judge{req: &req, res: res, l: l, lowest: lo, startElev: elev}
	fw, fieldErr := jd.setup(ctx)
	// The winds' footprints and the (field, wind) backward runs are
	// independent jobs for two workers, the footprints (the longest) first,
	// so both cores stay busy to the end. Each run is the same whatever runs
	// beside it, and every result goes to its own slot (members in the
	// winds' order, fields in theirs), so the result does not depend on the
	// cores or the timing.
	members := make([]*reach.FootprintResult, len(setup.Winds))
	shares := make([]float64, len(setup.Winds))
	var shareMu sync.Mutex
	footprint := func(k int) error {
		tab, err := setup.TableFor(setup.Winds[k], lo+math.Min(minLevel, 0)-260, alt+60+topExtra)
		if err != nil {
			return &InputError{Field: "Aircraft", Err: err}
		}
		n := float64(len(setup.Winds))
		fopts := reach.FootprintOptions{
			Reserve: setup.Reserve, Clearance: setup.Clearance, Levels: extraLevels,
			Progress: func(d float64) {
				shareMu.Lock()
				shares[k] = d
				t := 0.0
				for _, x := range shares {
					t += x
				}
				shareMu.Unlock()
				if req.Progress != nil {
					req.Progress(t / n)
				}
			}}
		var fr *reach.FootprintResult
		if fstate != nil {
			secs := secs0
			if k > 0 {
				if secs, err = fstate.Sectors(setup, setup.Winds[k], l, lat, lon, alt); err != nil {
					return err
				}
			}
			fr, err = reach.FootprintFromState(ctx, l, reach.Start{Lat: lat, Lon: lon, Alt: alt}, secs, tab, fopts)
		} else {
			fr, err = reach.Footprint(ctx, l, reach.Start{Lat: lat, Lon: lon, Alt: alt}, tab, fopts)
		}
		if err != nil {
			switch {
			case errors.Is(err, reach.ErrStartBelowGround), errors.Is(err, reach.ErrStartOffGround):
				return &InputError{Field: "From", Err: err}
			}
			return err
		}
		members[k] = fr
		return nil
	}
	nw, nf := len(setup.Winds), len(fw.work)
	if fieldErr != nil {
		nf = 0
	}
	err = ForEach(ctx, nw+nf, 2, func(t int) error {
		if t < nw {
			return footprint(t)
		}
		return jd.backward(ctx, fw, fw.work[t-nw])
	})
	if err != nil {
		return nil, err
	}
	if fieldErr != nil {
		return nil, fieldErr
	}
	fp, err := reach.Intersect(members)
	if err != nil {
		return nil, err
	}
	res.Footprint, res.Members = fp, members
	levels := append([]float64{setup.Reserve}, extraLevels...)
	sort.Sort(sort.Reverse(sort.Float64Slice(levels))) // highest first, as a pilot reads them
	res.Levels = fp.Rings(dedupe(levels))
	// The farthest point: the reserve ring's vertex farthest from the start
	// (geodesic), which a reader finds in the GeoJSON rings as written; it is
	// within one cell of the farthest cell reached with the reserve.
	for _, lv := range res.Levels {
		if lv.ArrivalAGL != setup.Reserve {
			continue
		}
		if p, d, b, ok := lv.FarthestVertex(lat, lon); ok {
			res.Farthest, res.FarBearing, res.FarPoint = d, b, p
		}
	}
	res.Edge = TerrainEdge(fp, grid, math.Min(minLevel, setup.Reserve))

	if err := jd.finish(ctx, fw); err != nil {
		return nil, err
	}
	return res, nil
}

// judge holds what judging the fields of a footprint needs.
type judge struct {
	req       *ReachRequest
	res       *ReachResult
	l         *terrain.Local // the footprint's window
	lowest    float64        // Lowest(l), m MSL
	startElev float64
}

// fieldWork is the fields' backward runs set up by judge.setup.
type fieldWork struct {
	jobs  []*fieldJob // per request field; nil where no run is needed
	onWin []bool      // per request field: it lies on the footprint's window
	tabs  []*reach.Table
	work  []fieldPair // the (field, wind) runs
}

// fieldPair is one backward run: field f (index into the request's
// fields) in wind k.
type fieldPair struct{ f, k int }

// setup prepares every field of the request (res.Fields, without the
// footprint's verdict, which finish adds), decides the fields beyond any
// possible reach without a run, and lists the (field, wind) backward runs
// the rest need, with one speed-to-fly table per wind for every field:
// from the lowest ground of the window or field to the highest ceiling.
// The table of each wind is built once, over the range every field needs,
// and shared (a table built per field, or widened when a later field
// needed more, made a field's figure depend on the order the fields were
// judged in).
func (jd *judge) setup(ctx context.Context) (*fieldWork, error) {
	req, res := jd.req, jd.res
	fw := &fieldWork{jobs: make([]*fieldJob, len(req.Fields)), onWin: make([]bool, len(req.Fields))}
	res.Fields = make([]FieldResult, len(req.Fields))
	for i, f := range req.Fields {
		fr, job, onWin, err := jd.prepare(f)
		if err != nil {
			return fw, err
		}
		res.Fields[i], fw.jobs[i], fw.onWin[i] = fr, job, onWin
	}
	flo, fhi := jd.lowest, math.Inf(-1)
	for _, j := range fw.jobs {
		if j != nil {
			flo, fhi = math.Min(flo, j.target.Elev), math.Max(fhi, j.ceiling)
		}
	}
	if math.IsInf(fhi, -1) {
		return fw, nil
	}
	tabs, err := req.Setup.Tables(ctx, flo-60, fhi+60)
	if err != nil {
		return fw, err
	}
	bounds := make([]*reach.RangeBound, len(tabs))
	for k, t := range tabs {
		if bounds[k], err = reach.NewRangeBound(t, flo-50, fhi+50); err != nil {
			return fw, &InputError{Field: "Aircraft", Err: err}
		}
	}
	for i, j := range fw.jobs {
		if j == nil {
			continue
		}
		if !jd.place(&res.Fields[i], j, bounds) {
			fw.jobs[i] = nil
		}
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, j := range fw.jobs {
		if j == nil {
			continue
		}
		lo, hi = math.Min(lo, j.lo), math.Max(hi, j.ceiling)
		for k := range req.Setup.Winds {
			fw.work = append(fw.work, fieldPair{i, k})
		}
	}
	if len(fw.work) == 0 {
		return fw, nil
	}
	if tlo, thi := tabs[0].Range(); tlo > lo-60 || thi < hi+60 {
		if tabs, err = req.Setup.Tables(ctx, lo-60, hi+60); err != nil {
			return fw, err
		}
	}
	fw.tabs = tabs
	return fw, nil
}

// backward runs the backward search of one field in one wind (the least
// start altitude that reaches it with the reserve, from the start or the
// failure's sector start) and keeps the raw figure in the field's job;
// finish reconciles it with the footprint and adds the failure's cost.
func (jd *judge) backward(ctx context.Context, fw *fieldWork, w fieldPair) error {
	j, k := fw.jobs[w.f], w.k
	r, rok, err := reach.RequiredFrom(ctx, j.win, j.target, fw.tabs[k],
		reach.RequiredOptions{Clearance: jd.req.Setup.Clearance, Ceiling: j.ceiling}, j.fromLat, j.fromLon)
	if err != nil {
		if !errors.Is(err, reach.ErrNoTargets) && !errors.Is(err, reach.ErrStartOffGround) {
			return err
		}
		rok = false
	}
	j.req[k], j.ok[k] = r, rok
	return nil
}

// finish judges every field from the footprint (reachable or not, arrival
// height), makes each backward figure on the footprint's window agree with
// the footprint's verdict in its wind (reconcile; the rare bisections run
// two at a time), folds the winds into the field's figure and sorts the
// fields: reachable ones first (most arrival height first), then by
// required altitude (unknown last).
func (jd *judge) finish(ctx context.Context, fw *fieldWork) error {
	req, res, l := jd.req, jd.res, jd.l
	reserve := req.Setup.Reserve
	for i, fr := range res.Fields {
		if !fw.onWin[i] {
			continue
		}
		if a, ok := res.Footprint.ArrivalAtField(fr.Lat, fr.Lon, fr.ElevationM); ok {
			res.Fields[i].ArrivalAGLM = a - fr.ElevationM
			res.Fields[i].MarginM = res.Fields[i].ArrivalAGLM - reserve
			res.Fields[i].Reachable = res.Fields[i].ArrivalAGLM >= reserve
		}
	}
	var rec []fieldPair
	for _, w := range fw.work {
		if fw.jobs[w.f].win == l && res.Sectors == nil {
			// (From a failure state the forward figure is the sectors'
			// union, which a bisection from one point would not fly.)
			rec = append(rec, w)
		}
	}
	err := ForEach(ctx, len(rec), 2, func(t int) error {
		j, k := fw.jobs[rec[t].f], rec[t].k
		r, rok, err := jd.reconcile(ctx, k, j.target, fw.tabs[k], j.req[k], j.ok[k], j.ceiling)
		j.req[k], j.ok[k] = r, rok
		return err
	})
	if err != nil {
		return err
	}
	for i, job := range fw.jobs {
		if job == nil {
			continue
		}
		for k := range job.req {
			job.req[k] += job.cost
		}
		res.Fields[i] = job.finish(res.Fields[i])
	}
	sort.SliceStable(res.Fields, func(i, j int) bool {
		a, b := res.Fields[i], res.Fields[j]
		if a.Reachable != b.Reachable {
			return a.Reachable
		}
		if a.Reachable {
			return a.ArrivalAGLM > b.ArrivalAGLM
		}
		return nanLast(a.RequiredMSL, b.RequiredMSL)
	})
	return nil
}

func nanLast(a, b float64) bool {
	if math.IsNaN(a) {
		return false
	}
	if math.IsNaN(b) {
		return true
	}
	return a < b
}

func dedupe(v []float64) []float64 {
	var out []float64
	seen := map[float64]bool{}
	for _, x := range v {
		if !seen[x] {
			seen[x] = true
			out = append(out, x)
		}
	}
	return out
}

// fieldJob is what the backward runs of one field need and produce.
type fieldJob struct {
	onWindow bool
	// fromLat, fromLon are where the glide to the field starts (the start,
	// or the failure state's sector start), cost the altitude (m) the
	// failure costs before it.
	fromLat, fromLon, cost float64
	dist                   float64        // m from the start (geodesic), NaN if unknown
	win                    *terrain.Local // the window the runs search
	target                 reach.Target
	ceiling                float64 // m MSL
	lo                     float64 // lowest ground of win or the field, m MSL
	req                    []float64
	ok                     []bool
}

// finish folds the runs of every wind into the field's figure: the
// highest required altitude (it must hold in every wind), none when any
// wind has none.
func (j *fieldJob) finish(fr FieldResult) FieldResult {
	req, ok := math.Inf(-1), true
	for k := range j.req {
		if !j.ok[k] {
			ok = false
			break
		}
		req = math.Max(req, j.req[k])
	}
	if ok {
		fr.RequiredMSL = req
	} else if fr.Note == "" {
		fr.Note = fmt.Sprintf("not reachable from below %.0f m MSL", j.ceiling)
	}
	return fr
}

// prepare sets up the search for the start altitude that would just reach
// a field with the reserve (job is nil when no search is needed) and says
// whether the field lies on the footprint's window (onWindow: finish then
// judges it from the footprint). It needs the window and the sectors, not
// the footprint.
func (jd *judge) prepare(f Field) (fr FieldResult, job *fieldJob, onWindow bool, err error) {
	req, res, l := jd.req, jd.res, jd.l
	fr = FieldResult{Name: f.Name, Lat: f.Lat, Lon: f.Lon, LengthM: f.Length, Surface: f.Surface,
		ArrivalAGLM: math.NaN(), RequiredMSL: math.NaN(), MarginM: math.NaN()}
	s, az, _, err := geodesy.Inverse(geodesy.LatLon{Lat: req.Lat, Lon: req.Lon}, geodesy.LatLon{Lat: f.Lat, Lon: f.Lon})
	if err == nil {
		fr.DistanceM, fr.BearingDeg = s, math.Mod(az+360, 360)
	}
	te, onWindow := PointElevation(l, res.Grid, f.Lat, f.Lon)
	switch {
	case f.HasElevation:
		fr.ElevationM = f.Elevation
	case onWindow:
		fr.ElevationM = te
	default:
		e, ok, err := req.Ground.ElevationAt(f.Lat, f.Lon)
		if err != nil {
			return fr, nil, onWindow, &InputError{Field: "Terrain", Err: err}
		}
		if !ok {
			fr.Note = "off the terrain data: elevation unknown"
			return fr, nil, onWindow, nil
		}
		fr.ElevationM = e
	}
	reserve := req.Setup.Reserve
	if !onWindow {
		fr.Note = "beyond the computed window: out of reach"
	}
	// From a failure state the glide starts at the sector start that
	// claims the field, and what the failure costs before it (the start's
	// altitude less the sector's) is added to the figure.
	fromLat, fromLon, cost, dist := req.Lat, req.Lon, 0.0, fr.DistanceM
	if err != nil {
		dist = math.NaN()
	}
	if res.Sectors != nil {
		sec, ok := SectorFor(l, res.Sectors, f.Lat, f.Lon)
		if !ok {
			if fr.Note == "" {
				fr.Note = "inside the turn after the failure: no straight glide from the failure state reaches it"
			}
			return fr, nil, onWindow, nil
		}
		fromLat, fromLon, cost = sec.Start.Lat, sec.Start.Lon, req.Alt-sec.Start.Alt
		if d, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: fromLat, Lon: fromLon}, geodesy.LatLon{Lat: f.Lat, Lon: f.Lon}); err == nil {
			dist = d
		} else {
			dist = math.NaN()
		}
	}
	ceiling := math.Max(req.Alt, fr.ElevationM+reserve) + 4000
	nw := len(req.Setup.Winds)
	return fr, &fieldJob{ceiling: ceiling, onWindow: onWindow, dist: dist, fromLat: fromLat, fromLon: fromLon, cost: cost,
		target: reach.Target{Name: f.Name, Lat: f.Lat, Lon: f.Lon, Elev: fr.ElevationM, Reserve: reserve},
		req:    make([]float64, nw), ok: make([]bool, nw)}, onWindow, nil
}

// place decides a field beyond any possible reach without a solver run,
// and otherwise chooses the window its searches cover; it returns false
// when no search is needed (the note says why). bounds are the winds'
// range bounds, covering the field's altitudes up to its ceiling.
func (jd *judge) place(fr *FieldResult, j *fieldJob, bounds []*reach.RangeBound) bool {
	// A field farther than any glide from the ceiling can cover in some
	// wind, whatever its tracks (reach.GlideRangeBound of that wind), with
	// 5 % and 2 km to spare for the grid and the local frame, is out of
	// reach in that wind, and so out of reach: its figure must hold in
	// every wind (fieldJob.finish), so the other winds need no run either.
	if !math.IsNaN(j.dist) {
		for _, rb := range bounds {
			if j.dist > 1.05*rb.Bound(j.ceiling, j.target.Elev+j.target.Reserve)+2000 {
				if fr.Note == "" {
					fr.Note = fmt.Sprintf("not reachable from below %.0f m MSL", j.ceiling)
				}
				return false
			}
		}
	}
	// The least start altitude: backward from the field over the whole
	// forward window (RequiredFrom stops as soon as the start's cells are
	// final, so only ground needing less altitude than the start's figure is
	// searched). A box around start and field missed the way around a
	// ridge with open ends and contradicted the forward figures.
	j.win = jd.l
	if !j.onWindow {
		midLat, midLon := (j.fromLat+j.target.Lat)/2, (j.fromLon+j.target.Lon)/2
		w, _, err := jd.req.Ground.Window(midLat, midLon, j.dist/2*1.3+2000)
		if err != nil {
			fr.Note = "required altitude not computed: " + noteOf(err, jd.req.FieldName)
			return false
		}
		j.win = w
	}
	low := jd.lowest
	if j.win != jd.l {
		low = Lowest(j.win)
	}
	j.lo = math.Min(low, j.target.Elev)
	return true
}

// noteOf is err's text for a note: an *InputError names its field as
// name gives it (nil: the request field's own name).
func noteOf(err error, name func(string) string) string {
	var ie *InputError
	if errors.As(err, &ie) && err == error(ie) {
		f := ie.Field
		if name != nil {
			f = name(ie.Field)
		}
		if f == "" {
			return ie.Err.Error()
		}
		return f + ": " + ie.Err.Error()
	}
	return err.Error()
}

// reconcile makes the required altitude r of wind k agree with the forward
// footprint's verdict at the start: a start at or above the required
// altitude reaches the field with the reserve, one below does not. Both
// searches are near-optimal (their paths may bend at different cells), so
// where the backward figure and the forward verdict disagree — the forward
// run reaches the field but r is above the start or missing, or it does
// not but r is at or below the start — the figure is found again by
// bisection on forward runs from the start (reach.RequiredForward, to
// 0.25 m), which is what the verdict rests on. Neither figure is derived
// from the other by subtraction.
func (jd *judge) reconcile(ctx context.Context, k int, target reach.Target, tab reach.LossModel, r float64, rok bool, ceiling float64) (float64, bool, error) {
	req, l := jd.req, jd.l
	a, reached := jd.res.Members[k].ArrivalAtField(target.Lat, target.Lon, target.Elev)
	reachable := reached && a >= target.Elev+target.Reserve
	start := req.Alt
	if reachable == (rok && r <= start) {
		return r, rok, nil
	}
	opts := reach.FootprintOptions{Clearance: req.Setup.Clearance}
	base := math.Max(jd.startElev+1, target.Elev+target.Reserve) // no glide climbs
	find := func(lo, hi float64) (float64, bool, error) {
		lo = math.Max(lo, base)
		if hi < lo {
			return math.NaN(), false, nil
		}
		v, ok, err := reach.RequiredForward(ctx, l, req.Lat, req.Lon, target, tab, opts, lo, hi, 0.25)
		if err == nil && ok && v == lo && lo > base {
			// Reached already at the guessed bottom: search down to base.
			return reach.RequiredForward(ctx, l, req.Lat, req.Lon, target, tab, opts, base, lo, 0.25)
		}
		return v, ok, err
	}
	if reachable {
		// The forward run reaches the field: the figure is at most the start.
		guess := start - 1.1*(a-target.Elev-target.Reserve) - 20
		v, ok, err := find(guess, start)
		if err != nil || !ok {
			return start, true, err // the start itself reaches it
		}
		return math.Min(v, start), true, nil
	}
	// The forward run does not reach it: the figure is above the start.
	short := 50.0
	if reached {
		short = target.Elev + target.Reserve - a
	}
	hi := math.Min(start+1.2*short+20, ceiling)
	v, ok, err := find(start, hi)
	if err == nil && !ok && hi < ceiling {
		v, ok, err = find(hi, ceiling)
	}
	if err != nil || !ok {
		return math.NaN(), false, err
	}
	return math.Max(v, math.Nextafter(start, math.Inf(1))), true, nil
}
