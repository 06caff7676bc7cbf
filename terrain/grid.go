package terrain

// CRS identifies the coordinate reference system of a Grid by EPSG code:
// 4326 (WGS84 geographic, lon/lat degrees), 326zz / 327zz (WGS84 UTM zone zz
// north / south) or 258zz (ETRS89 UTM zone zz, taken as WGS84: the two differ
// by under a metre, far below DEM accuracy).
type CRS struct {
	EPSG int
}

// Grid is an elevation raster in its own CRS, north-up, as read from a file.
// Cell (c, r) has its centre at CRS coordinates
//
//	X = X0 + c·DX,  Y = Y0 − r·DY   (row 0 is the north row, DX, DY > 0)
//
// in degrees for a geographic CRS and metres for UTM. Elev holds metres MSL,
// row-major (r·Cols + c); NaN marks a void.
type Grid struct {
	CRS        CRS
	Cols, Rows int
	X0, Y0     float64 // centre of the north-west cell (0, 0)
	DX, DY     float64 // cell size, both positive
	Elev       []float32
	Format     string // "GeoTIFF", "SRTM hgt", "ESRI ASCII grid", "mosaic", "synthetic"
	Name       string // file name(s), for output
}
