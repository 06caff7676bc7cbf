package tiling

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sync"

	"glidereach/reach/geodesy"
	"glidereach/terrain"
)

// areaBlock is the side (cells) of the blocks of output cells that share
// one ellipsoidal cell area (the block's area on the WGS84 ellipsoid over
// its cell count). Blocks are aligned on the lattice, so a cell's area does
// not depend on the tiling. Within a 16-cell block of 30 m cells the area
// per cell changes by under 1e-6 of itself (UTM scale factor, or cos φ over
// 0.005°).
const areaBlock = 16

// FieldArea is what one field covers in one tile: the ellipsoidal area (m²)
// of the zone's cells it covers from the altitude flown, and of those no
// other field covers.
type FieldArea struct {
	Field             int
	Covers, Exclusive float64
}

// CandidateCells are the zone cells of a tile (indices r·Cols + c) that a
// candidate covers and no existing field does, with their area (m²).
type CandidateCells struct {
	Field int // job index (len(Plan.Fields) + j)
	Cells []int32
	Area  float64
}

// TileResult is the merged coverage of one output tile.
type TileResult struct {
	Tile       TileID
	C0, R0     int
	Cols, Rows int
	// Least is the least altitude (m MSL) from which some field is reached
	// with its reserve, per cell (row-major, north row first); NaN where
	// none is reached from below the ceiling. Best is that field's index
	// (−1 none); Count the number of fields reached from the altitude
	// flown (saturating at 255).
	Least []float32
	Best  []int32
	Count []uint8
	// Flown is the altitude flown per cell (m MSL; NaN on a void) with
	// Plan.AGL; nil for a constant altitude (Plan.Alt).
	Flown []float32
	Mask  []byte // the TileJob's zone mask (nil: every cell)
	// BlockAreas is the area (m²) of one cell in each areaBlock × areaBlock
	// block of the tile (CellArea reads it).
	BlockAreas []float64
	// Zone and covered cells of the tile and their ellipsoidal areas (m²).
	ZoneCells, CoveredCells int64
	ZoneArea, CoveredArea   float64
	Fields                  []FieldArea      // by field index; fields with a part here
	Gains                   []CandidateCells // by candidate index; candidates adding cells here
}

// CellArea returns the ellipsoidal area (m²) of tile cell (c, r).
func (t *TileResult) CellArea(c, r int) float64 {
	bc := (t.Cols + areaBlock - 1) / areaBlock
	return t.BlockAreas[(r/areaBlock)*bc+c/areaBlock]
}

// InZone reports whether tile cell i belongs to the zone.
func (t *TileResult) InZone(i int) bool { return t.Mask == nil || t.Mask[i>>3]&(1<<(i&7)) != 0 }

// FlownAt returns the altitude flown over tile cell i (m MSL).
func (t *TileResult) FlownAt(i int, p *Plan) float64 {
	if t.Flown != nil {
		return float64(t.Flown[i])
	}
	return p.Alt
}

// Encode returns the result in the package's explicit binary encoding
// (codec.go): the same result gives the same bytes in every process (a test
// runs two processes). The error is always nil.
func (t *TileResult) Encode() ([]byte, error) { return encodeTileResult(t), nil }

// DecodeTileResult decodes a result written by Encode and checks its shape;
// a truncated, damaged or foreign input gives an error wrapping ErrCorrupt
// (Result.Tile adds the file's path).
func DecodeTileResult(data []byte) (*TileResult, error) {
	t, err := decodeTileResult(data)
	if err != nil {
		return nil, err
	}
	if t.Cols > 1<<14 || t.Rows > 1<<14 {
		return nil, fmt.Errorf("%w: tile result %v of %d×%d cells is larger than a tile can be", ErrCorrupt, t.Tile, t.Cols, t.Rows)
	}
	n := t.Cols * t.Rows
	bc, br := (t.Cols+areaBlock-1)/areaBlock, (t.Rows+areaBlock-1)/areaBlock
	if t.Cols <= 0 || t.Rows <= 0 || len(t.Least) != n || len(t.Best) != n || len(t.Count) != n ||
		(t.Flown != nil && len(t.Flown) != n) || (t.Mask != nil && len(t.Mask) != (n+7)/8) || len(t.BlockAreas) != bc*br {
		return nil, fmt.Errorf("%w: tile result %v has arrays that do not match its %d×%d cells", ErrCorrupt, t.Tile, t.Cols, t.Rows)
	}
	for _, g := range t.Gains {
		for _, i := range g.Cells {
			if i < 0 || int(i) >= n {
				return nil, fmt.Errorf("%w: tile result %v names cell %d of %d", ErrCorrupt, t.Tile, i, n)
			}
		}
	}
	return t, nil
}

// blockAreas returns the area of one cell of each areaBlock block of the
// tile: the block's outline (its four corners, with the midpoints of its
// sides, in lon/lat) measured on the WGS84 ellipsoid (geodesy.RingArea)
// over its cell count. For a geographic lattice the outline follows
// meridians and parallels and the area is exact.
func blockAreas(p *Plan, job *TileJob) ([]float64, error) {
	g := p.Lattice.Grid()
	bc, br := (job.Cols+areaBlock-1)/areaBlock, (job.Rows+areaBlock-1)/areaBlock
	out := make([]float64, bc*br)
	ring := make([][2]float64, 0, 9)
	for j := range br {
		ra, rb := j*areaBlock, min(job.Rows, (j+1)*areaBlock)
		for i := range bc {
			ca, cb := i*areaBlock, min(job.Cols, (i+1)*areaBlock)
			// Cell edges in CRS units.
			x0, x1 := g.X0+(float64(job.C0+ca)-0.5)*g.DX, g.X0+(float64(job.C0+cb)-0.5)*g.DX
			y0, y1 := g.Y0-(float64(job.R0+rb)-0.5)*g.DY, g.Y0-(float64(job.R0+ra)-0.5)*g.DY
			xm, ym := (x0+x1)/2, (y0+y1)/2
			ring = ring[:0]
			for _, q := range [][2]float64{{x0, y0}, {xm, y0}, {x1, y0}, {x1, ym}, {x1, y1}, {xm, y1}, {x0, y1}, {x0, ym}} {
				lat, lon, err := g.FromCRS(q[0], q[1])
				if err != nil {
					return nil, err
				}
				ring = append(ring, [2]float64{lon, lat})
			}
			out[j*bc+i] = math.Abs(geodesy.RingArea(ring)) / float64((cb-ca)*(rb-ra))
		}
	}
	return out, nil
}

// flownAGL returns the altitude flown over each cell of the tile with
// p.AGL: the DEM's own (bilinear) value at the cell centre plus p.Alt; on
// the DEM's lattice that is the DEM sample itself.
func flownAGL(src terrain.Source, p *Plan, job *TileJob) ([]float32, error) {
	n := job.Cols * job.Rows
	out := make([]float32, n)
	if src == nil {
		for i := range out {
			out[i] = float32(p.Flat + p.Alt)
		}
		return out, nil
	}
	g := p.Lattice.Grid()
	w, s, e, nn := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, q := range [][2]int{{0, 0}, {job.Cols - 1, 0}, {0, job.Rows - 1}, {job.Cols - 1, job.Rows - 1}} {
		lat, lon, err := g.FromCRS(g.X0+float64(job.C0+q[0])*g.DX, g.Y0-float64(job.R0+q[1])*g.DY)
		if err != nil {
			return nil, err
		}
		w, e, s, nn = math.Min(w, lon), math.Max(e, lon), math.Min(s, lat), math.Max(nn, lat)
	}
	pad := 2 * math.Max(g.DX, g.DY)
	if p.Lattice.EPSG != 4326 {
		pad = 2 * math.Max(g.DX, g.DY) / 111000
	}
	dem, err := src.Window(w-pad, s-pad, e+pad, nn+pad)
	if errors.Is(err, terrain.ErrOutside) {
		// The tile lies off the DEM: unknown ground, no altitude flown.
		for i := range out {
			out[i] = float32(math.NaN())
		}
		return out, nil
	}
	if err != nil {
		return nil, err
	}
	for r := range job.Rows {
		for c := range job.Cols {
			lat, lon, err := g.FromCRS(g.X0+float64(job.C0+c)*g.DX, g.Y0-float64(job.R0+r)*g.DY)
			v := math.NaN()
			if err == nil {
				if h, ok := dem.Elevation(lat, lon); ok {
					v = h + p.Alt
				}
			}
			out[r*job.Cols+c] = float32(v)
		}
	}
	return out, nil
}

// Accumulator merges the parts of one tile as they come (safe for
// concurrent Add calls). The result does not depend on the order of the
// parts: least altitude by (value, field index), counts and per-part sums.
type Accumulator struct {
	mu     sync.Mutex
	plan   *Plan
	res    *TileResult
	only   []int32
	fields map[int]*FieldArea
	cands  map[int][]byte // candidate → bitset of zone cells it covers
}

// NewAccumulator starts the merge of job. src (nil: flat ground) is read
// only with p.AGL, for the altitude flown.
func NewAccumulator(src terrain.Source, p *Plan, job TileJob) (*Accumulator, error) {
	n := job.Cols * job.Rows
	if n <= 0 || (job.Mask != nil && len(job.Mask) != (n+7)/8) {
		return nil, fmt.Errorf("tiling: tile job %v of %d×%d cells has a mask of %d bytes", job.Tile, job.Cols, job.Rows, len(job.Mask))
	}
	areas, err := blockAreas(p, &job)
	if err != nil {
		return nil, err
	}
	res := &TileResult{Tile: job.Tile, C0: job.C0, R0: job.R0, Cols: job.Cols, Rows: job.Rows, Mask: job.Mask, BlockAreas: areas,
		Least: make([]float32, n), Best: make([]int32, n), Count: make([]uint8, n)}
	if p.AGL {
		if res.Flown, err = flownAGL(src, p, &job); err != nil {
			return nil, err
		}
	}
	a := &Accumulator{plan: p, res: res, only: make([]int32, n), fields: map[int]*FieldArea{}, cands: map[int][]byte{}}
	nan := float32(math.NaN())
	for i := range res.Least {
		res.Least[i], res.Best[i], a.only[i] = nan, -1, -1
	}
	return a, nil
}

// Add merges one part (of this tile).
func (a *Accumulator) Add(part *TilePart) error {
	r := a.res
	if part.Tile != r.Tile || part.C0 < 0 || part.R0 < 0 || part.C0+part.W > r.Cols || part.R0+part.H > r.Rows || len(part.Least) != part.W*part.H {
		return fmt.Errorf("tiling: part of field %d for tile %v does not fit tile %v", part.Field, part.Tile, r.Tile)
	}
	a.mu.Lock()
	defer a.mu.Unlock()
	p := a.plan
	if part.Field >= len(p.Fields) {
		bits := a.cands[part.Field]
		if bits == nil {
			bits = make([]byte, (r.Cols*r.Rows+7)/8)
			a.cands[part.Field] = bits
		}
		for y := range part.H {
			for x := range part.W {
				v := part.Least[y*part.W+x]
				i := (part.R0+y)*r.Cols + part.C0 + x
				if v == v && float64(v) <= r.FlownAt(i, p) && r.InZone(i) {
					bits[i>>3] |= 1 << (i & 7)
				}
			}
		}
		return nil
	}
	fa := a.fields[part.Field]
	if fa == nil {
		fa = &FieldArea{Field: part.Field}
		a.fields[part.Field] = fa
	}
	k := int32(part.Field)
	for y := range part.H {
		for x := range part.W {
			v := part.Least[y*part.W+x]
			if v != v {
				continue
			}
			c, rr := part.C0+x, part.R0+y
			i := rr*r.Cols + c
			if cv := r.Least[i]; cv != cv || v < cv || (v == cv && k < r.Best[i]) {
				r.Least[i], r.Best[i] = v, k
			}
			if float64(v) <= r.FlownAt(i, p) {
				if r.Count[i] < 255 {
					r.Count[i]++
				}
				a.only[i] = k
				if r.InZone(i) {
					fa.Covers += r.CellArea(c, rr)
				}
			}
		}
	}
	return nil
}

// Finish counts the zone, the covered cells, the exclusive areas and the
// candidates' gains, and returns the result. The accumulator must not be
// used after.
func (a *Accumulator) Finish() *TileResult {
	a.mu.Lock()
	defer a.mu.Unlock()
	r := a.res
	for y := range r.Rows {
		for x := range r.Cols {
			i := y*r.Cols + x
			if !r.InZone(i) {
				continue
			}
			ar := r.CellArea(x, y)
			r.ZoneCells++
			r.ZoneArea += ar
			if r.Count[i] > 0 {
				r.CoveredCells++
				r.CoveredArea += ar
			}
			if r.Count[i] == 1 {
				a.fields[int(a.only[i])].Exclusive += ar
			}
		}
	}
	for _, fa := range a.fields {
		r.Fields = append(r.Fields, *fa)
	}
	slices.SortFunc(r.Fields, func(x, y FieldArea) int { return x.Field - y.Field })
	for k, bits := range a.cands {
		cc := CandidateCells{Field: k}
		for y := range r.Rows {
			for x := range r.Cols {
				i := y*r.Cols + x
				if bits[i>>3]&(1<<(i&7)) != 0 && r.Count[i] == 0 {
					cc.Cells = append(cc.Cells, int32(i))
					cc.Area += r.CellArea(x, y)
				}
			}
		}
		if len(cc.Cells) > 0 {
			r.Gains = append(r.Gains, cc)
		}
	}
	slices.SortFunc(r.Gains, func(x, y CandidateCells) int { return x.Field - y.Field })
	return r
}

// MergeTile merges the parts of every field for job's tile (in any order)
// into its result: NewAccumulator, Add each, Finish.
func MergeTile(src terrain.Source, p *Plan, job TileJob, parts []TilePart) (*TileResult, error) {
	a, err := NewAccumulator(src, p, job)
	if err != nil {
		return nil, err
	}
	for i := range parts {
		if err := a.Add(&parts[i]); err != nil {
			return nil, err
		}
	}
	return a.Finish(), nil
}
