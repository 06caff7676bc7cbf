package input

import (
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"glidereach/wind"
)

// checkWindProfile asserts the invariants of a profile a parser accepted.
func checkWindProfile(t *testing.T, in string, p *wind.Profile) {
	t.Helper()
	if p == nil {
		t.Fatalf("%q: nil profile without error", in)
	}
	ls := p.Layers()
	if len(ls) == 0 || len(ls) > maxWindLayers {
		t.Fatalf("%q: %d layers", in, len(ls))
	}
	for i, l := range ls {
		if i > 0 && !(l.Alt > ls[i-1].Alt) {
			t.Fatalf("%q: altitudes not increasing: %+v", in, ls)
		}
		if !(l.Speed >= 0 && l.Speed <= wind.MaxSpeed) || !(l.Dir >= 0 && l.Dir <= 360) || !(l.Alt >= wind.MinAlt && l.Alt <= wind.MaxAlt) {
			t.Fatalf("%q: layer out of range: %+v", in, l)
		}
		if l.HasTemp && !(l.Temp >= wind.MinTemp && l.Temp <= wind.MaxTemp) {
			t.Fatalf("%q: temperature out of range: %+v", in, l)
		}
	}
	for _, h := range []float64{-2000, ls[0].Alt, (ls[0].Alt + ls[len(ls)-1].Alt) / 2, ls[len(ls)-1].Alt, 40000} {
		e, n := p.At(h)
		a, c := p.Components(h, 123)
		T, _ := p.Temperature(h, 0)
		for _, v := range []float64{e, n, a, c, T} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("%q: non-finite value at %g m", in, h)
			}
		}
		if math.Hypot(e, n) > wind.MaxSpeed+1e-9 {
			t.Fatalf("%q: interpolated speed %g above the limit", in, math.Hypot(e, n))
		}
	}
	if p.String() == "" {
		t.Fatalf("%q: empty String", in)
	}
}

// inlineSpec writes layers back in the inline form (SI, kelvin).
func inlineSpec(ls []wind.Layer) string {
	parts := make([]string, len(ls))
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	for i, l := range ls {
		s := g(l.Alt) + "m:" + g(l.Dir) + "/" + g(l.Speed) + "m/s"
		if l.HasTemp {
			s += "@" + g(l.Temp) + "K"
		}
		parts[i] = s
	}
	return strings.Join(parts, ",")
}

func addFileSeeds(f *testing.F, names ...string) {
	for _, n := range names {
		b, err := os.ReadFile(windTestdata + n)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
}

func FuzzParseWindInline(f *testing.F) {
	for _, s := range []string{"calm", "270/20kt", "270/20kt@15C", "0m:240/10kt,1500m:270/20kt,3000m:280/35kt",
		"0ft:240/10kt; 5000ft:270/20kt@-5C", "0:360/0,3000:90/5@268K", "1e3m:1/1", "-0:0/0", "1500m:270deg/36km/h"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		p, err := parseWindInline(s)
		if err != nil {
			return
		}
		checkWindProfile(t, s, p)
		// Round trip through the inline form.
		spec := inlineSpec(p.Layers())
		q, err := parseWindInline(spec)
		if err != nil {
			t.Fatalf("%q: round trip %q: %v", s, spec, err)
		}
		if !sameLayers(p.Layers(), q.Layers()) {
			t.Fatalf("%q: round trip %q changed the layers: %+v vs %+v", s, spec, p.Layers(), q.Layers())
		}
	})
}

func FuzzParseWindYAML(f *testing.F) {
	addFileSeeds(f, "layers.yaml", "layers.json", "bad-unsorted.yaml")
	f.Add([]byte("- {alt: 0, dir: 0, speed: 0}\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > maxWindFileSize {
			return
		}
		p, err := parseWindYAML("fuzz.yaml", data)
		if err == nil {
			checkWindProfile(t, string(data), p)
		}
	})
}

func FuzzParseWindCSV(f *testing.F) {
	addFileSeeds(f, "layers.csv", "bad-speed.csv")
	f.Add([]byte("alt_ft,dir_deg,speed_kt,temp_c\n0,240,10,\n5000,270,20,5\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > maxWindFileSize {
			return
		}
		p, err := parseWindCSV("fuzz.csv", data)
		if err == nil {
			checkWindProfile(t, string(data), p)
		}
	})
}

func FuzzParseWindAloft(f *testing.F) {
	for _, s := range []string{"3000:2714 6000:2725+05 9000:2830-02", "3000:9900 6000:9900+02 39000:731960 45000:7799",
		"30000:274650", "18000:7345", "10km:750456", "24000:2665-32"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		p, err := ParseWindAloft(s)
		if err == nil {
			checkWindProfile(t, s, p)
		}
	})
}

func FuzzParseWindAloftText(f *testing.F) {
	addFileSeeds(f, "forecast-line.txt", "forecast-bulletin.txt", "bad-group.txt")
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > maxWindFileSize {
			return
		}
		for _, station := range []string{"", "QQA", "QQB"} {
			p, err := parseWindAloftText("fuzz.txt", data, station)
			if err == nil {
				checkWindProfile(t, string(data), p)
			}
		}
	})
}

func FuzzParseWindError(f *testing.F) {
	for _, s := range []string{"20deg,5kt", "0,0", "180°,10km/h", "20", "-1,1"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		d, v, err := ParseWindError(s)
		if err != nil {
			return
		}
		if !(d >= 0 && d <= 180) || !(v >= 0 && v <= wind.MaxSpeed) {
			t.Fatalf("%q: accepted %g, %g", s, d, v)
		}
		// Whatever is accepted must be usable by wind.Perturb without panic.
		if n := len(wind.Perturb(wind.Calm(), d, v)); n < 1 || n > 9 {
			t.Fatalf("%q: %d scenarios", s, n)
		}
	})
}
