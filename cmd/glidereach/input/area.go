package input

import (
	"errors"
	"fmt"
	"math"
	"os"
	"strconv"
	"strings"

	"github.com/paulmach/orb"
)

// Zone is a part of the earth's surface that the coverage command tests
// grid cells against: a *Region (box or polygons) or a *Corridor.
type Zone interface {
	// Contains reports whether the point (decimal degrees) lies inside;
	// it is false outside Bounds (the coverage's mask relies on it).
	Contains(lat, lon float64) bool
	// Bounds is the lon/lat box that holds the region (orb.Bound: Min is
	// the south-west corner, X = lon, Y = lat).
	Bounds() orb.Bound
}

// Region is an area given as a latitude/longitude box (--box, ParseBox) or
// as GeoJSON polygons (--area, ParseArea) of the coverage command; named
// Region because Area is the Kind of square-metre quantities. Regions do
// not cross the antimeridian (a box wider than 180° of longitude is refused; a
// GeoJSON area that crosses it must be split per RFC 7946 §3.1.9, and is then
// treated as two separate polygons, which is what it is).
type Region struct {
	// Source is the box text or the file the area came from.
	Source string
	// Polygons holds the area: exterior rings counter-clockwise, holes
	// clockwise (RFC 7946 §3.1.6), lon/lat degrees. A box is one rectangle.
	Polygons orb.MultiPolygon
	bound    orb.Bound
	box      bool // the area is exactly its bound
	index    []polyIndex
}

var _ Zone = (*Region)(nil)

// Bounds returns the lon/lat box of the area.
func (a *Region) Bounds() orb.Bound { return a.bound }

// Contains reports whether lat, lon (degrees) lie inside the area: inside an
// exterior ring and outside its holes, by the even-odd crossing rule in
// lon/lat (the rule GeoJSON polygons are defined by, RFC 7946 §3.1.6). A point
// exactly on a boundary may fall on either side. Each polygon has a bounding
// box check and a latitude-band index of its edges, so a test costs a few
// edge comparisons whatever the ring length (see BenchmarkRegionContains).
func (a *Region) Contains(lat, lon float64) bool {
	if !(lon >= a.bound.Min[0] && lon <= a.bound.Max[0] && lat >= a.bound.Min[1] && lat <= a.bound.Max[1]) {
		return false
	}
	if a.box {
		return true
	}
	for i := range a.index {
		if a.index[i].contains(lon, lat) {
			return true
		}
	}
	return false
}

// BoundaryClear reports whether the closed lat/lon box minLat..maxLat ×
// minLon..maxLon (degrees) certainly holds no point of the area's boundary,
// so that Contains gives the same answer at every point of it: the box
// lies strictly inside or strictly outside the area's bound and each
// polygon's, and no edge's own box meets it. false means only "not
// known". It lets a caller testing a whole raster of points test one per
// such box.
func (a *Region) BoundaryClear(minLat, minLon, maxLat, maxLon float64) bool {
	if !(minLat <= maxLat && minLon <= maxLon) {
		return false
	}
	box := orb.Bound{Min: orb.Point{minLon, minLat}, Max: orb.Point{maxLon, maxLat}}
	switch boxSide(box, a.bound) {
	case sideOut:
		return true
	case sideEdge:
		return false
	}
	if a.box {
		return true
	}
	for i := range a.index {
		pi := &a.index[i]
		switch boxSide(box, pi.bound) {
		case sideOut:
			continue
		case sideEdge:
			return false
		}
		for k := range pi.rings {
			ri := &pi.rings[k]
			for b := ri.band(minLat); b <= ri.band(maxLat); b++ {
				for _, e := range ri.bands[b] {
					if math.Max(e.x0, e.x1) >= minLon && math.Min(e.x0, e.x1) <= maxLon &&
						math.Max(e.y0, e.y1) >= minLat && math.Min(e.y0, e.y1) <= maxLat {
						return false
					}
				}
			}
		}
	}
	return true
}

// Where a box lies against a bound: strictly inside, strictly outside, or
// touching its edge.
const (
	sideIn = iota
	sideOut
	sideEdge
)

func boxSide(box, b orb.Bound) int {
	if box.Min[0] > b.Max[0] || box.Max[0] < b.Min[0] || box.Min[1] > b.Max[1] || box.Max[1] < b.Min[1] {
		return sideOut
	}
	if box.Min[0] > b.Min[0] && box.Max[0] < b.Max[0] && box.Min[1] > b.Min[1] && box.Max[1] < b.Max[1] {
		return sideIn
	}
	return sideEdge
}

// ParseArea reads the value of --area: the path of a GeoJSON file holding a
// Polygon or MultiPolygon, as a bare geometry, a Feature or a
// FeatureCollection of such features (their union). A typed box is refused
// with a message pointing to --box (ParseBox): the flag once took a box
// minlon,minlat,maxlon,maxlat, and that old longitude-first order must fail
// loudly instead of meaning another place. Errors are *UsageError naming
// "--area" for a value that is not a file and the file (with feature and
// line) for a file.
func ParseArea(s string) (*Region, error) {
	t := strings.TrimSpace(s)
	if looksLikeBox(t) {
		if _, err := os.Stat(t); err != nil {
			v := strings.Split(t, ",")
			for i := range v {
				v[i] = strings.TrimSpace(v[i])
			}
			return nil, Usagef("--area", "%q is a typed box, but --area takes a GeoJSON file only; type a box as --box LAT,LON,LAT,LON "+
				"(two opposite corners, latitude first, like --from), e.g. --box %s,%s,%s,%s if you meant the old minlon,minlat,maxlon,maxlat order",
				s, v[1], v[0], v[3], v[2])
		}
	}
	if _, err := os.Stat(t); err != nil {
		return nil, Usagef("--area", "%q is not a readable GeoJSON file (a typed box goes in --box LAT,LON,LAT,LON)", s)
	}
	data, err := readInputFile(t)
	if err != nil {
		return nil, err
	}
	a, err := ParseAreaGeoJSON(data)
	if err != nil {
		return nil, &UsageError{Where: t, Err: err}
	}
	a.Source = t
	return a, nil
}

// looksLikeBox reports whether s is four comma-separated parts that start
// like numbers.
func looksLikeBox(s string) bool {
	parts := strings.Split(s, ",")
	if len(parts) != 4 {
		return false
	}
	for _, p := range parts {
		if numberPrefix(strings.TrimSpace(p)) == 0 {
			return false
		}
	}
	return true
}

// ParseBox reads the value of --box: "LAT,LON,LAT,LON", two opposite
// corners of a latitude/longitude box in decimal degrees, latitude first
// like every position typed on the command line (--from, --to, --at). The
// corners may be given in either order (south-west and north-east, or
// north-west and south-east, …): the box spans from the lower to the higher
// latitude and from the lower to the higher longitude. A box across the
// antimeridian cannot be written (its west corner would have the higher
// longitude); split it at 180° into two runs, as the terrain windows cannot
// cross it either. Errors are *UsageError naming "--box".
func ParseBox(s string) (*Region, error) {
	a, err := parseBox(strings.TrimSpace(s))
	if err != nil {
		return nil, &UsageError{Where: "--box", Err: err}
	}
	return a, nil
}

func parseBox(s string) (*Region, error) {
	parts := strings.Split(s, ",")
	if len(parts) != 4 {
		return nil, fmt.Errorf("%q: want four numbers LAT,LON,LAT,LON (two opposite corners, latitude first)", s)
	}
	var v [4]float64
	for i, p := range parts {
		f, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
			return nil, fmt.Errorf("%q: part %d %q is not a number (want LAT,LON,LAT,LON)", s, i+1, strings.TrimSpace(p))
		}
		v[i] = f
	}
	for _, lat := range []float64{v[0], v[2]} {
		if lat < -90 || lat > 90 {
			return nil, fmt.Errorf("%q: latitude %v out of range -90..90 (order is LAT,LON,LAT,LON: latitude first)", s, lat)
		}
	}
	for _, lon := range []float64{v[1], v[3]} {
		if lon < -180 || lon > 180 {
			return nil, fmt.Errorf("%q: longitude %v out of range -180..180 (order is LAT,LON,LAT,LON)", s, lon)
		}
	}
	minLat, maxLat := math.Min(v[0], v[2]), math.Max(v[0], v[2])
	minLon, maxLon := math.Min(v[1], v[3]), math.Max(v[1], v[3])
	if minLat == maxLat || minLon == maxLon {
		return nil, fmt.Errorf("%q: the corners share a latitude or a longitude, so the box is empty", s)
	}
	if maxLon-minLon > 180 {
		return nil, fmt.Errorf("%q: the box would span %.1f° of longitude; a box across the antimeridian (180°) cannot be typed: split it at 180° into two runs", s, maxLon-minLon)
	}
	ring := orb.Ring{{minLon, minLat}, {maxLon, minLat}, {maxLon, maxLat}, {minLon, maxLat}, {minLon, minLat}}
	return &Region{
		Source:   s,
		Polygons: orb.MultiPolygon{{ring}},
		bound:    orb.Bound{Min: orb.Point{minLon, minLat}, Max: orb.Point{maxLon, maxLat}},
		box:      true,
	}, nil
}

// ParseAreaGeoJSON parses the GeoJSON text of an area file (see ParseArea).
// Its errors name the feature and line but not the file.
func ParseAreaGeoJSON(data []byte) (*Region, error) {
	feats, err := readGeoJSON(data)
	if err != nil {
		return nil, err
	}
	var mp orb.MultiPolygon
	for i := range feats {
		f := &feats[i]
		switch g := f.Geom.(type) {
		case orb.Polygon:
			mp = append(mp, g)
		case orb.MultiPolygon:
			mp = append(mp, g...)
		default:
			return nil, fmt.Errorf("%s: geometry %s not supported for an area (want Polygon or MultiPolygon)", f.where(), f.Kind)
		}
	}
	if len(mp) == 0 {
		return nil, errors.New("no polygons: an area file needs a Polygon or MultiPolygon")
	}
	return NewRegion(mp), nil
}

// NewRegion returns the area covered by mp (lon/lat degrees; rings closed,
// exterior first). The rings are used as given; the area keeps mp.
func NewRegion(mp orb.MultiPolygon) *Region {
	a := &Region{Polygons: mp, bound: mp.Bound()}
	a.index = make([]polyIndex, len(mp))
	for i, p := range mp {
		a.index[i] = newPolyIndex(p)
	}
	return a
}

// polyIndex speeds up point-in-polygon tests: the polygon's bounding box and,
// for every ring, its edges sorted into equal latitude bands.
type polyIndex struct {
	bound orb.Bound
	rings []ringIndex
}

type ringIndex struct {
	minY, bandH float64
	bands       [][]edge // edges whose latitude span overlaps each band
}

type edge struct{ x0, y0, x1, y1 float64 }

func newPolyIndex(p orb.Polygon) polyIndex {
	pi := polyIndex{bound: p.Bound()}
	for _, r := range p {
		pi.rings = append(pi.rings, newRingIndex(r))
	}
	return pi
}

// maxBands caps the bands per ring; about two edges per band below it.
const maxBands = 8192

func newRingIndex(r orb.Ring) ringIndex {
	b := r.Bound()
	n := len(r) - 1
	nb := n / 2
	if nb < 1 {
		nb = 1
	}
	if nb > maxBands {
		nb = maxBands
	}
	ri := ringIndex{minY: b.Min[1], bandH: (b.Max[1] - b.Min[1]) / float64(nb)}
	if !(ri.bandH > 0) {
		nb, ri.bandH = 1, 1
	}
	ri.bands = make([][]edge, nb)
	for i := 0; i+1 < len(r); i++ {
		e := edge{r[i][0], r[i][1], r[i+1][0], r[i+1][1]}
		lo, hi := ri.band(math.Min(e.y0, e.y1)), ri.band(math.Max(e.y0, e.y1))
		for k := lo; k <= hi; k++ {
			ri.bands[k] = append(ri.bands[k], e)
		}
	}
	return ri
}

func (ri *ringIndex) band(y float64) int {
	k := int((y - ri.minY) / ri.bandH)
	if k < 0 {
		return 0
	}
	if k >= len(ri.bands) {
		return len(ri.bands) - 1
	}
	return k
}

// contains is the even-odd crossing test (W. R. Franklin's PNPOLY) over the
// edges of the point's band.
func (ri *ringIndex) contains(x, y float64) bool {
	in := false
	for _, e := range ri.bands[ri.band(y)] {
		if (e.y0 > y) != (e.y1 > y) && x < (e.x1-e.x0)*(y-e.y0)/(e.y1-e.y0)+e.x0 {
			in = !in
		}
	}
	return in
}

func (pi *polyIndex) contains(x, y float64) bool {
	if !(x >= pi.bound.Min[0] && x <= pi.bound.Max[0] && y >= pi.bound.Min[1] && y <= pi.bound.Max[1]) {
		return false
	}
	if len(pi.rings) == 0 || !pi.rings[0].contains(x, y) {
		return false
	}
	for i := 1; i < len(pi.rings); i++ {
		if pi.rings[i].contains(x, y) {
			return false
		}
	}
	return true
}

// polygonContains is the unindexed even-odd test of lon, lat against p.
func polygonContains(p orb.Polygon, lon, lat float64) bool {
	ringIn := func(r orb.Ring) bool {
		in := false
		for i := 0; i+1 < len(r); i++ {
			x0, y0, x1, y1 := r[i][0], r[i][1], r[i+1][0], r[i+1][1]
			if (y0 > lat) != (y1 > lat) && lon < (x1-x0)*(lat-y0)/(y1-y0)+x0 {
				in = !in
			}
		}
		return in
	}
	if len(p) == 0 || !ringIn(p[0]) {
		return false
	}
	for _, h := range p[1:] {
		if ringIn(h) {
			return false
		}
	}
	return true
}
