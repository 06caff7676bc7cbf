package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
	"glidereach/reach/plan"
	"glidereach/wind"
)

func init() { register(newPolarCmd) }

// speedUnits are the display units of the polar table (the library stays SI).
var speedUnits = map[string]struct {
	factor float64 // m/s per unit
	step   float64 // table spacing in this unit
}{
	"kt":   {input.Knot, 5},
	"km/h": {input.KMH, 10},
	"mph":  {input.MPH, 5},
}

// polarOptions are the resolved settings of one polar table.
type polarOptions struct {
	ac       *reach.Aircraft
	alt      float64 // m MSL
	isaDev   float64 // K
	atm      reach.Atmosphere
	wind     *wind.Profile // nil or calm: still air
	windText string
	track    float64 // degrees true
	hasTrack bool
	cond     reach.Conditions
	unit     string
}

func newPolarCmd() *cobra.Command {
	var (
		aircraft, windSpec, aloftSpec, format, unit, out string
		alt                                              = input.NewQuantity(input.Length, 0).Within(-1000, 20000)
		mass                                             = input.NewQuantity(input.Mass, 0).Within(0, maxMass)
		bugs                                             = input.NewQuantity(input.Fraction, 0).Within(0, maxBugs)
		isaDev                                           = input.NewQuantity(input.TempDelta, 0).Within(-maxISADev, maxISADev)
		track                                            = input.NewQuantity(input.Angle, 0).Within(0, 360)
		mc                                               = input.NewQuantity(input.VerticalSpeed, 0).Within(0, maxVSpeed)
		airSink                                          = input.NewQuantity(input.VerticalSpeed, 0).Within(0, maxVSpeed)
	)
	cmd := &cobra.Command{
		Use:   "polar --aircraft NAME|FILE [flags]",
		Short: "Performance table of an aircraft profile at an altitude, mass and wind",
		Long: `polar prints the glide performance of an aircraft profile across its usable
speed range: indicated and true airspeed, sink rate and glide ratio, and in
wind the ground speed and ground glide ratio on a held track. It marks the
best glide, the least sink and the speed to fly (which includes the wind,
sinking air and MacCready setting). Speeds below the usable minimum (the
profile's min_speed, else 1.3 x stall) are never offered; when an optimum
wants a slower speed it is clamped and the table says so.

Built-in profiles: ` + strings.Join(reach.BuiltinNames(), ", ") + ` (generic, invented).

` + wrapText(cautionText, 78),
		Example: `  glidereach polar --aircraft trainer --alt 5000ft
  glidereach polar --aircraft sailplane --alt 1500m --units km/h --mc 1.5m/s
  glidereach polar --aircraft trainer --alt 6000ft --wind 270/20kt --track 090
  glidereach polar --aircraft testdata/aircraft/trainer.yaml --mass 700kg --bugs 10% --isa-dev 15C --format json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			ac, err := input.LoadAircraft(aircraft)
			if err != nil {
				return err
			}
			if w := plan.MinSpeedWarning(ac); w != "" {
				fmt.Fprintln(cmd.ErrOrStderr(), "glidereach: WARNING:", w)
			}
			if out != "" {
				if err := checkOutputs(out, "", "", ""); err != nil {
					return err
				}
			}
			if _, ok := speedUnits[unit]; !ok {
				return input.Usagef("--units", "%q: want kt, km/h or mph", unit)
			}
			if format != "text" && format != "json" {
				return input.Usagef("--format", "%q: want text or json", format)
			}
			o := &polarOptions{ac: ac, alt: alt.Value, isaDev: isaDev.Value, unit: unit,
				track: track.Value, hasTrack: track.Given,
				cond: reach.Conditions{Mass: mass.Value, Bugs: bugs.Value, AirSink: airSink.Value, MacCready: mc.Value}}
			if err := checkPolarFlags(o, mass.Given); err != nil {
				return err
			}
			w, err := input.WindFromFlags(windSpec, aloftSpec)
			if err != nil {
				return err
			}
			if !w.IsCalm() {
				if !o.hasTrack {
					return input.Usagef("--track", "is required with a wind (the track to hold, degrees true, e.g. --track 090)")
				}
				o.wind, o.windText = w, plan.WindText(w, input.WindStyleOf(windSpec, aloftSpec))
			}
			if w.HasTemperatures() {
				o.wind = w
				o.windText = plan.WindText(w, input.WindStyleOf(windSpec, aloftSpec))
			}
			o.atm = reach.Atmosphere{ISADev: o.isaDev}
			if w.HasTemperatures() {
				o.atm.Temp = func(h float64) (float64, bool) { return w.Temperature(h, o.isaDev) }
			}
			rep := buildPolarReport(o)
			write := func(wr io.Writer) error { return writePolar(wr, rep, format) }
			if out != "" {
				return writeFileAtomic(out, func(f *os.File) error { return write(f) })
			}
			return write(cmd.OutOrStdout())
		},
	}
	f := cmd.Flags()
	f.StringVar(&aircraft, "aircraft", "", "built-in profile name ("+strings.Join(reach.BuiltinNames(), ", ")+") or a YAML/JSON profile file")
	f.Var(alt, "alt", alt.Help("altitude MSL ("+input.UnitNames(input.Length)+"; bare number is m)"))
	f.Var(mass, "mass", mass.Help("flying mass ("+input.UnitNames(input.Mass)+"); 0 = the profile's mass"))
	f.Var(bugs, "bugs", bugs.Help("contamination: sink x (1 + f), e.g. 0.1 or 10%"))
	f.Var(isaDev, "isa-dev", isaDev.Help("temperature deviation from ISA ("+input.UnitNames(input.TempDelta)+")"))
	f.StringVar(&windSpec, "wind", "", "wind: DIR/SPEED (270/20kt), layers (0m:240/10kt,1500m:270/20kt) or a file")
	f.StringVar(&aloftSpec, "wind-aloft", "", "coded winds-aloft forecast groups, e.g. \"3000:2714 6000:2725+05\"")
	f.Var(track, "track", track.Help("track to hold in degrees true (needed with --wind)"))
	f.Var(mc, "mc", mc.Help("MacCready setting ("+input.UnitNames(input.VerticalSpeed)+"); 0 flies for best range"))
	f.Var(airSink, "air-sink", airSink.Help("sinking-air allowance ("+input.UnitNames(input.VerticalSpeed)+")"))
	f.StringVar(&unit, "units", "kt", "speed units of the text table: kt, km/h or mph")
	f.StringVar(&format, "format", "text", "output format: text or json")
	f.StringVar(&out, "out", "", "write to FILE instead of standard output")
	_ = cmd.MarkFlagRequired("aircraft")
	_ = cmd.RegisterFlagCompletionFunc("aircraft", func(*cobra.Command, []string, string) ([]string, cobra.ShellCompDirective) {
		return reach.BuiltinNames(), cobra.ShellCompDirectiveDefault
	})
	_ = cmd.RegisterFlagCompletionFunc("format", cobra.FixedCompletions([]string{"text", "json"}, cobra.ShellCompDirectiveNoFileComp))
	_ = cmd.RegisterFlagCompletionFunc("units", cobra.FixedCompletions([]string{"kt", "km/h", "mph"}, cobra.ShellCompDirectiveNoFileComp))
	return cmd
}

// checkPolarFlags checks the values a user can get wrong, naming the flag.
func checkPolarFlags(o *polarOptions, massGiven bool) error {
	c := o.cond
	switch {
	case o.alt < -1000 || o.alt > 20000:
		return input.Usagef("--alt", "%.0f m is outside -1000..20000 m", o.alt)
	case o.isaDev < -60 || o.isaDev > 60:
		return input.Usagef("--isa-dev", "%g K is outside -60..60 K", o.isaDev)
	case massGiven && !(c.Mass > 0):
		return input.Usagef("--mass", "must be positive")
	case c.Bugs < 0 || c.Bugs > 2:
		return input.Usagef("--bugs", "%g is outside 0..2 (0.1 = sink 10 %% higher)", c.Bugs)
	case c.MacCready < 0 || c.MacCready >= 20:
		return input.Usagef("--mc", "%g m/s is outside 0..20 m/s", c.MacCready)
	case c.AirSink < 0 || c.AirSink >= 20:
		return input.Usagef("--air-sink", "%g m/s is outside 0..20 m/s (sinking air is positive)", c.AirSink)
	case o.hasTrack && (o.track < 0 || o.track > 360):
		return input.Usagef("--track", "%g° is outside 0..360°", o.track)
	}
	if err := o.ac.Check(c); err != nil {
		return &input.UsageError{Where: "--mass", Err: err}
	}
	return nil
}

// polarRow is one speed of the table (SI).
type polarRow struct {
	IAS         float64  `json:"ias_m_s"`
	TAS         float64  `json:"tas_m_s"`
	Sink        float64  `json:"sink_m_s"`
	GlideRatio  float64  `json:"glide_ratio"`
	GroundSpeed float64  `json:"ground_speed_m_s"`
	GroundRatio float64  `json:"ground_ratio"`
	Marks       []string `json:"marks,omitempty"`
}

type polarOptimum struct {
	IAS        float64 `json:"ias_m_s"`
	TAS        float64 `json:"tas_m_s"`
	Sink       float64 `json:"sink_m_s"`
	GlideRatio float64 `json:"glide_ratio"`
	Clamp      string  `json:"clamp"` // "", "min" or "max"
}

type polarSTF struct {
	IAS         float64 `json:"ias_m_s"`
	TAS         float64 `json:"tas_m_s"`
	Sink        float64 `json:"sink_m_s"`
	GroundSpeed float64 `json:"ground_speed_m_s"`
	GroundRatio float64 `json:"ground_ratio"`
	Clamp       string  `json:"clamp"`
	NoHeadway   bool    `json:"no_headway"`
}

type polarWind struct {
	Description string  `json:"description"`
	FromDeg     float64 `json:"from_deg"` // at the altitude
	Speed       float64 `json:"speed_m_s"`
	TrackDeg    float64 `json:"track_deg"`
	Along       float64 `json:"along_m_s"`
	Cross       float64 `json:"cross_m_s"`
}

// polarReport is the whole result of polar, in SI; text and JSON are views.
type polarReport struct {
	Aircraft  string  `json:"aircraft"`
	PolarForm string  `json:"polar_form"`
	AltitudeM float64 `json:"alt_msl_m"`
	// ISADevK is the deviation from ISA of the air at AltitudeM: --isa-dev,
	// or what the wind layers' temperatures give there (TempSource).
	ISADevK      float64      `json:"isa_dev_k"`
	TemperatureK float64      `json:"temperature_k"`
	TempSource   string       `json:"temperature_source"` // "isa_dev" or "wind_layers"
	Density      float64      `json:"density_kg_m3"`
	Sigma        float64      `json:"sigma"`
	MassKg       float64      `json:"mass_kg"`
	RefMassKg    float64      `json:"reference_mass_kg"`
	Bugs         float64      `json:"bugs"`
	AirSink      float64      `json:"air_sink_m_s"`
	MacCready    float64      `json:"mac_cready_m_s"`
	Wind         *polarWind   `json:"wind"`
	StallIAS     float64      `json:"stall_ias_m_s"`
	MinIAS       float64      `json:"min_ias_m_s"`
	MinSource    string       `json:"min_ias_source"`
	MaxIAS       float64      `json:"max_ias_m_s"`
	Rows         []polarRow   `json:"rows"`
	BestGlide    polarOptimum `json:"best_glide"`
	LeastSink    polarOptimum `json:"least_sink"`
	SpeedToFly   polarSTF     `json:"speed_to_fly"`
	// BestRange is the MacCready-0 speed to fly in this wind and sinking
	// air, the farthest glide; equal to SpeedToFly when MacCready is 0.
	BestRange polarSTF `json:"best_range"`
	Caution   string   `json:"caution"`

	unit string
}

// buildPolarReport computes the table for o.
func buildPolarReport(o *polarOptions) *polarReport {
	ac, c := o.ac, o.cond
	rho := o.atm.Density(o.alt)
	fig := ac.Figures(rho, c)
	r := &polarReport{
		Aircraft: ac.Name, PolarForm: ac.Polar.Form(), AltitudeM: o.alt, ISADevK: o.isaDev,
		TemperatureK: o.atm.Temperature(o.alt), Density: rho, Sigma: fig.Sigma,
		MassKg: fig.Mass, RefMassKg: ac.RefMass, Bugs: c.Bugs, AirSink: c.AirSink, MacCready: c.MacCready,
		StallIAS: fig.StallIAS, MinIAS: fig.MinIAS, MaxIAS: fig.MaxIAS, Caution: reach.Caution, unit: o.unit,
	}
	r.TempSource = "isa_dev"
	if o.wind != nil && o.wind.HasTemperatures() {
		isaT, _, _ := reach.ISA(o.alt)
		r.ISADevK, r.TempSource = r.TemperatureK-isaT, "wind_layers"
	}
	r.MinSource = fmt.Sprintf("%.1f x stall", reach.StallMargin)
	if ac.MinIAS > 0 {
		r.MinSource = "profile min_speed"
	}
	var along, cross float64
	if o.wind != nil {
		tr := o.track
		if !o.hasTrack {
			tr = 0
		}
		along, cross = o.wind.Components(o.alt, tr)
		// Drop rounding residue (1e-15 m/s) from the sine and cosine of round tracks.
		if math.Abs(along) < 1e-9 {
			along = 0
		}
		if math.Abs(cross) < 1e-9 {
			cross = 0
		}
		if o.hasTrack {
			e, n := o.wind.At(o.alt)
			from := math.Mod(math.Atan2(-e, -n)*180/math.Pi+360, 360)
			r.Wind = &polarWind{Description: o.windText, FromDeg: from, Speed: math.Hypot(e, n), TrackDeg: o.track, Along: along, Cross: cross}
		}
	}
	r.BestGlide = polarOptimum{fig.BestGlideIAS, fig.BestGlideTAS, fig.BestGlideSink, fig.BestGlideRatio, fig.BestGlideClamp.String()}
	r.LeastSink = polarOptimum{fig.LeastSinkIAS, fig.LeastSinkTAS, fig.LeastSink, fig.LeastSinkRatio, fig.LeastSinkClamp.String()}
	s := ac.SpeedToFly(rho, along, cross, c)
	r.SpeedToFly = polarSTF{s.IAS, s.TAS, s.Sink, s.GroundSpeed, s.GroundRatio, s.Clamp.String(), s.NoHeadway}
	c0 := c
	c0.MacCready = 0
	br := ac.SpeedToFly(rho, along, cross, c0)
	r.BestRange = polarSTF{br.IAS, br.TAS, br.Sink, br.GroundSpeed, br.GroundRatio, br.Clamp.String(), br.NoHeadway}

	// Rows: the usable minimum, round speeds of the display unit, the
	// maximum, and the three marked speeds.
	u := speedUnits[o.unit]
	type mark struct {
		ias  float64
		name string
	}
	marks := []mark{{fig.MinIAS, "min"}, {fig.MaxIAS, "max"}, {fig.BestGlideIAS, "best glide"}, {fig.LeastSinkIAS, "least sink"}}
	if !s.NoHeadway {
		marks = append(marks, mark{s.IAS, "speed to fly"})
	}
	var speeds []float64
	for v := math.Ceil(fig.MinIAS/u.factor/u.step) * u.step * u.factor; v < fig.MaxIAS; v += u.step * u.factor {
		speeds = append(speeds, v)
	}
	for _, m := range marks {
		speeds = append(speeds, m.ias)
	}
	sort.Float64s(speeds)
	tol := 0.05 * u.factor // speeds closer than 0.05 unit share a row
	for _, v := range speeds {
		if n := len(r.Rows); n > 0 && v-r.Rows[n-1].IAS < tol {
			continue
		}
		tas := reach.TAS(v, fig.Sigma)
		w := ac.Sink(tas, rho, c)
		row := polarRow{IAS: v, TAS: tas, Sink: w, GlideRatio: tas / w}
		if g := math.Sqrt(math.Max(0, tas*tas-cross*cross)) + along; tas > math.Abs(cross) && g > 0 {
			row.GroundSpeed, row.GroundRatio = g, g/(w+c.AirSink)
		}
		r.Rows = append(r.Rows, row)
	}
	for _, m := range marks {
		best := 0
		for i, row := range r.Rows {
			if math.Abs(row.IAS-m.ias) < math.Abs(r.Rows[best].IAS-m.ias) {
				best = i
			}
		}
		r.Rows[best].Marks = append(r.Rows[best].Marks, m.name)
	}
	return r
}

// writePolar writes the report as text or JSON.
func writePolar(w io.Writer, r *polarReport, format string) error {
	if format == "json" {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(r)
	}
	u := speedUnits[r.unit]
	sp := func(v float64) string { return fmt.Sprintf("%.0f %s", v/u.factor, r.unit) }
	sp1 := func(v float64) string { return fmt.Sprintf("%.1f %s", v/u.factor, r.unit) }
	fpm := func(v float64) float64 { return v / input.FPM }
	var b strings.Builder
	fmt.Fprintf(&b, "%s (%s polar) at %.0f m / %.0f ft MSL\n", r.Aircraft, r.PolarForm, r.AltitudeM, r.AltitudeM/input.Foot)
	tempFrom := fmt.Sprintf("ISA %+.0f K", r.ISADevK)
	if r.TempSource == "wind_layers" {
		tempFrom = fmt.Sprintf("ISA %+.1f K, from the wind layers' temperatures", r.ISADevK)
	}
	fmt.Fprintf(&b, "Air: %.1f °C (%s), density %.4f kg/m³, sigma %.4f (TAS = IAS / %.4f)\n",
		r.TemperatureK-273.15, tempFrom, r.Density, r.Sigma, math.Sqrt(r.Sigma))
	fmt.Fprintf(&b, "Mass %.0f kg (reference %.0f kg)", r.MassKg, r.RefMassKg)
	if r.Bugs > 0 {
		fmt.Fprintf(&b, ", contamination +%.0f %% sink", 100*r.Bugs)
	}
	if r.AirSink > 0 {
		fmt.Fprintf(&b, ", sinking air %.2f m/s", r.AirSink)
	}
	fmt.Fprintf(&b, ", MacCready %.1f m/s\n", r.MacCready)
	fmt.Fprintf(&b, "Usable speeds %s to %s IAS (stall %s; minimum = %s)\n", sp1(r.MinIAS), sp1(r.MaxIAS), sp1(r.StallIAS), r.MinSource)
	ground := r.Wind != nil || r.AirSink > 0
	if r.Wind != nil {
		fmt.Fprintf(&b, "Wind: %s\n", r.Wind.Description)
		if r.Wind.Speed < 0.005 {
			fmt.Fprintf(&b, "Wind at %.0f m: calm\n", r.AltitudeM)
		} else {
			// wind.Profile.Components: cross > 0 is wind from the left of the track.
			side := ""
			if s := math.Round(math.Abs(r.Wind.Cross)/u.factor*10) / 10; s > 0 {
				side = map[bool]string{true: " from the left", false: " from the right"}[r.Wind.Cross > 0]
			}
			fmt.Fprintf(&b, "Wind at %.0f m: from %03.0f° at %s; on track %03.0f°: %s %s, crosswind %s%s\n",
				r.AltitudeM, r.Wind.FromDeg, sp1(r.Wind.Speed), r.Wind.TrackDeg,
				map[bool]string{true: "tailwind", false: "headwind"}[r.Wind.Along >= 0], sp1(math.Abs(r.Wind.Along)), sp1(math.Abs(r.Wind.Cross)), side)
		}
	} else {
		b.WriteString("Wind: calm\n")
	}
	b.WriteString("\n")
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', tabwriter.AlignRight)
	head := "IAS " + r.unit + "\tTAS " + r.unit + "\tsink m/s\tsink ft/min\tglide 1:\t"
	if ground {
		head += "ground " + r.unit + "\tground glide 1:\t"
	}
	fmt.Fprintln(tw, head+"\t")
	for _, row := range r.Rows {
		line := fmt.Sprintf("%.1f\t%.1f\t%.2f\t%.0f\t%.1f\t", row.IAS/u.factor, row.TAS/u.factor, row.Sink, fpm(row.Sink), row.GlideRatio)
		if ground {
			if row.GroundRatio > 0 {
				line += fmt.Sprintf("%.1f\t%.1f\t", row.GroundSpeed/u.factor, row.GroundRatio)
			} else {
				line += "no headway\t-\t"
			}
		}
		fmt.Fprintln(tw, line+"\t"+strings.Join(row.Marks, ", "))
	}
	tw.Flush()
	b.WriteString("\n")
	clampNote := func(c, what string) string {
		switch c {
		case "min":
			return "  [clamped: the polar's " + what + " speed is below the usable minimum]"
		case "max":
			return "  [clamped at the maximum speed]"
		}
		return ""
	}
	bg, ls, st := r.BestGlide, r.LeastSink, r.SpeedToFly
	fmt.Fprintf(&b, "Best glide    1:%.1f at %s IAS (%s TAS), sink %.2f m/s, still air%s\n", bg.GlideRatio, sp1(bg.IAS), sp1(bg.TAS), bg.Sink, clampNote(bg.Clamp, "best-glide"))
	fmt.Fprintf(&b, "Least sink    %.2f m/s (%.0f ft/min) at %s IAS (%s TAS)%s\n", ls.Sink, fpm(ls.Sink), sp1(ls.IAS), sp1(ls.TAS), clampNote(ls.Clamp, "least-sink"))
	if br := r.BestRange; r.MacCready > 0 && !br.NoHeadway {
		fmt.Fprintf(&b, "Best range    %s IAS: ground glide 1:%.1f (the farthest glide, MacCready 0)%s\n", sp1(br.IAS), br.GroundRatio, clampNote(br.Clamp, "optimum"))
	}
	switch {
	case st.NoHeadway:
		fmt.Fprintf(&b, "Speed to fly  none: no headway on this track even at %s IAS\n", sp(r.MaxIAS))
	default:
		fmt.Fprintf(&b, "Speed to fly  %s IAS (%s TAS) for MacCready %.1f: ground speed %s, ground glide 1:%.1f%s\n",
			sp1(st.IAS), sp1(st.TAS), r.MacCready, sp(st.GroundSpeed), st.GroundRatio, clampNote(st.Clamp, "optimum"))
		fmt.Fprintf(&b, "              %.0f m over ground per 100 m of height (%.2f nm per 1000 ft)\n",
			100*st.GroundRatio, st.GroundRatio*1000*input.Foot/input.NauticalMile)
	}
	b.WriteString("\nIAS is taken as equivalent airspeed (no instrument or compressibility error).\n")
	b.WriteString(wrapText("Caution: "+r.Caution, 78))
	_, err := io.WriteString(w, b.String())
	return err
}

// wrapText breaks s into lines of at most width characters at spaces.
func wrapText(s string, width int) string {
	var b strings.Builder
	n := 0
	for _, w := range strings.Fields(s) {
		if n > 0 && n+1+len([]rune(w)) > width {
			b.WriteString("\n")
			n = 0
		} else if n > 0 {
			b.WriteString(" ")
			n++
		}
		b.WriteString(w)
		n += len([]rune(w))
	}
	b.WriteString("\n")
	return b.String()
}
