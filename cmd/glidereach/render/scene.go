package render

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/paulmach/orb"

	"glidereach/reach"
	"glidereach/terrain"
)

// Scene is everything one map shows. Only Terrain is required; every other
// field may be left empty and is then not drawn (and not listed in the
// legend). Geometry is lon/lat degrees (orb.Point{lon, lat}); heights are
// metres.
type Scene struct {
	// Title is drawn above the map ("Reach from Alder Strip, 1500 m MSL").
	Title string

	// Terrain is the raster the map is drawn over and the frame every point
	// is projected with. It may be flat (terrain.NewFlat). Required.
	Terrain *terrain.Local

	// Bounds, when not empty, is the lon/lat box the map shows; the map
	// covers the frame rectangle that encloses the box's four corners.
	// Empty (the zero orb.Bound) means the whole extent of Terrain, cell
	// edges included.
	Bounds orb.Bound

	// Levels are footprint levels: the area from which the aircraft
	// arrives with at least ArrivalAGL metres above the ground. They are
	// drawn as translucent fills with crisp outlines, lowest level first,
	// so nested levels read darker towards the start.
	Levels []Level

	// Start is the position the glide starts from, drawn with its heading.
	Start *Marker

	// Fields are landing options, marked reachable or not.
	Fields []FieldMark

	// FieldsFrom says from where "in reach" is judged, for the legend:
	// "from the start", "from some point of the route at the planned
	// altitude", … Empty means "from the start".
	FieldsFrom string

	// WindLayers is the wind by altitude, drawn on the map as a panel of
	// arrows pointing where the air goes (one per layer, highest first),
	// under the north arrow and the single Wind arrow when there is one;
	// empty draws no panel. WindSource names where it comes from
	// ("--wind", "coded forecast", "worst of 9 winds of --wind-error").
	WindLayers []WindMark
	WindSource string

	// Warnings are limits of the result the reader must see (a footprint
	// cut off by the edge of the terrain data, …): drawn in bold on the map
	// and listed beside the inputs.
	Warnings []string

	// Route is the planned route, in pieces coloured by whether a field is
	// in reach along them, in flying order: the first point of the first
	// piece is labelled "route start", the last point of the last piece
	// "route end".
	Route []RoutePiece

	// Gaps are stretches of the route with no landing option.
	Gaps []Gap

	// Glide is the final-glide line and its lowest terrain clearance.
	Glide *GlideLine

	// Coverage shows which parts of an area fields cover.
	Coverage *Coverage

	// Inputs are the run's key inputs, one short line each, as the
	// command formats them ("Aircraft: Demo trainer (L/D 9)",
	// "Start: 1500 m MSL", "Wind: 270/20 kt", "Reserve: 300 m").
	Inputs []string

	// DataSource names the terrain ("terrain: dem.tif" or "flat ground at
	// 0 m"). Empty means Terrain.Source, and "flat ground" when that is
	// empty too.
	DataSource string

	// Caution is the safety text drawn on every map; empty means
	// reach.Caution. It cannot be switched off.
	Caution string

	// HeightFeet labels heights in feet (1 ft = 0.3048 m exactly) instead
	// of metres. Geometry and fields stay in metres.
	HeightFeet bool

	// Hillshade sets the light for the terrain shading; the zero value is
	// gdaldem's default (azimuth 315°, altitude 45°, z-factor 1).
	Hillshade HillshadeOptions

	// Wind, when not nil, draws a wind arrow below the north arrow.
	Wind *WindArrow
}

// WindArrow is the wind drawn on a map: the arrow points the way the air
// moves (FromDeg + 180°, degrees true), Label is printed under it ("wind
// 240°/12 kt at the field").
type WindArrow struct {
	FromDeg float64
	Label   string
}

// WindMark is the wind of one layer.
type WindMark struct {
	AltMSL  float64 // m MSL
	FromDeg float64 // degrees true the wind blows from
	Speed   float64 // m/s; 0 is calm
	// Text labels the arrow ("1500 m 270°/20 kt"); empty means it is made
	// from the numbers.
	Text string
}

// Level is one footprint level.
type Level struct {
	// ArrivalAGL is the arrival height above ground the level stands for,
	// metres.
	ArrivalAGL float64
	// Polygons is the area, lon/lat, RFC 7946 rings (holes for high ground
	// out of reach). Ring orientation is normalised by the renderer.
	Polygons orb.MultiPolygon
	// Label overrides the legend text ("arrive ≥ 300 m AGL" by default).
	Label string
	// IsReserve marks the reserve ring: the level a landing plan should
	// use. It is drawn with the heaviest outline and named in the legend.
	IsReserve bool
	// BelowReserve marks a level under the reserve (a "touch the ground"
	// or 150 m ring): ground reached only with less height than the
	// reserve. It is drawn as a warning, hatched in vermillion with a
	// dashed outline and no reach fill, so it never reads as reachable.
	BelowReserve bool
}

// Marker is the start position.
type Marker struct {
	Point orb.Point // lon, lat
	// Label is drawn next to the symbol ("Start" when empty).
	Label string
	// HeadingDeg is the heading in degrees true, clockwise from north; NaN
	// when there is none (the symbol is then a circle, not an arrow).
	HeadingDeg float64
	// AltMSL is the start altitude, metres MSL; NaN when not shown.
	AltMSL float64
}

// NewMarker returns a start marker at p with no heading and no altitude.
func NewMarker(p orb.Point, label string) *Marker {
	return &Marker{Point: p, Label: label, HeadingDeg: math.NaN(), AltMSL: math.NaN()}
}

// FieldMark is a landing field.
type FieldMark struct {
	Name  string
	Point orb.Point // lon, lat
	// Reachable fields are filled circles, the others crosses.
	Reachable bool
	// ArrivalAGL is the arrival height above the field, metres (negative:
	// short of it by that much); NaN when unknown (not labelled).
	ArrivalAGL float64
	// Note is one more label line saying why, e.g. "below the 300 m
	// reserve" for a field out of reach that would still be reached
	// without the reserve. Empty means none.
	Note string
	// Proposed marks a candidate field that does not exist yet (a
	// coverage suggestion): drawn as an open ring with a plus, neither in
	// reach nor out of reach. Reachable is ignored.
	Proposed bool
}

// RoutePiece is a stretch of the planned route.
type RoutePiece struct {
	Line orb.LineString // lon, lat
	// Covered pieces have a field in reach everywhere along them: solid
	// line; the others are dashed.
	Covered bool
}

// Gap is a stretch of the route with no landing option in reach.
type Gap struct {
	Line orb.LineString // lon, lat, along the route
	// Label is drawn at the gap's middle; empty means "gap" and the
	// gap's length in km and nm.
	Label string
}

// GlideLine is the final-glide line.
type GlideLine struct {
	Line orb.LineString // lon, lat, start to goal
	// Lowest is where the clearance over terrain is least; marked when
	// LowestClearance is not NaN.
	Lowest orb.Point
	// LowestClearance is the least height above terrain along the line,
	// metres; NaN when not known.
	LowestClearance float64
	// Turns are the turn points between start and goal, in order, each
	// drawn as a small ringed dot with its name.
	Turns []TurnPoint
	// LineLabel and TurnLabel name the line and its points in the legend;
	// empty means "Final glide line" and "Turn point" (an approach plan
	// draws its path and gates with the same symbols under its own names).
	LineLabel, TurnLabel string
}

// TurnPoint is a named point of a final-glide line.
type TurnPoint struct {
	Name  string
	Point orb.Point // lon, lat
}

// Coverage shows an area split into the part with a field in reach and the
// rest.
type Coverage struct {
	Area      orb.MultiPolygon // outline of the area analysed (dashed), may be empty
	Covered   orb.MultiPolygon // filled bluish green
	Uncovered orb.MultiPolygon // hatched vermillion
}

// Errors returned for scenes that cannot be drawn. They are contract
// errors of the calling command, not user input errors.
var (
	ErrNoTerrain = errors.New("render: scene has no terrain")
	ErrEmptyMap  = errors.New("render: map extent is empty")
)

// MaxWidthPx is the widest map RenderPNG draws (a guard against runaway
// allocations: 8000 px wide maps take about 256 MB).
const MaxWidthPx = 8000

// DefaultWidthPx is the map width used when 0 is asked for.
const DefaultWidthPx = 1600

func (s *Scene) validate() error {
	if s == nil || s.Terrain == nil {
		return ErrNoTerrain
	}
	l := s.Terrain
	if l.Cols <= 0 || l.Rows <= 0 || !(l.Cell > 0) || len(l.Elev) != l.Cols*l.Rows {
		return fmt.Errorf("render: terrain raster is inconsistent (%d×%d cells of %g m, %d values)",
			l.Cols, l.Rows, l.Cell, len(l.Elev))
	}
	return nil
}

func (s *Scene) caution() string {
	if s.Caution != "" {
		return s.Caution
	}
	return reach.Caution
}

func (s *Scene) dataSource() string {
	switch {
	case s.DataSource != "":
		return s.DataSource
	case s.Terrain != nil && s.Terrain.Source != "":
		return s.Terrain.Source
	}
	return "flat ground"
}

// sourceText is dataSource without a leading "terrain: ", for places that
// already head it "Terrain data".
func (s *Scene) sourceText() string {
	t := s.dataSource()
	if len(t) > len("terrain: ") && strings.EqualFold(t[:len("terrain: ")], "terrain: ") {
		return t[len("terrain: "):]
	}
	return t
}

// height formats a height in the scene's height unit: "1500 m" or "4921 ft".
func (s *Scene) height(m float64) string {
	if s.HeightFeet {
		return fmt.Sprintf("%.0f ft", m/0.3048)
	}
	return fmt.Sprintf("%.0f m", m)
}

// signedHeight is height with an explicit sign ("+420 m", "−85 m").
func (s *Scene) signedHeight(m float64) string {
	v := m
	if s.HeightFeet {
		v = m / 0.3048
	}
	v = math.Round(v)
	unit := "m"
	if s.HeightFeet {
		unit = "ft"
	}
	if v < 0 {
		return fmt.Sprintf("\u2212%.0f %s", -v, unit)
	}
	return fmt.Sprintf("+%.0f %s", v, unit)
}
