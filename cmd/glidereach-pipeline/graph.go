package main

import (
	"bytes"
	"context"
	"encoding/gob"
	"fmt"
	"reflect"
	"slices"
	"sort"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/register"

	"glidereach/reach/tiling"
)

// The job graph of a coverage run (package tiling's, step for step):
//
//	Create(job indices) ─windows─▶ FieldJob ─field-runs─▶ KV<TileID, TilePart> ─┐
//	Create(tiles) ─tile-jobs─▶ KV<TileID, TileJob> ───────────────────────────────┴─CoGroupByKey─▶ merge ─▶ TileID
//	TileID (+ tiles finished before) ─AddFixedKey─GroupByKey─▶ finish (totals, outputs; one worker)
//
// Every value on an edge is a gob-encoded []byte (Beam's bytes coder) or a
// TileID (two ints, Beam's schema coder: deterministic, so it can be a
// key). merge writes each finished tile to the work directory in
// tiling.Run's layout and passes on only its ID, so no worker ever holds
// more than one tile's merge, and finish reads the tiles back one at a time
// in row-major order (tiling.Totals' order).

func init() {
	beam.RegisterType(reflect.TypeOf((*tiling.TileID)(nil)).Elem())

	register.DoFn3x1[context.Context, int, func([]byte), error](&windowsFn{})
	register.Emitter1[[]byte]()
	register.DoFn3x1[context.Context, []byte, func(tiling.TileID, []byte), error](&fieldRunFn{})
	register.Emitter2[tiling.TileID, []byte]()
	register.DoFn3x1[context.Context, tiling.TileID, func(tiling.TileID, []byte), error](&tileJobsFn{})
	register.DoFn5x1[context.Context, tiling.TileID, func(*[]byte) bool, func(*[]byte) bool, func(tiling.TileID), error](&mergeFn{})
	register.Iter1[[]byte]()
	register.Emitter1[tiling.TileID]()
	register.DoFn3x1[context.Context, int, func(*tiling.TileID) bool, error](&finishFn{})
	register.Iter1[tiling.TileID]()
}

// Outputs are the files the finish step writes (empty: not written) and
// what it needs to write them.
type Outputs struct {
	// COG is the least-altitude raster (cloud-optimised GeoTIFF,
	// tiling.WriteCOG).
	COG string
	// FGB is the covered and uncovered parts (tiling.Contour over the
	// merged raster) and the fields, as FlatGeobuf.
	FGB string
	// Summary is the JSON summary: covered share, per-field areas, the
	// candidates' ranking.
	Summary string
	// Ranked: the plan has candidates (--candidates), to rank and choose
	// Pick of greedily (tiling.Totals.Rank).
	Ranked bool
	Pick   int
	// Zone names the zone analysed and Assumptions are the inputs the run
	// rests on, in glidereach coverage --tiled's words (the FlatGeobuf's
	// title and description).
	Zone        string
	Assumptions []string
}

// buildPipeline adds the coverage job graph of plan to a new pipeline. done
// are the tiles already finished in the work directory (a resumed run):
// they are not merged again, and fields whose window touches only finished
// tiles are not run. The graph's inputs are two small lists (job indices and
// tile IDs); the data stays on the workers.
func buildPipeline(in Inputs, out Outputs, plan *tiling.Plan, done []tiling.TileID) *beam.Pipeline {
	p, s := beam.NewPipelineWithRoot()
	skip := map[tiling.TileID]bool{}
	for _, id := range done {
		skip[id] = true
	}
	var jobs []int
	for k := range len(plan.Fields) + len(plan.Candidates) {
		jobs = append(jobs, k)
	}
	var tiles []tiling.TileID
	for _, id := range plan.Tiles() {
		if !skip[id] {
			tiles = append(tiles, id)
		}
	}

	js := beam.CreateList(s.Scope("fields"), jobs)
	windows := beam.ParDo(s.Scope("windows"), &windowsFn{In: in, Done: done}, js)
	parts := beam.ParDo(s.Scope("field-runs"), &fieldRunFn{In: in, Done: done}, windows)

	ts := beam.CreateList(s.Scope("tiles"), tiles)
	tileJobs := beam.ParDo(s.Scope("tile-jobs"), &tileJobsFn{In: in}, ts)

	grouped := beam.CoGroupByKey(s.Scope("by-tile"), tileJobs, parts)
	merged := beam.ParDo(s.Scope("merge"), &mergeFn{In: in}, grouped)

	every := beam.Flatten(s.Scope("every-tile"), merged, beam.CreateList(s.Scope("finished-before"), done))
	all := beam.GroupByKey(s.Scope("all-tiles"), beam.AddFixedKey(s.Scope("one-key"), every))
	beam.ParDo0(s.Scope("finish"), &finishFn{In: in, Out: out}, all)
	return p
}

// windowsFn turns a job index into its FieldJob: the field's window and the
// tiles it touches (tiling.Plan.FieldJobs). Indices whose field has no
// window on the lattice, or whose tiles are all in Done, give nothing.
type windowsFn struct {
	In   Inputs
	Done []tiling.TileID

	jobs map[int]tiling.FieldJob
	skip map[tiling.TileID]bool
}

func (f *windowsFn) Setup(ctx context.Context) error {
	o, err := f.In.open()
	if err != nil {
		return err
	}
	if f.jobs, err = o.fieldJobs(); err != nil {
		return err
	}
	f.skip = map[tiling.TileID]bool{}
	for _, id := range f.Done {
		f.skip[id] = true
	}
	return nil
}

func (f *windowsFn) ProcessElement(ctx context.Context, k int, emit func([]byte)) error {
	job, ok := f.jobs[k]
	if !ok || !slices.ContainsFunc(job.Tiles, func(id tiling.TileID) bool { return !f.skip[id] }) {
		return nil
	}
	b, err := gobEncode(&job)
	if err != nil {
		return err
	}
	emit(b)
	return nil
}

// fieldRunFn runs one field's backward solver on its window
// (tiling.RunField), writes the job's parts to the work directory
// (parts.go) and emits one TilePart per touched tile not in Done, keyed by
// tile. A job whose parts file is already there is not run again.
type fieldRunFn struct {
	In   Inputs
	Done []tiling.TileID

	o    *opened
	skip map[tiling.TileID]bool
}

func (f *fieldRunFn) Setup(ctx context.Context) (err error) {
	f.skip = map[tiling.TileID]bool{}
	for _, id := range f.Done {
		f.skip[id] = true
	}
	f.o, err = f.In.open()
	return err
}

func (f *fieldRunFn) ProcessElement(ctx context.Context, b []byte, emit func(tiling.TileID, []byte)) error {
	var job tiling.FieldJob
	if err := gob.NewDecoder(bytes.NewReader(b)).Decode(&job); err != nil {
		return fmt.Errorf("field job: %w", err)
	}
	// A job whose parts are in the work directory (a resumed run) is not
	// run again: its parts are read back.
	parts, ok, err := loadParts(f.In.WorkDir, &job)
	if err != nil {
		return err
	}
	if !ok {
		ps, err := tiling.RunField(ctx, f.o.src, f.o.plan, job)
		if err != nil {
			return err
		}
		enc := make([][]byte, len(ps))
		parts = make([]rawPart, len(ps))
		for i := range ps {
			if enc[i], err = ps[i].Encode(); err != nil {
				return err
			}
			parts[i] = rawPart{Tile: ps[i].Tile, Data: enc[i]}
		}
		// Every touched tile's part is kept, finished or not, so the file
		// serves whichever tiles a later run still lacks.
		if err := writeAtomic(partsPath(f.In.WorkDir, job.Index), encodeParts(job.Index, enc)); err != nil {
			return err
		}
		if testFieldRunDone != nil {
			if err := testFieldRunDone(job.Index); err != nil {
				return err
			}
		}
	}
	for _, p := range parts {
		if !f.skip[p.Tile] {
			emit(p.Tile, p.Data)
		}
	}
	return nil
}

// Test hooks (nil outside tests; Prism runs the steps in the test's
// process): called after a field job's parts are written, and before a
// tile is merged. An error fails the step, as a crash would stop it.
var (
	testFieldRunDone func(job int) error
	testBeforeMerge  func(id tiling.TileID) error
)

// tileJobsFn gives each tile its TileJob (its cells and the zone's mask,
// tiling.Plan.TileJob), keyed by tile.
type tileJobsFn struct {
	In Inputs

	o *opened
}

func (f *tileJobsFn) Setup(ctx context.Context) (err error) {
	f.o, err = f.In.open()
	return err
}

func (f *tileJobsFn) ProcessElement(ctx context.Context, id tiling.TileID, emit func(tiling.TileID, []byte)) error {
	job, err := f.o.plan.TileJob(id, f.o.zone)
	if err != nil {
		return err
	}
	b, err := gobEncode(&job)
	if err != nil {
		return err
	}
	emit(id, b)
	return nil
}

// mergeFn merges the parts of one tile by least altitude per cell
// (tiling.NewAccumulator, Add, Finish: the result does not depend on the
// order the parts arrive in) and writes the TileResult to the work
// directory.
type mergeFn struct {
	In Inputs

	o *opened
}

func (f *mergeFn) Setup(ctx context.Context) (err error) {
	f.o, err = f.In.open()
	return err
}

func (f *mergeFn) ProcessElement(ctx context.Context, id tiling.TileID, jobs func(*[]byte) bool, parts func(*[]byte) bool, emit func(tiling.TileID)) error {
	if testBeforeMerge != nil {
		if err := testBeforeMerge(id); err != nil {
			return err
		}
	}
	var jb, b []byte
	n := 0
	for jobs(&b) {
		jb, n = b, n+1
	}
	if n != 1 {
		return fmt.Errorf("tile %v: %d tile jobs, want 1", id, n)
	}
	var job tiling.TileJob
	if err := gob.NewDecoder(bytes.NewReader(jb)).Decode(&job); err != nil {
		return fmt.Errorf("tile %v: tile job: %w", id, err)
	}
	acc, err := tiling.NewAccumulator(f.o.src, f.o.plan, job)
	if err != nil {
		return err
	}
	for parts(&b) {
		part, err := tiling.DecodeTilePart(b)
		if err != nil {
			return err
		}
		if err := acc.Add(part); err != nil {
			return err
		}
	}
	if err := saveTile(f.In.WorkDir, acc.Finish()); err != nil {
		return err
	}
	emit(id)
	return nil
}

// finishFn checks that every tile is in the work directory, sums the totals
// in row-major tile order and writes the outputs.
type finishFn struct {
	In  Inputs
	Out Outputs
}

func (f *finishFn) ProcessElement(ctx context.Context, _ int, ids func(*tiling.TileID) bool) error {
	o, err := f.In.open()
	if err != nil {
		return err
	}
	var got []tiling.TileID
	var id tiling.TileID
	for ids(&id) {
		got = append(got, id)
	}
	sort.Slice(got, func(a, b int) bool {
		if got[a].Row != got[b].Row {
			return got[a].Row < got[b].Row
		}
		return got[a].Col < got[b].Col
	})
	want := o.plan.Tiles()
	if len(got) != len(want) {
		return fmt.Errorf("finish: %d tiles merged, the plan has %d", len(got), len(want))
	}
	for i := range want {
		if got[i] != want[i] {
			return fmt.Errorf("finish: tile %v merged, %v expected", got[i], want[i])
		}
	}
	return writeOutputs(ctx, o, f.In.WorkDir, f.Out)
}

func gobEncode(v any) ([]byte, error) {
	var b bytes.Buffer
	if err := gob.NewEncoder(&b).Encode(v); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}
