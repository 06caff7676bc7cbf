package input

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"os"
	"strconv"
	"strings"

	"glidereach/wind"
)

// Coded winds-and-temperatures-aloft forecasts.
//
// Each level carries a group DDff or DDff±TT (or DDffTT above 24 000 ft):
//
//	DD  direction the wind blows from, tens of degrees true (01..36)
//	ff  speed, knots (00..99)
//	TT  temperature, °C
//
// with the published coding rules (FAA Aviation Weather Services, AC 00-45,
// winds and temperatures aloft forecast):
//
//   - 9900 is "light and variable" (below 5 kt): decoded as calm (speed 0),
//     since its direction is unknown and its speed small; a temperature may
//     follow (9900+02).
//   - Speeds of 100..199 kt are coded by adding 50 to DD and subtracting 100
//     from the speed: DD 51..86. 7319 is 230° at 119 kt.
//   - Speeds of 200 kt or more are coded as 199 kt (ff 99 with DD 51..86);
//     they decode as 199 kt, a lower bound.
//   - Above 24 000 ft temperatures are always negative and carry no sign:
//     731960 at 39 000 ft is 230° at 119 kt and −60 °C. At or below
//     24 000 ft a temperature must carry its sign.
//   - The 3000 ft level carries no temperature; a temperature there is
//     refused (it usually means the groups were shifted by one level).
//
// Levels are feet MSL as in the forecast (levels from 18 000 ft up are
// pressure altitudes in the original product; they are taken as MSL here, a
// small error against the uncertainty of a forecast wind). Other direction
// codes (00, 37..50, 87..98, and 99 with a speed) are refused.

// ParseWindAloft parses levels given on the command line as a line of
// "LEVEL:GROUP" tokens separated by spaces, e.g.
//
//	3000:2714 6000:2725+05 9000:2830-02 34000:750456
//
// LEVEL is in feet when bare (the unit of the forecast) or carries a length
// unit; levels must increase. Errors are plain errors naming the token.
func ParseWindAloft(line string) (*wind.Profile, error) {
	fields := strings.Fields(line)
	if len(fields) == 0 {
		return nil, errors.New(`empty forecast (want LEVEL:GROUP tokens such as "3000:2714 6000:2725+05")`)
	}
	if len(fields) > maxWindLayers {
		return nil, fmt.Errorf("%d levels: at most %d", len(fields), maxWindLayers)
	}
	layers := make([]wind.Layer, 0, len(fields))
	for i, tok := range fields {
		lv, grp, ok := strings.Cut(tok, ":")
		if !ok {
			return nil, fmt.Errorf("level %d %q: want LEVEL:GROUP such as 6000:2725+05", i+1, tok)
		}
		ft, err := parseLevelFeet(lv)
		if err != nil {
			return nil, fmt.Errorf("level %d %q: %w", i+1, tok, err)
		}
		l, err := DecodeWindAloftGroup(grp, ft)
		if err != nil {
			return nil, fmt.Errorf("level %d %q: %w", i+1, tok, err)
		}
		layers = append(layers, l)
	}
	p, err := wind.NewProfile(layers)
	if err != nil {
		return nil, describeLayerError(err, func(i int) string { return fmt.Sprintf("level %d %q", i+1, fields[i]) })
	}
	return p, nil
}

// parseLevelFeet parses a forecast level: a bare number of feet or a length
// with a unit; the result is in feet.
func parseLevelFeet(s string) (float64, error) {
	ft, err := strconv.ParseFloat(s, 64)
	if err != nil {
		m, qerr := ParseQuantity(s, Length)
		if qerr != nil {
			return 0, fmt.Errorf("level: %w", qerr)
		}
		ft = m / Foot
	}
	// Forecast levels are heights above sea level, from the lowest level
	// forecast (3000 ft in the bulletin) up to the flight levels.
	if !(ft > 0 && ft <= maxAloftLevelFt) {
		return 0, fmt.Errorf("level %q is outside 0..%.0f ft (forecast levels are above sea level)", s, float64(maxAloftLevelFt))
	}
	return ft, nil
}

// maxAloftLevelFt is the highest forecast level accepted (ft): above the
// highest level of the published bulletins (53 000 ft, from memory).
const maxAloftLevelFt = 60000

// DecodeWindAloftGroup decodes one coded group at a level of levelFt feet
// MSL into a layer (SI), following the rules above.
func DecodeWindAloftGroup(group string, levelFt float64) (wind.Layer, error) {
	var l wind.Layer
	g := strings.TrimSpace(group)
	if len(g) < 4 || !allDigits(g[:4]) {
		return l, fmt.Errorf("group %q: want 4 digits DDff, optionally followed by the temperature (±TT)", group)
	}
	dd, _ := strconv.Atoi(g[:2])
	ff, _ := strconv.Atoi(g[2:4])
	switch {
	case dd == 99 && ff == 0: // light and variable
	case dd == 99:
		return l, fmt.Errorf("group %q: variable direction at %d kt cannot be used; give a direction", group, ff)
	case dd >= 1 && dd <= 36:
		l.Dir, l.Speed = float64(dd*10), float64(ff)*Knot
	case dd >= 51 && dd <= 86:
		l.Dir, l.Speed = float64((dd-50)*10), float64(ff+100)*Knot
	default:
		return l, fmt.Errorf("group %q: direction code %02d is not 01..36, 51..86 (speed 100 kt and more) or 99 (light and variable)", group, dd)
	}
	l.Alt = levelFt * Foot
	t := g[4:]
	if t == "" {
		return l, nil
	}
	if levelFt == 3000 {
		return l, fmt.Errorf("group %q: the 3000 ft level carries no temperature in the coded forecast (are the groups shifted by one level?)", group)
	}
	neg := false
	switch t[0] {
	case '+':
		t = t[1:]
	case '-':
		t, neg = t[1:], true
	default:
		if levelFt <= 24000 {
			return l, fmt.Errorf("group %q: a temperature at or below 24000 ft needs its sign (+ or -)", group)
		}
		neg = true // above 24 000 ft temperatures are negative and unsigned
	}
	if len(t) != 2 || !allDigits(t) {
		return l, fmt.Errorf("group %q: temperature must be two digits (°C)", group)
	}
	c, _ := strconv.Atoi(t)
	if neg {
		c = -c
	}
	l.Temp, l.HasTemp = float64(c)+273.15, true
	return l, nil
}

func allDigits(s string) bool {
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return len(s) > 0
}

// ParseWindAloftSpec parses a --wind-aloft value: the path of a forecast
// file, "PATH:STATION" to pick one station's line from a file holding
// several, or an inline line for ParseWindAloft.
func ParseWindAloftSpec(spec string) (*wind.Profile, error) {
	s := strings.TrimSpace(spec)
	if st, err := os.Stat(s); err == nil && st.Mode().IsRegular() {
		return ParseWindAloftFile(s, "")
	}
	if i := strings.LastIndexByte(s, ':'); i > 0 {
		if st, err := os.Stat(s[:i]); err == nil && st.Mode().IsRegular() {
			return ParseWindAloftFile(s[:i], s[i+1:])
		}
	}
	return ParseWindAloft(s)
}

// ParseWindAloftFile reads a coded forecast from a file: either LEVEL:GROUP
// tokens (one or more lines), or a header line "FT 3000 6000 9000 …" naming
// the levels followed by data lines of groups, each optionally preceded by a
// station identifier, as in the published bulletin:
//
//	FT  3000    6000    9000   12000   18000   24000  30000  34000  39000
//	ABC 2714 2725+05 2830-02 2835-08 2745-20 2760-32 772245 771952 760860
//
// Lines before the header are ignored. A station whose lowest levels are not
// forecast has fewer groups: they belong to the highest levels. When the file
// holds several data lines, station picks one (case-insensitive); empty
// station requires a single data line. Errors are *UsageError with Where set
// to "file:line:column".
func ParseWindAloftFile(path, station string) (*wind.Profile, error) {
	data, err := readWindFile(path)
	if err != nil {
		return nil, err
	}
	return parseWindAloftText(path, data, station)
}

// aloftLine is a data line of a forecast file.
type aloftLine struct {
	no      int      // line number, 1-based
	station string   // identifier, may be empty
	groups  []string // coded groups
	cols    []int    // 1-based column of each group
}

func parseWindAloftText(path string, data []byte, station string) (*wind.Profile, error) {
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 0, 64*1024), maxWindFileSize)
	var (
		levels   []float64
		headerNo int
		inline   []string
		inlineAt [][2]int
		lines    []aloftLine
	)
	no := 0
	for sc.Scan() {
		no++
		text := sc.Text()
		if i := strings.IndexByte(text, '#'); i >= 0 {
			text = text[:i]
		}
		toks, cols := fieldsWithCols(text)
		if len(toks) == 0 {
			continue
		}
		switch {
		case strings.EqualFold(toks[0], "FT"):
			if levels != nil {
				return nil, &UsageError{Where: filePos(path, no, cols[0]), Err: errors.New("a second FT header line")}
			}
			if len(toks) == 1 {
				return nil, &UsageError{Where: filePos(path, no, cols[0]), Err: errors.New("FT header names no levels")}
			}
			if len(toks)-1 > maxWindLayers {
				return nil, &UsageError{Where: filePos(path, no, cols[0]), Err: fmt.Errorf("%d levels: at most %d", len(toks)-1, maxWindLayers)}
			}
			headerNo = no
			for j, t := range toks[1:] {
				v, err := strconv.Atoi(t)
				if err != nil || v <= 0 || v > maxAloftLevelFt {
					return nil, &UsageError{Where: filePos(path, no, cols[j+1]), Err: fmt.Errorf("level %q is not a whole number of feet", t)}
				}
				if j > 0 && float64(v) <= levels[j-1] {
					return nil, &UsageError{Where: filePos(path, no, cols[j+1]), Err: fmt.Errorf("level %d ft does not increase", v)}
				}
				levels = append(levels, float64(v))
			}
		case levels == nil && strings.Contains(toks[0], ":") && len(toks[0]) > 0 && toks[0][0] >= '0' && toks[0][0] <= '9':
			for j, t := range toks {
				if len(inline) == maxWindLayers {
					return nil, &UsageError{Where: filePos(path, no, cols[j]), Err: fmt.Errorf("more than %d levels", maxWindLayers)}
				}
				inline = append(inline, t)
				inlineAt = append(inlineAt, [2]int{no, cols[j]})
			}
		case levels != nil:
			al := aloftLine{no: no}
			if toks[0][0] < '0' || toks[0][0] > '9' {
				al.station, toks, cols = toks[0], toks[1:], cols[1:]
			}
			al.groups, al.cols = toks, cols
			lines = append(lines, al)
		default:
			// Bulletin heading lines before the FT header.
		}
	}
	if err := sc.Err(); err != nil {
		return nil, &UsageError{Where: filePos(path, no+1, 1), Err: err}
	}
	if levels == nil {
		if len(inline) == 0 {
			return nil, &UsageError{Where: path, Err: errors.New(`no forecast found: want an "FT 3000 6000 ..." header with data lines, or LEVEL:GROUP tokens`)}
		}
		return aloftInline(path, inline, inlineAt)
	}
	if len(inline) > 0 {
		return nil, &UsageError{Where: filePos(path, inlineAt[0][0], inlineAt[0][1]), Err: errors.New("LEVEL:GROUP tokens and an FT header in one file")}
	}
	var pick *aloftLine
	switch {
	case station != "":
		for i := range lines {
			if strings.EqualFold(lines[i].station, station) {
				pick = &lines[i]
				break
			}
		}
		if pick == nil {
			return nil, &UsageError{Where: path, Err: fmt.Errorf("no data line for station %q", station)}
		}
	case len(lines) == 1:
		pick = &lines[0]
	case len(lines) == 0:
		return nil, &UsageError{Where: filePos(path, headerNo, 1), Err: errors.New("no data line after the FT header")}
	default:
		var names []string
		for _, l := range lines {
			if l.station != "" {
				names = append(names, l.station)
			}
		}
		return nil, &UsageError{Where: path, Err: fmt.Errorf("%d data lines (stations %s): name the station (FILE:STATION)", len(lines), strings.Join(names, ", "))}
	}
	if len(pick.groups) == 0 {
		return nil, &UsageError{Where: filePos(path, pick.no, 1), Err: errors.New("data line has no groups")}
	}
	if len(pick.groups) > len(levels) {
		return nil, &UsageError{Where: filePos(path, pick.no, pick.cols[len(levels)]), Err: fmt.Errorf("%d groups for %d levels", len(pick.groups), len(levels))}
	}
	off := len(levels) - len(pick.groups) // missing groups are the lowest levels
	layers := make([]wind.Layer, len(pick.groups))
	for j, g := range pick.groups {
		l, err := DecodeWindAloftGroup(g, levels[off+j])
		if err != nil {
			return nil, &UsageError{Where: filePos(path, pick.no, pick.cols[j]), Err: fmt.Errorf("level %g ft: %w", levels[off+j], err)}
		}
		layers[j] = l
	}
	p, err := wind.NewProfile(layers)
	if err != nil {
		var le *wind.LayerError
		if errors.As(err, &le) {
			return nil, &UsageError{Where: filePos(path, pick.no, pick.cols[le.Index]), Err: fmt.Errorf("level %g ft: %w", levels[off+le.Index], le.Err)}
		}
		return nil, &UsageError{Where: path, Err: err}
	}
	return p, nil
}

// aloftInline decodes LEVEL:GROUP tokens read from a file.
func aloftInline(path string, toks []string, at [][2]int) (*wind.Profile, error) {
	layers := make([]wind.Layer, len(toks))
	for i, tok := range toks {
		lv, grp, ok := strings.Cut(tok, ":")
		where := filePos(path, at[i][0], at[i][1])
		if !ok {
			return nil, &UsageError{Where: where, Err: fmt.Errorf("%q: want LEVEL:GROUP", tok)}
		}
		ft, err := parseLevelFeet(lv)
		if err != nil {
			return nil, &UsageError{Where: where, Err: err}
		}
		l, err := DecodeWindAloftGroup(grp, ft)
		if err != nil {
			return nil, &UsageError{Where: where, Err: err}
		}
		layers[i] = l
	}
	p, err := wind.NewProfile(layers)
	if err != nil {
		var le *wind.LayerError
		if errors.As(err, &le) {
			return nil, &UsageError{Where: filePos(path, at[le.Index][0], at[le.Index][1]), Err: fmt.Errorf("%q: %w", toks[le.Index], le.Err)}
		}
		return nil, &UsageError{Where: path, Err: err}
	}
	return p, nil
}

// fieldsWithCols splits s at spaces and tabs and returns each field with its
// 1-based byte column.
func fieldsWithCols(s string) (fields []string, cols []int) {
	start := -1
	for i := 0; i <= len(s); i++ {
		sep := i == len(s) || s[i] == ' ' || s[i] == '\t' || s[i] == '\r'
		switch {
		case sep && start >= 0:
			fields = append(fields, s[start:i])
			cols = append(cols, start+1)
			start = -1
		case !sep && start < 0:
			start = i
		}
	}
	return fields, cols
}
