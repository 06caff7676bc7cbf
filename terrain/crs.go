package terrain

// ToCRS maps latitude and longitude (degrees, WGS84) to the grid's own CRS
// coordinates: (lon, lat) in degrees for EPSG:4326, (easting, northing) in
// metres for a UTM zone (transverse Mercator of the zone, as the readers
// use). It fails only for a CRS the package does not know.
func (g *Grid) ToCRS(lat, lon float64) (x, y float64, err error) { return g.toCRS(lat, lon) }

// FromCRS maps the grid's CRS coordinates back to latitude and longitude
// (degrees, WGS84); the inverse of ToCRS.
func (g *Grid) FromCRS(x, y float64) (lat, lon float64, err error) { return g.fromCRS(x, y) }
