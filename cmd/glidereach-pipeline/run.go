package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/runners"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
	"glidereach/reach/tiling"
)

// run checks the flags, claims the work directory, runs the pipeline on the
// runner --runner names (Prism when none) and prints the summary.
func run(ctx context.Context, o *options, stdout, stderr io.Writer) error {
	r, err := newRequest(o)
	if err != nil {
		return err
	}
	for _, w := range r.warnings {
		fmt.Fprintln(stderr, "glidereach-pipeline: WARNING:", w)
	}
	done, err := claimWorkDir(r.in.WorkDir, r.in.Plan)
	if err != nil {
		return err
	}
	runner := *runners.Runner
	if runner == "" {
		runner = "prism"
	}
	jobsDone := partsOnDisk(r.in.WorkDir, r.plan)
	p := buildPipeline(r.in, r.out, r.plan, done)
	if _, err := beam.Run(ctx, runner, p); err != nil {
		if ctx.Err() != nil {
			return fmt.Errorf("stopped (%w); the finished field runs and tiles are kept in %s: run the same command again to continue", ctx.Err(), r.in.WorkDir)
		}
		if line := corruptLine(err); line != "" {
			// A work file damaged outside the run (the run writes each
			// whole, by rename): the user's input, as glidereach coverage
			// --tiled says it. Beam hands a worker's error over as text, so
			// the library's sentinel is found by its marker text.
			return input.Usagef("--work-dir", "%s (remove that file, or the whole work directory, to compute it again)", line)
		}
		return fmt.Errorf("pipeline on %s: %w", runner, err)
	}
	data, err := os.ReadFile(filepath.Join(r.in.WorkDir, "summary.json"))
	if err != nil {
		// An asynchronous submission, or a work directory this machine
		// does not see: the job writes the outputs itself.
		fmt.Fprintf(stdout, "submitted to %s; the job writes its summary to %s\n", runner, filepath.Join(r.in.WorkDir, "summary.json"))
		return nil
	}
	var s summary
	if err := json.Unmarshal(data, &s); err != nil {
		return err
	}
	printSummary(stdout, &s, len(done), jobsDone)
	return nil
}

// printSummary prints the headline figures of a finished run.
func printSummary(w io.Writer, s *summary, resumed, jobsResumed int) {
	// Covered shares and areas are rounded down (never optimistic), as
	// glidereach's text.
	tiles := "tiles"
	if s.Tiles == 1 {
		tiles = "tile"
	}
	fmt.Fprintf(w, "covered: %.1f %% of the zone (%.2f of %.2f km²), %d %s", down(100*s.CoveredFraction, 10), down(s.CoveredAreaM2/1e6, 100), s.ZoneAreaM2/1e6, s.Tiles, tiles)
	switch {
	case resumed > 0 && jobsResumed > 0:
		fmt.Fprintf(w, " (%d, and %d field runs, found finished in the work directory)", resumed, jobsResumed)
	case resumed > 0:
		fmt.Fprintf(w, " (%d found finished in the work directory)", resumed)
	case jobsResumed > 0:
		fmt.Fprintf(w, " (%d field runs found finished in the work directory)", jobsResumed)
	}
	fmt.Fprintln(w)
	for _, f := range s.Fields {
		if f.Skipped {
			fmt.Fprintf(w, "  %-24s no window on the area (too far, off the data or above the ceiling)\n", f.Name)
			continue
		}
		fmt.Fprintf(w, "  %-24s covers %10.2f km², alone %10.2f km²\n", f.Name, down(f.CoversM2/1e6, 100), down(f.ExclusiveM2/1e6, 100))
	}
	if s.Candidates != nil {
		fmt.Fprintln(w, "candidates by the area each would add alone:")
		for _, c := range *s.Candidates {
			fmt.Fprintf(w, "  %2d. %-24s adds %10.2f km²", c.Rank, c.Name, down(c.AddsM2/1e6, 100))
			if c.Note != "" {
				fmt.Fprintf(w, " (%s)", c.Note)
			}
			fmt.Fprintln(w)
		}
		fmt.Fprintln(w, "greedy choice (each step the candidate adding most to what is covered so far):")
		if len(*s.Picks) == 0 {
			fmt.Fprintln(w, "  no candidate adds any covered area")
		}
		for _, p := range *s.Picks {
			fmt.Fprintf(w, "  %2d. %-24s adds %10.2f km², covered %.1f %%\n", p.Step, p.Name, down(p.AddsM2/1e6, 100), down(100*p.CoveredFraction, 10))
		}
	}
	for _, n := range s.Notes {
		fmt.Fprintln(w, "note:", n)
	}
	fmt.Fprintln(w, reach.Caution)
}

// down rounds v down to 1/per (per 10: one decimal), with a margin of
// 1e-9 for a value printed exactly.
func down(v, per float64) float64 { return math.Floor(v*per+1e-9) / per }

// claimWorkDir makes dir the work directory of the plan (encoded): it
// writes plan.gob in a new or empty directory, accepts one holding the same
// plan and returns the tiles already finished there, and refuses one
// holding another plan or other files (tiling.Run's rule).
func claimWorkDir(dir string, plan []byte) ([]tiling.TileID, error) {
	path := filepath.Join(dir, "plan.gob")
	old, err := os.ReadFile(path)
	if errors.Is(err, os.ErrNotExist) {
		if ents, err := os.ReadDir(dir); err == nil && len(ents) > 0 {
			return nil, input.Usagef("--work-dir", "%s is not empty and holds no plan.gob; give an empty or new directory", dir)
		}
		return nil, writeAtomic(path, plan)
	}
	if err != nil {
		return nil, err
	}
	if !bytes.Equal(old, plan) {
		return nil, input.Usagef("--work-dir", "%s holds the files of another run (a different plan); give an empty or new directory, or remove it", dir)
	}
	p, err := tiling.DecodePlan(plan)
	if err != nil {
		return nil, err
	}
	var done []tiling.TileID
	for _, id := range p.Tiles() {
		if _, err := os.Stat(filepath.Join(dir, "tiles", id.String()+".gob")); err == nil {
			done = append(done, id)
		}
	}
	return done, nil
}

// corruptLine returns the line of a pipeline error that reports a damaged
// work file, or "": the error itself when it wraps tiling.ErrCorrupt, else
// the line holding tiling.CorruptMarker (a worker's error reaches the
// launcher as Beam's text; the library tests that the marker is in the
// text of every error wrapping ErrCorrupt).
func corruptLine(err error) string {
	if errors.Is(err, tiling.ErrCorrupt) {
		return err.Error()
	}
	for _, l := range strings.Split(err.Error(), "\n") {
		if strings.Contains(l, tiling.CorruptMarker) {
			return strings.TrimSpace(l)
		}
	}
	return ""
}
