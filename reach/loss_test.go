package reach

import (
	"math"
	"math/rand/v2"
	"testing"
)

// skewLoss is a loss model with a different glide ratio in every direction
// and no symmetry about north (a tailwind from about 220°): the direction
// blend of the descent table shows up in its figures.
func skewLoss(e float64) LossFunc {
	return func(h, b float64) float64 { return 1 / (e * (1 + 0.3*math.Sin(b-0.7))) }
}

// wrapBearings returns bearings (radians) at every multiple of 90° and a
// hair either side of it: ±1e-9° and ±1e-15 rad (the latter rounds to the
// multiple when reduced to [0, 360°) — the case that broke the blend).
func wrapBearings() []float64 {
	var out []float64
	for k := -1; k <= 4; k++ {
		base := float64(k) * math.Pi / 2
		for _, d := range []float64{0, 1e-9 * math.Pi / 180, -1e-9 * math.Pi / 180, 1e-15, -1e-15, 5e-324, -5e-324} {
			out = append(out, base+d)
		}
	}
	return out
}

func TestDescentDirectionWrap(t *testing.T) {
	// Regression (issue 11, defect 1): a track a hair west of north reduced
	// to exactly 360° and was blended as direction 0 with weight 360, which
	// extrapolated the two columns: a field due north of the start got an
	// arrival hundreds of metres above the start.
	//
	// Reference: with a loss that does not depend on altitude the descent
	// on a held track is the straight line h₂ = h₁ − λ(θ)·L (definition of
	// the loss, no source needed); the table's 1° columns are linear in
	// between, so the figures agree within 0.1 % of the height lost.
	m := skewLoss(12)
	d, err := newDescentFor(m, 0, 2000)
	if err != nil {
		t.Fatal(err)
	}
	const h, L = 1800.0, 6000.0
	for _, b := range wrapBearings() {
		d0, d1, w := d.dirIndex(b)
		if d0 < 0 || d0 >= d.nDir || d1 < 0 || d1 >= d.nDir || !(w >= 0 && w < 1) {
			t.Errorf("bearing %.17g: dirIndex = %d, %d, %g", b, d0, d1, w)
		}
		want := h - m.Loss(h, b)*L
		tol := 1e-3 * (h - want)
		if got := d.arrive(h, b, L); math.Abs(got-want) > tol {
			t.Errorf("arrive on bearing %.17g rad: %.3f m, want %.3f m", b, got, want)
		}
		if got := d.depart(want, b, L); math.Abs(got-h) > tol {
			t.Errorf("depart on bearing %.17g rad: %.3f m, want %.3f m", b, got, h)
		}
		// The same track given as a vector, as the any-angle search does.
		dx, dy := math.Sin(b), math.Cos(b)
		if got := d.arriveVec(h, dx, dy, L); math.Abs(got-want) > tol {
			t.Errorf("arriveVec (%.17g, %.17g): %.3f m, want %.3f m", dx, dy, got, want)
		}
		if got := d.departVec(want, dx, dy, L); math.Abs(got-h) > tol {
			t.Errorf("departVec (%.17g, %.17g): %.3f m, want %.3f m", dx, dy, got, h)
		}
	}
	// Vectors a hair west of north, as a frame projection gives for a field
	// on the start's meridian.
	for _, dx := range []float64{-1e-13, -1e-16, -5e-324, 1e-13} {
		want := h - m.Loss(h, 0)*L
		if got := d.arriveVec(h, dx, 1, L); math.Abs(got-want) > 1e-3*(h-want) {
			t.Errorf("arriveVec (%g, 1): %.3f m, want %.3f m", dx, got, want)
		}
	}
}

func TestTableGridDirectionWrap(t *testing.T) {
	// The speed-to-fly table and the final glide's track table locate a
	// bearing with tableGrid.cell: at and a hair either side of every
	// multiple of 90° the columns must be valid and the weight in [0, 1]
	// (the descent table's wrap bug, issue 11 defect 1, must not exist
	// here either).
	g := tableGrid{hMin: 0, hMax: 1000, dh: 50, nh: 21, nd: TableDirections}
	for _, b := range wrapBearings() {
		_, _, j0, j1, tb, ok := g.cell(500, b)
		if !ok || j0 < 0 || j0 >= g.nd || j1 < 0 || j1 >= g.nd || !(tb >= 0 && tb <= 1) {
			t.Errorf("bearing %.17g: columns %d, %d, weight %g, ok %v", b, j0, j1, tb, ok)
		}
		// Within 1e-9° of a multiple of 90° the weight sits at an end.
		if j0%90 != 0 && j1%90 != 0 {
			t.Errorf("bearing %.17g: columns %d, %d are not beside a multiple of 90°", b, j0, j1)
		}
	}
}

// TestLossRangeDirTabulated checks the tabulated reciprocals of
// lossRangeDir against the two divisions they replace, bit for bit, for
// every pair of neighbouring columns and a spread of other pairs, in a
// layered wind with a band of directions that makes no headway at some
// altitudes (ratio 0: no bound on the loss). The identity
// 1/max(a, b) = min(1/a, 1/b) holds because IEEE 754 division is correctly
// rounded, so monotone (IEEE 754-2019 §4.3); the check is common practice,
// no source.
func TestLossRangeDirTabulated(t *testing.T) {
	model := LossFunc(func(h, bearing float64) float64 {
		d := math.Mod(bearing*180/math.Pi+360, 360)
		if d > 100 && d < 110 && h < 800 {
			return math.Inf(1) // no headway below 800 m on these tracks
		}
		return 1 / (30 + 10*math.Sin(bearing) + h/200)
	})
	d, err := newDescent(model, 0, 2000, 10, 360)
	if err != nil {
		t.Fatal(err)
	}
	old := func(d0, d1 int) (lo, hi float64) {
		lo, hi = 0, math.Inf(1)
		if r := max(d.dirMax[d0], d.dirMax[d1]); r > 0 {
			lo = 1 / r
		}
		if r := min(d.dirMin[d0], d.dirMin[d1]); r > 0 {
			hi = 1 / r
		}
		return lo, hi
	}
	infSeen := false
	for d0 := 0; d0 < d.nDir; d0++ {
		for _, d1 := range []int{(d0 + 1) % d.nDir, (d0 + 97) % d.nDir, d0} {
			lo, hi := d.lossRangeDir(d0, d1)
			wlo, whi := old(d0, d1)
			if math.Float64bits(lo) != math.Float64bits(wlo) || math.Float64bits(hi) != math.Float64bits(whi) {
				t.Fatalf("columns %d, %d: lossRangeDir %v, %v; divisions give %v, %v", d0, d1, lo, hi, wlo, whi)
			}
			infSeen = infSeen || math.IsInf(hi, 1)
		}
	}
	if !infSeen {
		t.Fatal("no column without headway: the test does not cover the +Inf case")
	}
}

// TestRowIndexIsHeightNear: the row index (rowOf, heightOnRow) must give,
// wherever it answers, the very altitude the search it replaces gives
// (heightNear from any start row, and heightAt's binary search): bit for
// bit, so that no solver value moves. The tables include the footprint
// benchmarks' (a sailplane in three wind layers), the same in winds three
// times as strong (headwind columns whose rows differ many-fold), and a
// made-up loss with rows of rising air (very long rows) and rows without
// headway (runs of equal distances, where the start row matters to
// heightNear). The distances tried: every row's own (and a hair either
// side), midpoints, seeded random ones, and the ends and beyond. The
// definition is the search's; no outside source is needed.
func TestRowIndexIsHeightNear(t *testing.T) {
	ac, err := Builtin("sailplane")
	if err != nil {
		t.Fatal(err)
	}
	var models []LossModel
	for _, scale := range []float64{1, 3} {
		tab, err := NewTable(ac, Atmosphere{}, layeredWind(t, scale), Conditions{}, -300, 2600)
		if err != nil {
			t.Fatal(err)
		}
		models = append(models, tab)
	}
	models = append(models, LossFunc(func(h, b float64) float64 {
		switch {
		case h > 600 && h < 700 && math.Cos(b) > 0.5:
			return math.Inf(1) // no headway
		case h > 1200 && h < 1300:
			return -0.5 // rising air
		}
		return 1 / (20 * (1 + 0.5*math.Sin(b-0.3)))
	}))
	rng := rand.New(rand.NewPCG(3, 5))
	for mi, m := range models {
		d, err := newDescentFor(m, 0, 1900)
		if err != nil {
			t.Fatal(err)
		}
		if d.binM == 0 {
			t.Fatalf("model %d: no row index", mi)
		}
		answered, asked := 0, 0
		for c := 0; c < d.nDir; c += 7 {
			row := d.column(c)
			var gs []float64
			for k := 0; k < d.nh; k++ {
				r := row.at(k)
				gs = append(gs, r, math.Nextafter(r, math.Inf(1)), math.Nextafter(r, math.Inf(-1)))
				if k+1 < d.nh {
					gs = append(gs, (r+row.at(k+1))/2)
				}
			}
			nRow := len(gs)
			for range 200 {
				gs = append(gs, row.at(0)*rng.Float64())
			}
			gs = append(gs, 0, -1, row.at(0)*1.01, math.Inf(1), math.NaN())
			for gi, g := range gs {
				random := gi >= nRow && gi < nRow+200
				if random {
					asked++
				}
				k := d.rowOf(row, g)
				if k < 0 {
					continue
				}
				h := d.heightOnRow(row, k, g)
				if random {
					answered++
				}
				want := d.heightAt(row, g)
				if math.Float64bits(h) != math.Float64bits(want) {
					t.Fatalf("model %d column %d g=%v: rowOf %v, heightAt %v", mi, c, g, h, want)
				}
				for _, hint := range []int{0, d.nh / 3, d.nh / 2, d.nh - 1, int(h-d.hBot)/int(d.dh) - 3, int(h-d.hBot)/int(d.dh) + 3} {
					if got := d.heightNear(row, g, hint); math.Float64bits(got) != math.Float64bits(h) {
						t.Fatalf("model %d column %d g=%v: rowOf %v, heightNear from row %d %v", mi, c, g, h, hint, got)
					}
				}
			}
		}
		// The index is there to answer: on the aircraft's tables nearly
		// every random distance gets an answer. The made-up loss's rows of
		// rising air are thousands of times longer than its others, so
		// most of its bins span several rows and are left to the search.
		t.Logf("model %d: the row index answered %d of %d random distances", mi, answered, asked)
		if mi < 2 && answered < asked*99/100 {
			t.Errorf("model %d: the row index answered %d of %d", mi, answered, asked)
		}
	}
}
