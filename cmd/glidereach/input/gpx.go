package input

import (
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// GPX namespaces accepted. GPX 1.1 is the format read; GPX 1.0 files have
// the same trk/trkseg/trkpt and rte/rtept structure with lat, lon and ele,
// so they are read too. Elements without a namespace are taken as GPX.
const (
	gpx11NS = "http://www.topografix.com/GPX/1/1"
	gpx10NS = "http://www.topografix.com/GPX/1/0"
)

// ParseGPX parses a route from GPX text.
//
// Structure read (GPX 1.1 schema, topografix.com/GPX/1/1/gpx.xsd; element
// names confirmed against public copies of the schema):
//
//	<gpx> <rte> <name/> <rtept lat lon> <ele/> </rtept>… </rte>
//	      <trk> <name/> <trkseg> <trkpt lat lon> <ele/> </trkpt>… </trkseg>… </trk>
//
// lat and lon are decimal degrees (WGS84; latitudeType −90..90,
// longitudeType −180..180), ele metres (the schema: "all measurements are
// in metric units"). Every <rte> and every <trk> is a candidate route; the
// segments of a track are joined in order into one line (a track is one
// journey recorded in pieces; the gap between two segments is flown as the
// geodesic between them). name picks a route or track by its <name>
// (without case); "" requires exactly one. Waypoints (<wpt>) alone are not a
// route and are ignored, as are extensions and all other elements.
//
// Errors carry the line (from the decoder's InputOffset) of the offending
// element.
func ParseGPX(data []byte, name string) (*Route, error) {
	lc := newLineCounter(data)
	dec := xml.NewDecoder(bytes.NewReader(data))
	dec.Strict = true
	type cand struct {
		kind, name string
		line       int
		pts        []RoutePoint
		ptLines    []int
	}
	var (
		cands   []*cand
		cur     *cand // the <rte> or <trk> being read
		pt      *RoutePoint
		stack   []string // local names of open GPX elements
		text    strings.Builder
		inText  bool
		sawRoot bool
		nWpt    int
	)
	for {
		off := dec.InputOffset()
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			var se *xml.SyntaxError
			if errors.As(err, &se) {
				return nil, errAtLine(se.Line, "invalid XML: %s", se.Msg)
			}
			return nil, errAtLine(lc.line(dec.InputOffset()), "invalid XML: %w", err)
		}
		line := lc.line(off)
		switch t := tok.(type) {
		case xml.StartElement:
			ns := t.Name.Space
			if ns != "" && ns != gpx11NS && ns != gpx10NS {
				// An extension or foreign element: skip it whole.
				if len(stack) == 0 {
					return nil, errAtLine(line, "root element <%s> in namespace %q is not GPX", t.Name.Local, ns)
				}
				if err := dec.Skip(); err != nil {
					return nil, errAtLine(line, "invalid XML in <%s>: %w", t.Name.Local, err)
				}
				continue
			}
			local := t.Name.Local
			parent := ""
			if len(stack) > 0 {
				parent = stack[len(stack)-1]
			}
			stack = append(stack, local)
			switch {
			case parent == "" && local == "gpx":
				sawRoot = true
			case parent == "":
				return nil, errAtLine(line, "root element is <%s>, not <gpx>", local)
			case parent == "gpx" && (local == "rte" || local == "trk"):
				kind := map[string]string{"rte": "route", "trk": "track"}[local]
				cur = &cand{kind: kind, line: line}
				cands = append(cands, cur)
			case parent == "gpx" && local == "wpt":
				nWpt++
			case cur != nil && ((parent == "rte" && local == "rtept") || (parent == "trkseg" && local == "trkpt")):
				p, err := pointAttrs(t)
				if err != nil {
					return nil, errAtLine(line, "<%s>: %w", local, err)
				}
				cur.pts = append(cur.pts, p)
				cur.ptLines = append(cur.ptLines, line)
				pt = &cur.pts[len(cur.pts)-1]
			case pt != nil && (parent == "rtept" || parent == "trkpt") && local == "ele",
				cur != nil && (parent == "rte" || parent == "trk") && local == "name":
				text.Reset()
				inText = true
			}
		case xml.CharData:
			if inText {
				text.Write(t)
			}
		case xml.EndElement:
			if len(stack) == 0 {
				continue // the decoder checks nesting; not reached
			}
			local := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			parent := ""
			if len(stack) > 0 {
				parent = stack[len(stack)-1]
			}
			switch {
			case local == "ele" && pt != nil && inText && (parent == "rtept" || parent == "trkpt"):
				s := strings.TrimSpace(text.String())
				v, err := strconv.ParseFloat(s, 64)
				if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
					return nil, errAtLine(line, "<ele>%s</ele> is not a number of metres", shortText(s))
				}
				pt.Ele, pt.HasEle = v, true
				inText = false
			case local == "name" && cur != nil && inText && (parent == "rte" || parent == "trk"):
				cur.name = strings.TrimSpace(text.String())
				inText = false
			case local == "rtept" || local == "trkpt":
				pt = nil
			case (local == "rte" || local == "trk") && parent == "gpx":
				cur, pt = nil, nil
			}
		}
	}
	if !sawRoot {
		return nil, errors.New("not GPX: no <gpx> root element")
	}
	names := make([]string, len(cands))
	for i, c := range cands {
		names[i] = c.name
	}
	what := "<rte> or <trk> elements"
	if len(cands) == 0 && nWpt > 0 {
		what = fmt.Sprintf("<rte> or <trk> (only %d <wpt> waypoints, which do not make a route)", nWpt)
	}
	k, err := pickRoute(names, name, what)
	if err != nil {
		return nil, err
	}
	c := cands[k]
	r := &Route{Name: c.name, Points: c.pts}
	bad, err := checkRoute(r, func(i int) string { return fmt.Sprintf("point %d", i) })
	if err != nil {
		line := c.line
		if bad >= 0 {
			line = c.ptLines[bad]
		}
		return nil, errAtLine(line, "%s %s: %w", c.kind, quoteList([]string{c.name}), err)
	}
	return r, nil
}

// pointAttrs reads the required lat and lon attributes of a waypoint.
func pointAttrs(t xml.StartElement) (RoutePoint, error) {
	var p RoutePoint
	var haveLat, haveLon bool
	for _, a := range t.Attr {
		if a.Name.Space != "" {
			continue
		}
		switch a.Name.Local {
		case "lat", "lon":
			v, err := strconv.ParseFloat(strings.TrimSpace(a.Value), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return p, fmt.Errorf("%s=%q is not a number of decimal degrees", a.Name.Local, shortText(a.Value))
			}
			if a.Name.Local == "lat" {
				if v < -90 || v > 90 {
					return p, fmt.Errorf("lat=%q out of range -90..90", a.Value)
				}
				p.Lat, haveLat = v, true
			} else {
				if v < -180 || v > 180 {
					return p, fmt.Errorf("lon=%q out of range -180..180", a.Value)
				}
				p.Lon, haveLon = v, true
			}
		}
	}
	if !haveLat || !haveLon {
		return p, errors.New("needs both lat and lon attributes")
	}
	return p, nil
}

func shortText(s string) string {
	if len(s) > 40 {
		return s[:37] + "..."
	}
	return s
}
