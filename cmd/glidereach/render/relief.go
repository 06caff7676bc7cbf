package render

import (
	"math"

	"glidereach/terrain"
)

// Pixel states of the relief layer.
const (
	pxGround = iota
	pxVoid   // a void of the DEM
	pxOff    // outside the raster (Scene.Bounds larger than Terrain)
)

// drawTerrain paints the map area with the tinted hillshade: the DEM is
// resampled to the map's pixel grid (block means first where a pixel spans
// two or more cells, then bilinear), shaded there by Horn's method with the
// pixel size as cell size, and each pixel's tint multiplied by its shade
// relative to flat ground (so flat ground shows its tint unchanged, slopes
// facing the light are lightened, slopes facing away darkened).
func (r *renderer) drawTerrain() {
	if r.z == nil {
		r.sampleTerrain()
	}
	lo, l := r.lo, r.s.Terrain
	mw, mh := lo.mapRect.Dx(), lo.mapRect.Dy()
	z, state := r.z, r.state
	lowE, highE := elevRange(l)
	span := math.Max(highE-lowE, 300)
	shade := r.shade
	if shade == nil && !l.Flat {
		shade = shadeGrid(z, mw, mh, false, lo.mpp, r.s.Hillshade) // map rows: north first
		defer putF32(shade)
	}
	defer func() { // the buffers go to the next map
		putF32(r.z)
		putU8(r.state)
		putF32(r.shade)
		r.z, r.state, r.shade = nil, nil, nil
	}()
	_, alt, _ := r.s.Hillshade.resolved()
	flatShade := math.Sin(alt * math.Pi / 180)
	img := r.img
	flat := l.Flat
	for j := 0; j < mh; j++ {
		o := img.PixOffset(lo.mapRect.Min.X, lo.mapRect.Min.Y+j)
		pix := img.Pix[o : o+4*mw : o+4*mw]
		zr, st := z[j*mw:(j+1)*mw], state[j*mw:(j+1)*mw]
		var sh []float32
		if shade != nil {
			sh = shade[j*mw : (j+1)*mw]
		}
		for i, s := range st {
			p := pix[4*i : 4*i+4 : 4*i+4]
			switch {
			case s == pxOff:
				p[0], p[1], p[2], p[3] = colOffMap.R, colOffMap.G, colOffMap.B, 255
				continue
			case s == pxVoid:
				p[0], p[1], p[2], p[3] = colVoid.R, colVoid.G, colVoid.B, 255
				continue
			case flat:
				p[0], p[1], p[2], p[3] = colFlat.R, colFlat.G, colFlat.B, 255
				continue
			}
			cr, cg, cb := tint((float64(zr[i]) - lowE) / span)
			sv := float64(sh[i])
			if sv != sv { // a ground pixel whose shade cells are all void
				sv = flatShade
			}
			f := sv / flatShade // 1 on flat ground, 0 … √2 at 45°
			if f < 1 {
				m := 0.38 + 0.62*f
				cr, cg, cb = cr*m, cg*m, cb*m
			} else {
				m := min(1, (f-1)/0.41) * 0.5 // the builtin: math.Min's rules, inline
				cr, cg, cb = cr+(255-cr)*m, cg+(255-cg)*m, cb+(255-cb)*m
			}
			p[0], p[1], p[2], p[3] = uint8(cr+0.5), uint8(cg+0.5), uint8(cb+0.5), 255
		}
	}
}

// elevRange is the lowest and highest elevation of l, ignoring voids (0, 0
// when all are void).
func elevRange(l *terrain.Local) (lo, hi float64) {
	var a, b float32 = float32(math.Inf(1)), float32(math.Inf(-1))
	for _, v := range l.Elev {
		if v < a {
			a = v
		}
		if v > b {
			b = v
		}
	}
	if a > b { // every value NaN
		return 0, 0
	}
	return float64(a), float64(b)
}

// decimate returns the k×k block means of l (voids ignored; a block of
// voids stays void), for maps whose pixels span several cells.
func decimate(l *terrain.Local, k int) *terrain.Local {
	cols, rows := max(l.Cols/k, 1), max(l.Rows/k, 1)
	d := &terrain.Local{Frame: l.Frame, Cell: l.Cell * float64(k), Cols: cols, Rows: rows,
		Elev: make([]float32, cols*rows), Source: l.Source}
	d.X0 = l.X0 + float64(k-1)/2*l.Cell
	d.Y0 = l.Y0 + float64(k-1)/2*l.Cell
	sum := make([]float64, cols)
	cnt := make([]int, cols)
	for r := 0; r < rows; r++ {
		clear(sum)
		clear(cnt)
		for rr := r * k; rr < min((r+1)*k, l.Rows); rr++ {
			row := l.Elev[rr*l.Cols : (rr+1)*l.Cols]
			for c := 0; c < cols; c++ {
				for cc := c * k; cc < min((c+1)*k, l.Cols); cc++ {
					if v := row[cc]; v == v {
						sum[c] += float64(v)
						cnt[c]++
					}
				}
			}
		}
		for c := 0; c < cols; c++ {
			if cnt[c] == 0 {
				d.Elev[r*cols+c] = float32(math.NaN())
			} else {
				d.Elev[r*cols+c] = float32(sum[c] / float64(cnt[c]))
			}
		}
	}
	return d
}

// sampleTerrain resamples the DEM to the map's pixel grid (r.z) and marks
// each pixel ground, void or off the raster (r.state); the legend lists
// voids and off-raster ground only when some pixel shows them.
func (r *renderer) sampleTerrain() {
	lo, l := r.lo, r.s.Terrain
	mw, mh := lo.mapRect.Dx(), lo.mapRect.Dy()
	src := l
	if k := int(lo.mpp / l.Cell); k >= 2 && !l.Flat {
		src = decimate(l, k)
	}
	// Column and row lookups: x depends only on the column, y on the row.
	type tap struct {
		i0, i1 int
		t      float32
		off    bool
	}
	taps := func(n int, first, step float64, x0, cell float64, cells, cellsOrig int, x0Orig, cellOrig float64) []tap {
		out := make([]tap, n)
		for i := range out {
			v := first + (float64(i)+0.5)*step
			fo := (v - x0Orig) / cellOrig
			if fo < -0.5 || fo > float64(cellsOrig)-0.5 {
				out[i].off = true
				continue
			}
			f := (v - x0) / cell
			f = math.Max(0, math.Min(float64(cells-1), f))
			i0 := int(f)
			if i0 >= cells-1 {
				i0 = max(cells-2, 0)
			}
			i1 := min(i0+1, cells-1)
			out[i] = tap{i0: i0, i1: i1, t: float32(f - float64(i0))}
			if i1 == i0 {
				out[i].t = 0
			}
		}
		return out
	}
	xs := taps(mw, lo.minX, lo.mpp, src.X0, src.Cell, src.Cols, l.Cols, l.X0, l.Cell)
	ys := taps(mh, lo.maxY, -lo.mpp, src.Y0, src.Cell, src.Rows, l.Rows, l.Y0, l.Cell)

	z := getF32(mw * mh)    // every pixel is written below
	state := getU8(mw * mh) // zero: pxGround
	nan := float32(math.NaN())
	for j, ty := range ys {
		row := z[j*mw : (j+1)*mw]
		st := state[j*mw : (j+1)*mw]
		if ty.off {
			for i := range st {
				st[i], row[i] = pxOff, nan
			}
			continue
		}
		r0, r1 := src.Elev[ty.i0*src.Cols:], src.Elev[ty.i1*src.Cols:]
		for i, tx := range xs {
			if tx.off {
				st[i], row[i] = pxOff, nan
				continue
			}
			a, b, c, d := r0[tx.i0], r0[tx.i1], r1[tx.i0], r1[tx.i1]
			v := (a*(1-tx.t)+b*tx.t)*(1-ty.t) + (c*(1-tx.t)+d*tx.t)*ty.t
			if v != v {
				// A void corner. The pixel is void when its nearest corner
				// is (a void cell covers its own square); otherwise its
				// height is the bilinear mean of the valid corners, so the
				// ground stays smooth up to the void. (The nearest corner's
				// value instead made steps one cell long, which the
				// hillshade drew as a dashed seam along every void edge.)
				near := a
				if tx.t >= 0.5 {
					near = b
				}
				if ty.t >= 0.5 {
					near = c
					if tx.t >= 0.5 {
						near = d
					}
				}
				v = near
				if near == near {
					var sw, sv float32
					for _, q := range [4][2]float32{{a, (1 - tx.t) * (1 - ty.t)}, {b, tx.t * (1 - ty.t)},
						{c, (1 - tx.t) * ty.t}, {d, tx.t * ty.t}} {
						if q[0] == q[0] {
							sw += q[1]
							sv += q[1] * q[0]
						}
					}
					if sw > 0 {
						v = sv / sw
					}
				}
			}
			row[i] = v
			if v != v {
				st[i] = pxVoid
			}
		}
	}

	// The outermost two pixels lie under the map's frame line: what shows
	// only there is not listed.
	for j := 2; j < mh-2; j++ {
		for _, st := range state[j*mw+2 : (j+1)*mw-2] {
			switch st {
			case pxVoid:
				r.voidShown = true
			case pxOff:
				r.offShown = true
			}
		}
	}
	r.z, r.state = z, state

	// A DEM coarser than the map's pixels: a bilinear surface has a slope
	// that jumps at every cell edge, and the hillshade of the pixel-sampled
	// surface draws those edges as a grid (moiré on resampled windows,
	// stair-steps on 1 km cells). Shade the DEM at its own resolution
	// instead and interpolate the shading, which is then smooth across
	// cells; voids stay void (a shade cell that is void drops out of the
	// mean, as for the elevation above).
	if !l.Flat && src.Cell > 1.5*lo.mpp {
		sh := shadeGrid(src.Elev, src.Cols, src.Rows, true, src.Cell, r.s.Hillshade) // the Local's row 0 is south
		out := getF32(mw * mh)                                                       // every pixel is written below
		for j, ty := range ys {
			row, st := out[j*mw:(j+1)*mw], state[j*mw:(j+1)*mw]
			if ty.off {
				for i := range row {
					row[i] = nan
				}
				continue
			}
			s0 := sh[ty.i0*src.Cols : (ty.i0+1)*src.Cols]
			s1 := sh[ty.i1*src.Cols : (ty.i1+1)*src.Cols]
			wy0, wy1 := 1-ty.t, ty.t
			for i, tx := range xs {
				if st[i] != pxGround || tx.off {
					row[i] = nan
					continue
				}
				// The bilinear mean of the valid corners, summed in this
				// order (float32 sums round by order).
				var sw, sv float32
				wx0, wx1 := 1-tx.t, tx.t
				if v := s0[tx.i0]; v == v {
					w := wx0 * wy0
					sw += w
					sv += w * v
				}
				if v := s0[tx.i1]; v == v {
					w := wx1 * wy0
					sw += w
					sv += w * v
				}
				if v := s1[tx.i0]; v == v {
					w := wx0 * wy1
					sw += w
					sv += w * v
				}
				if v := s1[tx.i1]; v == v {
					w := wx1 * wy1
					sw += w
					sv += w * v
				}
				row[i] = nan
				if sw > 0 {
					row[i] = sv / sw
				}
			}
		}
		putF32(sh)
		r.shade = out
	}
}
