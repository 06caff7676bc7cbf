package plan

import (
	"math"

	"glidereach/terrain"
)

// WindowSize says how far the glides of a use case can reach, for sizing
// its solver window: from Top (m MSL, the highest altitude a glide starts
// from) down to the lowest ground they meet, first guessed at Bottom (m
// MSL) and corrected from the window read. The sizing tables cover
// Bottom−Below .. TableTop (m MSL; TableTop ≥ Top, Below ≥ 0).
type WindowSize struct {
	Top, TableTop float64
	Bottom, Below float64
}

// SizeWindow finds the window the glides of sz can reach, by the
// worst-of-winds rule: open(radius) reads a window for the largest glide
// radius over s.Winds (Setup.GlideRadius, m; open adds its own margins); if
// the window's lowest ground lies below the guessed bottom the radius is
// found again down to it and the window read once more. Two passes at most:
// ground lower still in the second window is not chased further (a known
// limit; the second window is the larger one). The window returned may hold only voids (Lowest is then
// +Inf): the caller says so in its own words. Errors are GlideRadius's and
// open's.
func (s *Setup) SizeWindow(sz WindowSize, open func(radius float64) (*terrain.Local, *terrain.Grid, error)) (*terrain.Local, *terrain.Grid, error) {
	bottom := sz.Bottom
	var l *terrain.Local
	var grid *terrain.Grid
	for pass := 0; pass < 2; pass++ {
		radius, err := s.GlideRadius(sz.Top, bottom, bottom-sz.Below, sz.TableTop)
		if err != nil {
			return nil, nil, err
		}
		l, grid, err = open(radius)
		if err != nil {
			return nil, nil, err
		}
		lo := Lowest(l)
		if math.IsInf(lo, 1) || lo >= bottom-1 {
			break
		}
		bottom = lo
	}
	return l, grid, nil
}
