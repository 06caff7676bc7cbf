package main

import (
	"context"
	"encoding/json"
	"io"
	"path/filepath"

	"glidereach/reach"
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
	if out.COG != "" {
		if err := writeFileAtomic(out.COG, func(w io.Writer) error {
			return tiling.WriteCOG(w, o.plan, res, cogDescription)
		}); err != nil {
			return err
		}
	}
	return nil
}

// cogDescription goes in the COG's ImageDescription: glidereach coverage
// --tiled's, so both write the same bytes for the same plan.
const cogDescription = "glidereach: least altitude (m MSL) from which a landing field is reached with the reserve; NaN where none below the ceiling; overviews hold the highest value of the cells they cover. " + reach.Caution
