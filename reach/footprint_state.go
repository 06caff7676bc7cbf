package reach

import (
	"context"
	"errors"
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
	members := make([]*FootprintResult, len(sectors))
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
			m, err := Footprint(ctx, ground, sectors[k].Start, model, o)
			if errors.Is(err, ErrStartBelowGround) || errors.Is(err, ErrStartOffGround) {
				return // this sector reaches nothing
			}
			members[k], errs[k] = m, err
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
		StartX: (x - g.X0) / g.Cell, StartY: (y - g.Y0) / g.Cell, sectors: sectors, sectorMembers: members}
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
		for r := 0; r < g.Rows; r++ {
			for c := 0; c < g.Cols; c++ {
				i := r*g.Cols + c
				a := m.Arrival[i]
				if a != a {
					continue
				}
				dx, dy := float64(c)-m.StartX, float64(r)-m.StartY
				if dx == 0 && dy == 0 || !s.inCone(math.Atan2(dx, dy)*180/math.Pi) {
					continue
				}
				if cur := out.Arrival[i]; cur != cur || a > cur {
					out.Arrival[i] = a
				}
			}
		}
	}
	return out, nil
}

// sectorArrivalAt is ArrivalAt for a FootprintFromState result: the best
// of the sectors whose cone holds the point.
func (f *FootprintResult) sectorArrivalAt(lat, lon float64) (float64, bool) {
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
		if a, aok := m.ArrivalAt(lat, lon); aok && a > best {
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
	i := r*f.Ground.Cols + c
	want := f.Arrival[i]
	if want != want {
		return nil, false
	}
	for _, m := range f.sectorMembers {
		if m != nil && m.Arrival[i] == want {
			return m.Path(c, r)
		}
	}
	return nil, false
}

// SectorStarts returns the sector starts of a FootprintFromState result
// (nil for any other).
func (f *FootprintResult) SectorStarts() []SectorStart { return f.sectors }
