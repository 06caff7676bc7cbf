package main

import (
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/spf13/pflag"

	"glidereach/cmd/glidereach/input"
	"glidereach/cmd/glidereach/render"
	"glidereach/reach"
	"glidereach/reach/plan"
	"glidereach/terrain"
	"glidereach/wind"
)

// Conservative defaults of the commands (m): height above a field on
// arrival, and least height above terrain en route. An aircraft profile may
// set its own; a flag overrides both.
const (
	defaultReserve   = plan.DefaultReserve
	defaultClearance = plan.DefaultClearance
)

// Settings below plan.WarnReserve, plan.WarnClearance and plan.WarnMinSpeed
// (common practice, no source; their reasons are there) draw a warning on
// stderr and in every output's assumptions. A reserve or clearance of 0 is
// allowed (a planner's "touch the ground" ring) but warned about loudly;
// negative values and a lowest speed at or below the stall are refused.

// glideFlags are the flags every glide computation takes: the aircraft and
// its conditions, the air, and the margins.
type glideFlags struct {
	aircraft  string
	mass      *input.Quantity
	bugs      *input.Quantity
	mc        *input.Quantity
	airSink   *input.Quantity
	isaDev    *input.Quantity
	wind      string
	windAloft string
	windError string
	reserve   *input.Quantity
	clearance *input.Quantity
}

// Physical ranges of the flags (SI units), refused outside with exit
// status 2 naming the flag, and stated in --help and README "Ranges". They
// span what light aircraft and gliders fly and where (common practice, no
// source: the lowest dry land is about 430 m below sea level and the
// highest summit 8849 m; light-aircraft and glider flight stays below
// 19 km), so a value outside is a typing or unit error.
const (
	minAltMSL, maxAltMSL = -400.0, 19000.0                // --alt, m MSL
	maxAGL               = 10000.0                        // --agl, m above the ground
	minGround, maxGround = plan.MinGround, plan.MaxGround // --ground and DEM samples at the start, m MSL
	maxMargin            = 3000.0                         // --reserve, --clearance, m
	maxMass              = 10000.0                        // --mass, kg (0 = the profile's)
	maxVSpeed            = 10.0                           // --mc, --air-sink, m/s
	maxISADev            = 60.0                           // --isa-dev, K either side of ISA
	maxBugs              = 2.0                            // --bugs, sink factor 1 + f
)

func newGlideFlags() *glideFlags {
	return &glideFlags{
		mass:      input.NewQuantity(input.Mass, 0).Within(0, maxMass),
		bugs:      input.NewQuantity(input.Fraction, 0).Within(0, maxBugs),
		mc:        input.NewQuantity(input.VerticalSpeed, 0).Within(0, maxVSpeed),
		airSink:   input.NewQuantity(input.VerticalSpeed, 0).Within(0, maxVSpeed),
		isaDev:    input.NewQuantity(input.TempDelta, 0).Within(-maxISADev, maxISADev),
		reserve:   input.NewQuantity(input.Length, defaultReserve).Within(0, maxMargin),
		clearance: input.NewQuantity(input.Length, defaultClearance).Within(0, maxMargin),
	}
}

func (g *glideFlags) register(fs *pflag.FlagSet) {
	fs.StringVar(&g.aircraft, "aircraft", "trainer", "aircraft profile: built-in name ("+strings.Join(reach.BuiltinNames(), ", ")+") or a YAML/JSON profile file")
	fs.Var(g.mass, "mass", g.mass.Help("actual mass (kg, lb); 0 = the profile's mass"))
	fs.Var(g.bugs, "bugs", g.bugs.Help("contamination: sink × (1 + f), e.g. 0.1 or 10%"))
	fs.Var(g.mc, "mc", g.mc.Help("MacCready setting (m/s, fpm, kt); 0 flies for best range"))
	fs.Var(g.airSink, "air-sink", g.airSink.Help("allowance for sinking air along the glide (m/s, fpm, kt)"))
	fs.Var(g.isaDev, "isa-dev", g.isaDev.Help("temperature deviation from ISA (K or C difference) where the wind gives no temperature"))
	fs.StringVar(&g.wind, "wind", "", "wind: calm, DIR/SPEED (270/20kt), layers (0m:240/10kt,1500m:270/20kt), or a YAML/JSON/CSV file")
	fs.StringVar(&g.windAloft, "wind-aloft", "", "coded winds-aloft groups with levels in ft, e.g. \"3000:2714 6000:2725+05\", or a bulletin file")
	fs.StringVar(&g.windError, "wind-error", "", "wind uncertainty DIR,SPEED (e.g. 20deg,5kt): the result holds for every wind within it (conservative)")
	fs.Var(g.reserve, "reserve", g.reserve.Help("height above a field to arrive with (m, ft); default: the aircraft profile's ("+builtinDefaults(func(a *reach.Aircraft) float64 { return a.Reserve })+"), else 300 m; below 150 m warns, 0 warns loudly. It may be below the clearance: the glide then tapers from the clearance to the reserve over ground no higher than the field"))
	fs.Var(g.clearance, "clearance", g.clearance.Help("least height above terrain on the way (m, ft); default: the aircraft profile's ("+builtinDefaults(func(a *reach.Aircraft) float64 { return a.Clearance })+"), else 100 m; below 50 m warns, 0 warns loudly. Kept over all ground higher than the field, tapering to the reserve over lower ground near it (reach, final, route and coverage alike)"))
	// The default depends on the profile, so no single "(default …)".
	fs.Lookup("reserve").DefValue = ""
	fs.Lookup("clearance").DefValue = ""
}

// builtinDefaults lists a built-in profile setting, "trainer 300 m, …".
func builtinDefaults(f func(*reach.Aircraft) float64) string {
	var parts []string
	for _, n := range reach.BuiltinNames() {
		if ac, err := reach.Builtin(n); err == nil {
			parts = append(parts, fmt.Sprintf("%s %.0f m", n, f(ac)))
		}
	}
	return strings.Join(parts, ", ")
}

// flagGiven reports whether the margin flag was given on the command line.
func (g *glideFlags) flagGiven(flag string) bool {
	if flag == "--reserve" {
		return g.reserve.Given
	}
	return g.clearance.Given
}

// glideSetup is the resolved form of glideFlags: the library's
// plan.Setup (aircraft, conditions, atmosphere, winds, margins) and what the
// command line says about it.
type glideSetup struct {
	plan.Setup
	WindText string
	// WindSource says where the wind came from, for maps: "--wind",
	// "--wind-aloft (coded forecast)" or "none given: calm", and the
	// --wind-error set when there is one.
	WindSource string
	// Warnings are the settings below common practice (plan.SetupWarnings);
	// each is printed on stderr and listed first in the assumptions.
	Warnings []string
	// Notes are further assumptions of the run (how the start altitude
	// was obtained), listed after the standard ones.
	Notes []string
	// State describes the engine-failure state the result starts from, for
	// the commands that take one ("" for the others).
	State string
}

// warn records a warning and prints it on stderr (w) at once.
func (s *glideSetup) warn(w io.Writer, format string, args ...any) {
	msg := fmt.Sprintf(format, args...)
	s.Warnings = append(s.Warnings, msg)
	fmt.Fprintln(w, "glidereach: WARNING:", msg)
}

// printWarnings prints the warnings resolve found on stderr (w).
func (s *glideSetup) printWarnings(w io.Writer) {
	for _, m := range s.Warnings {
		fmt.Fprintln(w, "glidereach: WARNING:", m)
	}
}

// checkStartClearance warns when the start is less than the clearance
// above the ground under it (the command refuses a start at or below it).
func (s *glideSetup) checkStartClearance(w io.Writer, startAlt, groundElev float64) {
	if h := startAlt - groundElev; h > 0 && h < s.Clearance {
		s.warn(w, "the start is only %.0f m above the terrain under it, less than the %.0f m clearance: the first part of every glide is already below it", h, s.Clearance)
	}
}

func (g *glideFlags) resolve() (*glideSetup, error) {
	ac, err := input.LoadAircraft(g.aircraft)
	if err != nil {
		return nil, err
	}
	w, err := input.WindFromFlags(g.wind, g.windAloft)
	if err != nil {
		return nil, err
	}
	if w == nil {
		w = wind.Calm()
	}
	dev := g.isaDev.Value
	ps, err := plan.NewSetup(ac, reach.Conditions{Mass: g.mass.Value, Bugs: g.bugs.Value, AirSink: g.airSink.Value, MacCready: g.mc.Value}, dev, w, math.NaN(), math.NaN())
	if err != nil {
		return nil, usage(err)
	}
	if math.Abs(dev) > maxISADev {
		return nil, input.Usagef("--isa-dev", "%v K is not a plausible deviation from ISA (-60..60)", dev)
	}
	s := &glideSetup{Setup: *ps}
	resFrom, clrFrom := "the default", "the default"
	if ac.HasReserve || ac.Reserve > 0 {
		s.Reserve, resFrom = ac.Reserve, "the aircraft profile"
	}
	if ac.HasClearance || ac.Clearance > 0 {
		s.Clearance, clrFrom = ac.Clearance, "the aircraft profile"
	}
	if g.reserve.Given {
		s.Reserve, resFrom = g.reserve.Value, "--reserve"
	}
	if g.clearance.Given {
		s.Clearance, clrFrom = g.clearance.Value, "--clearance"
	}
	// The flags were range-checked when parsed; a profile's own margins
	// blame the profile file.
	for _, m := range []struct {
		flag, key string
		v         float64
	}{{"--reserve", "reserve", s.Reserve}, {"--clearance", "clearance", s.Clearance}} {
		if !(m.v >= 0 && m.v <= maxMargin) {
			where := m.flag
			if !g.flagGiven(m.flag) {
				where = g.aircraft + " (" + m.key + ")"
			}
			return nil, input.Usagef(where, "%v m is outside 0..%v m", m.v, maxMargin)
		}
	}
	s.checkSettings(resFrom, clrFrom)
	s.WindText = plan.WindText(w, input.WindStyleOf(g.wind, g.windAloft))
	switch {
	case strings.TrimSpace(g.windAloft) != "":
		s.WindSource = "--wind-aloft " + strings.TrimSpace(g.windAloft) + " (coded forecast)"
	case strings.TrimSpace(g.wind) != "":
		s.WindSource = "--wind " + strings.TrimSpace(g.wind)
	default:
		s.WindSource = "none given: calm"
	}
	s.Winds = []*wind.Profile{w}
	if g.windError != "" {
		d, sp, err := input.ParseWindError(g.windError)
		if err != nil {
			return nil, input.FlagError("--wind-error", g.windError, err)
		}
		s.WithWindError(d, sp)
		if len(s.Winds) > 1 {
			s.WindText += plan.WindErrorText(d, sp, len(s.Winds))
			s.WindSource += fmt.Sprintf("; the figures hold for the worst of %d winds (--wind-error %s), the arrows show the forecast", len(s.Winds), g.windError)
		}
	}
	return s, nil
}

// checkSettings records a warning for every setting below common practice
// (plan.SetupWarnings, the words glidereach-pipeline writes too); resFrom
// and clrFrom say where the reserve and the clearance came from.
func (s *glideSetup) checkSettings(resFrom, clrFrom string) {
	s.Warnings = append(s.Warnings, plan.SetupWarnings(&s.Setup, resFrom, clrFrom)...)
}

// assumptions lists the inputs a result rests on, for every output: the
// library's (plan.Setup.Assumptions), then the start state and the notes.
func (s *glideSetup) assumptions() []string {
	a := s.Setup.Assumptions(s.WindText, s.Warnings)
	if s.State != "" {
		a = append(a, s.State)
	}
	return append(a, s.Notes...)
}

// terrainFlags choose the ground: a DEM (files or a directory) or a flat
// plane at --ground.
type terrainFlags struct {
	paths  []string
	ground *input.Quantity
	crs    string
	voids  string
}

func newTerrainFlags() *terrainFlags {
	return &terrainFlags{ground: input.NewQuantity(input.Length, 0).Within(minGround, maxGround)}
}

func (t *terrainFlags) register(fs *pflag.FlagSet) {
	fs.StringSliceVar(&t.paths, "terrain", nil, "elevation data: GeoTIFF, SRTM .hgt or ESRI ASCII grid files, or a directory (comma-separated or repeated)")
	fs.Var(t.ground, "ground", t.ground.Help("elevation of flat ground when no --terrain is given (m, ft MSL)"))
	fs.StringVar(&t.crs, "crs", "", "CRS of ESRI ASCII grids without a .prj sidecar, e.g. EPSG:4326 or EPSG:32633")
	fs.StringVar(&t.voids, "voids", "obstacle", "what to do with voids (no-data cells): obstacle or fill (fills small voids by interpolation)")
}

// open returns the elevation source, or nil for flat ground.
func (t *terrainFlags) open() (terrain.Source, error) {
	if len(t.paths) == 0 {
		return nil, nil
	}
	var opts terrain.OpenOptions
	if t.crs != "" {
		code := strings.TrimPrefix(strings.ToUpper(strings.TrimSpace(t.crs)), "EPSG:")
		var epsg int
		if _, err := fmt.Sscanf(code, "%d", &epsg); err != nil {
			return nil, input.Usagef("--crs", "%q is not an EPSG code (e.g. EPSG:4326)", t.crs)
		}
		opts.CRS = terrain.CRS{EPSG: epsg}
		if err := terrain.CheckCRS(opts.CRS); err != nil {
			return nil, &input.UsageError{Where: "--crs", Err: err}
		}
	}
	switch t.voids {
	case "obstacle", "":
	case "fill":
		opts.FillVoids = 64
	default:
		return nil, input.Usagef("--voids", "%q: want obstacle or fill", t.voids)
	}
	src, err := terrain.OpenWith(opts, t.paths...)
	if err != nil {
		return nil, &input.UsageError{Where: "--terrain", Err: err}
	}
	return src, nil
}

// positionFlags give the start of a glide.
type positionFlags struct {
	from *input.LatLon
	alt  *input.Quantity
	agl  *input.Quantity
	ind  *input.Indicated
	// note says how the start altitude was obtained, for the assumptions.
	note string
}

func newPositionFlags() *positionFlags {
	return &positionFlags{from: &input.LatLon{}, alt: input.NewQuantity(input.Length, 0).Within(minAltMSL, maxAltMSL), agl: input.NewQuantity(input.Length, 0).Within(0, maxAGL),
		ind: input.NewIndicated()}
}

func (p *positionFlags) register(fs *pflag.FlagSet) {
	fs.Var(p.from, "from", "start position LAT,LON (decimal degrees)")
	fs.Var(p.alt, "alt", p.alt.Help("start altitude: TRUE altitude above mean sea level (m, ft), not the altimeter reading; on a cold day give --alt-indicated instead"))
	fs.Var(p.agl, "agl", p.agl.Help("start height above the ground there (m, ft), instead of --alt"))
	p.ind.Register(fs, "start altitude")
}

// startAlt returns the start altitude MSL (true altitude) given the ground
// elevation there, and sets p.note to how it was obtained.
func (p *positionFlags) startAlt(groundElev float64) (float64, error) {
	if p.alt.Given && p.agl.Given || p.agl.Given && p.ind.AltInd.Given {
		return 0, input.Usagef("--alt", "give one of --alt, --agl or --alt-indicated")
	}
	note, err := p.ind.Apply(p.alt)
	if err != nil {
		return 0, err
	}
	switch {
	case p.alt.Given:
		if p.alt.Value > 19000 || p.alt.Value < -400 {
			return 0, input.Usagef("--alt", "%v m is outside -400..19000 m", p.alt.Value)
		}
		p.note = note
		if p.note == "" {
			p.note = "start altitude --alt taken as true altitude MSL (no altimeter temperature correction)"
		}
		return p.alt.Value, nil
	case p.agl.Given:
		if p.agl.Value <= 0 {
			return 0, input.Usagef("--agl", "%v m is not above the ground", p.agl.Value)
		}
		if a := groundElev + p.agl.Value; a > maxAltMSL {
			return 0, input.Usagef("--agl", "%v m above the ground at %.0f m puts the start at %.0f m MSL, above the %.0f m limit", p.agl.Value, groundElev, a, maxAltMSL)
		}
		p.note = "start altitude --agl taken as true height above the terrain at the start"
		return groundElev + p.agl.Value, nil
	}
	return 0, input.Usagef("--alt", "a start altitude is required (--alt true MSL, --agl above the ground, or --alt-indicated)")
}

// given reports whether a start altitude was given in any form.
func (p *positionFlags) given() bool { return p.alt.Given || p.agl.Given || p.ind.AltInd.Given }

// windText describes a wind profile for people (plan.WindText): each
// layer as "ALTm DIR°/SPEED kt", direction the wind blows from.
func windText(p *wind.Profile) string { return plan.WindText(p, plan.WindStyle{}) }

// windMarks are the map's wind arrows for the setup's wind (the forecast,
// not its --wind-error perturbations), one per layer, labelled as the text
// outputs label them, and where the wind came from. A calm profile gives
// one calm mark, so the map still says the air was taken as calm.
func windMarks(s *glideSetup) ([]render.WindMark, string) {
	var st plan.WindStyle
	if strings.HasPrefix(s.WindSource, "--wind-aloft") {
		st = plan.WindStyle{Feet: true, Forecast: true}
	} else if strings.Contains(strings.ToLower(s.WindSource), "ft") {
		st.Feet = true
	}
	if s.Wind == nil || s.Wind.IsCalm() {
		return []render.WindMark{{Text: "calm at every altitude"}}, s.WindSource
	}
	var marks []render.WindMark
	for _, l := range s.Wind.Layers() {
		text := fmt.Sprintf("%03.0f°/%.0f kt", l.Dir, l.Speed/input.Knot)
		if len(s.Wind.Layers()) > 1 {
			alt := fmt.Sprintf("%.0f m", l.Alt)
			if st.Feet {
				alt = fmt.Sprintf("%.0f ft", l.Alt/0.3048)
			}
			switch {
			case l.Speed == 0 && st.Forecast:
				text = alt + " light and variable"
			case l.Speed == 0:
				text = alt + " calm"
			default:
				text = alt + " " + text
			}
		}
		marks = append(marks, render.WindMark{AltMSL: l.Alt, FromDeg: l.Dir, Speed: l.Speed, Text: text})
	}
	return marks, s.WindSource
}
