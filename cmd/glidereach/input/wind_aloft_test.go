package input

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// Sources of the decoding checks below (each case names one on the line
// above it):
//
// [AC45] FAA Advisory Circular AC 00-45, "Aviation Weather Services", the
// section on the Winds and Temperatures Aloft Forecast (FB). The 00-45F
// edition (October 2007, chapter 7 "Forecast Text Products") was found with
// the search tool, but its FB section text was not in the excerpt seen. The
// rules and the worked examples 3127, 731960, 7799 and 9900 are those
// reproduced in the encyclopedia article "Winds aloft" (found with the search
// tool). That they are the AC's own examples, and the section number in the
// current 00-45H edition, are FROM MEMORY. AC 00-45 is now consolidated into
// FAA-H-8083-28, Aviation Weather Handbook (2022), chapter 27 "Forecasts"
// (table of contents seen, section text not seen).
//
// [P1246] U.S. Navy CNATRA P-1246, "Meteorology and Flight Planning", page
// 2-50 (found with the search tool): 7345 = 230° at 145 kt, 7399 = 230° at
// 199 kt, 9900 = light and variable, no temperature at the 3000 ft level,
// temperatures above 24 000 ft unsigned.
//
// [P304] U.S. Navy CNATRA P-304, chapter 2 "Meteorology Flight Planning"
// (found with the search tool): 2435+07 = 240° at 35 kt, +7 °C; 274650 =
// 270° at 46 kt, −50 °C above 24 000 ft.
//
// [FBtut] A public pilot-training page on the FB (found with the search
// tool): 750456 at 39 000 ft = 250° at 104 kt; and an FD sample line whose
// 6000 ft group 2728+01 it decodes as 270° at 28 kt, +1 °C.
func TestDecodeWindAloftGroupPublishedExamples(t *testing.T) {
	tests := []struct {
		name    string
		group   string
		levelFt float64
		dir     float64 // degrees
		kts     float64
		tempC   float64
		hasTemp bool
	}{
		// [AC45] 3127: 310° at 27 kt (the format's introductory example).
		{"plain DDff", "3127", 3000, 310, 27, 0, false},
		// [AC45] and [P1246]: 9900 is light and variable; decoded as calm.
		{"light and variable", "9900", 3000, 0, 0, 0, false},
		// Light and variable with a temperature, as in a published NWS
		// bulletin line (FBAK31 KWNO, 6000 ft column "9900+02"; see
		// testdata/wind/ORIGIN.md); the decode is the [AC45] rule.
		{"light and variable with temperature", "9900+02", 6000, 0, 0, 2, true},
		// [P304] 2435+07: 240° at 35 kt, +7 °C.
		{"signed positive temperature", "2435+07", 12000, 240, 35, 7, true},
		// [FBtut] 2728+01 at 6000 ft: 270° at 28 kt, +1 °C.
		{"6000 ft with temperature", "2728+01", 6000, 270, 28, 1, true},
		// [P1246] 7345: 230° at 145 kt (100..199 kt: DD+50, ff−100).
		{"100 kt and more", "7345", 18000, 230, 145, 0, false},
		// [AC45] 731960: 230° at 119 kt, −60 °C (above 24 000 ft, unsigned).
		{"over 100 kt, implied negative", "731960", 39000, 230, 119, -60, true},
		// [AC45] 7799: 270° at 199 kt or more.
		{"200 kt and more coded 199", "7799", 39000, 270, 199, 0, false},
		// [P1246] 7399: 230° at 199 kt.
		{"199 kt", "7399", 39000, 230, 199, 0, false},
		// [P304] 274650: 270° at 46 kt, −50 °C (implied negative).
		{"implied negative", "274650", 30000, 270, 46, -50, true},
		// [FBtut] 750456 at 39 000 ft: 250° at 104 kt; −56 °C by the [AC45]
		// unsigned-temperature rule (the page's temperature text was cut off).
		{"104 kt, implied negative", "750456", 39000, 250, 104, -56, true},
		// [AC45] signed temperature at 24 000 ft and below ("TEMPS NEG ABV
		// 24000": the sign is still printed at 24 000 ft).
		{"24000 ft keeps its sign", "2665-32", 24000, 260, 65, -32, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			l, err := DecodeWindAloftGroup(tc.group, tc.levelFt)
			if err != nil {
				t.Fatalf("DecodeWindAloftGroup(%q, %g): %v", tc.group, tc.levelFt, err)
			}
			if math.Abs(l.Dir-tc.dir) > 1e-9 || math.Abs(l.Speed-tc.kts*Knot) > 1e-9 {
				t.Errorf("wind = %g° at %g kt, want %g° at %g kt", l.Dir, l.Speed/Knot, tc.dir, tc.kts)
			}
			if l.HasTemp != tc.hasTemp || (tc.hasTemp && math.Abs(l.Temp-(tc.tempC+273.15)) > 1e-9) {
				t.Errorf("temperature = %v %g K, want %v %g °C", l.HasTemp, l.Temp, tc.hasTemp, tc.tempC)
			}
			if math.Abs(l.Alt-tc.levelFt*Foot) > 1e-9 {
				t.Errorf("altitude = %g m, want %g ft", l.Alt, tc.levelFt)
			}
		})
	}
}

func TestDecodeWindAloftGroupRefusals(t *testing.T) {
	tests := []struct {
		group   string
		levelFt float64
		want    string
	}{
		// [P1246]: no temperature is forecast for the 3000 ft level.
		{"2714+05", 3000, "3000 ft level carries no temperature"},
		// [AC45]: below 24 000 ft the temperature carries its sign.
		{"271405", 12000, "needs its sign"},
		{"4025", 6000, "direction code 40"},
		{"0025", 6000, "direction code 00"},
		{"9925", 6000, "variable direction"},
		{"27", 6000, "want 4 digits"},
		{"27a4", 6000, "want 4 digits"},
		{"2714-5", 6000, "two digits"},
		{"2714+055", 6000, "two digits"},
		{"", 6000, "want 4 digits"},
	}
	for _, tc := range tests {
		_, err := DecodeWindAloftGroup(tc.group, tc.levelFt)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("DecodeWindAloftGroup(%q, %g) error %v, want it to say %q", tc.group, tc.levelFt, err, tc.want)
		}
	}
}

// nearC reports whether T (K) is c degrees Celsius.
func nearC(T, c float64) bool { return math.Abs(T-273.15-c) < 1e-9 }

func TestParseWindAloftLine(t *testing.T) {
	// The example of the issue; decodes by the [AC45] rules.
	p, err := ParseWindAloft("3000:2714 6000:2725+05 9000:2830-02")
	if err != nil {
		t.Fatal(err)
	}
	ls := p.Layers()
	if len(ls) != 3 {
		t.Fatalf("%d layers, want 3", len(ls))
	}
	want := []struct{ ft, dir, kt, c float64 }{{3000, 270, 14, math.NaN()}, {6000, 270, 25, 5}, {9000, 280, 30, -2}}
	for i, w := range want {
		l := ls[i]
		if math.Abs(l.Alt-w.ft*Foot) > 1e-9 || l.Dir != w.dir || math.Abs(l.Speed-w.kt*Knot) > 1e-9 {
			t.Errorf("layer %d = %+v, want %+v", i, l, w)
		}
		if math.IsNaN(w.c) == l.HasTemp || (l.HasTemp && math.Abs(l.Temp-273.15-w.c) > 1e-9) {
			t.Errorf("layer %d temperature %v %g, want %g °C", i, l.HasTemp, l.Temp, w.c)
		}
	}
	// Levels with a unit, and 34 000 ft with an implied negative temperature.
	p, err = ParseWindAloft("3000ft:9900 10km:731960")
	if err != nil {
		t.Fatal(err)
	}
	if l := p.Layers()[1]; l.Alt != 10000 || !l.HasTemp || !nearC(l.Temp, -60) {
		t.Errorf("10 km layer = %+v", l)
	}

	bad := []struct{ in, want string }{
		{"", "empty forecast"},
		{"3000 2714", `level 1 "3000": want LEVEL:GROUP`},
		{"6000:2725+05 3000:2714", `level 2 "3000:2714"`},
		{"6000:2725+05 6000:2714+01", "duplicate altitude"},
		{"x:2714", "level 1"},
		{"6000:9999", "variable direction"},
	}
	for _, tc := range bad {
		_, err := ParseWindAloft(tc.in)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("ParseWindAloft(%q) error %v, want it to contain %q", tc.in, err, tc.want)
		}
	}
}

func TestParseWindAloftFile(t *testing.T) {
	p, err := ParseWindAloftFile("../../../testdata/wind/forecast-line.txt", "")
	if err != nil {
		t.Fatal(err)
	}
	if n := len(p.Layers()); n != 4 {
		t.Errorf("forecast-line.txt: %d layers, want 4", n)
	}

	// Bulletin layout: the FT header gives the levels.
	const bulletin = "../../../testdata/wind/forecast-bulletin.txt"
	if _, err := ParseWindAloftFile(bulletin, ""); err == nil || !strings.Contains(err.Error(), "2 data lines (stations QQA, QQB): name the station") {
		t.Errorf("two stations without a choice: error %v", err)
	}
	a, err := ParseWindAloftFile(bulletin, "qqa")
	if err != nil {
		t.Fatal(err)
	}
	la := a.Layers()
	if len(la) != 9 {
		t.Fatalf("QQA: %d layers, want 9", len(la))
	}
	// 9900 at 3000 ft: light and variable, calm, no temperature.
	if la[0].Speed != 0 || la[0].HasTemp {
		t.Errorf("QQA 3000 ft = %+v, want calm without temperature", la[0])
	}
	// 242651 at 30 000 ft: 240° at 26 kt, −51 °C (implied negative).
	if l := la[6]; l.Dir != 240 || math.Abs(l.Speed-26*Knot) > 1e-9 || !nearC(l.Temp, -51) || math.Abs(l.Alt-30000*Foot) > 1e-9 {
		t.Errorf("QQA 30000 ft = %+v", l)
	}
	// QQB has no 3000 ft group: its groups belong to the highest levels.
	b, err := ParseWindAloftSpec(bulletin + ":QQB")
	if err != nil {
		t.Fatal(err)
	}
	lb := b.Layers()
	if len(lb) != 8 || math.Abs(lb[0].Alt-6000*Foot) > 1e-9 {
		t.Fatalf("QQB: %d layers from %g m, want 8 from 6000 ft", len(lb), lb[0].Alt)
	}
	// 731960 at 30 000 ft, 760456 at 34 000 ft, 7799 at 39 000 ft.
	if l := lb[5]; l.Dir != 230 || math.Abs(l.Speed-119*Knot) > 1e-9 || !nearC(l.Temp, -60) {
		t.Errorf("QQB 30000 ft = %+v", l)
	}
	if l := lb[6]; l.Dir != 260 || math.Abs(l.Speed-104*Knot) > 1e-9 || !nearC(l.Temp, -56) {
		t.Errorf("QQB 34000 ft = %+v", l)
	}
	if l := lb[7]; l.Dir != 270 || math.Abs(l.Speed-199*Knot) > 1e-9 || l.HasTemp {
		t.Errorf("QQB 39000 ft = %+v", l)
	}

	// Errors name the file, line and column of the bad group.
	_, err = ParseWindAloftFile("../../../testdata/wind/bad-group.txt", "")
	var ue *UsageError
	if !errors.As(err, &ue) || ue.Where != "../../../testdata/wind/bad-group.txt:2:10" || !strings.Contains(err.Error(), "direction code 40") {
		t.Errorf("bad-group.txt: error %v, want a *UsageError at line 2 column 10", err)
	}
	if _, err := ParseWindAloftFile(bulletin, "ZZZ"); err == nil || !strings.Contains(err.Error(), `station "ZZZ"`) {
		t.Errorf("unknown station: error %v", err)
	}
}
