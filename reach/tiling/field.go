package tiling

import (
	"context"
	"errors"
	"fmt"
	"math"

	"glidereach/reach"
	"glidereach/terrain"
)

// TilePart is what one field's run gives one output tile: the conservative
// least altitudes (m MSL, NaN none) of a box of the tile's cells, W × H
// cells from tile cell (C0, R0), row-major. Field is the job index.
type TilePart struct {
	Tile   TileID
	Field  int
	C0, R0 int
	W, H   int
	Least  []float32
}

// Encode returns the part in the package's explicit binary encoding
// (codec.go: magic, kind, version, little-endian fields, CRC-32): the same
// part gives the same bytes in every process. The error is always nil (kept
// for the callers' signature).
func (t *TilePart) Encode() ([]byte, error) { return encodeTilePart(t), nil }

// DecodeTilePart decodes a part written by Encode; a truncated, damaged or
// foreign input gives an error wrapping ErrCorrupt.
func DecodeTilePart(data []byte) (*TilePart, error) {
	t, err := decodeTilePart(data)
	if err != nil {
		return nil, err
	}
	if t.W < 0 || t.H < 0 || t.W > 1<<14 || t.H > 1<<14 || len(t.Least) != t.W*t.H {
		return nil, fmt.Errorf("%w: tile part of %d×%d cells holds %d values", ErrCorrupt, t.W, t.H, len(t.Least))
	}
	return t, nil
}

// FieldWindow returns the obstacle surface of job's window: src's window
// resampled to the highest DEM sample per solver cell
// (terrain.ResampleHigh), or flat ground at p.Flat when src is nil.
func FieldWindow(src terrain.Source, p *Plan, job *FieldJob) (*terrain.Local, error) {
	f, x0, y0, n := job.Frame(p.Cell)
	if src == nil {
		return terrain.NewFlat(f, x0, y0, p.Cell, n, n, p.Flat), nil
	}
	w, s, e, nn := terrain.LocalExtent(f, x0, y0, p.Cell, n, n)
	g, err := src.Window(w, s, e, nn)
	if err != nil {
		if errors.Is(err, terrain.ErrOutside) {
			// The whole window off the data: void ground, nothing reached.
			l := terrain.NewFlat(f, x0, y0, p.Cell, n, n, 0)
			for i := range l.Elev {
				l.Elev[i] = float32(math.NaN())
			}
			l.Flat = false
			return l, nil
		}
		return nil, err
	}
	return terrain.ResampleHigh(g, f, x0, y0, p.Cell, n, n), nil
}

// RunField runs job: the backward solver (reach.Required, one worker) for
// the field alone on its window in every model of the plan, the worst
// (highest) least altitude per solver cell, read conservatively at the
// output cells of each touched tile (the maximum of the four solver cells
// around the centre; NaN when one of them has none). It returns one part
// per touched tile that got at least one value, in job.Tiles order; none
// when the field lies on a void. src nil means flat ground at p.Flat.
//
// Memory: the DEM window, the obstacle surface and the propagation's
// state, all proportional to (2·Half+1)² solver cells (see the README's
// figure per worker); the parts hold at most the window's output cells.
func RunField(ctx context.Context, src terrain.Source, p *Plan, job FieldJob) ([]TilePart, error) {
	l, err := FieldWindow(src, p, &job)
	if err != nil {
		return nil, err
	}
	var worst []float32
	for i := range p.Models {
		res, err := reach.Required(ctx, l, []reach.Target{job.Target}, &p.Models[i],
			reach.RequiredOptions{Clearance: p.Clearance, Ceiling: p.Ceiling, Workers: 1})
		if errors.Is(err, reach.ErrNoTargets) {
			return nil, nil
		}
		if err != nil {
			return nil, fmt.Errorf("tiling: field %q: %w", job.Target.Name, err)
		}
		if worst == nil {
			worst = res.Required
			continue
		}
		for k, v := range res.Required {
			if v != v || v > worst[k] {
				worst[k] = v
			}
		}
	}
	var parts []TilePart
	for _, id := range job.Tiles {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		if part := p.sampleTile(l, worst, job.Index, id); part != nil {
			parts = append(parts, *part)
		}
	}
	return parts, nil
}

// sampleTile reads vals (laid out like l.Elev) at the output cells of tile
// id: the maximum of the four solver cells around each cell centre. Cell
// centres are mapped exactly on a lattice every 16 output cells and
// linearly in between (the map is smooth: the error is millimetres).
func (p *Plan) sampleTile(l *terrain.Local, vals []float32, field int, id TileID) *TilePart {
	c0, r0, cols, rows := p.TileBox(id)
	g := p.Lattice.Grid()
	const B = 16
	nbx, nby := (cols-1)/B+1, (rows-1)/B+1
	nodes := make([][2]float64, (nbx+1)*(nby+1))
	for j := 0; j <= nby; j++ {
		for i := 0; i <= nbx; i++ {
			X, Y := g.X0+float64(c0+i*B)*g.DX, g.Y0-float64(r0+j*B)*g.DY
			lat, lon, err := g.FromCRS(X, Y)
			if err != nil {
				nodes[j*(nbx+1)+i] = [2]float64{math.NaN(), math.NaN()}
				continue
			}
			x, y := l.Frame.Forward(lat, lon)
			nodes[j*(nbx+1)+i] = [2]float64{(x - l.X0) / l.Cell, (y - l.Y0) / l.Cell}
		}
	}
	out := make([]float32, cols*rows)
	nan := float32(math.NaN())
	minC, minR, maxC, maxR := cols, rows, -1, -1
	maxX, maxY := float64(l.Cols-1), float64(l.Rows-1)
	for r := range rows {
		j, ty := r/B, float64(r%B)/B
		for bi := range nbx {
			n00, n10 := nodes[j*(nbx+1)+bi], nodes[j*(nbx+1)+bi+1]
			n01, n11 := nodes[(j+1)*(nbx+1)+bi], nodes[(j+1)*(nbx+1)+bi+1]
			wx, wy := n00[0]+(n01[0]-n00[0])*ty, n00[1]+(n01[1]-n00[1])*ty
			ex, ey := n10[0]+(n11[0]-n10[0])*ty, n10[1]+(n11[1]-n10[1])*ty
			dx, dy := (ex-wx)/B, (ey-wy)/B
			for k := bi * B; k < min((bi+1)*B, cols); k++ {
				fx, fy := wx+dx*float64(k-bi*B), wy+dy*float64(k-bi*B)
				v := nan
				if fx >= 0 && fy >= 0 && fx <= maxX && fy <= maxY {
					cc, rr := min(int(fx), l.Cols-2), min(int(fy), l.Rows-2)
					i := rr*l.Cols + cc
					a, b, c, d := vals[i], vals[i+1], vals[i+l.Cols], vals[i+l.Cols+1]
					if a == a && b == b && c == c && d == d {
						v = max(a, b, c, d)
					}
				}
				out[r*cols+k] = v
				if v == v {
					minC, maxC = min(minC, k), max(maxC, k)
					minR, maxR = min(minR, r), max(maxR, r)
				}
			}
		}
	}
	if maxC < 0 {
		return nil
	}
	w, h := maxC-minC+1, maxR-minR+1
	part := &TilePart{Tile: id, Field: field, C0: minC, R0: minR, W: w, H: h, Least: make([]float32, w*h)}
	for r := range h {
		copy(part.Least[r*w:(r+1)*w], out[(minR+r)*cols+minC:])
	}
	return part
}
