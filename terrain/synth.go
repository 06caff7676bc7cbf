package terrain

import (
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
)

// Centre of the synthetic terrain: a point in the open equatorial Atlantic,
// far from any land, so that no one mistakes the invented relief for a real
// place. The scenario is fictional.
const (
	SyntheticLat = -0.5
	SyntheticLon = -24.5
)

// Synthetic returns an invented, deterministic elevation grid for demos,
// tests and benchmarks: cols × rows cells of cell degrees (EPSG:4326),
// centred on SyntheticLat, SyntheticLon. The same seed gives the same grid,
// bit for bit, on every platform.
//
// The relief is laid out relative to the grid's size, so a small demo grid
// and a large benchmark grid show the same landscape: a valley floor near
// 150 m, three roughly parallel ridges (crests 600–1100 m) running
// south-west to north-east, a winding river valley cut down to about 40 m,
// a flat-topped plateau at exactly 700 m (a disc of about a tenth of the
// width, with a 2 % rim) and gentle two-octave noise (±30 m) everywhere but
// on the plateau top. There are no voids. Elevations are metres.
//
// Sizes: the demo uses about 600 × 600 cells of 1 arc-second (1/3600°,
// ≈ 31 m); the solver benchmarks 2000² and 5000². cols, rows and cell must be
// positive; Synthetic panics otherwise (a programming error, not user input).
func Synthetic(seed int64, cols, rows int, cell float64) *Grid {
	if cols <= 0 || rows <= 0 || !(cell > 0) || int64(cols)*int64(rows) > MaxCells {
		panic("terrain: Synthetic: bad size")
	}
	rng := rand.New(rand.NewPCG(uint64(seed), 0x9e3779b97f4a7c15))
	g := &Grid{
		CRS:  CRS{EPSG: 4326},
		Cols: cols, Rows: rows, DX: cell, DY: cell,
		X0:     SyntheticLon - float64(cols-1)/2*cell,
		Y0:     SyntheticLat + float64(rows-1)/2*cell,
		Format: "synthetic",
		Name:   "synthetic terrain (fictional, open Atlantic)",
	}
	g.Elev = make([]float32, cols*rows)

	theta := math.Pi/4 + (rng.Float64()-0.5)*0.3 // SW–NE trend
	var ridges [3]synthRidge
	for i := range ridges {
		t := theta + (rng.Float64()-0.5)*0.2
		off := (float64(i) - 1) * 0.3
		ridges[i] = synthRidge{
			px: 0.5 - off*math.Sin(theta), py: 0.5 + off*math.Cos(theta),
			cx: math.Cos(t), cy: math.Sin(t),
			h: 450 + 500*rng.Float64(), w: 0.05 + 0.03*rng.Float64(),
			k: 6 + 6*rng.Float64(), ph: 2 * math.Pi * rng.Float64(),
		}
	}
	// River: a sine meander across the grid between the first two ridges.
	rv0 := 0.35 + 0.1*rng.Float64()
	ra, rk, rph := 0.06+0.04*rng.Float64(), 8+6*rng.Float64(), 2*math.Pi*rng.Float64()
	// Plateau in the south-east quarter.
	pcx, pcy := 0.7+0.1*rng.Float64(), 0.2+0.1*rng.Float64()
	// Noise lattice 33×33, two octaves.
	var lat [33 * 33]float64
	for i := range lat {
		lat[i] = rng.Float64()*2 - 1
	}
	noise := func(u, v float64) float64 {
		s := 0.0
		amp := 20.0
		for f := 8.0; f <= 16; f *= 2 {
			x, y := u*f, v*f
			i, j := int(x), int(y)
			tx, ty := x-float64(i), y-float64(j)
			tx, ty = tx*tx*(3-2*tx), ty*ty*(3-2*ty)
			i, j = i%32, j%32
			a, b := lat[j*33+i], lat[j*33+i+1]
			c, d := lat[(j+1)*33+i], lat[(j+1)*33+i+1]
			s += amp * ((a*(1-tx)+b*tx)*(1-ty) + (c*(1-tx)+d*tx)*ty)
			amp /= 2
		}
		return s
	}
	su, sv := 1/float64(max(cols-1, 1)), 1/float64(max(rows-1, 1))
	river := make([]float64, cols) // river centre line, per column
	for c := range river {
		river[c] = rv0 + ra*math.Sin(float64(c)*su*rk+rph)
	}
	// Rows are independent: compute them in parallel (the result does not
	// depend on the split).
	workers := max(1, min(runtime.GOMAXPROCS(0), rows/64))
	var wg sync.WaitGroup
	for wkr := 0; wkr < workers; wkr++ {
		wg.Add(1)
		go func(r0, r1 int) {
			defer wg.Done()
			synthRows(g, r0, r1, su, sv, river, ridges[:], noise, pcx, pcy)
		}(rows*wkr/workers, rows*(wkr+1)/workers)
	}
	wg.Wait()
	return g
}

type synthRidge struct{ px, py, cx, cy, h, w, k, ph float64 }

// synthRows fills rows r0..r1-1 of the synthetic grid.
func synthRows(g *Grid, r0, r1 int, su, sv float64, river []float64, ridges []synthRidge, noise func(u, v float64) float64, pcx, pcy float64) {
	const pr, prim, ptop = 0.1, 0.02, 700.0
	cols := g.Cols
	for r := r0; r < r1; r++ {
		v := 1 - float64(r)*sv // 0 south, 1 north
		for c := 0; c < cols; c++ {
			u := float64(c) * su
			z := 150.0
			for _, q := range ridges {
				dx, dy := u-q.px, v-q.py
				along := dx*q.cx + dy*q.cy
				across := (-dx*q.cy + dy*q.cx) / q.w
				if a2 := across * across; a2 < 40 { // beyond, below 1e-15 of the crest
					z += q.h * (0.75 + 0.25*math.Sin(along*q.k+q.ph)) * math.Exp(-a2)
				}
			}
			if dv := (v - river[c]) / 0.03; dv*dv < 40 {
				z -= (z - 40) * math.Exp(-dv*dv) * 0.9
			}
			z += noise(u, v)
			du, dw := u-pcx, v-pcy
			if d := math.Sqrt(du*du + dw*dw); d < pr+prim {
				t := math.Min(1, (pr+prim-d)/prim)
				t = t * t * (3 - 2*t)
				z = z*(1-t) + ptop*t
			}
			g.Elev[r*cols+c] = float32(z)
		}
	}
}
