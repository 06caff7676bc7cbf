package input

import (
	"math"
	"os"
	"path/filepath"
	"testing"
)

// FuzzParseCorridor: a route file of any content and any width text give
// a corridor or an error, never a panic; a corridor has a finite box that
// contains the route's points, and testing points does not panic.
func FuzzParseCorridor(f *testing.F) {
	gpx, _ := os.ReadFile("../../../testdata/routes/demo-route.gpx")
	gj, _ := os.ReadFile("../../../testdata/routes/demo-route.geojson")
	f.Add(gpx, ".gpx", "10km")
	f.Add(gj, ".geojson", "2nm")
	f.Add(gpx, ".gpx", "-5km")
	f.Add(gj, ".geojson", "1e9m")
	f.Add([]byte(`{"type":"LineString","coordinates":[[179.9,0],[-179.9,0]]}`), ".geojson", "1km")
	f.Add([]byte(`{"type":"LineString","coordinates":[[0,89.99],[90,89.99],[180,89.99]]}`), ".geojson", "50km")
	f.Fuzz(func(t *testing.T, data []byte, ext, width string) {
		if len(data) > 1<<20 || len(ext) > 10 || len(width) > 40 || (ext != ".gpx" && ext != ".geojson" && ext != ".json") {
			return
		}
		p := filepath.Join(t.TempDir(), "r"+ext)
		os.WriteFile(p, data, 0o644)
		c, err := ParseCorridor(p + "," + width)
		if err != nil {
			return
		}
		b := c.Bounds()
		for _, v := range []float64{b.Min[0], b.Min[1], b.Max[0], b.Max[1]} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("corridor box %v", b)
			}
		}
		for _, pt := range c.Route.Points {
			if !c.Contains(pt.Lat, pt.Lon) {
				t.Fatalf("route point %v,%v outside its own corridor", pt.Lat, pt.Lon)
			}
		}
		c.Contains((b.Min[1]+b.Max[1])/2, (b.Min[0]+b.Max[0])/2)
	})
}

// FuzzParseWindAloftSpec: the winds-aloft flag value as a file, a
// FILE:STATION pick or an inline line; a profile returned is consistent.
func FuzzParseWindAloftSpec(f *testing.F) {
	line, _ := os.ReadFile(windTestdata + "forecast-line.txt")
	bull, _ := os.ReadFile(windTestdata + "forecast-bulletin.txt")
	f.Add(bull, "", uint8(1))
	f.Add(bull, "QQA", uint8(1))
	f.Add(bull, "NOPE", uint8(1))
	f.Add(line, "", uint8(1))
	f.Add([]byte{}, "3000:2714 6000:2725+05", uint8(0))
	f.Add([]byte("FT 3000 6000\nABC 2714 2725+05\n"), "ABC", uint8(1))
	f.Fuzz(func(t *testing.T, data []byte, tail string, asFile uint8) {
		if len(data) > maxWindFileSize || len(tail) > 200 {
			return
		}
		spec := tail
		if asFile&1 != 0 {
			p := filepath.Join(t.TempDir(), "fb.txt")
			os.WriteFile(p, data, 0o644)
			spec = p
			if tail != "" {
				spec += ":" + tail
			}
		}
		p, err := ParseWindAloftSpec(spec)
		if err == nil {
			checkWindProfile(t, spec, p)
		}
	})
}

// FuzzWindFromFlags: the choice between an inline wind and a wind file
// (a value naming an existing file is read as one, whatever its extension;
// one with a wind-file extension that does not exist is an error), together
// with --wind-aloft; a profile returned is consistent.
func FuzzWindFromFlags(f *testing.F) {
	yml, _ := os.ReadFile(windTestdata + "layers.yaml")
	csv, _ := os.ReadFile(windTestdata + "layers.csv")
	f.Add(yml, "w.yaml", "", "", uint8(1))
	f.Add(csv, "w.csv", "", "", uint8(1))
	f.Add([]byte{}, "", "270/20kt", "", uint8(0))
	f.Add([]byte{}, "", "missing.yaml", "", uint8(0))
	f.Add([]byte("270/20kt"), "270", "", "", uint8(1))
	f.Add([]byte{}, "", "", "3000:2714", uint8(0))
	f.Add([]byte{}, "", "270/10kt", "3000:2714", uint8(0))
	f.Fuzz(func(t *testing.T, data []byte, name, inline, aloft string, asFile uint8) {
		if len(data) > maxWindFileSize || len(name) > 40 || len(inline) > 200 || len(aloft) > 200 || filepath.Base(name) != name || name == "." || name == ".." {
			return
		}
		spec := inline
		if asFile&1 != 0 && name != "" {
			p := filepath.Join(t.TempDir(), name)
			if os.WriteFile(p, data, 0o644) != nil {
				return
			}
			spec = p
		}
		p, err := WindFromFlags(spec, aloft)
		if err == nil && p != nil && !p.IsCalm() {
			checkWindProfile(t, spec, p)
		}
	})
}
