package tiling

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"math"

	"glidereach/reach"
	"glidereach/terrain"
)

// DefaultTile is the output tile side (cells) when Plan.Tile is 0: 1024 ×
// 1024 cells, 4 MiB of float32 per tile.
const DefaultTile = 1024

// Lattice is the output grid: north-up cells of the DEM's own CRS. Cell
// (c, r) has its centre at CRS coordinates X0 + c·DX, Y0 − r·DY (degrees for
// EPSG:4326, metres for UTM), as terrain.Grid.
type Lattice struct {
	EPSG       int
	X0, Y0     float64
	DX, DY     float64
	Cols, Rows int
}

// Grid returns a terrain.Grid header of the lattice (no elevations), for its
// CRS conversions and for writers.
func (l Lattice) Grid() *terrain.Grid {
	return &terrain.Grid{CRS: terrain.CRS{EPSG: l.EPSG}, Cols: l.Cols, Rows: l.Rows, X0: l.X0, Y0: l.Y0, DX: l.DX, DY: l.DY}
}

// Check reports a lattice that is empty, not finite or in a CRS the package
// cannot convert.
func (l Lattice) Check() error {
	if l.Cols <= 0 || l.Rows <= 0 || l.Cols > 1<<30 || l.Rows > 1<<30 || !(l.DX > 0) || !(l.DY > 0) || math.IsInf(l.DX, 0) || math.IsInf(l.DY, 0) ||
		math.IsNaN(l.X0) || math.IsNaN(l.Y0) || math.IsInf(l.X0, 0) || math.IsInf(l.Y0, 0) {
		return fmt.Errorf("tiling: lattice %d×%d cells of %g×%g at %g,%g is empty or not finite", l.Cols, l.Rows, l.DX, l.DY, l.X0, l.Y0)
	}
	if _, _, err := l.Grid().FromCRS(l.X0, l.Y0); err != nil {
		return fmt.Errorf("tiling: lattice: %w", err)
	}
	return nil
}

// TileID names an output tile: columns Col·Tile .. and rows Row·Tile .. of
// the lattice.
type TileID struct{ Col, Row int }

func (t TileID) String() string { return fmt.Sprintf("r%04d-c%04d", t.Row, t.Col) }

// Plan is a whole tiled coverage run, as plain data (see the package doc).
// Fields are the existing landing fields; Candidates, if any, are fields
// that might be added: they are run like fields (job indices len(Fields)+j)
// but change none of the coverage figures, only CandidateCells.
type Plan struct {
	Lattice    Lattice
	Tile       int // output tile side in cells, a multiple of 16; 0 means DefaultTile
	Fields     []reach.Target
	Candidates []reach.Target
	// Models are the loss models every field must be reached in: a cell's
	// least altitude for a field is the highest over them (a wind
	// uncertainty set: each field run costs one propagation per model).
	Models []LossGrid
	// Clearance is the least height above the terrain (m) a glide keeps
	// (reach.RequiredOptions.Clearance).
	Clearance float64
	// Alt is the altitude flown, m MSL; or, with AGL, the height above the
	// DEM's own value at each output cell (flat ground: Flat).
	Alt float64
	AGL bool
	// Ceiling (m MSL) is the highest altitude computed: the highest
	// altitude flown plus a margin. Cells needing more get NaN.
	Ceiling float64
	// Cell is the solver's cell (m) in every field's frame: the DEM's
	// resolution (terrain.Source.Resolution). A coarser cell is the user's
	// choice and goes with a note in Notes.
	Cell float64
	// Flat is the ground elevation (m MSL) when the run has no DEM (RunField
	// and MergeTile are given a nil Source).
	Flat float64
	// Notes are said with the outputs (e.g. a coarser solver cell asked for).
	Notes []string
}

// maxTiles bounds the number of tiles of a plan (a lattice of 2^22 tiles of
// 1024² cells is 4·10^12 cells; the bound keeps a damaged plan from asking
// for a list of tiles that does not fit in memory).
const maxTiles = 1 << 22

// TileSide returns the tile side in cells.
func (p *Plan) TileSide() int {
	if p.Tile <= 0 {
		return DefaultTile
	}
	return p.Tile
}

// TilesAcross returns the number of tile columns and rows.
func (p *Plan) TilesAcross() (cols, rows int) {
	t := p.TileSide()
	return (p.Lattice.Cols + t - 1) / t, (p.Lattice.Rows + t - 1) / t
}

// Tiles lists every tile in row-major order (the order of every sum).
func (p *Plan) Tiles() []TileID {
	tc, tr := p.TilesAcross()
	out := make([]TileID, 0, tc*tr)
	for r := range tr {
		for c := range tc {
			out = append(out, TileID{c, r})
		}
	}
	return out
}

// TileBox returns the lattice cells of tile id: first column and row, and
// its size (clipped at the lattice's east and south edges).
func (p *Plan) TileBox(id TileID) (c0, r0, cols, rows int) {
	t := p.TileSide()
	c0, r0 = id.Col*t, id.Row*t
	return c0, r0, min(t, p.Lattice.Cols-c0), min(t, p.Lattice.Rows-r0)
}

// Target returns the field of job index k: Fields[k], or Candidates[k −
// len(Fields)].
func (p *Plan) Target(k int) reach.Target {
	if k < len(p.Fields) {
		return p.Fields[k]
	}
	return p.Candidates[k-len(p.Fields)]
}

// Check reports a plan that cannot run.
func (p *Plan) Check() error {
	if err := p.Lattice.Check(); err != nil {
		return err
	}
	if t := p.TileSide(); t < 16 || t%16 != 0 || t > 1<<14 {
		return fmt.Errorf("tiling: tile side %d is not a multiple of 16 in 16..16384", t)
	}
	if tc, tr := p.TilesAcross(); tc > 1<<22 || tr > 1<<22 || tc*tr > maxTiles {
		return fmt.Errorf("tiling: %d×%d tiles of %d cells is more than %d tiles; use larger tiles", tc, tr, p.TileSide(), maxTiles)
	}
	if len(p.Models) == 0 {
		return errors.New("tiling: plan has no loss model")
	}
	for i := range p.Models {
		if err := p.Models[i].Check(); err != nil {
			return err
		}
	}
	if !(p.Cell > 0) || math.IsInf(p.Cell, 0) {
		return fmt.Errorf("tiling: solver cell %g m is not positive", p.Cell)
	}
	if !(p.Ceiling > -1000 && p.Ceiling < 20000) {
		return fmt.Errorf("tiling: ceiling %g m MSL is outside -1000..20000 m", p.Ceiling)
	}
	if len(p.Fields)+len(p.Candidates) > math.MaxInt32 {
		return errors.New("tiling: too many fields")
	}
	return nil
}

// Encode returns the plan in the package's explicit binary encoding
// (codec.go): the same plan gives the same bytes in every process, which is
// what lets plan.gob key a work directory. The error is always nil.
func (p *Plan) Encode() ([]byte, error) { return encodePlan(p), nil }

// DecodePlan decodes a plan written by Encode and checks it; a truncated,
// damaged or foreign input gives an error wrapping ErrCorrupt.
func DecodePlan(data []byte) (*Plan, error) {
	p, err := decodePlan(data)
	if err != nil {
		return nil, err
	}
	if err := p.Check(); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrCorrupt, err)
	}
	return p, nil
}

// Digest is the hex SHA-256 of the encoded plan: two runs with the same
// digest compute the same tiles (the work directory is keyed by it).
func (p *Plan) Digest() (string, error) {
	b, err := p.Encode()
	if err != nil {
		return "", err
	}
	s := sha256.Sum256(b)
	return hex.EncodeToString(s[:]), nil
}

// FieldJob is the backward run of one field: the field, its window (a
// square of 2·Half+1 solver cells of Plan.Cell metres, centred on the field
// in the frame tangent at it, terrain.NewFrame(Target.Lat, Target.Lon)),
// and the output tiles that window touches.
type FieldJob struct {
	Index  int // job index: into Plan.Fields, or len(Fields)+j for candidate j
	Target reach.Target
	Half   int
	Tiles  []TileID
}

// Frame returns the job's local frame and the window's south-west cell
// centre (m) and side (cells).
func (j *FieldJob) Frame(cell float64) (f terrain.Frame, x0, y0 float64, n int) {
	return terrain.NewFrame(j.Target.Lat, j.Target.Lon), -float64(j.Half) * cell, -float64(j.Half) * cell, 2*j.Half + 1
}

// FieldJobs returns the jobs of every field and candidate whose window
// touches the lattice, in job-index order, with skipped[k] true for the
// others (off every tile, without an elevation, or with the field itself
// above the ceiling). The window half-side is ⌈R/Cell⌉ + 3 cells with R the
// largest reach.GlideRangeBound over the models from the ceiling down to
// the field's elevation plus its reserve.
func (p *Plan) FieldJobs() (jobs []FieldJob, skipped []bool, err error) {
	if err := p.Check(); err != nil {
		return nil, nil, err
	}
	n := len(p.Fields) + len(p.Candidates)
	skipped = make([]bool, n)
	for k := range n {
		t := p.Target(k)
		low := t.Elev + t.Reserve
		if math.IsNaN(low) || !(p.Ceiling > low) || math.IsNaN(t.Lat) || math.IsNaN(t.Lon) {
			skipped[k] = true
			continue
		}
		radius := 0.0
		for i := range p.Models {
			r, err := reach.GlideRangeBound(&p.Models[i], p.Ceiling, low)
			if err != nil {
				return nil, nil, fmt.Errorf("tiling: field %q: %w", t.Name, err)
			}
			radius = math.Max(radius, r)
		}
		half := int(math.Ceil(radius/p.Cell)) + 3
		job := FieldJob{Index: k, Target: t, Half: half}
		job.Tiles = p.touched(&job)
		if len(job.Tiles) == 0 {
			skipped[k] = true
			continue
		}
		jobs = append(jobs, job)
	}
	return jobs, skipped, nil
}

// touched returns the tiles (row-major) whose cells the job's window may
// hold: the lattice box of the window's lon/lat outline, one cell wider.
func (p *Plan) touched(j *FieldJob) []TileID {
	f, x0, y0, n := j.Frame(p.Cell)
	g := p.Lattice.Grid()
	xmin, ymin, xmax, ymax := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	side := float64(n-1) * p.Cell
	const k = 32
	for i := 0; i <= k; i++ {
		t := float64(i) / k
		for _, q := range [][2]float64{{x0 + t*side, y0}, {x0 + t*side, y0 + side}, {x0, y0 + t*side}, {x0 + side, y0 + t*side}} {
			lat, lon := f.Inverse(q[0], q[1])
			X, Y, err := g.ToCRS(lat, lon)
			if err != nil {
				continue
			}
			xmin, xmax = math.Min(xmin, X), math.Max(xmax, X)
			ymin, ymax = math.Min(ymin, Y), math.Max(ymax, Y)
		}
	}
	l := p.Lattice
	c0 := int(math.Floor((xmin-l.X0)/l.DX)) - 1
	c1 := int(math.Ceil((xmax-l.X0)/l.DX)) + 1
	r0 := int(math.Floor((l.Y0-ymax)/l.DY)) - 1
	r1 := int(math.Ceil((l.Y0-ymin)/l.DY)) + 1
	if c1 < 0 || r1 < 0 || c0 >= l.Cols || r0 >= l.Rows || math.IsInf(xmin, 0) {
		return nil
	}
	c0, r0, c1, r1 = max(c0, 0), max(r0, 0), min(c1, l.Cols-1), min(r1, l.Rows-1)
	ts := p.TileSide()
	var out []TileID
	for r := r0 / ts; r <= r1/ts; r++ {
		for c := c0 / ts; c <= c1/ts; c++ {
			out = append(out, TileID{c, r})
		}
	}
	return out
}

// TileJob is the merge of one output tile: its lattice cells and the zone's
// cells in it.
type TileJob struct {
	Tile       TileID
	C0, R0     int // lattice cell of the tile's north-west cell
	Cols, Rows int
	// Mask has bit i (i = r·Cols + c within the tile, least significant bit
	// first in each byte) set for a cell whose centre lies in the zone
	// analysed; nil means every cell.
	Mask []byte
}

// InZone reports whether tile cell i belongs to the zone.
func (j *TileJob) InZone(i int) bool { return j.Mask == nil || j.Mask[i>>3]&(1<<(i&7)) != 0 }

// TileJob returns the job of tile id, with the zone's mask from zone (a
// test of a cell centre's latitude and longitude, degrees; nil for every
// cell). A mask with every bit set is stored as nil.
func (p *Plan) TileJob(id TileID, zone func(lat, lon float64) bool) (TileJob, error) {
	c0, r0, cols, rows := p.TileBox(id)
	if cols <= 0 || rows <= 0 {
		return TileJob{}, fmt.Errorf("tiling: tile %v is off the lattice", id)
	}
	j := TileJob{Tile: id, C0: c0, R0: r0, Cols: cols, Rows: rows}
	if zone == nil {
		return j, nil
	}
	g := p.Lattice.Grid()
	mask := make([]byte, (cols*rows+7)/8)
	all := true
	for r := range rows {
		for c := range cols {
			lat, lon, err := g.FromCRS(g.X0+float64(c0+c)*g.DX, g.Y0-float64(r0+r)*g.DY)
			if err != nil {
				return TileJob{}, err
			}
			if zone(lat, lon) {
				i := r*cols + c
				mask[i>>3] |= 1 << (i & 7)
			} else {
				all = false
			}
		}
	}
	if !all {
		j.Mask = mask
	}
	return j, nil
}

// LatticeFor returns the output lattice over the lon/lat box west..east,
// south..north (degrees): the lattice of src's own grid (read from a small
// window at the box's centre: CRS, cell size and alignment) holding the
// box, or for flat ground (src nil) a geographic lattice of about cell
// metres. The solver cell to use is src.Resolution() (cell for flat ground).
func LatticeFor(src terrain.Source, west, south, east, north, cell float64) (Lattice, error) {
	if !(west < east && south < north) {
		return Lattice{}, fmt.Errorf("tiling: box %g..%g E, %g..%g N is empty", west, east, south, north)
	}
	if src == nil {
		mid := (south + north) / 2
		dy := cell / 111320.0
		dx := dy / math.Max(math.Cos(mid*math.Pi/180), 0.01)
		l := Lattice{EPSG: 4326, X0: west + dx/2, Y0: north - dy/2, DX: dx, DY: dy,
			Cols: max(1, int(math.Ceil((east-west)/dx))), Rows: max(1, int(math.Ceil((north-south)/dy)))}
		return l, l.Check()
	}
	cl, cp := (west+east)/2, (south+north)/2
	d := 0.002
	g, err := src.Window(cl-d, cp-d, cl+d, cp+d)
	if err != nil {
		return Lattice{}, err
	}
	xmin, ymin, xmax, ymax := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	const k = 32
	for i := 0; i <= k; i++ {
		t := float64(i) / k
		lon, lat := west+t*(east-west), south+t*(north-south)
		for _, q := range [][2]float64{{south, lon}, {north, lon}, {lat, west}, {lat, east}} {
			X, Y, err := g.ToCRS(q[0], q[1])
			if err != nil {
				return Lattice{}, err
			}
			xmin, xmax = math.Min(xmin, X), math.Max(xmax, X)
			ymin, ymax = math.Min(ymin, Y), math.Max(ymax, Y)
		}
	}
	// Cells of src's lattice whose centres lie in the box.
	c0 := math.Ceil((xmin - g.X0) / g.DX)
	c1 := math.Floor((xmax - g.X0) / g.DX)
	r0 := math.Ceil((g.Y0 - ymax) / g.DY)
	r1 := math.Floor((g.Y0 - ymin) / g.DY)
	l := Lattice{EPSG: g.CRS.EPSG, X0: g.X0 + c0*g.DX, Y0: g.Y0 - r0*g.DY, DX: g.DX, DY: g.DY,
		Cols: int(c1-c0) + 1, Rows: int(r1-r0) + 1}
	return l, l.Check()
}
