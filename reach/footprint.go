package reach

import (
	"context"
	"errors"
	"fmt"
	"math"

	"glidereach/terrain"
)

// Footprint options. The command line fills them from its flags; a library
// caller sets every field it needs (the zero value is no reserve, no
// clearance).
type FootprintOptions struct {
	// Reserve is the height above the ground (m) the aircraft must still
	// have on arrival for a cell to count as reachable: the height for a
	// circuit and landing. The footprint ring is drawn at this level.
	Reserve float64
	// Clearance is the least height above the terrain (m) the glide keeps
	// on the way; cells below it can be end points but are not flown over.
	// The last part of a glide may be below it only over ground no higher
	// than the cell (or field) it ends at: the floor is terrain +
	// min(Clearance, altitude − landing elevation), as in FinalGlide and
	// Required, so a Reserve below the Clearance is reached on a straight
	// glide.
	Clearance float64
	// Levels are further arrival heights above the ground (m) to contour.
	Levels []float64
	// Progress, if not nil, is called now and then with the share of the
	// window done (0..1, an estimate).
	Progress func(done float64)
}

// Start is where the glide begins: position in degrees, altitude in m MSL.
type Start struct {
	Lat, Lon float64
	Alt      float64
}

// FootprintResult is the outcome of a forward reach computation.
type FootprintResult struct {
	Ground *terrain.Local // the window the solver worked on
	Start  Start
	// Arrival holds the best arrival altitude (m MSL) at each cell of
	// Ground, NaN where no glide reaches. Values below the ground are kept
	// next to the reachable region so contours are placed between cells.
	Arrival []float32
	prop    *propagation
	Reserve float64
	// StartX, StartY are the start in cell units of Ground.
	StartX, StartY float64
	// members are the footprints an Intersect combined (nil otherwise).
	members []*FootprintResult
	// sectors and sectorMembers are the sector starts and their
	// footprints of a FootprintFromState result (nil otherwise).
	sectors       []SectorStart
	sectorMembers []*FootprintResult
	sectorOffsets [][2]int // first column and row of each member's window in Ground
}

// ErrStartBelowGround is returned when the start altitude is not above the
// terrain at the start.
var ErrStartBelowGround = errors.New("reach: the start altitude is not above the terrain there")

// ErrStartOffGround is returned when the start is outside the terrain
// window or on a void.
var ErrStartOffGround = errors.New("reach: the start lies off the terrain or on a void (unknown ground)")

// newDescentFor tabulates model between hBot and hTop with the solver's
// standard resolution: 10 m altitude rows (or finer for shallow ranges) and
// 360 track directions.
func newDescentFor(model LossModel, hBot, hTop float64) (*descent, error) {
	dh := 10.0
	if span := hTop - hBot; span < 200 {
		dh = math.Max(span/20, 0.5)
	}
	if t, ok := model.(*Table); ok {
		return descentCache.get(t, hBot, hTop, func() (*descent, error) { return newDescent(model, hBot, hTop, dh, 360) })
	}
	return newDescent(model, hBot, hTop, dh, 360)
}

// bucketWidth is the width (m) of the propagation's queue buckets: half the
// least height lost over one cell, so that a cell is rarely re-opened.
func bucketWidth(cell float64, d *descent) float64 {
	if d.maxRatio <= 0 {
		return 1
	}
	return math.Max(cell/d.maxRatio/2, 0.005)
}

// ReachRadius returns the longest straight-line ground distance (m) over all
// tracks that a glide from altitude top covers before descending to bottom
// (both m MSL): the radius of the window a footprint computation needs.
func ReachRadius(model LossModel, top, bottom float64) (float64, error) {
	if !(top > bottom) {
		return 0, nil
	}
	d, err := newDescentFor(model, bottom, top)
	if err != nil {
		return 0, err
	}
	r := 0.0
	for k := 0; k < d.nDir; k++ {
		r = math.Max(r, d.column(k).at(0))
	}
	return r, nil
}

// Footprint computes the best arrival altitude at every cell of ground from
// start, with the height lost per metre over the ground given by model. The
// glide keeps opts.Clearance above the terrain on the way; cells are
// searched highest arrival first along any-angle paths (straight from the
// start until the terrain forces a bend).
func Footprint(ctx context.Context, ground *terrain.Local, start Start, model LossModel, opts FootprintOptions) (*FootprintResult, error) {
	if ground == nil || ground.Cols < 2 || ground.Rows < 2 {
		return nil, errors.New("reach: footprint needs a terrain window of at least 2×2 cells")
	}
	x, y := ground.Frame.Forward(start.Lat, start.Lon)
	sx, sy := (x-ground.X0)/ground.Cell, (y-ground.Y0)/ground.Cell
	if sx < 0 || sy < 0 || sx > float64(ground.Cols-1) || sy > float64(ground.Rows-1) {
		return nil, ErrStartOffGround
	}
	te, ok := ground.Sample(x, y)
	if !ok {
		return nil, ErrStartOffGround
	}
	if start.Alt <= te {
		return nil, fmt.Errorf("%w (terrain %.0f m, start %.0f m MSL)", ErrStartBelowGround, te, start.Alt)
	}
	return footprintOn(ctx, ground, start, sx, sy, model, opts, footprintBottom(lowestGround(ground), opts))
}

// lowestGround returns the lowest elevation (m MSL) of l, +Inf when l is
// all voids.
func lowestGround(l *terrain.Local) float64 {
	lo := math.Inf(1)
	for _, e := range l.Elev {
		if e == e && float64(e) < lo {
			lo = float64(e)
		}
	}
	return lo
}

// footprintBottom returns the lowest altitude (m MSL) a footprint's descent
// table covers over ground whose lowest point is lo: 200 m below the
// lowest level asked for there, so contours at that level can be
// interpolated between cells.
func footprintBottom(lo float64, opts FootprintOptions) float64 {
	return lo + minFootprintLevel(opts) - 200
}

// minFootprintLevel is the lowest height above ground (m) a footprint keeps
// values for: the reserve, the lowest extra level, and 0.
func minFootprintLevel(opts FootprintOptions) float64 {
	minLevel := opts.Reserve
	for _, l := range opts.Levels {
		minLevel = math.Min(minLevel, l)
	}
	return math.Min(minLevel, 0)
}

// footprintOn is Footprint from start at (sx, sy) (cell units of ground)
// with the descent table tabulated down to hBot (m MSL); a footprint on a
// crop of a larger window passes the larger window's hBot so its table,
// and so its values, are the larger window's.
func footprintOn(ctx context.Context, ground *terrain.Local, start Start, sx, sy float64, model LossModel, opts FootprintOptions, hBot float64) (*FootprintResult, error) {
	if ground.Cols*ground.Rows > maxPropagationCells {
		return nil, errWindowTooLarge
	}
	minLevel := minFootprintLevel(opts)
	d, err := newDescentFor(model, hBot, start.Alt+1)
	if err != nil {
		return nil, err
	}
	p := newPropagation(ground, d, false, scratchOf(ctx))
	p.clearance = float32(opts.Clearance)
	p.endLevel = float32(minLevel)
	p.srcs = []source{{X: sx, Y: sy, Alt: start.Alt}}
	p.initQueue(hBot-1, start.Alt+2, bucketWidth(ground.Cell, d))
	p.seed(0)
	var prog func(int)
	if opts.Progress != nil {
		n := float64(len(p.c))
		prog = func(c int) { opts.Progress(math.Min(1, float64(c)/n)) }
	}
	if err := p.run(ctx, prog); err != nil {
		return nil, err
	}
	return &FootprintResult{Ground: ground, Start: start, Arrival: p.val, prop: p, Reserve: opts.Reserve, StartX: sx, StartY: sy}, nil
}

// AGL returns the arrival height above the ground at cell (c, r), NaN where
// no glide arrives or the ground is a void.
func (f *FootprintResult) AGL(c, r int) float64 {
	i := r*f.Ground.Cols + c
	return float64(f.Arrival[i]) - float64(f.Ground.Elev[i])
}

// ArrivalAt returns the best arrival altitude (m MSL) at a point (degrees):
// the best straight final segment from the line-of-sight parents of the
// cells around the point, so it is exact along the solver's own paths. ok is
// false when no glide reaches there. The landing elevation for the terrain
// floor is the ground's own value at the point; ArrivalAtField takes it.
func (f *FootprintResult) ArrivalAt(lat, lon float64) (alt float64, ok bool) {
	x, y := f.Ground.Frame.Forward(lat, lon)
	e, ok := f.Ground.Sample(x, y)
	if !ok {
		e = math.Inf(-1) // unknown ground: no part of the glide below the clearance counts
	}
	return f.ArrivalAtField(lat, lon, e)
}

// ArrivalAtField is ArrivalAt for a landing point of elevation elev (m
// MSL): a path whose glide is below the clearance somewhere (the last part
// of a glide to a reserve under the clearance) counts only where the
// ground beneath those points is no higher than elev (the terrain floor of
// DEVELOPERS.md "Reserve and clearance").
func (f *FootprintResult) ArrivalAtField(lat, lon, elev float64) (alt float64, ok bool) {
	if f.members != nil {
		low := math.Inf(1)
		for _, m := range f.members {
			a, ok := m.ArrivalAtField(lat, lon, elev)
			if !ok {
				return math.NaN(), false
			}
			low = math.Min(low, a)
		}
		return low, true
	}
	if f.sectorMembers != nil {
		return f.sectorArrivalAt(lat, lon, elev)
	}
	x, y := f.Ground.Frame.Forward(lat, lon)
	gx, gy := (x-f.Ground.X0)/f.Ground.Cell, (y-f.Ground.Y0)/f.Ground.Cell
	return f.arrivalAtCellXY(gx, gy, float32(elev))
}

// arrivalAtCellXY is ArrivalAtField at the point (gx, gy) (cell units of
// the window) with landing elevation elev (m MSL): the best arrival over the
// final segments to the point from the four cells around it and from their
// line-of-sight parents. Each segment is walked square by square (sightTo,
// the solver's exact line-of-sight test) under the floor of an end value:
// terrain + clearance, except over ground no higher than elev, where the
// glide may be lower (DEVELOPERS.md "Reserve and clearance"); the path before
// the segment's start must pass no ground above elev below the clearance
// (top). A segment from the start itself that stays within one cell of it in
// both axes is not walked, as the solver's seed is not: the aircraft is
// there. A parent's line reaches the cell beside the point, not the point:
// it lies within about a cell of a line that was walked but is not that
// line, so it was wrong to take it unwalked (a feature one cell thick can
// lie between the two; TestArrivalAtFieldWalksFinalSegment).
func (f *FootprintResult) arrivalAtCellXY(gx, gy float64, elev float32) (float64, bool) {
	p := f.prop
	best := math.Inf(-1)
	c0, r0 := int(math.Floor(gx)), int(math.Floor(gy))
	var seen [8]int32
	nSeen := 0
	for r := r0; r <= r0+1; r++ {
		for c := c0; c <= c0+1; c++ {
			if c < 0 || r < 0 || c >= p.cols || r >= p.rows {
				continue
			}
			q := r*p.cols + c
			if st := p.c[q].st(); st == cellUntouched || st == cellVoid {
				continue
			}
			// Through the cell itself, and straight from its parent.
			for _, pi := range [2]int32{int32(q), p.c[q].par()} {
				dup := false
				for _, s := range seen[:nSeen] {
					dup = dup || s == pi
				}
				if dup {
					continue
				}
				seen[nSeen] = pi
				nSeen++
				top := noTop
				if pi >= 0 {
					top = p.c[pi].top()
				}
				if top > elev {
					continue
				}
				px, py, pv := p.parentPos(pi)
				dx, dy := gx-px, gy-py
				L := math.Hypot(dx, dy) * p.cell
				v := pv
				if L > 0 {
					v = p.desc.arrive(pv, math.Atan2(dx, dy), L)
				}
				if !(v > best) {
					continue
				}
				if pi < 0 && math.Abs(dx) <= 1 && math.Abs(dy) <= 1 {
					best = v // beside the start: not walked (seed)
					continue
				}
				if _, ok := p.sightTo(px, py, pv, gx, gy, v, elev, top, false); ok {
					best = v
				}
			}
		}
	}
	if math.IsInf(best, -1) {
		return math.NaN(), false
	}
	return best, true
}

// Path returns the bend points (frame metres) of the best glide from the
// start to cell (c, r), start first, and false when no glide reaches it.
//
// For an Intersect of several footprints it is the path of the first.
func (f *FootprintResult) Path(c, r int) ([][2]float64, bool) {
	if f.members != nil {
		return f.members[0].Path(c, r)
	}
	if f.sectorMembers != nil {
		return f.sectorPath(c, r)
	}
	p := f.prop
	q := r*p.cols + c
	if st := p.c[q].st(); st == cellUntouched || st == cellVoid {
		return nil, false
	}
	var pts [][2]float64
	g := f.Ground
	x, y := g.XY(c, r)
	pts = append(pts, [2]float64{x, y})
	pi := p.c[q].par()
	for n := 0; pi >= 0 && n < len(p.c); n++ {
		x, y := g.XY(int(pi)%p.cols, int(pi)/p.cols)
		pts = append(pts, [2]float64{x, y})
		pi = p.c[pi].par()
	}
	pts = append(pts, [2]float64{g.X0 + f.StartX*g.Cell, g.Y0 + f.StartY*g.Cell})
	for i, j := 0, len(pts)-1; i < j; i, j = i+1, j-1 {
		pts[i], pts[j] = pts[j], pts[i]
	}
	return pts, true
}
