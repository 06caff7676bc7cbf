package reach

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sync"

	"glidereach/terrain"
)

// SectorStart is where the straight glide starts, after an engine
// failure's reaction, speed change and turn, for the tracks TrackDeg ±
// HalfDeg (degrees true) as seen from that start.
type SectorStart struct {
	TrackDeg, HalfDeg float64
	Start             Start
}

// inCone reports whether bearing b (degrees) is within the sector.
func (s SectorStart) inCone(b float64) bool {
	d := math.Mod(b-s.TrackDeg+540, 360) - 180
	return math.Abs(d) <= s.HalfDeg+1e-9
}

// FootprintFromState computes the footprint of an aircraft whose glide
// starts differently for each sector of directions (the shape an engine
// failure's state gives: a field behind costs the turn and the ground the
// aircraft covers before it). One Footprint is run from each sector's
// start; a cell counts for a sector only when its bearing from that
// sector's start lies in the sector's cone, and keeps the best arrival of
// the sectors that claim it. Cells no sector claims (inside the turn, near
// the failure point) are not reached. failure is the failure point (the
// result's Start). Sectors whose start is below the terrain or off the
// window reach nothing.
//
// As in Footprint, a path that bends around terrain pays no turn at the
// bend; the sector's own turn is paid in its start altitude.
func FootprintFromState(ctx context.Context, ground *terrain.Local, failure Start, sectors []SectorStart, model LossModel, opts FootprintOptions) (*FootprintResult, error) {
	if len(sectors) == 0 {
		return nil, errors.New("reach: FootprintFromState needs at least one sector")
	}
	if ground == nil || ground.Cols < 2 || ground.Rows < 2 {
		return nil, errors.New("reach: footprint needs a terrain window of at least 2×2 cells")
	}
	// One descent table range for every sector: the whole window's, so a
	// sector run on a crop gives the values a run on the window would.
	hBot := footprintBottom(lowestGround(ground), opts)
	top := math.Inf(-1)
	for _, s := range sectors {
		top = math.Max(top, s.Start.Alt)
	}
	radius, err := ReachRadius(model, top, hBot)
	if err != nil {
		return nil, err
	}
	members := make([]*FootprintResult, len(sectors))
	offsets := make([][2]int, len(sectors))
	errs := make([]error, len(sectors))
	var wg sync.WaitGroup
	sem := make(chan struct{}, 2)
	for k := range sectors {
		wg.Add(1)
		sem <- struct{}{}
		go func(k int) {
			defer wg.Done()
			defer func() { <-sem }()
			o := opts
			o.Progress = nil
			m, off, err := sectorFootprint(ctx, ground, sectors[k], radius, model, o, hBot)
			if errors.Is(err, ErrStartBelowGround) || errors.Is(err, ErrStartOffGround) {
				return // this sector reaches nothing
			}
			members[k], offsets[k], errs[k] = m, off, err
			if opts.Progress != nil {
				opts.Progress(float64(k+1) / float64(len(sectors)))
			}
		}(k)
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	g := ground
	x, y := g.Frame.Forward(failure.Lat, failure.Lon)
	out := &FootprintResult{Ground: g, Start: failure, Reserve: opts.Reserve,
		StartX: (x - g.X0) / g.Cell, StartY: (y - g.Y0) / g.Cell, sectors: sectors, sectorMembers: members, sectorOffsets: offsets}
	out.Arrival = make([]float32, len(g.Elev))
	nan := float32(math.NaN())
	for i := range out.Arrival {
		out.Arrival[i] = nan
	}
	for k, m := range members {
		if m == nil {
			continue
		}
		s := sectors[k]
		c0, r0 := offsets[k][0], offsets[k][1]
		mg := m.Ground
		for r := 0; r < mg.Rows; r++ {
			for c := 0; c < mg.Cols; c++ {
				a := m.Arrival[r*mg.Cols+c]
				if a != a {
					continue
				}
				dx, dy := float64(c)-m.StartX, float64(r)-m.StartY
				if dx == 0 && dy == 0 || !s.inCone(math.Atan2(dx, dy)*180/math.Pi) {
					continue
				}
				i := (r0+r)*g.Cols + c0 + c
				if cur := out.Arrival[i]; cur != cur || a > cur {
					out.Arrival[i] = a
				}
			}
		}
	}
	return out, nil
}

// coneBoxPad is the widening of a sector's box beyond its cone, as a
// fraction of the longest straight glide (plus two cells): room for the
// glides that bend around terrain near the cone's edges. With it the demo's
// failure-state footprint is cell for cell the one of whole-window runs
// (checked when it was chosen; TestFootprintFromStateCropIsConservative
// checks the synthetic landscape).
const coneBoxPad = 0.05

// sectorFootprint runs the footprint of sector s on the part of ground its
// cone can hold: the bounding box of the cone's apex (the sector's start)
// and its arc at radius (m, the longest straight glide of the table),
// widened by coneBoxPad, when the cone is convex (HalfDeg < 90); the whole
// window otherwise. A cone narrower than a half-plane is convex, so every
// straight glide from its apex to a cell in it stays over the box; a glide
// that bends around terrain and leaves the box is not searched, so the crop
// can only lower an arrival, never raise it (never optimistic). It costs a
// sector about the box's share of the window instead of the whole window
// (a quarter of the CPU time on BenchmarkFootprintFromState). off is the
// crop's first column and row in ground; hBot is the window's table bottom.
func sectorFootprint(ctx context.Context, ground *terrain.Local, s SectorStart, radius float64, model LossModel, opts FootprintOptions, hBot float64) (m *FootprintResult, off [2]int, err error) {
	x, y := ground.Frame.Forward(s.Start.Lat, s.Start.Lon)
	sx, sy := (x-ground.X0)/ground.Cell, (y-ground.Y0)/ground.Cell
	if sx < 0 || sy < 0 || sx > float64(ground.Cols-1) || sy > float64(ground.Rows-1) {
		return nil, off, ErrStartOffGround
	}
	crop := ground
	if s.HalfDeg < 90 {
		c0, r0, c1, r1 := coneBox(sx, sy, s.TrackDeg, s.HalfDeg, radius/ground.Cell, 2+int(coneBoxPad*radius/ground.Cell))
		c0, r0 = max(c0, 0), max(r0, 0)
		c1, r1 = min(c1, ground.Cols-1), min(r1, ground.Rows-1)
		if c1-c0 >= 1 && r1-r0 >= 1 && (c1-c0+1)*(r1-r0+1) < ground.Cols*ground.Rows {
			crop = ground.CropCells(c0, r0, c1, r1)
			off = [2]int{c0, r0}
		}
	}
	te, ok := ground.Sample(x, y)
	if !ok {
		return nil, off, ErrStartOffGround
	}
	if s.Start.Alt <= te {
		return nil, off, fmt.Errorf("%w (terrain %.0f m, start %.0f m MSL)", ErrStartBelowGround, te, s.Start.Alt)
	}
	m, err = footprintOn(ctx, crop, s.Start, sx-float64(off[0]), sy-float64(off[1]), model, opts, hBot)
	return m, off, err
}

// coneBox returns the cell bounding box (inclusive) of the cone with apex
// (sx, sy) (cell units, rows increasing north), centre bearing trackDeg
// and half-angle halfDeg (< 90, degrees true) out to radius r (cells),
// widened by pad cells: the apex, the two edge points of the arc, and the
// arc's extreme points at the cardinal bearings the cone holds.
func coneBox(sx, sy, trackDeg, halfDeg, r float64, pad int) (c0, r0, c1, r1 int) {
	minX, maxX, minY, maxY := sx, sx, sy, sy
	add := func(b float64) {
		px, py := sx+r*math.Sin(b*math.Pi/180), sy+r*math.Cos(b*math.Pi/180)
		minX, maxX = math.Min(minX, px), math.Max(maxX, px)
		minY, maxY = math.Min(minY, py), math.Max(maxY, py)
	}
	add(trackDeg - halfDeg)
	add(trackDeg + halfDeg)
	for b := 0.0; b < 360; b += 90 {
		if d := math.Mod(b-trackDeg+540, 360) - 180; math.Abs(d) <= halfDeg {
			add(b)
		}
	}
	return int(math.Floor(minX)) - pad, int(math.Floor(minY)) - pad, int(math.Ceil(maxX)) + pad, int(math.Ceil(maxY)) + pad
}

// sectorArrivalAt is ArrivalAtField for a FootprintFromState result: the
// best of the sectors whose cone holds the point, with the landing
// elevation elev (m MSL) for the terrain floor.
func (f *FootprintResult) sectorArrivalAt(lat, lon, elev float64) (float64, bool) {
	best, ok := math.Inf(-1), false
	x, y := f.Ground.Frame.Forward(lat, lon)
	for k, m := range f.sectorMembers {
		if m == nil {
			continue
		}
		sx, sy := f.Ground.Frame.Forward(f.sectors[k].Start.Lat, f.sectors[k].Start.Lon)
		if !f.sectors[k].inCone(math.Atan2(x-sx, y-sy) * 180 / math.Pi) {
			continue
		}
		if a, aok := m.ArrivalAtField(lat, lon, elev); aok && a > best {
			best, ok = a, true
		}
	}
	if !ok {
		return math.NaN(), false
	}
	return best, true
}

// sectorPath is Path for a FootprintFromState result: the path of the
// sector that gives the cell its arrival.
func (f *FootprintResult) sectorPath(c, r int) ([][2]float64, bool) {
	want := f.Arrival[r*f.Ground.Cols+c]
	if want != want {
		return nil, false
	}
	for k, m := range f.sectorMembers {
		if m == nil {
			continue
		}
		mc, mr := c-f.sectorOffsets[k][0], r-f.sectorOffsets[k][1]
		if mc < 0 || mr < 0 || mc >= m.Ground.Cols || mr >= m.Ground.Rows {
			continue
		}
		if m.Arrival[mr*m.Ground.Cols+mc] == want {
			return m.Path(mc, mr)
		}
	}
	return nil, false
}

// SectorStarts returns the sector starts of a FootprintFromState result
// (nil for any other).
func (f *FootprintResult) SectorStarts() []SectorStart { return f.sectors }
