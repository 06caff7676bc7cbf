package input

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"

	"glidereach/reach/plan"
	"glidereach/wind"
)

// WindStyleOf finds how the --wind / --wind-aloft values gave the wind, for
// plan.WindText: feet and forecast when the coded forecast is given, feet
// when the --wind text (or the file it names, if under 1 MiB) uses ft.
func WindStyleOf(windSpec, aloftSpec string) plan.WindStyle {
	if strings.TrimSpace(aloftSpec) != "" {
		return plan.WindStyle{Feet: true, Forecast: true}
	}
	text := windSpec
	if st, err := os.Stat(strings.TrimSpace(windSpec)); err == nil && st.Mode().IsRegular() && st.Size() < 1<<20 {
		if b, err := os.ReadFile(strings.TrimSpace(windSpec)); err == nil {
			text = string(b)
		}
	}
	return plan.WindStyle{Feet: strings.Contains(strings.ToLower(text), "ft")}
}

// Wind specifications on the command line (--wind):
//
//	calm                                       no wind at any altitude
//	270/20kt                                   uniform: from 270° true at 20 kt
//	270/20kt@15C                               uniform, with a temperature at 0 m MSL
//	0m:240/10kt,1500m:270/20kt,3000m:280/35kt  layers ALT:DIR/SPEED, increasing altitude
//	0m:240/10kt,3000m:280/35kt@-5C             a layer may carry @TEMP
//	winds.yaml | winds.json | winds.csv        a file (see ParseWindFile)
//	forecast.txt                               a coded winds-aloft forecast file
//
// Altitudes are MSL with a length unit (m, ft, km, nm; a bare number is
// metres); directions are degrees true the wind blows FROM (bare or "deg");
// speeds take m/s, kt, km/h, mph (bare is m/s). Temperatures are absolute:
// "-5C" is −5 °C, "268K" is 268 K, a bare number is kelvin. Layers are
// separated by commas (or semicolons) and must be in increasing altitude.

// maxWindLayers bounds the layers of any wind input.
const maxWindLayers = 1000

// windFileExts are the extensions that make ParseWind read a file even when
// it does not exist (to say so, rather than parse the name as a spec).
var windFileExts = map[string]bool{".yaml": true, ".yml": true, ".json": true, ".csv": true, ".txt": true, ".fb": true}

// ParseWind parses a --wind value: "calm", a uniform "DIR/SPEED[@TEMP]",
// layers "ALT:DIR/SPEED[@TEMP],…", or the path of a wind file. A value is
// taken as a file when a regular file of that name exists or when it ends in
// .yaml, .yml, .json, .csv, .txt or .fb. Inline errors are plain errors
// naming the layer (the command adds the flag); file errors are *UsageError
// with Where set to the file, line and column.
func ParseWind(spec string) (*wind.Profile, error) {
	s := strings.TrimSpace(spec)
	st, err := os.Stat(s)
	if err == nil && st.Mode().IsRegular() {
		return ParseWindFile(s)
	}
	if windFileExts[strings.ToLower(filepath.Ext(s))] {
		if err == nil {
			return nil, &UsageError{Where: s, Err: errors.New("not a regular file (a wind file must be one)")}
		}
		return nil, &UsageError{Where: s, Err: errors.New("wind file not found")}
	}
	return parseWindInline(s)
}

// parseWindInline parses the inline forms (no file system access).
func parseWindInline(spec string) (*wind.Profile, error) {
	s := strings.TrimSpace(spec)
	if s == "" {
		return nil, errors.New(`empty wind (want "calm", DIR/SPEED such as 270/20kt, or layers such as 0m:240/10kt,1500m:270/20kt)`)
	}
	if strings.EqualFold(s, "calm") {
		return wind.Calm(), nil
	}
	parts := strings.FieldsFunc(s, func(r rune) bool { return r == ',' || r == ';' })
	if len(parts) == 0 {
		return nil, fmt.Errorf("%q has no layers", s)
	}
	// An empty layer (a trailing, leading or doubled comma) is a typing
	// error: a layer may have been lost.
	for _, part := range strings.Split(strings.ReplaceAll(s, ";", ","), ",") {
		if strings.TrimSpace(part) == "" {
			return nil, fmt.Errorf("%q has an empty layer (a trailing, leading or doubled comma?)", s)
		}
	}
	if len(parts) > maxWindLayers {
		return nil, fmt.Errorf("%d layers: at most %d", len(parts), maxWindLayers)
	}
	layers := make([]wind.Layer, 0, len(parts))
	for i, part := range parts {
		part = strings.TrimSpace(part)
		l, err := parseWindLayer(part, len(parts) == 1)
		if err != nil {
			return nil, fmt.Errorf("layer %d %q: %w", i+1, part, err)
		}
		layers = append(layers, l)
	}
	p, err := wind.NewProfile(layers)
	if err != nil {
		return nil, describeLayerError(err, func(i int) string { return fmt.Sprintf("layer %d %q", i+1, strings.TrimSpace(parts[i])) })
	}
	return p, nil
}

// parseWindLayer parses "ALT:DIR/SPEED[@TEMP]", or "DIR/SPEED[@TEMP]" (at
// 0 m) when alone is true.
func parseWindLayer(s string, alone bool) (wind.Layer, error) {
	var l wind.Layer
	rest := s
	if at := strings.IndexByte(rest, '@'); at >= 0 {
		T, err := ParseTemperature(rest[at+1:])
		if err != nil {
			return l, fmt.Errorf("temperature: %w", err)
		}
		l.Temp, l.HasTemp = T, true
		rest = rest[:at]
	}
	if c := strings.IndexByte(rest, ':'); c >= 0 {
		alt, err := ParseQuantity(rest[:c], Length)
		if err != nil {
			return l, fmt.Errorf("altitude: %w", err)
		}
		l.Alt = alt
		rest = rest[c+1:]
	} else if !alone {
		return l, errors.New("want ALT:DIR/SPEED, e.g. 1500m:270/20kt (each of several layers needs its altitude)")
	}
	dir, speed, ok := strings.Cut(rest, "/")
	if !ok {
		return l, errors.New("want DIR/SPEED, e.g. 270/20kt")
	}
	d, err := ParseQuantity(dir, Angle)
	if err != nil {
		return l, fmt.Errorf("direction: %w", err)
	}
	v, err := ParseQuantity(speed, Speed)
	if err != nil {
		return l, fmt.Errorf("speed: %w", err)
	}
	l.Dir, l.Speed = d, v
	return l, nil
}

// ParseTemperature parses an absolute air temperature and returns kelvin:
// "-5C", "-5°C", "-5degC" are degrees Celsius, "268.15K" is kelvin, and a
// bare number is kelvin (SI).
func ParseTemperature(s string) (float64, error) {
	v, err := ParseQuantity(s, TempDelta)
	if err != nil {
		return 0, err
	}
	t := strings.TrimSpace(s)
	unit := strings.ToLower(strings.TrimSpace(t[numberPrefix(t):]))
	if unit != "" && unit != "k" {
		v += 273.15
	}
	return v, nil
}

// describeLayerError rewrites a *wind.LayerError so that it names the layer
// as the user wrote it (name(i) gives that description); other errors are
// returned unchanged.
func describeLayerError(err error, name func(i int) string) error {
	var le *wind.LayerError
	if errors.As(err, &le) {
		return fmt.Errorf("%s: %w", name(le.Index), le.Err)
	}
	return err
}

// ParseWindError parses a --wind-error value "DIR,SPEED", e.g. "20deg,5kt":
// the uncertainty of the wind direction (degrees, 0..180; bare or "deg") and
// of its speed (a speed unit; bare is m/s, 0..120 m/s). wind.Perturb turns
// the result into the scenario set.
func ParseWindError(s string) (dirDeg, speed float64, err error) {
	a, b, ok := strings.Cut(s, ",")
	if !ok {
		return 0, 0, fmt.Errorf("%q: want DIR,SPEED such as 20deg,5kt", s)
	}
	dirDeg, err = ParseQuantity(a, Angle)
	if err != nil {
		return 0, 0, fmt.Errorf("direction error: %w", err)
	}
	if dirDeg < 0 || dirDeg > 180 {
		return 0, 0, fmt.Errorf("direction error %g° is outside 0..180°", dirDeg)
	}
	speed, err = ParseQuantity(b, Speed)
	if err != nil {
		return 0, 0, fmt.Errorf("speed error: %w", err)
	}
	if speed < 0 || speed > wind.MaxSpeed || math.IsNaN(speed) {
		return 0, 0, fmt.Errorf("speed error %g m/s is outside 0..%g m/s", speed, wind.MaxSpeed)
	}
	return dirDeg, speed, nil
}

// WindFromFlags resolves the --wind and --wind-aloft values of a command
// into one profile: at most one of them may be given; neither gives calm.
// Errors are *UsageError naming the flag and the value.
func WindFromFlags(windSpec, aloftSpec string) (*wind.Profile, error) {
	w, a := strings.TrimSpace(windSpec), strings.TrimSpace(aloftSpec)
	switch {
	case w != "" && a != "":
		return nil, Usagef("--wind", "give either --wind or --wind-aloft, not both")
	case a != "":
		p, err := ParseWindAloftSpec(a)
		if err != nil {
			return nil, FlagError("--wind-aloft", a, err)
		}
		return p, nil
	case w != "":
		p, err := ParseWind(w)
		if err != nil {
			return nil, FlagError("--wind", w, err)
		}
		return p, nil
	}
	return wind.Calm(), nil
}
