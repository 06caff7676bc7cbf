package input

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"go.yaml.in/yaml/v3"

	"glidereach/wind"
)

// maxWindFileSize bounds the size of a wind file read into memory.
const maxWindFileSize = 1 << 20

// ParseWindFile reads a wind file. The format follows the extension:
//
// .yaml, .yml, .json — a list of layers, either at the top level or under the
// key "layers". Each layer has alt (or altitude), dir (or direction), speed
// and optionally temp (or temperature); values are strings with units or
// bare SI numbers, as in the aircraft profile files:
//
//	layers:
//	  - {alt: 0m,     dir: 240, speed: 10kt}
//	  - {alt: 1500m,  dir: 270, speed: 20kt, temp: 5C}
//	  - {alt: 3000m,  dir: 280, speed: 35kt, temp: -5C}
//
// .csv — a header row naming the columns alt, dir, speed and optionally temp,
// each with an optional unit as "alt (ft)", "alt[ft]" or "alt_ft"; without a
// unit the column is SI (temperature then in kelvin). An empty temp cell
// means no temperature for that layer; lines starting with # are comments:
//
//	alt_ft,dir_deg,speed_kt,temp_c
//	0,240,10,
//	5000,270,20,5
//
// any other extension — a coded winds-aloft forecast (see
// ParseWindAloftFile) with a single station.
//
// Errors are *UsageError whose Where is "file:line:column".
func ParseWindFile(path string) (*wind.Profile, error) {
	data, err := readWindFile(path)
	if err != nil {
		return nil, err
	}
	return parseWindFileData(path, data)
}

func readWindFile(path string) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, &UsageError{Where: path, Err: err}
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, maxWindFileSize+1))
	if err != nil {
		return nil, &UsageError{Where: path, Err: err}
	}
	if len(data) > maxWindFileSize {
		return nil, &UsageError{Where: path, Err: fmt.Errorf("wind file larger than %d bytes", maxWindFileSize)}
	}
	return data, nil
}

// parseWindFileData parses the contents of a wind file named path.
func parseWindFileData(path string, data []byte) (*wind.Profile, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".yaml", ".yml", ".json":
		return parseWindYAML(path, data)
	case ".csv":
		return parseWindCSV(path, data)
	}
	return parseWindAloftText(path, data, "")
}

// filePos names a position in a file for Where.
func filePos(path string, line, col int) string {
	return fmt.Sprintf("%s:%d:%d", path, line, col)
}

// windKey maps the accepted spellings of a layer field to its canonical name.
var windKey = map[string]string{
	"alt": "alt", "altitude": "alt",
	"dir": "dir", "direction": "dir",
	"speed": "speed",
	"temp":  "temp", "temperature": "temp",
}

// parseWindYAML parses the YAML or JSON layer list. JSON is read by the YAML
// parser (JSON is a subset of YAML 1.2) so both give line and column.
func parseWindYAML(path string, data []byte) (*wind.Profile, error) {
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		return nil, &UsageError{Where: path, Err: err}
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) == 0 {
		return nil, &UsageError{Where: path, Err: errors.New("no wind layers in the file")}
	}
	root := doc.Content[0]
	seq := root
	if root.Kind == yaml.MappingNode {
		seq = nil
		for i := 0; i+1 < len(root.Content); i += 2 {
			k, v := root.Content[i], root.Content[i+1]
			if k.Value != "layers" {
				return nil, &UsageError{Where: filePos(path, k.Line, k.Column), Err: fmt.Errorf("unknown key %q (want layers)", k.Value)}
			}
			seq = v
		}
		if seq == nil {
			return nil, &UsageError{Where: path, Err: errors.New(`no "layers" key`)}
		}
	}
	if seq.Kind != yaml.SequenceNode {
		return nil, &UsageError{Where: filePos(path, seq.Line, seq.Column), Err: errors.New("want a list of layers")}
	}
	if len(seq.Content) == 0 {
		return nil, &UsageError{Where: filePos(path, seq.Line, seq.Column), Err: errors.New("the list of layers is empty")}
	}
	if len(seq.Content) > maxWindLayers {
		return nil, &UsageError{Where: filePos(path, seq.Line, seq.Column), Err: fmt.Errorf("%d layers: at most %d", len(seq.Content), maxWindLayers)}
	}
	layers := make([]wind.Layer, 0, len(seq.Content))
	for _, item := range seq.Content {
		l, err := yamlLayer(path, item)
		if err != nil {
			return nil, err
		}
		layers = append(layers, l)
	}
	p, err := wind.NewProfile(layers)
	if err != nil {
		var le *wind.LayerError
		if errors.As(err, &le) {
			n := seq.Content[le.Index]
			return nil, &UsageError{Where: filePos(path, n.Line, n.Column), Err: fmt.Errorf("layer %d: %w", le.Index+1, le.Err)}
		}
		return nil, &UsageError{Where: path, Err: err}
	}
	return p, nil
}

func yamlLayer(path string, item *yaml.Node) (wind.Layer, error) {
	var l wind.Layer
	if item.Kind != yaml.MappingNode {
		return l, &UsageError{Where: filePos(path, item.Line, item.Column), Err: errors.New("a layer must be a mapping with alt, dir, speed and optionally temp")}
	}
	seen := map[string]bool{}
	for i := 0; i+1 < len(item.Content); i += 2 {
		k, v := item.Content[i], item.Content[i+1]
		name, ok := windKey[strings.ToLower(k.Value)]
		if !ok {
			return l, &UsageError{Where: filePos(path, k.Line, k.Column), Err: fmt.Errorf("unknown key %q (want alt, dir, speed, temp)", k.Value)}
		}
		if seen[name] {
			return l, &UsageError{Where: filePos(path, k.Line, k.Column), Err: fmt.Errorf("%s given twice", name)}
		}
		seen[name] = true
		if v.Kind != yaml.ScalarNode {
			return l, &UsageError{Where: filePos(path, v.Line, v.Column), Err: fmt.Errorf("%s: want a value such as 1500m, 270 or 20kt", name)}
		}
		if err := setLayerField(&l, name, v.Value); err != nil {
			return l, &UsageError{Where: filePos(path, v.Line, v.Column), Err: fmt.Errorf("%s: %w", name, err)}
		}
	}
	for _, need := range []string{"alt", "dir", "speed"} {
		if !seen[need] {
			return l, &UsageError{Where: filePos(path, item.Line, item.Column), Err: fmt.Errorf("layer has no %s", need)}
		}
	}
	return l, nil
}

// setLayerField parses text as the field name ("alt", "dir", "speed",
// "temp") of l.
func setLayerField(l *wind.Layer, name, text string) error {
	var err error
	switch name {
	case "alt":
		l.Alt, err = ParseQuantity(text, Length)
	case "dir":
		l.Dir, err = ParseQuantity(text, Angle)
	case "speed":
		l.Speed, err = ParseQuantity(text, Speed)
	case "temp":
		l.Temp, err = ParseTemperature(text)
		l.HasTemp = err == nil
	}
	return err
}

// csvColumn is one recognised CSV column.
type csvColumn struct {
	name string // canonical field name, or "" for an unknown column
	unit string // suffix appended to bare cells, may be empty
}

// splitHeader splits a CSV header cell into a field name and a unit:
// "alt (ft)", "alt[ft]", "alt_ft" or "alt".
func splitHeader(h string) (name, unit string) {
	h = strings.TrimSpace(h)
	for _, br := range [][2]string{{"(", ")"}, {"[", "]"}} {
		if i := strings.Index(h, br[0]); i >= 0 && strings.HasSuffix(h, br[1]) {
			return strings.TrimSpace(h[:i]), strings.TrimSpace(h[i+1 : len(h)-1])
		}
	}
	if i := strings.IndexByte(h, '_'); i >= 0 {
		return h[:i], h[i+1:]
	}
	return h, ""
}

// checkUnit verifies that unit is accepted for the field name.
func checkUnit(name, unit string) error {
	if unit == "" {
		return nil
	}
	var err error
	switch name {
	case "alt":
		_, err = ParseQuantity("0"+unit, Length)
	case "dir":
		_, err = ParseQuantity("0"+unit, Angle)
	case "speed":
		_, err = ParseQuantity("0"+unit, Speed)
	case "temp":
		_, err = ParseTemperature("0" + unit)
	}
	return err
}

// parseWindCSV parses a CSV wind file with a header row.
func parseWindCSV(path string, data []byte) (*wind.Profile, error) {
	r := csv.NewReader(bytes.NewReader(data))
	r.Comment = '#'
	r.TrimLeadingSpace = true
	r.FieldsPerRecord = -1
	header, err := r.Read()
	if err == io.EOF {
		return nil, &UsageError{Where: path, Err: errors.New("empty file: want a header row such as alt_ft,dir_deg,speed_kt,temp_c")}
	}
	if err != nil {
		return nil, csvError(path, err)
	}
	cols := make([]csvColumn, len(header))
	index := map[string]int{}
	for i, h := range header {
		line, col := r.FieldPos(i)
		name, unit := splitHeader(h)
		canon, ok := windKey[strings.ToLower(name)]
		if !ok {
			return nil, &UsageError{Where: filePos(path, line, col), Err: fmt.Errorf("unknown column %q (want alt, dir, speed, temp, each with an optional unit such as alt_ft)", h)}
		}
		if _, dup := index[canon]; dup {
			return nil, &UsageError{Where: filePos(path, line, col), Err: fmt.Errorf("column %s given twice", canon)}
		}
		if err := checkUnit(canon, unit); err != nil {
			return nil, &UsageError{Where: filePos(path, line, col), Err: fmt.Errorf("column %q: unit %q: %w", h, unit, err)}
		}
		index[canon] = i
		cols[i] = csvColumn{name: canon, unit: unit}
	}
	for _, need := range []string{"alt", "dir", "speed"} {
		if _, ok := index[need]; !ok {
			line, _ := r.FieldPos(0)
			return nil, &UsageError{Where: filePos(path, line, 1), Err: fmt.Errorf("header has no %s column", need)}
		}
	}
	var layers []wind.Layer
	var lines []int
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvError(path, err)
		}
		line, _ := r.FieldPos(0)
		if len(rec) != len(cols) {
			return nil, &UsageError{Where: filePos(path, line, 1), Err: fmt.Errorf("%d fields, the header has %d", len(rec), len(cols))}
		}
		if len(layers) == maxWindLayers {
			return nil, &UsageError{Where: filePos(path, line, 1), Err: fmt.Errorf("more than %d layers", maxWindLayers)}
		}
		var l wind.Layer
		for i, cell := range rec {
			cell = strings.TrimSpace(cell)
			c := cols[i]
			_, col := r.FieldPos(i)
			if cell == "" {
				if c.name == "temp" {
					continue
				}
				return nil, &UsageError{Where: filePos(path, line, col), Err: fmt.Errorf("%s is empty", c.name)}
			}
			if c.unit != "" && numberPrefix(cell) != len(cell) {
				return nil, &UsageError{Where: filePos(path, line, col), Err: fmt.Errorf("%s: %q is not a number (the header gives the unit %s)", c.name, cell, c.unit)}
			}
			if err := setLayerField(&l, c.name, cell+c.unit); err != nil {
				return nil, &UsageError{Where: filePos(path, line, col), Err: fmt.Errorf("%s: %w", c.name, err)}
			}
		}
		layers = append(layers, l)
		lines = append(lines, line)
	}
	if len(layers) == 0 {
		return nil, &UsageError{Where: path, Err: errors.New("no layers after the header row")}
	}
	p, err := wind.NewProfile(layers)
	if err != nil {
		var le *wind.LayerError
		if errors.As(err, &le) {
			return nil, &UsageError{Where: filePos(path, lines[le.Index], 1), Err: fmt.Errorf("layer %d: %w", le.Index+1, le.Err)}
		}
		return nil, &UsageError{Where: path, Err: err}
	}
	return p, nil
}

func csvError(path string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &UsageError{Where: filePos(path, pe.Line, pe.Column), Err: pe.Err}
	}
	return &UsageError{Where: path, Err: err}
}
