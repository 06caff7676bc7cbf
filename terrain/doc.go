// Package terrain reads elevation grids and gives them to the solvers.
//
// Elevations are metres above mean sea level (as the source gives them:
// SRTM heights are above the EGM96 geoid). Voids (no data) are NaN and are
// treated by the solvers as obstacles: a glide cannot be planned over
// unknown ground.
//
// A Grid is a DEM in its own coordinate reference system (geographic lon/lat
// or a UTM zone). A Local is a square-celled raster in a local metric Frame
// tangent to the WGS84 ellipsoid, resampled from a Grid (or flat), which is
// what the solvers read. Row 0 of a Local is its south row; row 0 of a Grid
// is its north row, as in the files.
package terrain
