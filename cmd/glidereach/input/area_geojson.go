package input

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"sort"

	"github.com/paulmach/orb"
	tgeo "github.com/tidwall/geojson"
	"github.com/tidwall/geojson/geometry"
)

// This file is the GeoJSON reading shared by the field, route and area
// loaders. It is the only place that sees tidwall/geojson types: each
// feature is parsed by tidwall/geojson and converted to orb geometry here.
//
// Rules applied (RFC 7946):
//   - §3: a GeoJSON text is a Geometry, a Feature or a FeatureCollection.
//   - §3.1.1: a position is [longitude, latitude] or [lon, lat, elevation];
//     further elements are ignored. Longitude and latitude are checked to lie
//     in [-180, 180] and [-90, 90] (§4: WGS84 decimal degrees).
//   - §3.1.6: a polygon ring is closed (first = last) with at least four
//     positions. The winding order is not enforced on input (§3.1.6: parsers
//     SHOULD NOT reject polygons that do not follow the right-hand rule); rings
//     are rewound to exterior counter-clockwise, holes clockwise.
//   - §3.2: a feature's "geometry" may be null and "properties" may be null;
//     a null geometry is refused here (a field, route or area needs a place).

// maxInputFile bounds the size of a user file read whole into memory.
const maxInputFile = 64 << 20

// readInputFile reads path, refusing files larger than maxInputFile. Errors
// are *UsageError naming the file.
func readInputFile(path string) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, &UsageError{Where: path, Err: errors.Unwrap(err)}
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, maxInputFile+1))
	if err != nil {
		return nil, &UsageError{Where: path, Err: err}
	}
	if len(data) > maxInputFile {
		return nil, Usagef(path, "file larger than %d MiB", maxInputFile>>20)
	}
	return data, nil
}

// geoFeature is one feature of a user GeoJSON text, converted to orb.
type geoFeature struct {
	Index int    // position in "features"; -1 for a bare geometry or a single Feature
	Line  int    // 1-based line where the feature starts in the text
	Kind  string // GeoJSON geometry type: "Point", "LineString", "Polygon", "MultiPolygon", …
	// Geom is orb.Point, orb.LineString, orb.Polygon or orb.MultiPolygon;
	// nil for the other geometry types, which the loaders refuse by Kind.
	Geom  orb.Geometry
	Z     []float64 // third coordinates of a Point or LineString; NaN where a position has none; nil if none has one
	Props map[string]json.RawMessage
}

// where names a feature in error messages: "features[3] (line 12)".
func (f *geoFeature) where() string {
	if f.Index < 0 {
		return fmt.Sprintf("line %d", f.Line)
	}
	return fmt.Sprintf("features[%d] (line %d)", f.Index, f.Line)
}

// lineCounter maps byte offsets of a text to 1-based line numbers.
type lineCounter []int // offsets of line starts

func newLineCounter(data []byte) lineCounter {
	lc := lineCounter{0}
	for i, b := range data {
		if b == '\n' {
			lc = append(lc, i+1)
		}
	}
	return lc
}

func (lc lineCounter) line(off int64) int {
	return sort.Search(len(lc), func(i int) bool { return int64(lc[i]) > off })
}

// skipSpace returns the offset of the first non-space byte at or after off.
func skipSpace(data []byte, off int64) int64 {
	for off < int64(len(data)) {
		switch data[off] {
		case ' ', '\t', '\r', '\n', ',':
			off++
		default:
			return off
		}
	}
	return off
}

// jsonError describes a JSON syntax error with its line.
func jsonError(err error, lc lineCounter) error {
	var se *json.SyntaxError
	if errors.As(err, &se) {
		return fmt.Errorf("line %d: invalid JSON: %w", lc.line(se.Offset), err)
	}
	var te *json.UnmarshalTypeError
	if errors.As(err, &te) {
		return fmt.Errorf("line %d: invalid JSON: %w", lc.line(te.Offset), err)
	}
	if errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF) {
		return fmt.Errorf("invalid JSON: unexpected end of file")
	}
	return fmt.Errorf("invalid JSON: %w", err)
}

// readGeoJSON splits a GeoJSON text into its features, each converted to
// orb. A bare geometry or a single Feature gives one feature with Index -1.
// Errors name the feature and its line; the caller adds the file name.
func readGeoJSON(data []byte) ([]geoFeature, error) {
	lc := newLineCounter(data)
	start := skipSpace(data, 0)
	if start >= int64(len(data)) || data[start] != '{' {
		return nil, fmt.Errorf("not a GeoJSON object (RFC 7946 §3: a Geometry, Feature or FeatureCollection)")
	}
	// The top level: find "type" and the raw "features" with their offsets.
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	if _, err := dec.Token(); err != nil { // '{'
		return nil, jsonError(err, lc)
	}
	var typ string
	type rawAt struct {
		raw json.RawMessage
		off int64
	}
	var features []rawAt
	haveFeatures := false
	for dec.More() {
		kt, err := dec.Token()
		if err != nil {
			return nil, jsonError(err, lc)
		}
		key, _ := kt.(string)
		switch key {
		case "type":
			if err := dec.Decode(&typ); err != nil {
				var te *json.UnmarshalTypeError
				if errors.As(err, &te) {
					return nil, fmt.Errorf("line %d: \"type\" must be a string", lc.line(te.Offset))
				}
				return nil, jsonError(err, lc)
			}
		case "features":
			haveFeatures = true
			t, err := dec.Token()
			if err != nil {
				return nil, jsonError(err, lc)
			}
			if d, ok := t.(json.Delim); !ok || d != '[' {
				return nil, fmt.Errorf("line %d: \"features\" must be an array (RFC 7946 §3.3)", lc.line(dec.InputOffset()))
			}
			for dec.More() {
				off := skipSpace(data, dec.InputOffset())
				var raw json.RawMessage
				if err := dec.Decode(&raw); err != nil {
					return nil, jsonError(err, lc)
				}
				features = append(features, rawAt{raw, off})
			}
			if _, err := dec.Token(); err != nil { // ']'
				return nil, jsonError(err, lc)
			}
		default:
			var skip json.RawMessage
			if err := dec.Decode(&skip); err != nil {
				return nil, jsonError(err, lc)
			}
		}
	}
	if _, err := dec.Token(); err != nil { // '}'
		return nil, jsonError(err, lc)
	}
	if _, err := dec.Token(); err != io.EOF {
		return nil, fmt.Errorf("line %d: unexpected data after the GeoJSON object", lc.line(dec.InputOffset()))
	}
	switch typ {
	case "":
		return nil, fmt.Errorf("line %d: missing \"type\" (RFC 7946 §3)", lc.line(start))
	case "FeatureCollection":
		if !haveFeatures {
			return nil, fmt.Errorf("line %d: FeatureCollection without \"features\" (RFC 7946 §3.3)", lc.line(start))
		}
		out := make([]geoFeature, 0, len(features))
		for i, f := range features {
			g, err := parseFeature(f.raw, i, lc.line(f.off))
			if err != nil {
				return nil, err
			}
			out = append(out, g)
		}
		return out, nil
	default:
		g, err := parseFeature(data[start:], -1, lc.line(start))
		if err != nil {
			return nil, err
		}
		return []geoFeature{g}, nil
	}
}

var tidwallOptions = &tgeo.ParseOptions{
	IndexChildren:     0, // no index: the loaders convert and drop the objects
	IndexGeometry:     0,
	DisableCircleType: true, // a Point with properties.type "Circle" stays a Point
}

// parseFeature parses one Feature or bare Geometry text with tidwall/geojson
// and converts it to orb.
func parseFeature(raw []byte, index, line int) (geoFeature, error) {
	g := geoFeature{Index: index, Line: line}
	var head struct {
		Type       string                     `json:"type"`
		Geometry   json.RawMessage            `json:"geometry"`
		Properties map[string]json.RawMessage `json:"properties"`
		Coords     json.RawMessage            `json:"coordinates"`
	}
	if err := json.Unmarshal(raw, &head); err != nil {
		return g, fmt.Errorf("%s: %w", g.where(), err)
	}
	geomRaw := raw
	switch head.Type {
	case "Feature":
		if len(head.Geometry) == 0 || string(head.Geometry) == "null" {
			return g, fmt.Errorf("%s: feature has no geometry", g.where())
		}
		geomRaw = head.Geometry
		g.Props = head.Properties
	case "":
		return g, fmt.Errorf("%s: missing \"type\" (RFC 7946 §3)", g.where())
	}
	obj, err := tgeo.Parse(string(geomRaw), tidwallOptions)
	if err != nil {
		if err.Error() == "invalid coordinates" {
			return g, fmt.Errorf("%s: %w (RFC 7946 §3.1: positions are [lon, lat] or [lon, lat, elevation] numbers, "+
				"the same count in every position; a LineString has at least 2; a ring is closed with at least 4)", g.where(), err)
		}
		return g, fmt.Errorf("%s: %w", g.where(), err)
	}
	if err := convert(&g, obj); err != nil {
		return g, fmt.Errorf("%s: %w", g.where(), err)
	}
	if g.Kind == "Point" || g.Kind == "LineString" {
		z, err := thirdCoordinates(geomRaw, g.Kind)
		if err != nil {
			return g, fmt.Errorf("%s: %w", g.where(), err)
		}
		g.Z = z
	}
	return g, nil
}

// convert fills g.Kind and g.Geom from a tidwall object and checks the
// coordinate ranges.
func convert(g *geoFeature, obj tgeo.Object) error {
	switch o := obj.(type) {
	case *tgeo.Point:
		g.Kind = "Point"
		p := orb.Point{o.Base().X, o.Base().Y}
		if err := checkPosition(p); err != nil {
			return err
		}
		g.Geom = p
	case *tgeo.LineString:
		g.Kind = "LineString"
		ls, err := series(o.Base())
		if err != nil {
			return err
		}
		g.Geom = orb.LineString(ls)
	case *tgeo.Polygon:
		g.Kind = "Polygon"
		p, err := polygon(o.Base())
		if err != nil {
			return err
		}
		g.Geom = p
	case *tgeo.MultiPolygon:
		g.Kind = "MultiPolygon"
		var mp orb.MultiPolygon
		for i, c := range o.Base() {
			pg, ok := c.(*tgeo.Polygon)
			if !ok {
				return fmt.Errorf("MultiPolygon member %d is not a polygon", i)
			}
			p, err := polygon(pg.Base())
			if err != nil {
				return fmt.Errorf("polygon %d: %w", i, err)
			}
			mp = append(mp, p)
		}
		g.Geom = mp
	case *tgeo.MultiPoint:
		g.Kind = "MultiPoint"
	case *tgeo.MultiLineString:
		g.Kind = "MultiLineString"
	case *tgeo.GeometryCollection:
		g.Kind = "GeometryCollection"
	case *tgeo.Feature:
		return fmt.Errorf("a Feature cannot be the geometry of a Feature")
	case *tgeo.FeatureCollection:
		return fmt.Errorf("a FeatureCollection cannot be nested")
	default:
		g.Kind = fmt.Sprintf("%T", obj)
	}
	return nil
}

func checkPosition(p orb.Point) error {
	lon, lat := p[0], p[1]
	if !(lon >= -180 && lon <= 180) {
		return fmt.Errorf("longitude %v out of range -180..180 (RFC 7946 §4: [lon, lat] order)", lon)
	}
	if !(lat >= -90 && lat <= 90) {
		return fmt.Errorf("latitude %v out of range -90..90 (RFC 7946 §4: [lon, lat] order)", lat)
	}
	return nil
}

func series(s geometry.Series) ([]orb.Point, error) {
	n := s.NumPoints()
	out := make([]orb.Point, n)
	for i := 0; i < n; i++ {
		p := s.PointAt(i)
		out[i] = orb.Point{p.X, p.Y}
		if err := checkPosition(out[i]); err != nil {
			return nil, fmt.Errorf("position %d: %w", i, err)
		}
	}
	return out, nil
}

// polygon converts a tidwall polygon, checks its rings (RFC 7946 §3.1.6)
// and rewinds them: exterior counter-clockwise, holes clockwise.
func polygon(p *geometry.Poly) (orb.Polygon, error) {
	rings := append([]geometry.Ring{p.Exterior}, p.Holes...)
	out := make(orb.Polygon, 0, len(rings))
	for i, r := range rings {
		pts, err := series(r)
		if err != nil {
			return nil, fmt.Errorf("ring %d: %w", i, err)
		}
		if len(pts) < 4 || pts[0] != pts[len(pts)-1] {
			return nil, fmt.Errorf("ring %d is not closed with at least 4 positions (RFC 7946 §3.1.6)", i)
		}
		// RFC 7946 §3.1.9: a ring across the antimeridian must be cut
		// there. An unsplit one (an edge spanning more than 180° of
		// longitude) has two readings, the long way round or across ±180°;
		// neither is guessed. An edge ending on ±180° itself (a band all
		// round, -180..180) is not a crossing.
		for k := 1; k < len(pts); k++ {
			a, b := pts[k-1][0], pts[k][0]
			if d := math.Abs(b - a); d > 180 && math.Abs(a) != 180 && math.Abs(b) != 180 {
				return nil, fmt.Errorf("ring %d: the edge from position %d to %d spans %.1f° of longitude: a ring across the antimeridian must be split at ±180° (RFC 7946 §3.1.9)", i, k-1, k, d)
			}
		}
		ring := orb.Ring(pts)
		a := ringArea(ring)
		if a == 0 || math.IsNaN(a) {
			return nil, fmt.Errorf("ring %d has no area", i)
		}
		if (i == 0) != (a > 0) {
			ring.Reverse()
		}
		out = append(out, ring)
	}
	return out, nil
}

// ringArea is the signed shoelace area of r in degrees² (positive when
// counter-clockwise in lon/lat).
func ringArea(r orb.Ring) float64 {
	s := 0.0
	for i := 0; i+1 < len(r); i++ {
		s += r[i][0]*r[i+1][1] - r[i+1][0]*r[i][1]
	}
	return s / 2
}

// thirdCoordinates returns the elevations (third elements) of a Point's or
// LineString's positions, NaN where a position has two elements, or nil if
// none has a third. tidwall/geojson keeps them but does not expose them, so
// they are read here from the raw geometry.
func thirdCoordinates(geomRaw []byte, kind string) ([]float64, error) {
	var pos [][]json.Number
	var gm struct {
		Coordinates json.RawMessage `json:"coordinates"`
	}
	if err := json.Unmarshal(geomRaw, &gm); err != nil {
		return nil, err
	}
	if kind == "Point" {
		var one []json.Number
		if err := json.Unmarshal(gm.Coordinates, &one); err != nil {
			return nil, fmt.Errorf("coordinates: %w", err)
		}
		pos = [][]json.Number{one}
	} else if err := json.Unmarshal(gm.Coordinates, &pos); err != nil {
		return nil, fmt.Errorf("coordinates: %w", err)
	}
	var z []float64
	for i, p := range pos {
		if len(p) < 3 {
			continue
		}
		v, err := p[2].Float64()
		if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
			return nil, fmt.Errorf("position %d: elevation %s is not a finite number", i, p[2])
		}
		if z == nil {
			z = make([]float64, len(pos))
			for j := range z {
				z[j] = math.NaN()
			}
		}
		z[i] = v
	}
	return z, nil
}
