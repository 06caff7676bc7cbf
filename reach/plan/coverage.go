package plan

import (
	"context"
	"errors"
	"math"

	"github.com/paulmach/orb"

	"glidereach/reach"
	"glidereach/terrain"
)

// Zone is the area a coverage is computed for: a region or a corridor. A
// Zone may also have a method BoundaryClear(minLat, minLon, maxLat, maxLon
// float64) bool, true when the lat/lon box certainly holds none of its
// boundary (input.Region has one); the zone mask then tests one cell per
// such block of cells.
type Zone interface {
	// Contains reports whether the point (degrees) lies in the zone; it is
	// false outside Bounds.
	Contains(lat, lon float64) bool
	// Bounds is the zone's lon/lat box.
	Bounds() orb.Bound
}

// CoverageMargin is how far above the highest altitude flown the least
// altitudes of a coverage are computed (m).
const CoverageMargin = 300.0

// CoverageRequest asks how much of a zone has a landing field in reach
// from the altitude flown there, and which candidate fields would add most.
type CoverageRequest struct {
	Setup  *Setup
	Ground Ground
	Zone   Zone
	// ZoneField names the request field the zone came from in errors and
	// messages ("Area", "Box", "Corridor"; "" is taken as "Area").
	ZoneField string
	// Alt is the altitude flown (m MSL, true) or, with AGL, the height
	// flown above the terrain at each cell (m, > 0).
	Alt float64
	AGL bool
	// Fields are the existing fields; Candidates are ranked by the area
	// each would add, and Pick of them (0..100) chosen one by one, each
	// adding most to what is covered.
	Fields, Candidates []Field
	Pick               int
	// Progress, if not nil, receives the share of the solver work done
	// (0..1).
	Progress func(done float64)
}

// CoverageResult is a coverage and, with candidates, their ranking.
type CoverageResult struct {
	// Coverage holds the least altitude to reach a field per cell, the
	// covered share and each field's covered and exclusive areas.
	Coverage *reach.CoverageResult
	Ranking  *reach.CandidateRanking // nil without Candidates
	// Fields and Candidates as used: elevation, target index, note.
	Fields, Candidates []RouteField
	Grid               *terrain.Grid // the DEM window read; nil on flat ground
	// Covered and Uncovered are the zone's covered and uncovered parts
	// (lon/lat, RFC 7946 rings), with their ellipsoidal areas (m²).
	Covered, Uncovered         orb.MultiPolygon
	CoveredArea, UncoveredArea float64
	// Top is the highest altitude flown (m MSL): Alt, or the highest
	// terrain of the zone plus Alt with AGL.
	Top   float64
	Notes []string
}

// Coverage computes the coverage of req's zone: one window over the zone
// plus the glide radius from the ceiling (the highest altitude flown plus
// CoverageMargin, at most 19 500 m) sized by the worst-of-winds rule, the
// least altitude from which some field is reached with the reserve at
// every cell (a cell counts only when the SAME field is in reach in every
// wind of the setup: reach.Coverage with the other winds as Also), the
// covered parts as polygons, and the candidate ranking.
//
// Errors: *InputError naming the zone's field (a window too large, holding
// no cell, off the data), "Terrain" (all voids, a failed read), "Alt" (the
// altitude not above the lowest ground) or "Aircraft"; ctx's error when
// cancelled.
func Coverage(ctx context.Context, req CoverageRequest) (*CoverageResult, error) {
	s, g := req.Setup, req.Ground
	field := req.ZoneField
	if field == "" {
		field = "Area"
	}
	noun := lowerFirst(field)
	b := req.Zone.Bounds()
	minLon, minLat, maxLon, maxLat := b.Min[0], b.Min[1], b.Max[0], b.Max[1]
	out := &CoverageResult{}
	// The highest altitude flown: Alt, or the highest terrain of the zone
	// plus the height (read from a first window over the zone alone).
	top := req.Alt
	if req.AGL {
		top = g.Flat + req.Alt
		if g.Src != nil {
			l0, _, err := g.AreaWindow(minLat, minLon, maxLat, maxLon, 0, field)
			if err != nil {
				return nil, err
			}
			hi := math.Inf(-1)
			for _, e := range l0.Elev {
				if e == e {
					hi = math.Max(hi, float64(e))
				}
			}
			if math.IsInf(hi, -1) {
				return nil, inputf("Terrain", "the terrain over the %s is all voids", noun)
			}
			top = hi + req.Alt
		}
	}
	out.Top = top
	ceiling := math.Min(top+CoverageMargin, 19500)
	bottom := 0.0
	if g.Src == nil {
		bottom = g.Flat
	}
	l, grid, err := s.SizeWindow(WindowSize{Top: ceiling, TableTop: ceiling + 60, Bottom: bottom, Below: 60},
		func(radius float64) (*terrain.Local, *terrain.Grid, error) {
			return g.AreaWindow(minLat, minLon, maxLat, maxLon, radius*1.02+1000, field)
		})
	if err != nil {
		return nil, err
	}
	if math.IsInf(Lowest(l), 1) {
		return nil, inputf("Terrain", "the terrain around the %s is all voids", noun)
	}
	out.Grid = grid
	lo := Lowest(l)
	if lo >= top {
		return nil, inputf("Alt", "%.0f m MSL is not above the lowest ground (%.0f m)", top, lo)
	}
	// Mask of the zone: each cell centre tested (zoneMask).
	mask, inZone := zoneMask(l, req.Zone)
	if inZone == 0 {
		return nil, inputf(field, "the %s holds no cell of the %.0f m solver grid", noun, l.Cell)
	}
	toTargets := func(fs []Field) ([]RouteField, []reach.Target) {
		var rf []RouteField
		var ts []reach.Target
		for _, f := range fs {
			te, on := PointElevation(l, grid, f.Lat, f.Lon)
			r := RouteField{Field: f, Elev: te, Target: len(ts)}
			if f.HasElevation {
				r.Elev = f.Elevation
			}
			if !on {
				r.Elev = math.NaN()
				if f.HasElevation {
					r.Elev = f.Elevation
				}
				r.Note = "beyond the computed window (too far to matter) or on unknown ground"
			}
			ts = append(ts, reach.Target{Name: f.Name, Lat: f.Lat, Lon: f.Lon, Elev: r.Elev, Reserve: s.Reserve})
			if !math.IsNaN(r.Elev) {
				lo = math.Min(lo, r.Elev)
			}
			rf = append(rf, r)
		}
		return rf, ts
	}
	var ts, cs []reach.Target
	out.Fields, ts = toTargets(req.Fields)
	out.Candidates, cs = toTargets(req.Candidates)
	tab, err := s.Table(lo-60, ceiling+60)
	if err != nil {
		return nil, &InputError{Field: "Aircraft", Err: err}
	}
	// Every wind of the setup must hold: the other winds' tables go in as
	// CoverageOptions.Also.
	var also []reach.LossModel
	for _, w := range s.Winds[1:] {
		t, err := s.TableFor(w, lo-60, ceiling+60)
		if err != nil {
			return nil, &InputError{Field: "Aircraft", Err: err}
		}
		also = append(also, t)
	}
	progress := req.Progress
	if progress == nil {
		progress = func(float64) {}
	}
	share := 1.0
	if len(cs) > 0 {
		share = float64(len(ts)) / float64(len(ts)+len(cs))
	}
	opts := reach.CoverageOptions{Alt: req.Alt, Clearance: s.Clearance, Mask: mask, Margin: CoverageMargin, Also: also,
		Progress: func(d float64) { progress(d * share) }}
	if req.AGL {
		opts.AGL = true
		if grid != nil {
			// The height flown is measured from the DEM's own ground; l holds
			// the obstacle surface (highest sample per cell).
			opts.AGLGround = terrain.Resample(grid, l.Frame, l.X0, l.Y0, l.Cell, l.Cols, l.Rows).Elev
		}
	}
	res, err := reach.Coverage(ctx, l, ts, tab, opts)
	if errors.Is(err, reach.ErrNoTargets) {
		out.Notes = append(out.Notes, "no existing field lies within reach of the area")
		res, err = reach.NewEmptyCoverage(l, opts, len(ts)), nil
	}
	if err != nil {
		return nil, err
	}
	for i := range out.Fields {
		if res.Skipped[i] && out.Fields[i].Note == "" {
			out.Fields[i].Note = "off the computed window"
		}
	}
	out.Coverage = res
	if len(cs) > 0 {
		res.Opts.Progress = func(d float64) { progress(share + d*(1-share)) }
		rk, err := res.Candidates(ctx, cs, tab, req.Pick)
		if err != nil {
			return nil, err
		}
		out.Ranking = rk
	}
	out.Covered, out.Uncovered, out.CoveredArea, out.UncoveredArea = res.Polygons()
	return out, nil
}

// maskBlock is the side (cells) of the blocks zoneMask passes over whole.
const maskBlock = 16

// boundaryZone is a Zone that can tell that a lat/lon box holds none of
// its boundary (input.Region does): Contains is then the same at every
// point of the box. false means only "not known".
type boundaryZone interface {
	BoundaryClear(minLat, minLon, maxLat, maxLon float64) bool
}

// zoneMask marks the cells of l whose centre lies in z (z.Contains of the
// centre's lat/lon, Frame.Inverse) and counts them. For a block of
// maskBlock × maskBlock cells it takes the lat/lon box of its corners,
// widened on every side by the box's own larger span: within a block of a
// few km the plane-to-ellipsoid map bends the cell centres away from the
// corners' box by a minute fraction of a cell, far less than the widening,
// so every centre lies in the widened box. A block whose widened box is
// clear of z's Bounds is left unmarked (Contains is false outside Bounds);
// one whose widened box holds none of the zone's boundary (z has a
// BoundaryClear method that says so) takes the answer of its first cell
// for every cell. Blocks near a pole (|lat| ≥ 89°) or beyond ±180° of
// longitude, and the rest, are tested cell by cell. The mask is the same
// as testing every cell.
func zoneMask(l *terrain.Local, z Zone) ([]bool, int) {
	mask := make([]bool, l.Cols*l.Rows)
	b := z.Bounds()
	bz, _ := z.(boundaryZone)
	inZone := 0
	for br := 0; br < l.Rows; br += maskBlock {
		r1 := min(br+maskBlock, l.Rows) - 1
		for bc := 0; bc < l.Cols; bc += maskBlock {
			c1 := min(bc+maskBlock, l.Cols) - 1
			box, ok := blockBox(l, bc, br, c1, r1)
			if ok && boxClear(box, b) {
				continue
			}
			if ok && bz != nil && bz.BoundaryClear(box.Min[1], box.Min[0], box.Max[1], box.Max[0]) {
				x, y := l.XY(bc, br)
				if lat, lon := l.Frame.Inverse(x, y); z.Contains(lat, lon) {
					for r := br; r <= r1; r++ {
						row := mask[r*l.Cols+bc : r*l.Cols+c1+1]
						for i := range row {
							row[i] = true
						}
					}
					inZone += (r1 - br + 1) * (c1 - bc + 1)
				}
				continue
			}
			for r := br; r <= r1; r++ {
				for c := bc; c <= c1; c++ {
					x, y := l.XY(c, r)
					lat, lon := l.Frame.Inverse(x, y)
					if z.Contains(lat, lon) {
						mask[r*l.Cols+c] = true
						inZone++
					}
				}
			}
		}
	}
	return mask, inZone
}

// blockBox returns the lon/lat box (orb.Bound: X lon, Y lat) that holds
// the centres of cells c0..c1 × r0..r1 of l (see zoneMask); ok is false
// near a pole, across ±180° or for NaN.
func blockBox(l *terrain.Local, c0, r0, c1, r1 int) (orb.Bound, bool) {
	latLo, latHi, lonLo, lonHi := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, cr := range [4][2]int{{c0, r0}, {c1, r0}, {c0, r1}, {c1, r1}} {
		x, y := l.XY(cr[0], cr[1])
		lat, lon := l.Frame.Inverse(x, y)
		latLo, latHi = math.Min(latLo, lat), math.Max(latHi, lat)
		lonLo, lonHi = math.Min(lonLo, lon), math.Max(lonHi, lon)
	}
	e := math.Max(latHi-latLo, lonHi-lonLo) + 1e-9
	latLo, latHi, lonLo, lonHi = latLo-e, latHi+e, lonLo-e, lonHi+e
	if !(latLo > -89 && latHi < 89 && lonLo > -180 && lonHi < 180) {
		return orb.Bound{}, false
	}
	return orb.Bound{Min: orb.Point{lonLo, latLo}, Max: orb.Point{lonHi, latHi}}, true
}

// boxClear reports whether the box lies clear of the bound b.
func boxClear(box, b orb.Bound) bool {
	if !(b.Min[0] <= b.Max[0] && b.Min[1] <= b.Max[1]) {
		return false
	}
	return box.Max[0] < b.Min[0] || box.Min[0] > b.Max[0] || box.Max[1] < b.Min[1] || box.Min[1] > b.Max[1]
}
