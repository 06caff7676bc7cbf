package render

import (
	"math"

	"glidereach/terrain"
)

// HillshadeOptions sets the light of the terrain shading. The zero value
// gives gdaldem's defaults.
type HillshadeOptions struct {
	// AzimuthDeg is the direction the light comes from, degrees clockwise
	// from north (map north). 0 means the default 315 (north-west, the
	// cartographic convention that makes hills read as raised); use 360
	// for light from due north.
	AzimuthDeg float64
	// AltitudeDeg is the light's elevation above the horizon, degrees in
	// (0, 90]. 0 means the default 45.
	AltitudeDeg float64
	// ZFactor multiplies elevations before the slope is taken (vertical
	// exaggeration). Elevations and cells are both metres in a Local, so 1
	// is true relief. 0 means the default 1; negative values are taken as
	// their magnitude.
	ZFactor float64
}

func (o HillshadeOptions) resolved() (az, alt, z float64) {
	az, alt, z = o.AzimuthDeg, o.AltitudeDeg, math.Abs(o.ZFactor)
	if az == 0 || math.IsNaN(az) {
		az = 315
	}
	if !(alt > 0) {
		alt = 45
	}
	alt = math.Min(alt, 90)
	if z == 0 || math.IsNaN(z) {
		z = 1
	}
	return az, alt, z
}

// Hillshade returns the shaded-relief grey level of every cell of l, in the
// Local's order (index r·Cols + c, row 0 south): 1 (facing away from the
// light) to 255 (facing it), 0 for a void cell. It is the method of
// gdaldem hillshade with its default algorithm:
//
// Horn's estimate of the gradient from the 3×3 window around a cell
//
//	a b c
//	d e f     (a, b, c the row to the north)
//	g h i
//
//	p = ∂z/∂x = ((c + 2f + i) − (a + 2d + g)) / (8·Δ)   (east)
//	q = ∂z/∂y = ((a + 2b + c) − (g + 2h + i)) / (8·Δ)   (north)
//
// and, with z-factor k, light azimuth A (clockwise from north) and altitude
// h, the cosine of the angle between the surface normal and the light
//
//	cos θ = (sin h − k·p·sin A·cos h − k·q·cos A·cos h) / √(1 + k²(p² + q²))
//	grey  = 1 + 254·cos θ  (1 where cos θ ≤ 0), rounded
//
// Δ is the cell size in metres. Edges: gdaldem leaves the outermost ring of
// cells as nodata by default (and interpolates them with -compute_edges);
// Hillshade instead repeats the edge cell for a missing neighbour, so a map
// has no dark frame. A void neighbour is likewise replaced by the centre
// cell.
//
// References: B. K. P. Horn, "Hill shading and the reflectance map",
// Proceedings of the IEEE 69(1), 1981; GDAL gdaldem documentation
// (hillshade); checked against gdaldem 3.6.2 output in testdata/render.
func Hillshade(l *terrain.Local, opt HillshadeOptions) []uint8 {
	s := shadeGrid(l.Elev, l.Cols, l.Rows, true, l.Cell, opt) // a Local's row 0 is south
	out := make([]uint8, len(s))
	for i, v := range s {
		out[i] = grey(v)
	}
	putF32(s)
	return out
}

// grey converts cos θ to gdaldem's 1–255 scale, 0 for NaN (void).
func grey(v float32) uint8 {
	switch {
	case v != v:
		return 0
	case v <= 0:
		return 1
	}
	return uint8(math.Min(255, 1+254*float64(v)+0.5))
}

// shadeGrid computes cos θ (clamped at 0; NaN on voids) for a grid of
// square cells of size cell metres, row 0 north, or with southFirst row 0
// south (a terrain.Local's order; the result is in the same order). See
// Hillshade.
func shadeGrid(z []float32, cols, rows int, southFirst bool, cell float64, opt HillshadeOptions) []float32 {
	az, alt, k := opt.resolved()
	azr, altr := az*math.Pi/180, alt*math.Pi/180
	sinAlt, cosAlt := math.Sincos(altr)
	sinAz, cosAz := math.Sincos(azr)
	// Fold the constants: cos θ = (sinAlt − P·gx − Q·gy) / √(1 + k²(gx²+gy²)/(8Δ)²)
	// with gx, gy the raw Horn sums.
	inv := 1 / (8 * cell)
	px := k * inv * sinAz * cosAlt
	qy := k * inv * cosAz * cosAlt
	k2 := k * k * inv * inv
	out := getF32(len(z)) // every cell is written below
	nan := float32(math.NaN())
	for r := 0; r < rows; r++ {
		rn, r0, rs := max(r-1, 0), r, min(r+1, rows-1) // north to south
		if southFirst {
			rn, r0, rs = rows-1-rn, rows-1-r0, rows-1-rs
		}
		north, mid, south := z[rn*cols:(rn+1)*cols], z[r0*cols:(r0+1)*cols], z[rs*cols:(rs+1)*cols]
		o := out[r0*cols : (r0+1)*cols]
		for c, e := range mid {
			if e != e {
				o[c] = nan
				continue
			}
			cw, ce := max(c-1, 0), min(c+1, cols-1)
			a, b, cc := north[cw], north[c], north[ce]
			d, f := mid[cw], mid[ce]
			g, h, i := south[cw], south[c], south[ce]
			if s := a + b + cc + d + f + g + h + i; s != s { // a void among them (or ±Inf)
				a, b, cc = pick(a, e), pick(b, e), pick(cc, e)
				d, f = pick(d, e), pick(f, e)
				g, h, i = pick(g, e), pick(h, e), pick(i, e)
			}
			gx := float64((cc + 2*f + i) - (a + 2*d + g))
			gy := float64((a + 2*b + cc) - (g + 2*h + i))
			v := (sinAlt - px*gx - qy*gy) / math.Sqrt(1+k2*(gx*gx+gy*gy))
			o[c] = float32(max(v, 0)) // the builtin: math.Max's rules for NaN and -0, inline
		}
	}
	return out
}

// pick returns v, or e when v is a void.
func pick(v, e float32) float32 {
	if v != v {
		return e
	}
	return v
}
