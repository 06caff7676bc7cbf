package input

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/paulmach/orb"

	"glidereach/reach/geodesy"
)

// Field is a landing field read from a user GeoJSON file. Coordinates are
// decimal degrees (WGS84), lengths and elevations metres.
type Field struct {
	Name string
	// Lat, Lon is the landing point: the Point itself, or the area centroid
	// of a Polygon (computed in lon/lat, which for a field of a few hundred
	// metres differs from the ellipsoidal centroid by far less than a metre).
	Lat, Lon float64
	// Elevation is the field's elevation, m MSL, from property elevation_m;
	// HasElevation is false when the file gives none (the command then takes
	// it from the terrain or from --ground).
	Elevation    float64
	HasElevation bool
	Length       float64     // usable length, m, from length_m; 0 when not given
	Surface      string      // free text from surface ("grass", "sand", …); "" when not given
	Polygon      orb.Polygon // the field's outline for a Polygon feature (exterior counter-clockwise); nil for a Point
	// Strip holds the two ends (lon, lat) of a LineString field, a strip
	// usable from both ends; nil otherwise. Lat, Lon is then its midpoint.
	Strip orb.LineString
	// LandingDirs are the directions (degrees true, 0..360) a landing may
	// be made in, from property landing_directions; nil = any direction
	// (for a strip: its two directions).
	LandingDirs []float64
	// PatternSide is "left", "right" or "" (not given), from pattern_side.
	PatternSide string
}

// Property names read from each feature's "properties".
const (
	propName      = "name"
	propElevation = "elevation_m"
	propLength    = "length_m"
	propSurface   = "surface"
	propDirs      = "landing_directions"
	propSide      = "pattern_side"
)

// Plausibility bounds for field properties: the lowest dry land is about
// 430 m below sea level and the highest airstrips about 4400 m above it
// (common practice, from memory); the bounds leave room on both sides and
// catch feet given as metres only when grossly off.
const (
	minFieldElevation = -500.0  // m MSL
	maxFieldElevation = 9000.0  // m MSL
	maxFieldLength    = 20000.0 // m
)

// LoadFields reads a GeoJSON file of landing fields: a FeatureCollection
// (or a single Feature) of Point or Polygon features with properties
//
//	name         string, required, unique (compared without case and surrounding spaces)
//	elevation_m  number, optional, metres MSL
//	length_m     number, optional, metres, ≥ 0
//	surface      string, optional
//	landing_directions  array of degrees true (0..360), optional; absent = any
//	pattern_side string "left" or "right", optional
//
// A LineString is a strip usable from both ends: its first and last
// positions are the ends, its midpoint the landing point.
// Other properties are ignored. A Polygon's landing point is its area
// centroid; a polygon whose centroid falls outside it (an L- or U-shaped
// outline) is refused, since the landing point must be on the field — give
// such a field as a Point. Two fields with the same name are refused so that
// a field can be chosen by name without ambiguity. Coordinates follow
// RFC 7946 ([lon, lat], WGS84). Errors are *UsageError naming the file, the
// feature ("features[3]") and its line.
func LoadFields(path string) ([]Field, error) {
	data, err := readInputFile(path)
	if err != nil {
		return nil, err
	}
	fields, err := ParseFields(data)
	if err != nil {
		return nil, &UsageError{Where: path, Err: err}
	}
	return fields, nil
}

// ParseFields parses the GeoJSON text of a fields file (see LoadFields). Its
// errors name the feature and line but not the file.
func ParseFields(data []byte) ([]Field, error) {
	feats, err := readGeoJSON(data)
	if err != nil {
		return nil, err
	}
	if len(feats) == 0 {
		return nil, errors.New("no features: a fields file needs at least one Point or Polygon feature")
	}
	out := make([]Field, 0, len(feats))
	seen := make(map[string]int, len(feats))
	for i := range feats {
		f := &feats[i]
		fl, err := fieldFrom(f)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", f.where(), err)
		}
		key := strings.ToLower(strings.TrimSpace(fl.Name))
		if j, dup := seen[key]; dup {
			return nil, fmt.Errorf("%s: field name %q is used twice (also %s); names must be unique", f.where(), fl.Name, feats[j].where())
		}
		seen[key] = i
		out = append(out, fl)
	}
	return out, nil
}

func fieldFrom(f *geoFeature) (Field, error) {
	var fl Field
	name, ok, err := stringProp(f.Props, propName)
	if err != nil {
		return fl, err
	}
	if !ok || strings.TrimSpace(name) == "" {
		return fl, fmt.Errorf("missing property %q (every field needs a name)", propName)
	}
	fl.Name = strings.TrimSpace(name)
	switch g := f.Geom.(type) {
	case orb.Point:
		fl.Lon, fl.Lat = g[0], g[1]
	case orb.Polygon:
		c, ok := polygonCentroid(g)
		if !ok {
			return fl, fmt.Errorf("field %q: the centroid of its polygon lies outside it; give the landing point as a Point feature", fl.Name)
		}
		fl.Lon, fl.Lat = c[0], c[1]
		fl.Polygon = g
	case orb.LineString:
		if err := stripFrom(&fl, g); err != nil {
			return fl, err
		}
	default:
		return fl, fmt.Errorf("field %q: geometry %s not supported (want Point, Polygon or a LineString strip)", fl.Name, f.Kind)
	}
	if raw, ok := f.Props[propDirs]; ok && string(raw) != "null" {
		var dirs []float64
		if err := json.Unmarshal(raw, &dirs); err != nil || len(dirs) == 0 {
			return fl, fmt.Errorf("field %q: property %q must be a non-empty array of degrees true, not %s", fl.Name, propDirs, shorten(raw))
		}
		for i, d := range dirs {
			if !(d >= 0 && d <= 360) {
				return fl, fmt.Errorf("field %q: %s[%d] = %v is outside 0..360 degrees", fl.Name, propDirs, i, d)
			}
			dirs[i] = math.Mod(d, 360)
		}
		fl.LandingDirs = dirs
	}
	if s, ok, err := stringProp(f.Props, propSide); err != nil {
		return fl, err
	} else if ok {
		switch v := strings.ToLower(strings.TrimSpace(s)); v {
		case "left", "right":
			fl.PatternSide = v
		default:
			return fl, fmt.Errorf("field %q: %s %q: want left or right", fl.Name, propSide, s)
		}
	}
	if v, ok, err := numberProp(f.Props, propElevation); err != nil {
		return fl, err
	} else if ok {
		if v < minFieldElevation || v > maxFieldElevation {
			return fl, fmt.Errorf("field %q: %s %v outside %v..%v m", fl.Name, propElevation, v, minFieldElevation, maxFieldElevation)
		}
		fl.Elevation, fl.HasElevation = v, true
	}
	if v, ok, err := numberProp(f.Props, propLength); err != nil {
		return fl, err
	} else if ok {
		if v < 0 || v > maxFieldLength {
			return fl, fmt.Errorf("field %q: %s %v outside 0..%v m", fl.Name, propLength, v, maxFieldLength)
		}
		if fl.Strip == nil || v < fl.Length {
			fl.Length = v
		}
	}
	if s, ok, err := stringProp(f.Props, propSurface); err != nil {
		return fl, err
	} else if ok {
		fl.Surface = strings.TrimSpace(s)
	}
	return fl, nil
}

// stripFrom reads a LineString strip: its first and last positions are the
// ends (inner vertices are ignored), its midpoint the landing point, its
// geodesic length the usable length unless length_m says less.
func stripFrom(fl *Field, g orb.LineString) error {
	a, b := g[0], g[len(g)-1]
	s, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: a[1], Lon: a[0]}, geodesy.LatLon{Lat: b[1], Lon: b[0]})
	if err != nil {
		return fmt.Errorf("field %q: strip ends: %w", fl.Name, err)
	}
	if !(s >= 1) {
		return fmt.Errorf("field %q: the strip has zero length (its ends are %.1f m apart); give two distinct ends", fl.Name, s)
	}
	if s > maxFieldLength {
		return fmt.Errorf("field %q: the strip is %.0f m long, more than %v m", fl.Name, s, maxFieldLength)
	}
	fl.Strip = orb.LineString{a, b}
	fl.Lon, fl.Lat = (a[0]+b[0])/2, (a[1]+b[1])/2
	fl.Length = s
	return nil
}

// stringProp returns property key as a string; null counts as absent.
func stringProp(props map[string]json.RawMessage, key string) (string, bool, error) {
	raw, ok := props[key]
	if !ok || string(raw) == "null" {
		return "", false, nil
	}
	var s string
	if err := json.Unmarshal(raw, &s); err != nil {
		return "", false, fmt.Errorf("property %q must be a string, not %s", key, shorten(raw))
	}
	return s, true, nil
}

// numberProp returns property key as a finite number; null counts as absent.
func numberProp(props map[string]json.RawMessage, key string) (float64, bool, error) {
	raw, ok := props[key]
	if !ok || string(raw) == "null" {
		return 0, false, nil
	}
	var v float64
	if err := json.Unmarshal(raw, &v); err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, false, fmt.Errorf("property %q must be a number of metres, not %s", key, shorten(raw))
	}
	return v, true, nil
}

func shorten(raw []byte) string {
	if len(raw) > 40 {
		return string(raw[:37]) + "..."
	}
	return string(raw)
}

// polygonCentroid returns the area centroid of p's exterior ring less its
// holes (planar in lon/lat, shoelace formula) and whether it lies inside p.
//
//	Cx = Σ (x_i + x_{i+1})(x_i·y_{i+1} − x_{i+1}·y_i) / (6A), likewise Cy
func polygonCentroid(p orb.Polygon) (orb.Point, bool) {
	var sa, sx, sy float64
	for _, r := range p {
		// Offset by the first vertex to keep the products well conditioned.
		ox, oy := r[0][0], r[0][1]
		var a, cx, cy float64
		for i := 0; i+1 < len(r); i++ {
			x0, y0 := r[i][0]-ox, r[i][1]-oy
			x1, y1 := r[i+1][0]-ox, r[i+1][1]-oy
			c := x0*y1 - x1*y0
			a += c
			cx += (x0 + x1) * c
			cy += (y0 + y1) * c
		}
		// a is twice the signed area; holes are clockwise and subtract.
		if a != 0 {
			sx += cx/3 + ox*a
			sy += cy/3 + oy*a
			sa += a
		}
	}
	if sa == 0 {
		return orb.Point{}, false
	}
	c := orb.Point{sx / sa, sy / sa}
	return c, polygonContains(p, c[0], c[1])
}

// FindField returns the field named name (compared without case and
// surrounding spaces), or a *UsageError naming the flag and listing the
// names when there is none.
func FindField(fields []Field, name, flag string) (Field, error) {
	key := strings.ToLower(strings.TrimSpace(name))
	names := make([]string, 0, len(fields))
	for _, f := range fields {
		if strings.ToLower(f.Name) == key {
			return f, nil
		}
		names = append(names, fmt.Sprintf("%q", f.Name))
	}
	return Field{}, Usagef(flag, "no field named %q (have %s)", name, strings.Join(names, ", "))
}
