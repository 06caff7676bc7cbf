package input

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"glidereach/wind"
)

const windTestdata = "../../../testdata/wind/"

func TestParseWindInline(t *testing.T) {
	// Unit factors are exact definitions (1 kt = 1852/3600 m/s, 1 ft =
	// 0.3048 m); 0 °C = 273.15 K (SI definition of the Celsius scale).
	tests := []struct {
		in   string
		want []wind.Layer
	}{
		{"calm", []wind.Layer{{}}},
		{"CALM", []wind.Layer{{}}},
		{"270/20kt", []wind.Layer{{Dir: 270, Speed: 20 * Knot}}},
		{" 270/10 ", []wind.Layer{{Dir: 270, Speed: 10}}},
		{"270deg/36km/h", []wind.Layer{{Dir: 270, Speed: 10}}},
		{"270/20kt@15C", []wind.Layer{{Dir: 270, Speed: 20 * Knot, Temp: 288.15, HasTemp: true}}},
		{"1500m:270/20kt", []wind.Layer{{Alt: 1500, Dir: 270, Speed: 20 * Knot}}},
		{"0m:240/10kt,1500m:270/20kt,3000m:280/35kt", []wind.Layer{
			{Alt: 0, Dir: 240, Speed: 10 * Knot}, {Alt: 1500, Dir: 270, Speed: 20 * Knot}, {Alt: 3000, Dir: 280, Speed: 35 * Knot}}},
		{"0ft:240/10kt; 5000ft:270/20kt@-5C", []wind.Layer{
			{Alt: 0, Dir: 240, Speed: 10 * Knot}, {Alt: 5000 * Foot, Dir: 270, Speed: 20 * Knot, Temp: 268.15, HasTemp: true}}},
		{"0:360/0,3000:90/5@268K", []wind.Layer{{Dir: 360}, {Alt: 3000, Dir: 90, Speed: 5, Temp: 268, HasTemp: true}}},
	}
	for _, tc := range tests {
		p, err := ParseWind(tc.in)
		if err != nil {
			t.Errorf("ParseWind(%q): %v", tc.in, err)
			continue
		}
		if !sameLayers(p.Layers(), tc.want) {
			t.Errorf("ParseWind(%q) = %+v, want %+v", tc.in, p.Layers(), tc.want)
		}
	}
}

func sameLayers(a, b []wind.Layer) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		x, y := a[i], b[i]
		if math.Abs(x.Alt-y.Alt) > 1e-9 || math.Abs(x.Dir-y.Dir) > 1e-9 || math.Abs(x.Speed-y.Speed) > 1e-9 ||
			x.HasTemp != y.HasTemp || math.Abs(x.Temp-y.Temp) > 1e-9 {
			return false
		}
	}
	return true
}

func TestParseWindInlineErrors(t *testing.T) {
	tests := []struct{ in, want string }{
		{"", "empty wind"},
		{"270", "want DIR/SPEED"},
		{"270/20kn", `unknown speed unit "kn"`},
		{"270/-5kt", "speed out of range"},
		{"270/300kt", "speed out of range"},
		{"400/20kt", "direction out of range"},
		{"-10/20kt", "direction out of range"},
		{"0m:240/10kt,1500m:270/20kt,1500m:280/35kt", `layer 3 "1500m:280/35kt": wind: duplicate altitude`},
		{"0m:240/10kt,3000m:270/20kt,1500m:280/35kt", `layer 3 "1500m:280/35kt": wind: altitudes not in increasing order`},
		{"0m:240/10kt,270/20kt", `layer 2 "270/20kt": want ALT:DIR/SPEED`},
		{"0xx:240/10kt,1m:1/1", `layer 1 "0xx:240/10kt": altitude`},
		{"270/20kt@", "temperature"},
		{"270/20kt@-5", "temperature out of range"}, // bare = kelvin
		{"270/20kt@-5F", "unknown temperature difference unit"},
		{"0m:NaN/10kt,1m:1/1", "direction"},
		{",,,", "no layers"},
		{"missing.yaml", "wind file not found"},
	}
	for _, tc := range tests {
		_, err := ParseWind(tc.in)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("ParseWind(%q) error %v, want it to contain %q", tc.in, err, tc.want)
		}
	}
}

func TestParseWindFilesAgree(t *testing.T) {
	// The three encodings of one invented profile (testdata/wind/ORIGIN.md)
	// and its inline form must give the same layers.
	inline, err := ParseWind("0m:240/10kt,1500m:270/20kt@3C,3000m:280/35kt@-7C")
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{"layers.yaml", "layers.json", "layers.csv"} {
		p, err := ParseWind(windTestdata + f)
		if err != nil {
			t.Errorf("%s: %v", f, err)
			continue
		}
		if !sameLayers(p.Layers(), inline.Layers()) {
			t.Errorf("%s = %+v, want %+v", f, p.Layers(), inline.Layers())
		}
	}
	// A forecast file through ParseWind (sniffed by content).
	p, err := ParseWind(windTestdata + "forecast-line.txt")
	if err != nil || len(p.Layers()) != 4 {
		t.Errorf("forecast-line.txt via ParseWind: %v, %v", p, err)
	}
}

func TestParseWindFileErrors(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	tests := []struct {
		path      string
		wantWhere string // suffix of UsageError.Where
		want      string
	}{
		{windTestdata + "bad-unsorted.yaml", "bad-unsorted.yaml:4:5", "layer 3: wind: altitudes not in increasing order"},
		{windTestdata + "bad-speed.csv", "bad-speed.csv:3:10", `speed: "fast" is not a number (the header gives the unit kt)`},
		{write("e.yaml", ""), "e.yaml", "no wind layers"},
		{write("k.yaml", "layers:\n  - {alt: 0m, dir: 240, speed: 10kt, gust: 5kt}\n"), "k.yaml:2:38", `unknown key "gust"`},
		{write("m.yaml", "- {alt: 0m, speed: 10kt}\n"), "m.yaml:1:3", "layer has no dir"},
		{write("u.yaml", "- {alt: 0furlong, dir: 1, speed: 1}\n"), "u.yaml:1:9", "unknown length unit"},
		{write("s.yaml", "layers: 5\n"), "s.yaml:1:9", "want a list of layers"},
		{write("x.yaml", "winds: []\n"), "x.yaml:1:1", `unknown key "winds"`},
		{write("y.yaml", "layers: [\n"), "y.yaml", "yaml"},
		{write("j.json", "{\"layers\": [{\"alt\": 0, \"dir\": 90, \"speed\": 200}]}"), "j.json:1:13", "speed out of range"},
		{write("h.csv", "alt,direction,velocity\n"), "h.csv:1:15", `unknown column "velocity"`},
		{write("hu.csv", "alt (yd),dir,speed\n"), "hu.csv:1:1", `unit "yd"`},
		{write("nd.csv", "alt,speed\n0,5\n"), "nd.csv:1:1", "no dir column"},
		{write("n.csv", "alt,dir,speed\n"), "n.csv", "no layers after the header"},
		{write("f.csv", "alt,dir,speed\n0,1\n"), "f.csv:2:1", "2 fields, the header has 3"},
		{write("q.csv", "alt,dir,speed\n0,\"1,5\n"), "q.csv:2:8", "quoted-field"},
		{write("d.csv", "alt_ft,dir,speed_kt\n0,240,10\n0,250,12\n"), "d.csv:3:1", "duplicate altitude"},
		{write("t.txt", "hello\n"), "t.txt", "no forecast found"},
	}
	for _, tc := range tests {
		_, err := ParseWind(tc.path)
		var ue *UsageError
		if !errors.As(err, &ue) {
			t.Errorf("%s: error %v is not a *UsageError", tc.path, err)
			continue
		}
		if !strings.HasSuffix(ue.Where, tc.wantWhere) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %q (where %q), want where ...%q and %q", tc.path, err, ue.Where, tc.wantWhere, tc.want)
		}
	}
}

func TestParseWindFileSizeLimit(t *testing.T) {
	p := filepath.Join(t.TempDir(), "big.csv")
	if err := os.WriteFile(p, make([]byte, maxWindFileSize+1), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := ParseWind(p); err == nil || !strings.Contains(err.Error(), "larger than") {
		t.Errorf("oversized file: error %v", err)
	}
}

func TestParseWindError(t *testing.T) {
	good := []struct {
		in       string
		dir, spd float64
	}{
		{"20deg,5kt", 20, 5 * Knot},
		{"20,5", 20, 5},
		{"0,0", 0, 0},
		{" 180° , 10km/h ", 180, 10 * KMH},
	}
	for _, tc := range good {
		d, s, err := ParseWindError(tc.in)
		if err != nil || math.Abs(d-tc.dir) > 1e-12 || math.Abs(s-tc.spd) > 1e-12 {
			t.Errorf("ParseWindError(%q) = %g, %g, %v; want %g, %g", tc.in, d, s, err, tc.dir, tc.spd)
		}
	}
	bad := []struct{ in, want string }{
		{"20deg", "want DIR,SPEED"},
		{"", "want DIR,SPEED"},
		{"x,5kt", "direction error"},
		{"20rad,5kt", "unknown angle unit"},
		{"-5,5kt", "outside 0..180"},
		{"200,5kt", "outside 0..180"},
		{"20,-1kt", "outside 0..120"},
		{"20,500kt", "outside 0..120"},
		{"20,5furlongs", "speed error"},
	}
	for _, tc := range bad {
		_, _, err := ParseWindError(tc.in)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("ParseWindError(%q) error %v, want it to contain %q", tc.in, err, tc.want)
		}
	}
	// The parsed uncertainty feeds wind.Perturb: 9 scenarios.
	d, s, _ := ParseWindError("20deg,5kt")
	p, _ := ParseWind("270/20kt")
	if n := len(wind.Perturb(p, d, s)); n != 9 {
		t.Errorf("Perturb gives %d scenarios, want 9", n)
	}
}

func TestWindFromFlags(t *testing.T) {
	p, err := WindFromFlags("", "")
	if err != nil || !p.IsCalm() {
		t.Errorf("no flags: %v, %v; want calm", p, err)
	}
	p, err = WindFromFlags("0m:240/10kt,3000m:280/35kt", "")
	if err != nil || len(p.Layers()) != 2 {
		t.Errorf("--wind: %v, %v", p, err)
	}
	p, err = WindFromFlags("", "3000:2714 6000:2725+05")
	if err != nil || len(p.Layers()) != 2 {
		t.Errorf("--wind-aloft: %v, %v", p, err)
	}
	for _, tc := range []struct{ w, a, where, want string }{
		{"270/20kt", "3000:2714", "--wind", "not both"},
		{"270/20kn", "", "--wind", `"270/20kn"`},
		{"", "3000:2714+05", "--wind-aloft", "3000 ft level"},
		{windTestdata + "bad-speed.csv", "", "--wind", "bad-speed.csv:3:10"},
	} {
		_, err := WindFromFlags(tc.w, tc.a)
		var ue *UsageError
		if !errors.As(err, &ue) || ue.Where != tc.where || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("WindFromFlags(%q, %q) error %v, want a *UsageError at %s containing %q", tc.w, tc.a, err, tc.where, tc.want)
		}
	}
}
