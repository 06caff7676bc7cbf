package input

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/paulmach/orb"

	"glidereach/reach/geodesy"
)

// Route is a planned route read from a GPX or GeoJSON file.
type Route struct {
	Name   string // the track's or route's name, or the feature's "name"; may be empty
	Points []RoutePoint
}

// RoutePoint is one vertex of a route: decimal degrees (WGS84) and, when the
// file gives one, an elevation in metres (GPX <ele>, GeoJSON third
// coordinate), which the route command may take as the planned altitude.
type RoutePoint struct {
	Lat, Lon float64
	Ele      float64 // m; meaningful only when HasEle
	HasEle   bool
}

// Plausibility bounds for per-point elevations, m: below the lowest dry land
// and above any flight level a glide computation could mean (common
// practice, no source).
const (
	minRouteEle = -1000.0
	maxRouteEle = 30000.0
)

// LoadRoute reads the one route of a GPX 1.1 or GeoJSON file; it is
// LoadRouteNamed with no name. A file holding several routes or tracks is
// refused with a list of their names.
func LoadRoute(path string) (*Route, error) { return LoadRouteNamed(path, "") }

// LoadRouteNamed reads a route from a GPX or GeoJSON file, chosen by name
// (compared without case) when the file holds several; name "" means the
// file must hold exactly one. The format is recognised from the content: a
// file starting with '<' is GPX (see ParseGPX), with '{' GeoJSON (see
// ParseRouteGeoJSON). Errors are *UsageError naming the file and, where it
// applies, the line.
func LoadRouteNamed(path, name string) (*Route, error) {
	data, err := readInputFile(path)
	if err != nil {
		return nil, err
	}
	r, err := ParseRoute(data, name)
	if err != nil {
		var le *lineError
		if errors.As(err, &le) {
			return nil, &UsageError{Where: fmt.Sprintf("%s:%d", path, le.line), Err: le.err}
		}
		return nil, &UsageError{Where: path, Err: err}
	}
	return r, nil
}

// lineError is an error at a line of the input; LoadRouteNamed turns it into
// "file:line: message".
type lineError struct {
	line int
	err  error
}

func (e *lineError) Error() string { return fmt.Sprintf("line %d: %v", e.line, e.err) }
func (e *lineError) Unwrap() error { return e.err }

func errAtLine(line int, format string, args ...any) error {
	return &lineError{line: line, err: fmt.Errorf(format, args...)}
}

// ParseRoute parses a route from GPX or GeoJSON text (see LoadRouteNamed).
func ParseRoute(data []byte, name string) (*Route, error) {
	t := bytes.TrimLeft(data, " \t\r\n\ufeff")
	t = bytes.TrimPrefix(t, []byte("\xef\xbb\xbf")) // UTF-8 byte order mark
	switch {
	case len(t) > 0 && t[0] == '<':
		return ParseGPX(data, name)
	case len(t) > 0 && t[0] == '{':
		return ParseRouteGeoJSON(data, name)
	}
	return nil, errors.New("not a route file: want GPX 1.1 (XML) or GeoJSON with a LineString")
}

// ParseRouteGeoJSON parses a route from GeoJSON text: a LineString geometry,
// a Feature with one, or a FeatureCollection holding one LineString feature
// (Point features, e.g. markers, are ignored; other geometry types are
// refused). With several LineString features, name picks one by its
// "name" property. A third coordinate is the point's elevation in metres
// (RFC 7946 §3.1.1).
func ParseRouteGeoJSON(data []byte, name string) (*Route, error) {
	feats, err := readGeoJSON(data)
	if err != nil {
		return nil, err
	}
	type cand struct {
		f    *geoFeature
		name string
	}
	var cands []cand
	for i := range feats {
		f := &feats[i]
		switch f.Kind {
		case "LineString":
			n, _, err := stringProp(f.Props, propName)
			if err != nil {
				return nil, fmt.Errorf("%s: %w", f.where(), err)
			}
			cands = append(cands, cand{f, strings.TrimSpace(n)})
		case "Point":
		case "MultiLineString":
			return nil, fmt.Errorf("%s: MultiLineString not supported for a route; join its parts into one LineString", f.where())
		default:
			return nil, fmt.Errorf("%s: geometry %s not supported for a route (want LineString)", f.where(), f.Kind)
		}
	}
	names := make([]string, len(cands))
	for i, c := range cands {
		names[i] = c.name
	}
	k, err := pickRoute(names, name, "LineString features")
	if err != nil {
		return nil, err
	}
	f := cands[k].f
	ls := f.Geom.(orb.LineString)
	r := &Route{Name: cands[k].name, Points: make([]RoutePoint, len(ls))}
	for i, p := range ls {
		r.Points[i] = RoutePoint{Lat: p[1], Lon: p[0]}
		if f.Z != nil && !math.IsNaN(f.Z[i]) {
			r.Points[i].Ele, r.Points[i].HasEle = f.Z[i], true
		}
	}
	if _, err := checkRoute(r, func(i int) string { return fmt.Sprintf("%s: position %d", f.where(), i) }); err != nil {
		return nil, err
	}
	return r, nil
}

// pickRoute chooses among candidates by name ("" = the only one).
func pickRoute(names []string, name, what string) (int, error) {
	if len(names) == 0 {
		return 0, fmt.Errorf("no route: the file holds no %s", what)
	}
	if name == "" {
		if len(names) == 1 {
			return 0, nil
		}
		return 0, fmt.Errorf("the file holds %d %s (%s); choose one by name", len(names), what, quoteList(names))
	}
	key := strings.ToLower(strings.TrimSpace(name))
	found := -1
	for i, n := range names {
		if strings.ToLower(n) == key {
			if found >= 0 {
				return 0, fmt.Errorf("the file holds more than one route named %q", name)
			}
			found = i
		}
	}
	if found < 0 {
		return 0, fmt.Errorf("no route named %q (have %s)", name, quoteList(names))
	}
	return found, nil
}

func quoteList(names []string) string {
	q := make([]string, len(names))
	for i, n := range names {
		if n == "" {
			q[i] = "unnamed"
		} else {
			q[i] = fmt.Sprintf("%q", n)
		}
	}
	return strings.Join(q, ", ")
}

// checkRoute validates the points of a route: at least two distinct
// positions, plausible elevations, no nearly antipodal segment. On error it
// returns the index of the offending point, or -1 when the error concerns
// the whole route; label names point i in the message ("point 3").
func checkRoute(r *Route, label func(i int) string) (int, error) {
	if len(r.Points) < 2 {
		return -1, fmt.Errorf("route has %d point(s); a route needs at least 2", len(r.Points))
	}
	distinct := false
	for i, p := range r.Points {
		if p.HasEle && !(p.Ele >= minRouteEle && p.Ele <= maxRouteEle) {
			return i, fmt.Errorf("%s: elevation %v m outside %v..%v m", label(i), p.Ele, minRouteEle, maxRouteEle)
		}
		if i > 0 {
			q := r.Points[i-1]
			if p.Lat != q.Lat || p.Lon != q.Lon {
				distinct = true
			}
			if _, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: q.Lat, Lon: q.Lon}, geodesy.LatLon{Lat: p.Lat, Lon: p.Lon}); err != nil {
				return i, fmt.Errorf("%s: segment from the previous point: %w", label(i), err)
			}
		}
	}
	if !distinct {
		return -1, errors.New("all points of the route are the same position")
	}
	return -1, nil
}

// Line returns the route's vertices as geodesy positions.
func (r *Route) Line() []geodesy.LatLon {
	l := make([]geodesy.LatLon, len(r.Points))
	for i, p := range r.Points {
		l[i] = geodesy.LatLon{Lat: p.Lat, Lon: p.Lon}
	}
	return l
}

// HasElevations reports whether every point carries an elevation.
func (r *Route) HasElevations() bool {
	for _, p := range r.Points {
		if !p.HasEle {
			return false
		}
	}
	return len(r.Points) > 0
}

// Length returns the route's length along its geodesic segments, m.
func (r *Route) Length() (float64, error) { return geodesy.Length(r.Line()) }

// RouteSample is a point of a route sampled at a fixed step.
type RouteSample struct {
	geodesy.SamplePoint
	// Ele is the elevation interpolated linearly in distance between the
	// vertices around the sample, m; meaningful only when HasEle (both
	// vertices carry an elevation).
	Ele    float64
	HasEle bool
}

// Samples samples the route every step metres along its geodesic segments
// and at each vertex (geodesy.Sample), with elevations interpolated linearly
// in distance along each segment.
func (r *Route) Samples(step float64) ([]RouteSample, error) {
	sp, err := geodesy.Sample(r.Line(), step)
	if err != nil {
		return nil, err
	}
	// Segment lengths, for the interpolation weight.
	out := make([]RouteSample, len(sp))
	for i, s := range sp {
		out[i].SamplePoint = s
		a := r.Points[s.Seg]
		if s.Seg+1 >= len(r.Points) || s.SegDist == 0 {
			out[i].Ele, out[i].HasEle = a.Ele, a.HasEle
			continue
		}
		b := r.Points[s.Seg+1]
		if !a.HasEle || !b.HasEle {
			continue
		}
		segLen, _, _, err := geodesy.Inverse(geodesy.LatLon{Lat: a.Lat, Lon: a.Lon}, geodesy.LatLon{Lat: b.Lat, Lon: b.Lon})
		if err != nil {
			return nil, err
		}
		w := math.Min(1, s.SegDist/segLen)
		out[i].Ele, out[i].HasEle = a.Ele+(b.Ele-a.Ele)*w, true
	}
	return out, nil
}
