package input

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"glidereach/reach"
)

// Aircraft profile files (YAML or JSON, the same keys in both):
//
//	name: Demo two-seat trainer
//	reference_mass: 750kg
//	mass: 720kg               # optional, defaults to reference_mass
//	stall_speed: 48kt         # indicated, at reference mass, clean
//	min_speed: 55kt           # optional: replaces 1.3 x stall
//	max_speed: 120kt          # indicated
//	reserve: 300m             # optional defaults for the commands
//	clearance: 100m
//	kind: powered             # optional: powered | sailplane (approach pattern defaults)
//	approach_speed: 65kt      # optional: calm-air approach speed, indicated
//	max_crosswind: 15kt       # optional: crosswind limit for the landing direction
//	polar:
//	  form: best_glide        # best_glide | points | drag
//	  best_glide_speed: 65kt  # best_glide: indicated, at reference mass
//	  glide_ratio: 9
//	  # points: [[80km/h, 0.75m/s], [100km/h, 0.68m/s], [140km/h, 1.1m/s]]
//	  # drag: cd0: 0.012, aspect_ratio: 18, oswald: 0.9, wing_area: 10.5m2
//
// Quantities are strings with a unit or bare SI numbers. Only the keys of
// the chosen polar form may appear under polar; unknown keys are refused.
// The drag form uses reference_mass as the mass its polar is stated for.

// maxProfileBytes bounds a profile file; real ones are well under 10 kB.
const maxProfileBytes = 1 << 20

// maxPolarPoints bounds the points of a points polar.
const maxPolarPoints = 200

// LoadAircraft resolves an --aircraft value: the name of a built-in profile
// (reach.BuiltinNames, case-insensitive) or the path of a YAML or JSON
// profile file. Errors are *UsageError naming the file and line, or
// "--aircraft" when the value is neither a built-in nor a file.
func LoadAircraft(spec string) (*reach.Aircraft, error) {
	s := strings.TrimSpace(spec)
	if s == "" {
		return nil, Usagef("--aircraft", "is empty (want a built-in name: %s, or a profile file)", strings.Join(reach.BuiltinNames(), ", "))
	}
	if ac, err := reach.Builtin(s); err == nil {
		return ac, nil
	}
	st, err := os.Stat(s)
	if err != nil {
		return nil, Usagef("--aircraft", "%q is not a built-in profile (%s) and not a readable file", spec, strings.Join(reach.BuiltinNames(), ", "))
	}
	if !st.Mode().IsRegular() {
		return nil, Usagef(s, "not a regular file")
	}
	if st.Size() > maxProfileBytes {
		return nil, Usagef(s, "profile file is %d bytes, more than the %d allowed", st.Size(), maxProfileBytes)
	}
	data, err := os.ReadFile(s)
	if err != nil {
		return nil, &UsageError{Where: s, Err: err}
	}
	return ParseAircraft(s, data)
}

// ParseAircraft parses a profile in YAML or JSON (JSON is recognised by a
// leading '{' or a .json name) and validates it with reach. file names the
// source in errors, which are *UsageError with Where "file:line" where a
// line is known.
func ParseAircraft(file string, data []byte) (*reach.Aircraft, error) {
	if len(data) > maxProfileBytes {
		return nil, Usagef(file, "profile is %d bytes, more than the %d allowed", len(data), maxProfileBytes)
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	trimmed := bytes.TrimSpace(data)
	if len(trimmed) == 0 {
		return nil, Usagef(file, "empty aircraft profile")
	}
	if trimmed[0] == '{' || strings.EqualFold(filepath.Ext(file), ".json") {
		if err := checkJSON(data); err != nil {
			return nil, &UsageError{Where: file + ":" + strconv.Itoa(err.line), Err: err.err}
		}
		// In valid JSON a raw tab can only be whitespace between tokens, which
		// YAML refuses for indentation: make it a space so line numbers stay.
		data = bytes.ReplaceAll(data, []byte("\t"), []byte(" "))
	}
	var doc yaml.Node
	dec := yaml.NewDecoder(bytes.NewReader(data))
	if err := dec.Decode(&doc); err != nil && err != io.EOF {
		return nil, &UsageError{Where: file, Err: fmt.Errorf("not valid YAML or JSON: %w", err)}
	}
	// One profile per file: a second document would be silently ignored.
	var next yaml.Node
	if err := dec.Decode(&next); err != io.EOF {
		line := next.Line
		if err != nil || line == 0 {
			return nil, Usagef(file, "more than one YAML document (a line \"---\"); a profile file holds one")
		}
		return nil, Usagef(file+":"+strconv.Itoa(line), "a second YAML document; a profile file holds one")
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) != 1 {
		return nil, Usagef(file, "empty aircraft profile")
	}
	p := &profileParser{file: file}
	ac, err := p.aircraft(doc.Content[0])
	if err != nil {
		return nil, err
	}
	if ac.Name == "" {
		ac.Name = strings.TrimSuffix(filepath.Base(file), filepath.Ext(file))
	}
	if err := ac.Validate(); err != nil {
		var pe *reach.ProfileError
		if errors.As(err, &pe) && p.lines[pe.Field] > 0 {
			return nil, &UsageError{Where: file + ":" + strconv.Itoa(p.lines[pe.Field]), Err: err}
		}
		return nil, &UsageError{Where: file, Err: err}
	}
	return ac, nil
}

type jsonErr struct {
	line int
	err  error
}

// checkJSON reports a JSON syntax error with its line.
func checkJSON(data []byte) *jsonErr {
	var v any
	err := json.Unmarshal(data, &v)
	if err == nil {
		return nil
	}
	off := int64(len(data))
	var se *json.SyntaxError
	if errors.As(err, &se) {
		off = se.Offset
	}
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	return &jsonErr{line: 1 + bytes.Count(data[:off], []byte("\n")), err: fmt.Errorf("not valid JSON: %w", err)}
}

type profileParser struct {
	file  string
	lines map[string]int // line of each top-level key, for errors found after parsing
}

func (p *profileParser) errAt(n *yaml.Node, format string, args ...any) error {
	if n == nil || n.Line == 0 {
		return &UsageError{Where: p.file, Err: fmt.Errorf(format, args...)}
	}
	return &UsageError{Where: p.file + ":" + strconv.Itoa(n.Line), Err: fmt.Errorf(format, args...)}
}

// fields reads a mapping node into key → value node, refusing duplicates,
// non-scalar keys and keys not in allowed.
func (p *profileParser) fields(n *yaml.Node, what string, allowed map[string]bool) (map[string]*yaml.Node, error) {
	if n.Kind == yaml.AliasNode {
		n = n.Alias
	}
	if n == nil || n.Kind != yaml.MappingNode {
		return nil, p.errAt(n, "%s must be a mapping of keys to values", what)
	}
	m := make(map[string]*yaml.Node, len(n.Content)/2)
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		if k.Kind != yaml.ScalarNode {
			return nil, p.errAt(k, "%s: keys must be plain names", what)
		}
		if !allowed[k.Value] {
			return nil, p.errAt(k, "%s: unknown key %q (allowed: %s)", what, k.Value, keyList(allowed))
		}
		if _, dup := m[k.Value]; dup {
			return nil, p.errAt(k, "%s: key %q given twice", what, k.Value)
		}
		if v.Kind == yaml.AliasNode {
			v = v.Alias
		}
		m[k.Value] = v
	}
	return m, nil
}

func keyList(m map[string]bool) string {
	var ks []string
	for k := range m {
		ks = append(ks, k)
	}
	// small maps: a simple insertion sort keeps messages stable
	for i := 1; i < len(ks); i++ {
		for j := i; j > 0 && ks[j] < ks[j-1]; j-- {
			ks[j], ks[j-1] = ks[j-1], ks[j]
		}
	}
	return strings.Join(ks, ", ")
}

// scalar returns the text of a scalar node.
func (p *profileParser) scalar(n *yaml.Node, key string) (string, error) {
	if n == nil || n.Kind != yaml.ScalarNode || n.Tag == "!!null" || strings.TrimSpace(n.Value) == "" {
		return "", p.errAt(n, "%s: want a single value", key)
	}
	return n.Value, nil
}

// quantity parses a quantity of kind k; a bare number is SI.
func (p *profileParser) quantity(n *yaml.Node, key string, k Kind) (float64, error) {
	s, err := p.scalar(n, key)
	if err != nil {
		return 0, err
	}
	v, err := ParseQuantity(s, k)
	if err != nil {
		return 0, p.errAt(n, "%s: %w", key, err)
	}
	return v, nil
}

// number parses a plain number (no unit).
func (p *profileParser) number(n *yaml.Node, key string) (float64, error) {
	s, err := p.scalar(n, key)
	if err != nil {
		return 0, err
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, p.errAt(n, "%s: %q is not a number", key, s)
	}
	return v, nil
}

var topKeys = map[string]bool{"name": true, "reference_mass": true, "mass": true, "stall_speed": true,
	"min_speed": true, "max_speed": true, "reserve": true, "clearance": true, "polar": true,
	"kind": true, "approach_speed": true, "max_crosswind": true}

var polarKeys = map[string]map[string]bool{
	"best_glide": {"form": true, "best_glide_speed": true, "glide_ratio": true},
	"points":     {"form": true, "points": true},
	"drag":       {"form": true, "cd0": true, "aspect_ratio": true, "oswald": true, "wing_area": true},
}

func (p *profileParser) aircraft(root *yaml.Node) (*reach.Aircraft, error) {
	m, err := p.fields(root, "profile", topKeys)
	if err != nil {
		return nil, err
	}
	ac := &reach.Aircraft{}
	p.lines = map[string]int{}
	for i := 0; i+1 < len(root.Content); i += 2 {
		p.lines[root.Content[i].Value] = root.Content[i].Line
	}
	if n, ok := m["name"]; ok {
		if ac.Name, err = p.scalar(n, "name"); err != nil {
			return nil, err
		}
		ac.Name = strings.TrimSpace(ac.Name)
	}
	if n, ok := m["kind"]; ok {
		if ac.Kind, err = p.scalar(n, "kind"); err != nil {
			return nil, err
		}
		ac.Kind = strings.ToLower(strings.TrimSpace(ac.Kind))
	}
	req := func(key string) (*yaml.Node, error) {
		n, ok := m[key]
		if !ok {
			return nil, p.errAt(root, "missing key %q", key)
		}
		return n, nil
	}
	type q struct {
		key      string
		kind     Kind
		dst      *float64
		required bool
	}
	for _, f := range []q{
		{"reference_mass", Mass, &ac.RefMass, true},
		{"mass", Mass, &ac.Mass, false},
		{"stall_speed", Speed, &ac.StallIAS, true},
		{"min_speed", Speed, &ac.MinIAS, false},
		{"max_speed", Speed, &ac.MaxIAS, true},
		{"reserve", Length, &ac.Reserve, false},
		{"clearance", Length, &ac.Clearance, false},
		{"approach_speed", Speed, &ac.ApproachIAS, false},
		{"max_crosswind", Speed, &ac.MaxCrosswind, false},
	} {
		n, ok := m[f.key]
		if !ok {
			if f.required {
				return nil, p.errAt(root, "missing key %q", f.key)
			}
			continue
		}
		v, err := p.quantity(n, f.key, f.kind)
		if err != nil {
			return nil, err
		}
		switch f.key {
		case "reserve", "clearance":
			// 0 is allowed (with a loud warning from the commands), the
			// same as --reserve 0m / --clearance 0m on the command line.
			if !(v >= 0) {
				return nil, p.errAt(n, "%s: %s must not be negative", f.key, n.Value)
			}
			if f.key == "reserve" {
				ac.HasReserve = true
			} else {
				ac.HasClearance = true
			}
		default:
			if !(v > 0) {
				return nil, p.errAt(n, "%s: %s must be positive", f.key, n.Value)
			}
		}
		*f.dst = v
	}
	pn, err := req("polar")
	if err != nil {
		return nil, err
	}
	if ac.Polar, err = p.polar(pn, ac.RefMass); err != nil {
		return nil, err
	}
	return ac, nil
}

func (p *profileParser) polar(n *yaml.Node, refMass float64) (reach.Polar, error) {
	all := map[string]bool{}
	for _, ks := range polarKeys {
		for k := range ks {
			all[k] = true
		}
	}
	m, err := p.fields(n, "polar", all)
	if err != nil {
		return nil, err
	}
	fn, ok := m["form"]
	if !ok {
		return nil, p.errAt(n, "polar: missing key \"form\" (best_glide, points or drag)")
	}
	form, err := p.scalar(fn, "polar.form")
	if err != nil {
		return nil, err
	}
	keys, ok := polarKeys[form]
	if !ok {
		return nil, p.errAt(fn, "polar.form: unknown form %q (want best_glide, points or drag)", form)
	}
	for i := 0; i+1 < len(n.Content); i += 2 {
		if k := n.Content[i]; !keys[k.Value] {
			return nil, p.errAt(k, "polar: key %q does not belong to form %s (its keys: %s)", k.Value, form, keyList(keys))
		}
	}
	need := func(key string) (*yaml.Node, error) {
		v, ok := m[key]
		if !ok {
			return nil, p.errAt(n, "polar: form %s needs key %q", form, key)
		}
		return v, nil
	}
	wrap := func(at *yaml.Node, pol reach.Polar, err error) (reach.Polar, error) {
		if err != nil {
			return nil, &UsageError{Where: p.file + ":" + strconv.Itoa(at.Line), Err: err}
		}
		return pol, nil
	}
	switch form {
	case "best_glide":
		sn, err := need("best_glide_speed")
		if err != nil {
			return nil, err
		}
		v, err := p.quantity(sn, "polar.best_glide_speed", Speed)
		if err != nil {
			return nil, err
		}
		rn, err := need("glide_ratio")
		if err != nil {
			return nil, err
		}
		e, err := p.number(rn, "polar.glide_ratio")
		if err != nil {
			return nil, err
		}
		pol, err := reach.NewBestGlidePolar(v, e)
		return wrap(n, pol, err)
	case "drag":
		var vals [4]float64
		for i, key := range []string{"cd0", "aspect_ratio", "oswald", "wing_area"} {
			kn, err := need(key)
			if err != nil {
				return nil, err
			}
			if key == "wing_area" {
				vals[i], err = p.quantity(kn, "polar.wing_area", Area)
			} else {
				vals[i], err = p.number(kn, "polar."+key)
			}
			if err != nil {
				return nil, err
			}
		}
		pol, err := reach.NewDragPolar(vals[0], vals[1], vals[2], vals[3], refMass)
		return wrap(n, pol, err)
	default: // points
		pn, err := need("points")
		if err != nil {
			return nil, err
		}
		if pn.Kind != yaml.SequenceNode {
			return nil, p.errAt(pn, "polar.points: want a list of [speed, sink] pairs")
		}
		if len(pn.Content) > maxPolarPoints {
			return nil, p.errAt(pn, "polar.points: %d points, more than the %d allowed", len(pn.Content), maxPolarPoints)
		}
		var pts []reach.PolarPoint
		for i, e := range pn.Content {
			if e.Kind == yaml.AliasNode {
				e = e.Alias
			}
			if e == nil || e.Kind != yaml.SequenceNode || len(e.Content) != 2 {
				return nil, p.errAt(pn, "polar.points: point %d: want [speed, sink], e.g. [100km/h, 0.7m/s]", i+1)
			}
			key := fmt.Sprintf("polar.points[%d]", i+1)
			v, err := p.quantity(e.Content[0], key+" speed", Speed)
			if err != nil {
				return nil, err
			}
			w, err := p.quantity(e.Content[1], key+" sink", VerticalSpeed)
			if err != nil {
				return nil, err
			}
			pts = append(pts, reach.PolarPoint{Speed: v, Sink: w})
		}
		pol, err := reach.NewPointsPolar(pts)
		return wrap(pn, pol, err)
	}
}
