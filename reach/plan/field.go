package plan

import "github.com/paulmach/orb"

// Field is a landing field of a request, in library values (degrees, m
// MSL, m): what the use cases need of a field, whatever file it came from.
// The command line's input.Field has the same fields, so it converts with
// plan.Field(f).
type Field struct {
	Name string
	// Lat, Lon is the landing point (degrees): a point field itself, the
	// area centroid of a polygon, the midpoint of a strip.
	Lat, Lon float64
	// Elevation is the field's elevation, m MSL; HasElevation is false when
	// none is given (the use case then takes it from the terrain or the
	// flat ground).
	Elevation    float64
	HasElevation bool
	Length       float64     // usable length, m; 0 when not given
	Surface      string      // free text ("grass", "sand", …); "" when not given
	Polygon      orb.Polygon // the field's outline (lon/lat, exterior counter-clockwise); nil for a point
	// Strip holds the two ends (lon, lat) of a strip usable from both ends;
	// nil otherwise.
	Strip orb.LineString
	// LandingDirs are the directions (degrees true, 0..360) a landing may
	// be made in; nil = any direction (for a strip: its two directions).
	LandingDirs []float64
	// PatternSide is "left", "right" or "" (not given).
	PatternSide string
}

// FieldResult is one landing field judged from a start (Reach): reachable
// or not with the reserve, the arrival height, and the least start
// altitude that would reach it with the reserve in every wind of the
// setup. NaN means "not known" for ArrivalAGLM, RequiredMSL and MarginM
// (off the window, not reached, or off the data; Note says why).
type FieldResult struct {
	Name        string
	Lat, Lon    float64 // degrees
	ElevationM  float64 // m MSL
	Reachable   bool    // reached with at least the reserve, in every wind
	ArrivalAGLM float64 // m above the field on arrival (lowest over the winds)
	RequiredMSL float64 // m MSL: the least start altitude reaching it with the reserve in every wind
	DistanceM   float64 // m, geodesic (WGS84), start to field
	BearingDeg  float64 // degrees true, start to field
	LengthM     float64 // m, from the field; 0 when not given
	Surface     string
	MarginM     float64 // ArrivalAGLM − reserve, m
	Note        string  // why a figure is missing, "" when none is
}
