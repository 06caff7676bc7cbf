package tiling

import (
	"io"
	"math"

	"glidereach/terrain"
)

// TileReader gives the finished tiles of a plan: a Result reads them from
// its work directory; a distributed engine may serve them from memory.
type TileReader interface {
	Tile(id TileID) (*TileResult, error)
}

// LeastGrid assembles the least altitudes of every tile (m MSL, NaN none)
// into one terrain.Grid on the plan's lattice. Memory: 4 bytes per lattice
// cell (400 MB for 10⁸ cells).
func LeastGrid(p *Plan, tiles TileReader) (*terrain.Grid, error) {
	g := p.Lattice.Grid()
	g.Format = "GeoTIFF"
	g.Elev = make([]float32, g.Cols*g.Rows)
	for _, id := range p.Tiles() {
		tr, err := tiles.Tile(id)
		if err != nil {
			return nil, err
		}
		for y := range tr.Rows {
			copy(g.Elev[(tr.R0+y)*g.Cols+tr.C0:], tr.Least[y*tr.Cols:(y+1)*tr.Cols])
		}
	}
	return g, nil
}

// WriteCOG writes the least altitudes as a cloud-optimised GeoTIFF in the
// lattice's CRS (terrain.GeoTIFFWriter with COG: 256-cell deflate tiles,
// floating-point predictor, overviews down to one tile). An overview cell
// is the WORST of the cells it covers: the highest least altitude, and NaN
// (no field reached below the ceiling) when any of them is NaN
// (terrain.OverviewMax); never an average, so a zoomed-out view never shows
// less altitude needed than a cell under it. NaN cells are flagged by
// GDAL_NODATA "nan". description goes in ImageDescription.
func WriteCOG(w io.Writer, p *Plan, tiles TileReader, description string) error {
	g, err := LeastGrid(p, tiles)
	if err != nil {
		return err
	}
	return terrain.GeoTIFFWriter{COG: true, Predictor: true, Overview: terrain.OverviewMax, Description: description}.Write(w, g)
}

// Margin is the covered margin of tile cell i (m): the altitude flown minus
// the least altitude, −1e4 where no field is reached, NaN outside the zone
// or over a void with AGL. A cell is covered where it is ≥ 0.
func Margin(p *Plan, tr *TileResult, i int) float64 {
	if !tr.InZone(i) {
		return math.NaN()
	}
	f := tr.FlownAt(i, p)
	if f != f {
		return math.NaN()
	}
	l := float64(tr.Least[i])
	if l != l {
		return -1e4
	}
	return f - l
}
