package main

import (
	"strings"

	"github.com/spf13/pflag"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
)

// Physical ranges of the flags (SI), the same as glidereach's (its
// glideflags.go and README "Ranges"; common practice, no source): a value
// outside is a typing or unit error.
const (
	minAltMSL, maxAltMSL = -400.0, 19000.0
	maxAGL               = 10000.0
	minGround, maxGround = -500.0, 9000.0
	maxMargin            = 3000.0
	maxMass              = 10000.0
	maxVSpeed            = 10.0
	maxISADev            = 60.0
	maxBugs              = 2.0
	// Conservative defaults without a profile's own (m), as glidereach.
	defaultReserve   = 300.0
	defaultClearance = 100.0
)

// options are the command's flags.
type options struct {
	aircraft, wind, windAloft, windError string
	mass, bugs, mc, airSink, isaDev      *input.Quantity
	reserve, clearance                   *input.Quantity
	terrain                              []string
	ground                               *input.Quantity
	crs, voids                           string
	fields, area, box, corridor          string
	candidates                           string
	pick                                 int
	alt, agl, cell                       *input.Quantity
	ind                                  *input.Indicated
	tile                                 int
	workDir, cog, fgb, summary           string
	logLevel                             string
}

func newOptions() *options {
	return &options{
		mass:      input.NewQuantity(input.Mass, 0).Within(0, maxMass),
		bugs:      input.NewQuantity(input.Fraction, 0).Within(0, maxBugs),
		mc:        input.NewQuantity(input.VerticalSpeed, 0).Within(0, maxVSpeed),
		airSink:   input.NewQuantity(input.VerticalSpeed, 0).Within(0, maxVSpeed),
		isaDev:    input.NewQuantity(input.TempDelta, 0).Within(-maxISADev, maxISADev),
		reserve:   input.NewQuantity(input.Length, defaultReserve).Within(0, maxMargin),
		clearance: input.NewQuantity(input.Length, defaultClearance).Within(0, maxMargin),
		ground:    input.NewQuantity(input.Length, 0).Within(minGround, maxGround),
		alt:       input.NewQuantity(input.Length, 0).Within(minAltMSL, maxAltMSL),
		agl:       input.NewQuantity(input.Length, 0).Within(0, maxAGL),
		cell:      input.NewQuantity(input.Length, 0).Within(0, 10000),
		ind:       input.NewIndicated(),
	}
}

func (o *options) register(fs *pflag.FlagSet) {
	fs.StringVar(&o.fields, "fields", "", "existing landing fields: GeoJSON points or polygons with a name property (as glidereach coverage)")
	fs.StringVar(&o.candidates, "candidates", "", "candidate fields (GeoJSON, like --fields) to rank by the area each would add (as glidereach coverage)")
	fs.IntVar(&o.pick, "pick", 3, "with --candidates: how many to choose one by one (greedy), 0..100")
	fs.StringVar(&o.area, "area", "", "area to analyse: a GeoJSON Polygon/MultiPolygon file")
	fs.StringVar(&o.box, "box", "", "area to analyse: a box given by two opposite corners LAT,LON,LAT,LON")
	fs.StringVar(&o.corridor, "corridor", "", "corridor to analyse: ROUTE,WIDTH (GPX/GeoJSON route and full width, e.g. plan.gpx,10km)")
	fs.Var(o.alt, "alt", o.alt.Help("altitude flown over the area: true altitude MSL (m, ft)"))
	fs.Var(o.agl, "agl", o.agl.Help("height flown above the terrain at each cell (m, ft), instead of --alt"))
	o.ind.Register(fs, "altitude flown")
	fs.StringVar(&o.aircraft, "aircraft", "trainer", "aircraft profile: built-in name ("+strings.Join(reach.BuiltinNames(), ", ")+") or a YAML/JSON profile file")
	fs.Var(o.mass, "mass", o.mass.Help("actual mass (kg, lb); 0 = the profile's mass"))
	fs.Var(o.bugs, "bugs", o.bugs.Help("contamination: sink × (1 + f), e.g. 0.1 or 10%"))
	fs.Var(o.mc, "mc", o.mc.Help("MacCready setting (m/s, fpm, kt); 0 flies for best range"))
	fs.Var(o.airSink, "air-sink", o.airSink.Help("allowance for sinking air along the glide (m/s, fpm, kt)"))
	fs.Var(o.isaDev, "isa-dev", o.isaDev.Help("temperature deviation from ISA (K) where the wind gives no temperature"))
	fs.StringVar(&o.wind, "wind", "", "wind: calm, DIR/SPEED (270/20kt), layers (0m:240/10kt,1500m:270/20kt), or a YAML/JSON/CSV file")
	fs.StringVar(&o.windAloft, "wind-aloft", "", "coded winds-aloft groups with levels in ft, or a bulletin file (as glidereach)")
	fs.StringVar(&o.windError, "wind-error", "", "wind uncertainty DIR,SPEED (e.g. 20deg,5kt): every cell holds in each wind of the set")
	fs.Var(o.reserve, "reserve", o.reserve.Help("height above a field to arrive with (m, ft); default: the profile's, else 300 m"))
	fs.Var(o.clearance, "clearance", o.clearance.Help("least height above terrain on the way (m, ft); default: the profile's, else 100 m"))
	fs.Lookup("reserve").DefValue = ""
	fs.Lookup("clearance").DefValue = ""
	fs.StringSliceVar(&o.terrain, "terrain", nil, "elevation data: GeoTIFF, SRTM .hgt or ESRI ASCII grid files, or a directory (on a cluster: paths every worker can read)")
	fs.Var(o.ground, "ground", o.ground.Help("elevation of flat ground when no --terrain is given (m, ft MSL)"))
	fs.StringVar(&o.crs, "crs", "", "CRS of ESRI ASCII grids without a .prj sidecar, e.g. EPSG:4326")
	fs.StringVar(&o.voids, "voids", "obstacle", "what to do with voids (no-data cells): obstacle or fill")
	fs.Var(o.cell, "cell", o.cell.Help("solver cell (m), 1..1000: default the DEM's resolution (never finer; a coarser one is said in the outputs), 30 m on flat ground"))
	fs.IntVar(&o.tile, "tile", 0, "output tile side in cells, a multiple of 16 in 64..8192 (default 1024): the unit of work of the merge steps")
	fs.StringVar(&o.workDir, "work-dir", "", "work directory of the run (required; on a cluster: shared by every worker): plan.gob, parts/, tiles/, summary.json")
	fs.StringVar(&o.cog, "cog", "", "write the least altitude (m MSL) to reach a field as a cloud-optimised GeoTIFF (.tif) with worst-value overviews")
	fs.StringVar(&o.fgb, "fgb", "", "write the covered and uncovered parts and the fields as FlatGeobuf (.fgb, EPSG:4326), as glidereach coverage --tiled --fgb")
	fs.StringVar(&o.summary, "summary", "", "write the JSON summary (covered share, per-field areas) to this file")
	fs.StringVar(&o.logLevel, "beam-log-level", "off", "Beam's and Prism's own log lines on stderr: off, debug, info, warn or error")
}
