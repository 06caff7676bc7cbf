package plan

import (
	"math"

	"glidereach/reach"
	"glidereach/terrain"
)

// EdgeCut says where a footprint is cut off by the edge of the terrain data.
type EdgeCut struct {
	BearingDeg float64 // from the start to the mean of the cut cells, degrees true
	// AllRound is set when the cut cells lie on several sides of the start
	// (their mean direction is weak), so no one bearing describes them.
	AllRound bool
	Cells    int     // footprint cells next to the edge
	CoverM   float64 // half-size of the window the solver wanted, m: terrain this far around the start avoids the cut
}

// TerrainEdge finds footprint cells (arrival at least minAGL m above the
// ground) next to a cell that lies outside the terrain data (off grid, the
// DEM window read; a void inside the data is an obstacle, not an edge) or on
// the border of the solver's window. Such a footprint ends where the data
// ends, not where the glide does, and must say so; nil when none is, or on
// flat ground (grid nil).
func TerrainEdge(res *reach.FootprintResult, grid *terrain.Grid, minAGL float64) *EdgeCut {
	if grid == nil || res == nil || res.Ground == nil {
		return nil
	}
	l := res.Ground
	off := func(c, r int) bool {
		if c < 0 || r < 0 || c >= l.Cols || r >= l.Rows {
			return true
		}
		if e := l.Elev[r*l.Cols+c]; e == e {
			return false
		}
		x, y := l.XY(c, r)
		lat, lon := l.Frame.Inverse(x, y)
		return !Inside(grid, lat, lon)
	}
	var n int
	var ux, uy float64
	sx0, sy0 := l.Frame.Forward(res.Start.Lat, res.Start.Lon)
	for r := 0; r < l.Rows; r++ {
		for c := 0; c < l.Cols; c++ {
			k := r*l.Cols + c
			a, e := res.Arrival[k], l.Elev[k]
			if a != a || e != e || float64(a-e) < minAGL {
				continue
			}
			if off(c-1, r) || off(c+1, r) || off(c, r-1) || off(c, r+1) {
				x, y := l.XY(c, r)
				if d := math.Hypot(x-sx0, y-sy0); d > 0 {
					ux, uy = ux+(x-sx0)/d, uy+(y-sy0)/d
				}
				n++
			}
		}
	}
	if n == 0 {
		return nil
	}
	brg := math.Mod(math.Atan2(ux, uy)*180/math.Pi+360, 360)
	return &EdgeCut{BearingDeg: brg, AllRound: math.Hypot(ux, uy)/float64(n) < 0.5, Cells: n, CoverM: float64(max(l.Cols, l.Rows)-1) * l.Cell / 2}
}

// Inside reports whether lat, lon (degrees) lies within the grid's cells,
// in the grid's own CRS (so that a failed sample there means a void, not
// the edge of the data: a UTM grid's lon/lat box holds corners outside its
// cells).
func Inside(g *terrain.Grid, lat, lon float64) bool {
	x, y := lon, lat
	if zone, south, ok := terrain.UTMZone(g.CRS.EPSG); ok {
		x, y = terrain.UTM(zone, south).Forward(lat, lon)
	}
	return x >= g.X0-g.DX/2 && x <= g.X0+(float64(g.Cols)-0.5)*g.DX &&
		y <= g.Y0+g.DY/2 && y >= g.Y0-(float64(g.Rows)-0.5)*g.DY
}
