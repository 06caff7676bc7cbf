package render

import (
	"bytes"
	"encoding/base64"
	"fmt"
	"html/template"
	"image/png"
	"io"

	"glidereach/reach"
)

// Report is a self-contained HTML report: one file that references nothing
// outside itself (no network, no external CSS, scripts or fonts). The map is
// embedded as a data: URI PNG, the profile as inline SVG.
type Report struct {
	// Title heads the page and names it in the browser.
	Title string
	// Subtitle is one line under the title (what was computed, when).
	Subtitle string
	// Scene is drawn as the map; nil means no map.
	Scene *Scene
	// MapWidthPx is the map's width in pixels; 0 means DefaultWidthPx.
	MapWidthPx int
	// MapPNG, when not empty, is Scene already drawn by RenderPNG: it is
	// embedded as it is instead of drawing the scene a second time.
	MapPNG []byte
	// Summary is a few short lines of results, shown as a list under the
	// caution.
	Summary []string
	// Tables are the result tables (fields, legs, gaps…), in order.
	Tables []Table
	// Profile is the altitude profile chart (final glide, route); nil
	// means none.
	Profile *Profile
	// Caution overrides the safety text; empty means Scene.Caution, then
	// reach.Caution. It is always shown, at the top.
	Caution string
}

// Table is one result table. Rows may be ragged; missing cells are empty.
type Table struct {
	Title  string
	Header []string
	Rows   [][]string
	Note   string // shown under the table
}

var reportTmpl = template.Must(template.New("report").Funcs(template.FuncMap{"num": isNumeric}).Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8"/>
<meta name="viewport" content="width=device-width, initial-scale=1"/>
<title>{{.Title}}</title>
<style>
body { font-family: sans-serif; color: #1a1a1a; background: #fbfaf7; margin: 0 auto; max-width: 1640px; padding: 16px 20px 40px; line-height: 1.4; }
h1 { font-size: 1.6em; margin: 0.2em 0; }
h2 { font-size: 1.2em; margin: 1.4em 0 0.4em; }
.sub { color: #444; margin: 0 0 0.8em; }
.caution { border: 3px solid #e69f00; background: #fff7e0; padding: 8px 14px; font-weight: bold; margin: 0.6em 0 1em; }
.summary li { margin: 0.15em 0; }
figure { margin: 0; }
img.map { width: 100%; height: auto; border: 1px solid #999; background: #fff; }
table { border-collapse: collapse; margin: 0.3em 0; background: #fff; }
th, td { border: 1px solid #bbb; padding: 4px 10px; text-align: left; }
th { background: #eef2f6; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
.note { color: #444; font-size: 0.92em; }
.meta { color: #444; font-size: 0.92em; margin-top: 2em; }
@media print { body { background: #fff; } .caution { break-inside: avoid; } }
</style>
</head>
<body>
<h1>{{.Title}}</h1>
{{if .Subtitle}}<p class="sub">{{.Subtitle}}</p>{{end}}
<div class="caution" role="note">{{.Caution}}</div>
{{if .Summary}}<ul class="summary">{{range .Summary}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{if .Map}}<figure><img class="map" alt="map: {{.Title}}" width="{{.MapW}}" height="{{.MapH}}" src="{{.Map}}"/></figure>{{end}}
{{if .Chart}}<h2>Altitude profile</h2>
<figure class="profile">{{.Chart}}</figure>{{end}}
{{range .Tables}}<h2>{{.Title}}</h2>
<table>{{if .Header}}<thead><tr>{{range .Header}}<th>{{.}}</th>{{end}}</tr></thead>{{end}}
<tbody>{{range .Rows}}<tr>{{range .}}<td{{if num .}} class="num"{{end}}>{{.}}</td>{{end}}</tr>{{end}}</tbody></table>
{{if .Note}}<p class="note">{{.Note}}</p>{{end}}
{{end}}
{{if .Inputs}}<h2>Inputs</h2><ul>{{range .Inputs}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{if .Source}}<p class="meta">Terrain data: {{.Source}}</p>{{end}}
</body>
</html>
`))

// WriteReport writes r as one self-contained HTML file to w.
func WriteReport(w io.Writer, r *Report) error {
	if r == nil {
		return fmt.Errorf("render: no report")
	}
	d := struct {
		Title, Subtitle, Caution string
		Summary                  []string
		Map                      template.URL
		MapW, MapH               int
		Chart                    template.HTML
		Tables                   []Table
		Inputs                   []string
		Source                   string
	}{Title: r.Title, Subtitle: r.Subtitle, Summary: r.Summary, Tables: r.Tables}
	if d.Title == "" {
		d.Title = "Glide reach report"
	}
	d.Caution = r.Caution
	if r.Scene != nil {
		if d.Caution == "" {
			d.Caution = r.Scene.caution()
		}
		data := r.MapPNG
		if len(data) > 0 {
			cfg, err := png.DecodeConfig(bytes.NewReader(data))
			if err != nil {
				return fmt.Errorf("render: report map: %w", err)
			}
			d.MapW, d.MapH = cfg.Width, cfg.Height
		} else {
			img, err := Render(r.Scene, r.MapWidthPx)
			if err != nil {
				return err
			}
			var buf bytes.Buffer
			if err := encodePNG(&buf, img); err != nil {
				return err
			}
			data = buf.Bytes()
			d.MapW, d.MapH = img.Bounds().Dx(), img.Bounds().Dy()
		}
		d.Map = template.URL("data:image/png;base64," + base64.StdEncoding.EncodeToString(data))
		d.Inputs = r.Scene.Inputs
		d.Source = r.Scene.sourceText()
	}
	if d.Caution == "" {
		d.Caution = reach.Caution
	}
	if r.Profile != nil {
		var svg bytes.Buffer
		if err := WriteProfileSVG(&svg, r.Profile); err != nil {
			return err
		}
		d.Chart = template.HTML(svg.String())
	}
	if err := reportTmpl.Execute(w, d); err != nil {
		return fmt.Errorf("render: writing report: %w", err)
	}
	return nil
}

// isNumeric reports whether a table cell reads as a number ("420 m",
// "-3.5", "+12 %"), to right-align it.
func isNumeric(s string) bool {
	if s == "" {
		return false
	}
	c := s[0]
	if c == '+' || c == '-' {
		if len(s) == 1 {
			return false
		}
		c = s[1]
	}
	return c >= '0' && c <= '9'
}
