package plan

import (
	"errors"
	"fmt"
	"math"

	"glidereach/reach"
	"glidereach/reach/tiling"
	"glidereach/terrain"
)

// TiledCeilingMargin (m) is how far above the highest altitude flown the
// least altitudes of a tiled coverage run are searched (as on one grid).
const TiledCeilingMargin = 300.0

// TiledFlatCell is the solver cell (m) of a tiled run on flat ground, where
// no DEM gives a resolution.
const TiledFlatCell = 30.0

// TiledRequest asks for the plan of a tiled coverage run (reach/tiling):
// the zone's box, the altitude flown, the solver cell and the fields.
type TiledRequest struct {
	Setup  *Setup
	Ground Ground
	// West, South, East, North bound the zone (degrees); ZoneName ("area",
	// "box", "corridor") names it in messages.
	West, South, East, North float64
	ZoneName                 string
	// Alt is the altitude flown, m MSL, or m above the terrain at each
	// cell when AGL.
	Alt float64
	AGL bool
	// Cell is the solver cell (m) asked for; 0 takes the DEM's resolution.
	// It may not be finer than the DEM's; a coarser one is noted.
	Cell float64
	Tile int
	// Fields and Candidates with Elev NaN take the ground's elevation at
	// their point (NaN again on unknown ground or off the data).
	Fields, Candidates []reach.Target
	// Notes go into the plan before the ones PlanTiled adds.
	Notes []string
}

// TiledPlan is the outcome of PlanTiled.
type TiledPlan struct {
	Plan *tiling.Plan
	// DEMCell is the DEM's resolution (m; TiledFlatCell on flat ground).
	DEMCell float64
	// Top is the highest altitude flown (m MSL): Alt, or the highest ground
	// of the zone's lattice plus Alt for AGL.
	Top float64
}

// PlanTiled turns a request into the plan of a tiled coverage run: the
// DEM's lattice over the zone at the solver cell, the ceiling
// (TiledCeilingMargin above the highest altitude flown, at most 19 500 m),
// the fields' elevations, and one loss model per wind of the setup from
// 1000 m below the lowest ground and field (windows reach beyond the zone;
// below a table its lowest row is used) to above the ceiling. The plan is
// checked (tiling.Plan.Check). Bad requests give an *InputError naming
// "Cell", "Zone", "Alt", "Terrain" or "Aircraft".
func PlanTiled(req TiledRequest) (*TiledPlan, error) {
	src := req.Ground.Src
	out := &TiledPlan{DEMCell: TiledFlatCell}
	if src != nil {
		if out.DEMCell = src.Resolution(); !(out.DEMCell > 0) {
			out.DEMCell = TiledFlatCell
		}
	}
	notes := append([]string(nil), req.Notes...)
	cell := out.DEMCell
	if req.Cell > 0 {
		if src != nil && req.Cell < out.DEMCell*0.999 {
			return nil, inputf("Cell", "%.1f m is finer than the DEM's %.1f m: the solver works at the DEM's resolution or coarser", req.Cell, out.DEMCell)
		}
		cell = req.Cell
		if src != nil && cell > out.DEMCell*1.001 {
			notes = append(notes, fmt.Sprintf("solver cell %.1f m as asked (--cell), coarser than the DEM's %.1f m: terrain detail between cells is taken as the highest DEM sample of each cell", cell, out.DEMCell))
		}
	}
	lat, err := tiling.LatticeFor(src, req.West, req.South, req.East, req.North, cell)
	if err != nil {
		return nil, &InputError{Field: "Zone", Err: err}
	}
	if int64(lat.Cols)*int64(lat.Rows) > 4e9 {
		return nil, inputf("Zone", "the %s holds %d × %d cells of the DEM's lattice, more than 4×10⁹", req.ZoneName, lat.Cols, lat.Rows)
	}
	lo, hi := req.Ground.Flat, req.Ground.Flat
	if src != nil {
		if lo, hi, err = GroundRange(src, lat); err != nil {
			return nil, &InputError{Field: "Terrain", Err: err}
		}
		if math.IsInf(hi, -1) {
			return nil, inputf("Terrain", "the terrain over the %s is all voids", req.ZoneName)
		}
	}
	out.Top = req.Alt
	if req.AGL {
		out.Top = hi + req.Alt
	} else if lo >= out.Top {
		return nil, inputf("Alt", "%.0f m MSL is not above the lowest ground of the %s (%.0f m)", out.Top, req.ZoneName, lo)
	}
	ceiling := math.Min(out.Top+TiledCeilingMargin, 19500)
	elevations := func(ts []reach.Target) ([]reach.Target, error) {
		out := make([]reach.Target, len(ts))
		for i, t := range ts {
			if math.IsNaN(t.Elev) {
				e, ok, err := req.Ground.ElevationAt(t.Lat, t.Lon)
				if err != nil {
					return nil, &InputError{Field: "Terrain", Err: err}
				}
				if t.Elev = e; !ok {
					t.Elev = math.NaN()
				}
			}
			if !math.IsNaN(t.Elev) {
				lo = math.Min(lo, t.Elev)
			}
			out[i] = t
		}
		return out, nil
	}
	fields, err := elevations(req.Fields)
	if err != nil {
		return nil, err
	}
	cands, err := elevations(req.Candidates)
	if err != nil {
		return nil, err
	}
	tabLo := math.Max(-500, lo-1000)
	var models []tiling.LossGrid
	for _, w := range req.Setup.Winds {
		tab, err := req.Setup.TableFor(w, tabLo, ceiling+60)
		if err != nil {
			return nil, &InputError{Field: "Aircraft", Err: err}
		}
		hMin, hMax := tab.Range()
		lg, err := tiling.SampleLoss(tab, hMin, hMax)
		if err != nil {
			return nil, err
		}
		models = append(models, lg)
	}
	p := &tiling.Plan{Lattice: lat, Tile: req.Tile, Fields: fields, Candidates: cands, Models: models,
		Clearance: req.Setup.Clearance, Alt: req.Alt, AGL: req.AGL, Ceiling: ceiling, Cell: cell,
		Flat: req.Ground.Flat, Notes: notes}
	if err := p.Check(); err != nil {
		return nil, err
	}
	out.Plan = p
	return out, nil
}

// GroundRange returns the lowest and highest DEM samples (m) over the
// lattice (+Inf, −Inf when all are voids or off the data), read one window
// of 1024 × 1024 lattice cells at a time, so the memory is one window's.
func GroundRange(src terrain.Source, lat tiling.Lattice) (lo, hi float64, err error) {
	lo, hi = math.Inf(1), math.Inf(-1)
	p0 := &tiling.Plan{Lattice: lat, Tile: 1024}
	g := lat.Grid()
	for _, id := range p0.Tiles() {
		c0, r0, cols, rows := p0.TileBox(id)
		la0, lo0, err := g.FromCRS(g.X0+float64(c0)*g.DX, g.Y0-float64(r0)*g.DY)
		if err != nil {
			return 0, 0, err
		}
		la1, lo1, err := g.FromCRS(g.X0+float64(c0+cols-1)*g.DX, g.Y0-float64(r0+rows-1)*g.DY)
		if err != nil {
			return 0, 0, err
		}
		dem, err := src.Window(math.Min(lo0, lo1), math.Min(la0, la1), math.Max(lo0, lo1), math.Max(la0, la1))
		if errors.Is(err, terrain.ErrOutside) {
			continue // a window off the DEM: unknown ground
		}
		if err != nil {
			return 0, 0, err
		}
		if a, z, ok := dem.ElevationRange(); ok {
			lo, hi = math.Min(lo, a), math.Max(hi, z)
		}
	}
	return lo, hi, nil
}
