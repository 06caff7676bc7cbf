package tiling

import (
	"context"
	"math"
	"sort"
	"testing"

	"glidereach/reach"
)

// quantiles returns the 0.1, 1, 50, 99 and 99.9 % quantiles of ds (sorted
// in place).
func quantiles(ds []float64) [5]float64 {
	sort.Float64s(ds)
	n := len(ds)
	return [5]float64{ds[n/1000], ds[n/100], ds[n/2], ds[n*99/100], ds[min(n-1, n*999/1000)]}
}

// On the tiled path's own lattice (each field's frame, window and cell) the
// single-grid solver gives the tiled result exactly, and the tiled read is
// never below the single grid's interpolated value.
//
// The single grid here is reach.Required — the solver the single-grid
// coverage runs — for each field alone on the same obstacle surface
// (FieldWindow: the same frame, cell and extent). Read by the tiled rule
// (the highest of the four solver cells around each output cell centre)
// and merged by the least over the fields, it must be the tiled mosaic bit
// for bit, with 64-cell tiles or one tile: the tiling, the parts and the
// merge add nothing and lose nothing, and no tile edge shows (a cell's
// value depends on no tile boundary). Read bilinearly at the exact cell
// centres (reach.RequiredResult.RequiredAt, what the single-grid command
// writes), it is never above the tiled value: the only difference on one
// lattice is the conservative read, and it errs toward more altitude
// needed. Tolerance 0.01 m below, for the cell-centre map of the tiled
// read (exact every 16 cells, linear between: millimetres).
func TestTiledEqualsSingleGridOnItsLattice(t *testing.T) {
	if raceEnabled {
		t.Skip("long sequential comparison: run in full by the plain go test, not under -race")
	}
	sc := newScene(t, 500)
	const alt = 1000.0
	ctx := context.Background()
	p, _, tiled := sc.runTiled(t, 64, alt)
	_, _, one := sc.runTiled(t, 1024, alt)

	l := p.Lattice
	g := l.Grid()
	n := l.Cols * l.Rows
	same := make([]float32, n) // the single grids read by the tiled rule, least over the fields
	bil := make([]float64, n)  // the single grids read bilinearly, least over the fields
	for i := range same {
		same[i], bil[i] = float32(math.NaN()), math.NaN()
	}
	jobs, _, err := p.FieldJobs()
	if err != nil {
		t.Fatal(err)
	}
	if len(jobs) != len(sc.fields) {
		t.Fatalf("%d jobs for %d fields", len(jobs), len(sc.fields))
	}
	for _, job := range jobs {
		ground, err := FieldWindow(sc.src, p, &job)
		if err != nil {
			t.Fatal(err)
		}
		single, err := reach.Required(ctx, ground, []reach.Target{job.Target}, sc.table,
			reach.RequiredOptions{Clearance: p.Clearance, Ceiling: p.Ceiling, Workers: 1})
		if err != nil {
			t.Fatal(err)
		}
		for _, id := range job.Tiles {
			part := p.sampleTile(ground, single.Required, job.Index, id)
			if part == nil {
				continue
			}
			c0, r0, _, _ := p.TileBox(id)
			for y := range part.H {
				for x := range part.W {
					v := part.Least[y*part.W+x]
					k := (r0+part.R0+y)*l.Cols + c0 + part.C0 + x
					if v == v && (same[k] != same[k] || v < same[k]) {
						same[k] = v
					}
				}
			}
		}
		for r := range l.Rows {
			for c := range l.Cols {
				lat, lon, err := g.FromCRS(g.X0+float64(c)*g.DX, g.Y0-float64(r)*g.DY)
				if err != nil {
					t.Fatal(err)
				}
				if v, _, ok := single.RequiredAt(lat, lon); ok && (bil[r*l.Cols+c] != bil[r*l.Cols+c] || v < bil[r*l.Cols+c]) {
					bil[r*l.Cols+c] = v
				}
			}
		}
	}
	// Continuity across tile edges: the step of the least altitude between
	// two neighbouring cells on either side of a 64-cell tile edge is like
	// the step between neighbours inside a tile (the mosaics being bit for
	// bit equal makes this so; this states it on the values).
	var edgeSum, inSum, edgeMax, inMax float64
	var edgeN, inN int
	for r := range l.Rows {
		for c := range l.Cols {
			k := r*l.Cols + c
			for _, nb := range [][2]int{{c + 1, r}, {c, r + 1}} {
				if nb[0] >= l.Cols || nb[1] >= l.Rows {
					continue
				}
				a, b := float64(tiled[k]), float64(tiled[nb[1]*l.Cols+nb[0]])
				if a != a || b != b {
					continue
				}
				d := math.Abs(a - b)
				if nb[0]%64 == 0 && nb[0] != c || nb[1]%64 == 0 && nb[1] != r {
					edgeSum, edgeMax, edgeN = edgeSum+d, max(edgeMax, d), edgeN+1
				} else {
					inSum, inMax, inN = inSum+d, max(inMax, d), inN+1
				}
			}
		}
	}
	t.Logf("step between neighbours: across tile edges mean %.3f m, max %.2f m (%d pairs); inside tiles mean %.3f m, max %.2f m (%d pairs)",
		edgeSum/float64(edgeN), edgeMax, edgeN, inSum/float64(inN), inMax, inN)
	if edgeN < 100 || edgeSum/float64(edgeN) > 1.5*inSum/float64(inN) || edgeMax > inMax {
		t.Errorf("a seam: steps across tile edges mean %.3f m, max %.2f m; inside tiles mean %.3f m, max %.2f m", edgeSum/float64(edgeN), edgeMax, inSum/float64(inN), inMax)
	}

	var ds []float64
	var below, tiledOnly, bilOnly int
	worstBelow := 0.0
	for k := range n {
		if math.Float32bits(tiled[k]) != math.Float32bits(same[k]) {
			t.Fatalf("cell %d: tiled %v, single grid on the same lattice read the same way %v", k, tiled[k], same[k])
		}
		if math.Float32bits(one[k]) != math.Float32bits(tiled[k]) {
			t.Fatalf("cell %d: %v with 64-cell tiles, %v with one tile", k, tiled[k], one[k])
		}
		a, b := float64(tiled[k]), bil[k]
		switch {
		case a != a && b != b:
		case b != b:
			tiledOnly++
		case a != a:
			bilOnly++ // the tiled read needs all four cells: fewer cells, never more
		default:
			d := a - b
			ds = append(ds, d)
			if d < -0.01 {
				below++
				worstBelow = min(worstBelow, d)
			}
		}
	}
	if len(ds) < n/4 {
		t.Fatalf("only %d of %d cells valued", len(ds), n)
	}
	q := quantiles(ds)
	t.Logf("tiled − single grid (same lattice, bilinear read), %d cells: 0.1%% %.3f, 1%% %.3f, 50%% %.3f, 99%% %.3f, 99.9%% %.3f m, max %.3f m; %d cells valued only by the bilinear read",
		len(ds), q[0], q[1], q[2], q[3], q[4], ds[len(ds)-1], bilOnly)
	if below > 0 || tiledOnly > 0 {
		t.Errorf("%d cells tiled below the single grid on the same lattice (worst %.3f m), %d valued only by the tiled read", below, worstBelow, tiledOnly)
	}
	// The conservative read's cost, stated in the README: up to one solver
	// cell's rise of the least altitude, median ≈ 1/(2·E) of a cell (a glide
	// ratio E ≈ 9 over 31 m cells: ≈ 1.7 m), more across ridges where the
	// clearance above the terrain sets the value.
	if q[2] > 3 || q[4] > 16 {
		t.Errorf("conservative read costs more than stated: median %.2f m (≤ 3), 99.9 %% %.2f m (≤ 16)", q[2], q[4])
	}
	// Where the bilinear read has a value and the tiled one does not (a
	// cell next to the reach's edge): the tiled output says "not reached",
	// less coverage, never more.
	if frac := float64(bilOnly) / float64(len(ds)); frac > 0.02 {
		t.Errorf("%.2f %% of the cells valued by the bilinear read only", 100*frac)
	}
}
