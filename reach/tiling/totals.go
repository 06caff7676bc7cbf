package tiling

import (
	"fmt"
	"sort"

	"glidereach/reach"
)

// Totals are the coverage figures of a whole run, summed over the tiles in
// row-major tile order (Add must be called in that order: float sums in a
// fixed order give the same bits whatever ran in parallel).
type Totals struct {
	plan                    *Plan
	next                    int
	ZoneCells, CoveredCells int64
	// ZoneArea and CoveredArea are ellipsoidal areas (m²); CoveredFraction
	// is CoveredArea / ZoneArea (0 for an empty zone).
	ZoneArea, CoveredArea, CoveredFraction float64
	// Covers[k] and Exclusive[k] are the zone area (m²) field k covers, and
	// covers alone.
	Covers, Exclusive []float64
	gains             map[int][]cellArea // candidate job index → cells it adds
}

type cellArea struct {
	cell int64 // lattice index r·Cols + c
	area float64
}

// NewTotals starts the sums of plan p.
func NewTotals(p *Plan) *Totals {
	return &Totals{plan: p, Covers: make([]float64, len(p.Fields)), Exclusive: make([]float64, len(p.Fields)), gains: map[int][]cellArea{}}
}

// Add adds the next tile (row-major order; an error otherwise).
func (t *Totals) Add(tr *TileResult) error {
	tiles := t.plan.Tiles()
	if t.next >= len(tiles) || tiles[t.next] != tr.Tile {
		return fmt.Errorf("tiling: totals: tile %v out of order", tr.Tile)
	}
	t.next++
	t.ZoneCells += tr.ZoneCells
	t.CoveredCells += tr.CoveredCells
	t.ZoneArea += tr.ZoneArea
	t.CoveredArea += tr.CoveredArea
	for _, f := range tr.Fields {
		if f.Field < 0 || f.Field >= len(t.Covers) {
			return fmt.Errorf("tiling: totals: tile %v names field %d of %d", tr.Tile, f.Field, len(t.Covers))
		}
		t.Covers[f.Field] += f.Covers
		t.Exclusive[f.Field] += f.Exclusive
	}
	cols := int64(t.plan.Lattice.Cols)
	for _, g := range tr.Gains {
		for _, i := range g.Cells {
			c, r := int(i)%tr.Cols, int(i)/tr.Cols
			t.gains[g.Field] = append(t.gains[g.Field], cellArea{int64(tr.R0+r)*cols + int64(tr.C0+c), tr.CellArea(c, r)})
		}
	}
	t.CoveredFraction = 0
	if t.ZoneArea > 0 {
		t.CoveredFraction = t.CoveredArea / t.ZoneArea
	}
	return nil
}

// Step is one step of the greedy choice of candidates, as on one grid.
type Step = reach.CandidateStep

// Ranking is the outcome of Totals.Rank.
type Ranking struct {
	Gain  []float64 // per candidate: the zone area (m²) it alone adds to the existing coverage
	Order []int     // candidates by falling gain (ties by index)
	Steps []Step
}

// Rank ranks the candidates by the area each alone adds, and chooses up to
// k of them greedily (each step the one adding most to the coverage so
// far: the standard greedy rule for maximum coverage, within 1 − 1/e of
// the best choice of k; Nemhauser, Wolsey and Fisher 1978), as
// reach.CoverageResult.Candidates does on one grid. Cost: O(k · Σ cells
// the candidates add), in memory 16 bytes per such cell. Call it after
// every tile was added.
func (t *Totals) Rank(k int) *Ranking {
	nc := len(t.plan.Candidates)
	nf := len(t.plan.Fields)
	rk := &Ranking{Gain: make([]float64, nc), Order: make([]int, nc)}
	for j := range nc {
		for _, c := range t.gains[nf+j] {
			rk.Gain[j] += c.area
		}
		rk.Order[j] = j
	}
	sort.SliceStable(rk.Order, func(a, b int) bool { return rk.Gain[rk.Order[a]] > rk.Gain[rk.Order[b]] })
	taken := map[int64]bool{}
	chosen := make([]bool, nc)
	covered := t.CoveredArea
	for range k {
		best, bestA := -1, 0.0
		for j := range nc {
			if chosen[j] {
				continue
			}
			a := 0.0
			for _, c := range t.gains[nf+j] {
				if !taken[c.cell] {
					a += c.area
				}
			}
			if a > bestA {
				best, bestA = j, a
			}
		}
		if best < 0 {
			break
		}
		chosen[best] = true
		for _, c := range t.gains[nf+best] {
			taken[c.cell] = true
		}
		covered += bestA
		frac := 0.0
		if t.ZoneArea > 0 {
			frac = covered / t.ZoneArea
		}
		rk.Steps = append(rk.Steps, Step{Candidate: best, Added: bestA, CoveredFraction: frac})
	}
	return rk
}
