// Package demo is glidereach's invented demonstration scenario as typed
// library values: the landscape (terrain.Synthetic), the layered wind (SI),
// the landing fields (plan.Field), the route, the planning area, the
// aircraft profile names, and the start points and altitudes of each demo
// step, so that any program can run the demo scenario through reach/plan
// without the command line. `glidereach demo` takes its scenario from here.
//
// Everything is made up: the landscape lies over open ocean at 0.5° S,
// 24.5° W so nobody mistakes it for a real place, and the field, route and
// area names are fictional. The same fields, candidates, route and area as
// files for the commands (testdata/: demo-fields.geojson, demo-route.gpx,
// demo-area.geojson, …) are the same scenario: a test in cmd parses them
// and compares them with these values.
//
// Units: degrees for positions (WGS84), metres for altitudes (MSL unless
// AGL is said), m/s for speeds, degrees true for headings and wind
// directions (the direction the wind blows from).
//
// The figures computed from it are planning aids only (reach.Caution).
package demo

import (
	"fmt"
	"sync"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"glidereach/reach/plan"
	"glidereach/terrain"
	"glidereach/wind"
)

// The landscape: terrain.Synthetic with seed Seed, Cells × Cells cells of
// CellDeg degrees (2 arc-seconds, about 62 m; about 86 km square), centred
// at terrain.SyntheticLat, terrain.SyntheticLon.
const (
	Seed    = 1
	Cells   = 1400
	CellDeg = 1.0 / 1800
)

// knot is one knot in m/s (1852 m per hour, by definition), a variable so
// that products with it are rounded as the command line's are.
var knot = 1852.0 / 3600

// Landscape returns the invented landscape of the given seed (Seed is the
// demo's own; other seeds give other ridges and valleys on the same
// lattice).
func Landscape(seed int64) *terrain.Grid {
	return terrain.Synthetic(seed, Cells, Cells, CellDeg)
}

var (
	terrainOnce sync.Once
	terrainSrc  terrain.Source
)

// Terrain returns the demo's landscape (seed Seed) as a terrain.Source,
// built once per process (about 8 MB) and shared: callers must not change
// its grid.
func Terrain() terrain.Source {
	terrainOnce.Do(func() {
		terrainSrc = &terrain.GridSource{Grid: Landscape(Seed), Desc: fmt.Sprintf("invented demo landscape (synthetic, seed %d, %d×%d cells of 2″)", Seed, Cells, Cells)}
	})
	return terrainSrc
}

// Wind returns the demo's layered wind (a new slice each call): from 240° at
// 10 kt at sea level, 270° at 20 kt at 1500 m, 280° at 35 kt at 3000 m MSL,
// speeds in m/s; wind.NewProfile interpolates between the layers.
func Wind() []wind.Layer {
	return []wind.Layer{
		{Alt: 0, Dir: 240, Speed: 5.144444444444445},     // 10 kt
		{Alt: 1500, Dir: 270, Speed: 10.28888888888889},  // 20 kt
		{Alt: 3000, Dir: 280, Speed: 18.005555555555556}, // 35 kt
	}
}

// WindProfile returns Wind as a wind.Profile.
func WindProfile() (*wind.Profile, error) { return wind.NewProfile(Wind()) }

// Fields returns the demo's seven invented landing fields (new values each
// call). None gives an elevation: the demo takes it from the terrain. The
// polygon fields' Lat, Lon is the area centroid of the outline computed in
// lon/lat (as the command's GeoJSON reader computes it, to the last bit).
func Fields() []plan.Field {
	return []plan.Field{
		{Name: "Gannet Flats", Lat: -0.42, Lon: -24.71, Length: 900, Surface: "grass"},
		{Name: "Kelp Meadow Strip", Lat: -0.63, Lon: -24.38, Length: 700, Surface: "sand"},
		{Name: "Tern Hollow", Lat: -0.2799999999999986, Lon: -24.549999999999997, Length: 650, Surface: "grass",
			Polygon: orb.Polygon{orb.Ring{{-24.551601, -0.282484}, {-24.547848, -0.277981}, {-24.548399, -0.277516}, {-24.552152, -0.282019}, {-24.551601, -0.282484}}}},
		{Name: "Driftwood Common", Lat: -0.74, Lon: -24.62, Length: 1100, Surface: "grass",
			Polygon: orb.Polygon{orb.Ring{{-24.624969, -0.740107}, {-24.615125, -0.740974}, {-24.615031, -0.739893}, {-24.624875, -0.739026}, {-24.624969, -0.740107}}}},
		{Name: "Pumice Reach", Lat: -0.35, Lon: -24.27, Length: 800, Surface: "gravel"},
		{Name: "Shoalwater Field", Lat: -0.56, Lon: -24.79, Length: 1000, Surface: "grass"},
		{Name: "Cinder Terrace", Lat: -0.21, Lon: -24.36, Length: 500, Surface: "dirt"},
	}
}

// TableAltitudes are the altitudes (m MSL) of the demo's performance tables
// of every built-in profile.
func TableAltitudes() []float64 { return []float64{0, 1500, 3000} }

// Footprint is one glide footprint of the demo.
type Footprint struct {
	Name     string  // short name (the command's file stem)
	Aircraft string  // built-in profile (reach.Builtin)
	Lat, Lon float64 // start
	AGL      float64 // start height above the ground, m
	Heading  float64 // degrees true
	// IAS > 0 (m/s) starts the footprint from an engine failure on Heading
	// at that indicated airspeed; 0 keeps Heading for drawing only (the
	// sailplane has no engine to lose: it is already gliding).
	IAS float64
	// Levels are the arrival heights above the ground (m) the footprint's
	// rings are drawn at.
	Levels []float64
}

// Footprints returns the demo's two footprints: the trainer from an engine
// failure in cruise at 100 kt, 1200 m above the ground, and the sailplane
// already gliding, 900 m above the ground.
func Footprints() []Footprint {
	return []Footprint{
		{Name: "reach-trainer", Aircraft: "trainer", Lat: -0.5, Lon: -24.5, AGL: 1200, Heading: 250, IAS: 100 * knot, Levels: []float64{0, 150}},
		{Name: "reach-sailplane", Aircraft: "sailplane", Lat: -0.42, Lon: -24.62, AGL: 900, Heading: 100, Levels: []float64{0, 150}},
	}
}

// FinalGlide is the demo's final glide: the sailplane from Lat, Lon by the
// turn point to the field named Field.
type FinalGlide struct {
	Aircraft         string
	Lat, Lon         float64 // start
	TurnLat, TurnLon float64 // the one turn point
	Field            string  // a name in Fields
	Alt              float64 // start altitude, m MSL
	MacCready        float64 // m/s
}

// Final returns the demo's final glide: 2800 m MSL, MacCready 1 m/s, to
// Tern Hollow.
func Final() FinalGlide {
	return FinalGlide{Aircraft: "sailplane", Lat: -0.70, Lon: -24.30, TurnLat: -0.52, TurnLon: -24.36, Field: "Tern Hollow", Alt: 2800, MacCready: 1.0}
}

// EngineFailure is the demo's engine failure for the approach plan.
type EngineFailure struct {
	Aircraft string
	Lat, Lon float64
	Alt      float64 // m MSL
	Heading  float64 // degrees true
	IAS      float64 // m/s
	// MaxDistance (m): fields farther from the failure are not planned.
	MaxDistance float64
}

// Failure returns the demo's engine failure: the trainer in cruise along
// the demo route at 2400 m MSL, heading 045° at 105 kt.
func Failure() EngineFailure {
	return EngineFailure{Aircraft: "trainer", Lat: -0.62, Lon: -24.66, Alt: 2400, Heading: 45, IAS: 105 * knot, MaxDistance: 60e3}
}

// RoutePoint is one vertex of the demo route with its elevation (m MSL)
// as the route file gives it.
type RoutePoint struct {
	Lat, Lon float64
	Ele      float64
}

// FerryRoute is the demo's route step.
type FerryRoute struct {
	Name     string
	Aircraft string
	Points   []RoutePoint
	// Alt is the planned altitude (m MSL) flown along the whole route (the
	// points' own elevations are not used by the demo); Step (m) the
	// sampling step along it.
	Alt, Step float64
}

// Route returns the demo's route: the invented "Demo ferry line" of five
// points south-west to north-east, flown by the trainer at 2400 m MSL,
// sampled every 250 m.
func Route() FerryRoute {
	return FerryRoute{Name: "Demo ferry line", Aircraft: "trainer", Alt: 2400, Step: 250, Points: []RoutePoint{
		{Lat: -0.68, Lon: -24.72, Ele: 1200},
		{Lat: -0.6, Lon: -24.64, Ele: 1250},
		{Lat: -0.48, Lon: -24.52, Ele: 1300},
		{Lat: -0.4, Lon: -24.45, Ele: 1350},
		{Lat: -0.3, Lon: -24.36, Ele: 1400},
	}}
}

// CoverageArea is the demo's coverage step.
type CoverageArea struct {
	Name     string
	Aircraft string
	// Area is the planning area (lon/lat; exterior counter-clockwise, the
	// hole — a fictional no-landing zone — clockwise).
	Area orb.MultiPolygon
	Alt  float64 // altitude flown, m MSL
	// Candidates are invented fields that might be added; Pick is how many
	// the demo ranks.
	Candidates []plan.Field
	Pick       int
}

// Coverage returns the demo's coverage step: the trainer at 1800 m MSL over
// the invented planning area, four candidates, the best two ranked.
func Coverage() CoverageArea {
	return CoverageArea{Name: "Demo planning area", Aircraft: "trainer", Alt: 1800, Pick: 2,
		Area: orb.MultiPolygon{orb.Polygon{
			orb.Ring{{-24.85, -0.8}, {-24.2, -0.8}, {-24.15, -0.45}, {-24.4, -0.15}, {-24.85, -0.2}, {-24.85, -0.8}},
			orb.Ring{{-24.5, -0.5}, {-24.5, -0.44}, {-24.44, -0.44}, {-24.44, -0.5}, {-24.5, -0.5}},
		}},
		Candidates: []plan.Field{
			{Name: "Candidate Basalt Flat", Lat: -0.47, Lon: -24.60},
			{Name: "Candidate Spindrift Lea", Lat: -0.62, Lon: -24.50},
			{Name: "Candidate Urchin Bank", Lat: -0.25, Lon: -24.72},
			{Name: "Candidate Skerry Park", Lat: -0.52, Lon: -24.25},
		}}
}

// Zone is a planning area as a plan.Zone: a point is inside when it lies
// in one of the polygons (planar test in lon/lat, holes excluded).
type Zone orb.MultiPolygon

// Contains reports whether (lat, lon) lies in the zone.
func (z Zone) Contains(lat, lon float64) bool {
	return planar.MultiPolygonContains(orb.MultiPolygon(z), orb.Point{lon, lat})
}

// Bounds is the zone's lon/lat box.
func (z Zone) Bounds() orb.Bound { return orb.MultiPolygon(z).Bound() }
