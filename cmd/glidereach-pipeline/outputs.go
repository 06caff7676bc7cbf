package main

import (
	"context"
	"encoding/json"
	"io"
	"math"
	"os"
	"path/filepath"

	"glidereach/reach"
	"glidereach/reach/plan"
	"glidereach/reach/tiling"
)

// summary is the JSON summary of a run (the work directory's summary.json,
// and --summary). Keys are snake_case with the unit as suffix (DESIGN.md).
type summary struct {
	CoveredFraction float64        `json:"covered_fraction"`
	ZoneAreaM2      float64        `json:"zone_area_m2"`
	CoveredAreaM2   float64        `json:"covered_area_m2"`
	ZoneCells       int64          `json:"zone_cells"`
	CoveredCells    int64          `json:"covered_cells"`
	Tiles           int            `json:"tiles"`
	Fields          []fieldSummary `json:"fields"`
	Notes           []string       `json:"notes"`
	Caution         string         `json:"caution"`
	// Candidates and Picks are the ranking of --candidates, with the same
	// keys, values and roundings as glidereach coverage --tiled's JSON
	// "candidates" and "picks" (absent without --candidates).
	Candidates *[]candidateSummary `json:"candidates,omitempty"`
	Picks      *[]pickSummary      `json:"picks,omitempty"`
}

// candidateSummary is one candidate by rank: the zone area (m², rounded) it
// alone would add to the fields' coverage. The fields are in the order of
// their keys, as glidereach's JSON maps are written.
type candidateSummary struct {
	AddsM2     float64 `json:"adds_m2"`
	ElevationM any     `json:"elevation_m"` // m MSL to 0.1 m, null when unknown
	Lat        float64 `json:"lat"`
	Lon        float64 `json:"lon"`
	Name       string  `json:"name"`
	Note       string  `json:"note,omitempty"`
	Rank       int     `json:"rank"`
}

// pickSummary is one step of the greedy choice: the candidate that adds
// most to what is covered so far, the area it adds (m², rounded) and the
// covered share after it (rounded down to 1e-4: never optimistic).
type pickSummary struct {
	AddsM2          float64 `json:"adds_m2"`
	CoveredFraction float64 `json:"covered_fraction"`
	Name            string  `json:"name"`
	Step            int     `json:"step"`
}

type fieldSummary struct {
	Name        string  `json:"name"`
	Skipped     bool    `json:"skipped"`
	CoversM2    float64 `json:"covers_m2"`
	ExclusiveM2 float64 `json:"exclusive_m2"`
}

// finished returns the run in dir as tiling.Run would: its tiles read back
// one at a time in row-major order into the totals.
func finished(o *opened, dir string) (*tiling.Result, error) {
	res := &tiling.Result{Plan: o.plan, Dir: dir, Totals: tiling.NewTotals(o.plan)}
	jobs, err := o.fieldJobs()
	if err != nil {
		return nil, err
	}
	res.Skipped = make([]bool, len(o.plan.Fields)+len(o.plan.Candidates))
	for k := range res.Skipped {
		_, ok := jobs[k]
		res.Skipped[k] = !ok
	}
	for _, id := range o.plan.Tiles() {
		tr, err := res.Tile(id)
		if err != nil {
			return nil, err
		}
		if err := res.Totals.Add(tr); err != nil {
			return nil, err
		}
	}
	return res, nil
}

// writeOutputs writes the outputs of the finished run in dir: summary.json
// in dir, and the files out names.
func writeOutputs(ctx context.Context, o *opened, dir string, out Outputs) error {
	res, err := finished(o, dir)
	if err != nil {
		return err
	}
	t := res.Totals
	s := summary{CoveredFraction: t.CoveredFraction, ZoneAreaM2: t.ZoneArea, CoveredAreaM2: t.CoveredArea,
		ZoneCells: t.ZoneCells, CoveredCells: t.CoveredCells, Tiles: len(o.plan.Tiles()),
		Notes: append([]string{}, o.plan.Notes...), Caution: reach.Caution}
	for k, f := range o.plan.Fields {
		s.Fields = append(s.Fields, fieldSummary{Name: f.Name, Skipped: res.Skipped[k], CoversM2: t.Covers[k], ExclusiveM2: t.Exclusive[k]})
	}
	if out.Ranked {
		s.Candidates, s.Picks = ranking(o.plan, res, t.Rank(out.Pick))
	}
	data, err := json.MarshalIndent(&s, "", "  ")
	if err != nil {
		return err
	}
	data = append(data, '\n')
	if err := writeAtomic(filepath.Join(dir, "summary.json"), data); err != nil {
		return err
	}
	if out.Summary != "" {
		if err := writeAtomic(out.Summary, data); err != nil {
			return err
		}
	}
	if out.FGB != "" {
		covered, uncovered, _, _, err := tiling.Contour(o.plan, res)
		if err != nil {
			return err
		}
		if err := writeFileAtomic(out.FGB, func(w io.Writer) error {
			return plan.WriteTiledFGB(w, o.plan, t, covered, uncovered, out.Zone, out.Assumptions)
		}); err != nil {
			return err
		}
	}
	if out.COG != "" {
		if err := writeFileAtomic(out.COG, func(w io.Writer) error {
			return tiling.WriteCOG(w, o.plan, res, plan.TiledCOGDescription)
		}); err != nil {
			return err
		}
	}
	// Every tile is merged: the field jobs' parts are no longer needed
	// (they are the largest work files, 4 B per cell a field reaches).
	return os.RemoveAll(filepath.Join(dir, "parts"))
}

// ranking lists the candidates by the area each alone adds and the greedy
// picks, as glidereach coverage --tiled's JSON does (its candidatesJSON).
func ranking(p *tiling.Plan, res *tiling.Result, rk *tiling.Ranking) (*[]candidateSummary, *[]pickSummary) {
	nf := len(p.Fields)
	var cs []candidateSummary
	for k, i := range rk.Order {
		c := p.Candidates[i]
		row := candidateSummary{Rank: k + 1, Name: c.Name, Lat: c.Lat, Lon: c.Lon, ElevationM: num(c.Elev), AddsM2: math.Round(rk.Gain[i])}
		switch {
		case math.IsNaN(c.Elev):
			row.Note = "on unknown ground or off the terrain data"
		case res.Skipped[nf+i]:
			row.Note = "too far to reach the area from the altitude flown, or on unknown ground"
		}
		cs = append(cs, row)
	}
	ps := []pickSummary{}
	for k, st := range rk.Steps {
		ps = append(ps, pickSummary{Step: k + 1, Name: p.Candidates[st.Candidate].Name, AddsM2: math.Round(st.Added),
			CoveredFraction: plan.FractionDown(st.CoveredFraction)})
	}
	return &cs, &ps
}

// num is a value rounded to 0.1 for JSON, nil (null) when not finite.
func num(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return math.Round(v*10) / 10
}
