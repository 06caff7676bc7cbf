package render

import (
	"bytes"
	"encoding/base64"
	"encoding/xml"
	"errors"
	"image/png"
	"io"
	"math"
	"strings"
	"testing"

	"glidereach/terrain"
)

// sampleProfile is an invented final-glide profile along the sample scene's
// glide line (start (1, −1) km to Brackwater Farm (9, 3) km).
func sampleProfile(l *terrain.Local) *Profile {
	const n = 120
	length := math.Hypot(8000, 4000)
	var terr, glide, least, res Series
	terr = Series{Name: "terrain", Kind: SeriesTerrain}
	glide = Series{Name: "glide line", Kind: SeriesGlide}
	least = Series{Name: "least altitude", Kind: SeriesLeast}
	res = Series{Name: "reserve above ground", Kind: SeriesReserve}
	var endElev float64
	for i := 0; i <= n; i++ {
		t := float64(i) / n
		e, _ := l.Sample(1000+8000*t, -1000+4000*t)
		d := length * t
		terr.DistM, terr.AltMSL = append(terr.DistM, d), append(terr.AltMSL, e)
		res.DistM, res.AltMSL = append(res.DistM, d), append(res.AltMSL, e+300)
		endElev = e
	}
	for i := 0; i <= n; i++ {
		d := length * float64(i) / n
		glide.DistM, glide.AltMSL = append(glide.DistM, d), append(glide.AltMSL, 1500-(1500-endElev-420)*d/length)
		least.DistM, least.AltMSL = append(least.DistM, d), append(least.AltMSL, endElev+300+(length-d)/14)
	}
	return &Profile{Title: "Final glide to Brackwater Farm (invented demo)", Series: []Series{terr, glide, least, res},
		Marks: []ProfileMark{{DistM: length * 0.53, AltMSL: 1150, Label: "lowest clearance 180 m"},
			{DistM: length, AltMSL: endElev, Label: "Brackwater Farm"}}}
}

func sampleReport(s *Scene) *Report {
	return &Report{
		Title:    s.Title,
		Subtitle: "Computed by glidereach from invented demo data",
		Scene:    s,
		Summary:  []string{"3 of 5 fields in reach with the 300 m reserve.", "Route: 12.6 km without a landing option."},
		Tables: []Table{{
			Title:  "Fields",
			Header: []string{"Field", "In reach", "Arrival AGL", "Distance", "Bearing"},
			Rows: [][]string{{"Kestrel Mere", "yes", "1210 m", "0.5 km", "045°"},
				{"Brackwater Farm", "yes", "420 m", "8.9 km", "063°"},
				{"Cairn Top", "no", "-260 m", "16.3 km", "040°"},
				{"<script>alert(1)</script>", "no", "", "", ""}},
			Note: "Arrival heights include no reserve.",
		}},
		Profile: sampleProfile(s.Terrain),
	}
}

// checkSelfContained parses the report and fails on anything that would
// make a browser fetch something: external elements, attributes that are
// not data: URIs or fragments, CSS url()/@import, or any http(s) address.
// The parse also checks that the markup is well-formed (the template
// writes XHTML-compatible HTML).
func checkSelfContained(t *testing.T, doc []byte) (imgs []string, svgs int) {
	t.Helper()
	if bytes.Contains(bytes.ToLower(doc), []byte("http:")) || bytes.Contains(bytes.ToLower(doc), []byte("https:")) {
		t.Errorf("report contains an http(s) address")
	}
	dec := xml.NewDecoder(bytes.NewReader(doc))
	dec.Strict = true
	dec.Entity = xml.HTMLEntity
	inStyle := false
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("report does not parse: %v", err)
		}
		switch tk := tok.(type) {
		case xml.StartElement:
			name := strings.ToLower(tk.Name.Local)
			switch name {
			case "link", "iframe", "object", "embed", "base", "frame", "audio", "video", "source", "use", "image", "foreignobject":
				t.Errorf("report has a <%s> element", name)
			case "script":
				t.Errorf("report has a script")
			case "svg":
				svgs++
			case "style":
				inStyle = true
			}
			for _, a := range tk.Attr {
				an := strings.ToLower(a.Name.Local)
				v := strings.TrimSpace(a.Value)
				switch an {
				case "src", "href", "srcset", "action", "poster", "data", "background", "formaction":
					if !strings.HasPrefix(v, "data:") && !strings.HasPrefix(v, "#") {
						t.Errorf("<%s %s=%.40q> refers outside the file", name, an, v)
					}
					if name == "img" && an == "src" {
						imgs = append(imgs, v)
					}
				case "style":
					if strings.Contains(strings.ToLower(v), "url(") {
						t.Errorf("<%s style> uses url()", name)
					}
				}
				if strings.HasPrefix(an, "on") {
					t.Errorf("<%s> has an event handler %s", name, an)
				}
			}
		case xml.EndElement:
			if strings.ToLower(tk.Name.Local) == "style" {
				inStyle = false
			}
		case xml.CharData:
			if inStyle {
				css := strings.ToLower(string(tk))
				if strings.Contains(css, "url(") || strings.Contains(css, "@import") || strings.Contains(css, "@font-face") {
					t.Errorf("report CSS refers outside the file")
				}
			}
		case xml.Directive:
		}
	}
	return imgs, svgs
}

func TestReportSelfContained(t *testing.T) {
	s := sampleScene(hillyLocal(200, 150, 200))
	var buf bytes.Buffer
	rep := sampleReport(s)
	rep.MapWidthPx = 900
	if err := WriteReport(&buf, rep); err != nil {
		t.Fatal(err)
	}
	doc := buf.Bytes()
	// What a self-contained report is: one file a browser shows with no
	// network (issue 8; the data: URI scheme is RFC 2397).
	imgs, svgs := checkSelfContained(t, doc)
	if svgs != 1 {
		t.Errorf("report has %d <svg> charts, want 1", svgs)
	}
	if len(imgs) != 1 || !strings.HasPrefix(imgs[0], "data:image/png;base64,") {
		t.Fatalf("report images %.60q, want one data:image/png;base64 map", imgs)
	}
	raw, err := base64.StdEncoding.DecodeString(strings.TrimPrefix(imgs[0], "data:image/png;base64,"))
	if err != nil {
		t.Fatalf("map data URI: %v", err)
	}
	cfg, err := png.DecodeConfig(bytes.NewReader(raw))
	if err != nil || cfg.Width != 900 {
		t.Errorf("embedded map: %v, %d px wide", err, cfg.Width)
	}
	for _, want := range []string{"PLANNING AID ONLY", "Brackwater Farm", "Terrain data", "Aircraft: demo two-seat trainer",
		"&lt;script&gt;", "Altitude profile"} {
		if !bytes.Contains(doc, []byte(want)) {
			t.Errorf("report lacks %q", want)
		}
	}
}

func TestReportWithoutSceneStillHasCaution(t *testing.T) {
	var buf bytes.Buffer
	if err := WriteReport(&buf, &Report{Title: "Polar", Tables: []Table{{Title: "t", Rows: [][]string{{"1"}}}}}); err != nil {
		t.Fatal(err)
	}
	// Every output carries the caution (DESIGN.md, Safety).
	if !strings.Contains(buf.String(), "PLANNING AID ONLY") {
		t.Error("report without a map lacks the caution")
	}
	checkSelfContained(t, buf.Bytes())
}

func TestProfileSVGErrors(t *testing.T) {
	for name, p := range map[string]*Profile{
		"nil":       nil,
		"empty":     {},
		"ragged":    {Series: []Series{{DistM: []float64{0, 1}, AltMSL: []float64{1}}}},
		"all NaN":   {Series: []Series{{DistM: []float64{0, 1}, AltMSL: []float64{math.NaN(), math.NaN()}}}},
		"one point": {Series: []Series{{DistM: []float64{0}, AltMSL: []float64{100}}}},
	} {
		if err := WriteProfileSVG(io.Discard, p); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
}

func TestTicks(t *testing.T) {
	// Round axis ticks covering the range (common practice, no source).
	for _, c := range []struct{ lo, hi float64 }{{0, 8.9}, {213, 1620}, {-40, 35}, {0, 0.3}, {1000, 1000}} {
		tk := ticks(c.lo, c.hi, 6)
		if len(tk) < 2 || tk[0] > c.lo || tk[len(tk)-1] < c.hi || len(tk) > 14 {
			t.Errorf("ticks(%v, %v) = %v", c.lo, c.hi, tk)
		}
	}
}
