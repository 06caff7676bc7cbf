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

// coneBoxPad is the widening of a sector's cone (and of its box), as a
// fraction of the longest straight glide (plus two cells): room for the
// glides that bend around terrain near the cone's edges. With it the demo's
// failure-state footprint is cell for cell the one of whole-window runs
// (checked when it was chosen, and again when the runs were confined to
// the widened cone; TestFootprintFromStateCropIsConservative checks the
// synthetic landscape: never higher, at least 99.9 % of the cells equal).
const coneBoxPad = 0.05

// sectorFootprint runs the footprint of sector s on the part of ground its
// cone can hold, when the cone is convex (HalfDeg < 90; the whole window
// otherwise): the cone widened by coneBoxPad (coneRegion), on the crop to
// the bounding box of the cone's apex (the sector's start) and its arc at
// radius (m, the longest straight glide of the table), widened alike. A
// cone narrower than a half-plane is convex, so every straight glide from
// its apex to a cell in it stays in the cone; a glide that bends around
// terrain and leaves the widened cone is not searched, so the confinement
// can only lower an arrival, never raise it (never optimistic). It costs a
// sector about the widened cone's share of the window instead of the whole
// window: the box alone took the CPU time of BenchmarkFootprintFromState to
// a quarter of the whole window's, the cone within it took the demo's
// sector runs from 1.5 to 0.7 cpu-s. off is the crop's first column and row
// in ground; hBot is the window's table bottom.
func sectorFootprint(ctx context.Context, ground *terrain.Local, s SectorStart, radius float64, model LossModel, opts FootprintOptions, hBot float64) (m *FootprintResult, off [2]int, err error) {
	x, y := ground.Frame.Forward(s.Start.Lat, s.Start.Lon)
	sx, sy := (x-ground.X0)/ground.Cell, (y-ground.Y0)/ground.Cell
	if sx < 0 || sy < 0 || sx > float64(ground.Cols-1) || sy > float64(ground.Rows-1) {
		return nil, off, ErrStartOffGround
	}
	crop := ground
	var region *coneRegion
	if s.HalfDeg < 90 {
		pad := 2 + int(coneBoxPad*radius/ground.Cell)
		c0, r0, c1, r1 := coneBox(sx, sy, s.TrackDeg, s.HalfDeg, radius/ground.Cell, pad)
		c0, r0 = max(c0, 0), max(r0, 0)
		c1, r1 = min(c1, ground.Cols-1), min(r1, ground.Rows-1)
		if c1-c0 >= 1 && r1-r0 >= 1 && (c1-c0+1)*(r1-r0+1) < ground.Cols*ground.Rows {
			crop = ground.CropCells(c0, r0, c1, r1)
			off = [2]int{c0, r0}
		}
		region = newConeRegion(sx-float64(off[0]), sy-float64(off[1]), s.TrackDeg, s.HalfDeg, float64(pad))
	}
	te, ok := ground.Sample(x, y)
	if !ok {
		return nil, off, ErrStartOffGround
	}
	if s.Start.Alt <= te {
		return nil, off, fmt.Errorf("%w (terrain %.0f m, start %.0f m MSL)", ErrStartBelowGround, te, s.Start.Alt)
	}
	m, err = footprintOn(ctx, crop, s.Start, sx-float64(off[0]), sy-float64(off[1]), model, opts, hBot, region)
	return m, off, err
}

// coneRegion is a sector's cone widened by pad cells: the points within
// pad of the cone with apex (ax, ay) (cell units, rows increasing north),
// centre bearing TrackDeg and half-angle HalfDeg < 90 (a convex cone, the
// intersection of the two half-planes its edges bound). A sector's run is
// confined to it (footprintOn's region): its straight glides stay in the
// cone, and the pad leaves room for the glides that bend around terrain
// near the edges, as the box's pad does; cells farther out would only be
// searched to be thrown away, since the sector claims only its cone.
type coneRegion struct {
	ax, ay   float64
	e1x, e1y float64 // unit vectors along the cone's edges
	e2x, e2y float64
	n1x, n1y float64 // inward normals of the edges
	n2x, n2y float64
	pad2     float64 // pad², cells²
}

// newConeRegion returns the cone of apex (ax, ay), centre bearing trackDeg
// and half-angle halfDeg (< 90, degrees) widened by pad cells.
func newConeRegion(ax, ay, trackDeg, halfDeg, pad float64) *coneRegion {
	b1, b2 := (trackDeg-halfDeg)*math.Pi/180, (trackDeg+halfDeg)*math.Pi/180
	g := &coneRegion{ax: ax, ay: ay, pad2: pad * pad}
	// A bearing b points along (sin b, cos b). The inward normal of the
	// edge at trackDeg−halfDeg turns it clockwise by 90° (towards larger
	// bearings), that of the other edge counter-clockwise.
	g.e1x, g.e1y = math.Sin(b1), math.Cos(b1)
	g.e2x, g.e2y = math.Sin(b2), math.Cos(b2)
	g.n1x, g.n1y = g.e1y, -g.e1x
	g.n2x, g.n2y = -g.e2y, g.e2x
	return g
}

// holds reports whether cell (c, r) lies within pad of the cone.
func (g *coneRegion) holds(c, r int) bool {
	dx, dy := float64(c)-g.ax, float64(r)-g.ay
	d1, d2 := dx*g.n1x+dy*g.n1y, dx*g.n2x+dy*g.n2y
	if d1 >= 0 && d2 >= 0 {
		return true // in the cone
	}
	// The distance to the cone is the distance to the nearer edge ray.
	p2 := dx*dx + dy*dy
	return rayDist2(dx, dy, p2, g.e1x, g.e1y) <= g.pad2 || rayDist2(dx, dy, p2, g.e2x, g.e2y) <= g.pad2
}

// rayDist2 is the squared distance from (dx, dy) (p2 = dx²+dy²) to the ray
// from the origin along the unit vector (ex, ey).
func rayDist2(dx, dy, p2, ex, ey float64) float64 {
	t := dx*ex + dy*ey
	if t <= 0 {
		return p2
	}
	return math.Max(0, p2-t*t)
}

// exclude marks every cell of p's window outside g like a void. The cells
// outside form the two ends of each row (g is convex), so each row is
// scanned in from both ends to the first cell g holds.
func (g *coneRegion) exclude(p *propagation) {
	for r := 0; r < p.rows; r++ {
		row := p.c[r*p.cols : (r+1)*p.cols]
		lo := 0
		for ; lo < p.cols && !g.holds(lo, r); lo++ {
			row[lo].set(0, cellVoid)
		}
		for hi := p.cols - 1; hi > lo && !g.holds(hi, r); hi-- {
			row[hi].set(0, cellVoid)
		}
	}
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
