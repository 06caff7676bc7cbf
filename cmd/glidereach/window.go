package main

import (
	"fmt"
	"io"
	"math"
	"sync"

	"glidereach/reach/plan"
	"glidereach/terrain"
)

// warnOnce returns a warn function for ground that prints each distinct
// warning once on w.
func warnOnce(w io.Writer) func(string) {
	var mu sync.Mutex
	seen := map[string]bool{}
	return func(msg string) {
		mu.Lock()
		defer mu.Unlock()
		if !seen[msg] {
			seen[msg] = true
			fmt.Fprintln(w, "glidereach: warning:", msg)
		}
	}
}

// displayTerrain is the terrain a map is drawn over for the solver window
// l: the DEM itself, resampled bilinearly onto l's extent at the DEM's own
// resolution (at most displaySide cells a side), not l. The solvers' window
// holds the highest DEM sample of each cell (conservative for clearance),
// and where its cells and the DEM's do not line up that maximum takes 2 or
// 3 samples by turns, which the hillshade drew as a lattice of squares
// (moiré); a window coarser than the DEM also drew as stair-steps. Flat
// ground, or a failure to read the DEM again, returns l.
func displayTerrain(l *terrain.Local, g plan.Ground) *terrain.Local {
	if g.Src == nil || l.Flat {
		return l
	}
	const displaySide = 1600
	w := float64(max(l.Cols, l.Rows)-1) * l.Cell
	cell := math.Max(g.Src.Resolution(), w/(displaySide-1))
	if !(cell > 0) || cell >= l.Cell {
		cell = math.Min(l.Cell, math.Max(cell, w/(displaySide-1)))
	}
	cols := int(float64(l.Cols-1)*l.Cell/cell) + 1
	rows := int(float64(l.Rows-1)*l.Cell/cell) + 1
	d, err := terrain.ResampleSource(g.Src, l.Frame, l.X0, l.Y0, cell, cols, rows)
	if err != nil {
		return l
	}
	d.Source = l.Source
	return d
}
