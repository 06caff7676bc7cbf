package tiling

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"sync"

	"glidereach/terrain"
)

// RunOptions tune Run.
type RunOptions struct {
	// Workers is the number of field runs at a time; 0 means
	// runtime.NumCPU(). The output does not depend on it.
	Workers int
	// WorkDir holds the run's work files (required; codec.go's binary
	// encoding, the .gob names kept from an earlier format): plan.gob, the plan
	// the directory belongs to, and tiles/<tile>.gob, one finished
	// TileResult each, written atomically. A run given the directory of an
	// interrupted run of the same plan continues from the tiles it
	// finished; a directory of another plan is refused.
	WorkDir string
	// Zone tests whether a cell centre (latitude, longitude in degrees)
	// belongs to the zone analysed; nil means every cell.
	Zone func(lat, lon float64) bool
	// Progress, if not nil, is called now and then with the share done.
	Progress func(done float64)
	// tileDone, if not nil, is called after each tile is written (tests).
	tileDone func(TileID)
}

// Result is a finished run: its tiles are in the work directory.
type Result struct {
	Plan    *Plan
	Dir     string
	Skipped []bool // per job index: no window on the lattice, or on a void
	Totals  *Totals
	// Resumed is the number of tiles found finished in the work directory
	// at the start; Ran the number of field jobs run.
	Resumed, Ran int
}

// ErrOtherPlan is returned by Run for a work directory of another plan.
var ErrOtherPlan = errors.New("tiling: the work directory holds the files of another run")

// Run computes every tile of p with a pool of workers over the field jobs
// (src nil: flat ground at p.Flat). Jobs run in the row-major order of
// their first tile, so tiles finish, are written and leave memory as the
// run sweeps the lattice. A cancelled run returns ctx's error with the
// tiles it finished kept; Run again on the same WorkDir to continue. The
// tiles, and so every output, are byte-identical whatever the number of
// workers and however often the run was interrupted (tested).
//
// Memory: each worker holds one field's window (see RunField); the tiles
// being merged hold 17 bytes per cell (least altitude, field, count,
// altitude flown with AGL) plus a bit per cell per candidate.
func Run(ctx context.Context, src terrain.Source, p *Plan, opts RunOptions) (*Result, error) {
	if opts.WorkDir == "" {
		return nil, errors.New("tiling: Run needs a work directory")
	}
	jobs, skipped, err := p.FieldJobs()
	if err != nil {
		return nil, err
	}
	if err := claimDir(opts.WorkDir, p); err != nil {
		return nil, err
	}
	res := &Result{Plan: p, Dir: opts.WorkDir, Skipped: skipped}
	done := map[TileID]bool{}
	for _, id := range p.Tiles() {
		if _, err := os.Stat(res.tilePath(id)); err == nil {
			done[id] = true
			res.Resumed++
		}
	}
	pending := map[TileID]int{}
	var todo []FieldJob
	for _, j := range jobs {
		need := false
		for _, id := range j.Tiles {
			if !done[id] {
				pending[id]++
				need = true
			}
		}
		if need {
			todo = append(todo, j)
		}
	}
	sort.SliceStable(todo, func(a, b int) bool {
		ta, tb := todo[a].Tiles[0], todo[b].Tiles[0]
		if ta.Row != tb.Row {
			return ta.Row < tb.Row
		}
		return ta.Col < tb.Col
	})
	res.Ran = len(todo)

	var mu sync.Mutex
	accs := map[TileID]*Accumulator{}
	acc := func(id TileID) (*Accumulator, error) {
		mu.Lock()
		defer mu.Unlock()
		if a := accs[id]; a != nil {
			return a, nil
		}
		job, err := p.TileJob(id, opts.Zone)
		if err != nil {
			return nil, err
		}
		a, err := NewAccumulator(src, p, job)
		if err != nil {
			return nil, err
		}
		accs[id] = a
		return a, nil
	}
	finish := func(id TileID) error {
		a, err := acc(id)
		if err != nil {
			return err
		}
		mu.Lock()
		delete(accs, id)
		mu.Unlock()
		if err := res.writeTile(a.Finish()); err != nil {
			return err
		}
		if opts.tileDone != nil {
			opts.tileDone(id)
		}
		return nil
	}
	// Tiles no field reaches are finished first (empty).
	for _, id := range p.Tiles() {
		if !done[id] && pending[id] == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			if err := finish(id); err != nil {
				return nil, err
			}
		}
	}
	workers := opts.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	ndone := 0
	err = forEach(ctx, len(todo), workers, func(k int) error {
		j := todo[k]
		parts, err := RunField(ctx, src, p, j)
		if err != nil {
			return err
		}
		for i := range parts {
			if done[parts[i].Tile] {
				continue
			}
			a, err := acc(parts[i].Tile)
			if err != nil {
				return err
			}
			if err := a.Add(&parts[i]); err != nil {
				return err
			}
		}
		var ready []TileID
		mu.Lock()
		for _, id := range j.Tiles {
			if done[id] {
				continue
			}
			pending[id]--
			if pending[id] == 0 {
				ready = append(ready, id)
			}
		}
		ndone++
		if opts.Progress != nil {
			opts.Progress(float64(ndone) / float64(len(todo)))
		}
		mu.Unlock()
		for _, id := range ready {
			if err := ctx.Err(); err != nil {
				return err
			}
			if err := finish(id); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	res.Totals = NewTotals(p)
	for _, id := range p.Tiles() {
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

// forEach runs fn(k) for k in 0..n−1 on w goroutines, stopping at the
// first error or when ctx is done.
func forEach(ctx context.Context, n, w int, fn func(k int) error) error {
	next := make(chan int)
	var wg sync.WaitGroup
	var once sync.Once
	var first error
	stop := make(chan struct{})
	fail := func(err error) { once.Do(func() { first = err; close(stop) }) }
	for range min(w, max(n, 1)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range next {
				if err := fn(k); err != nil {
					fail(err)
				}
			}
		}()
	}
loop:
	for k := range n {
		select {
		case next <- k:
		case <-stop:
			break loop
		case <-ctx.Done():
			fail(ctx.Err())
			break loop
		}
	}
	close(next)
	wg.Wait()
	if first == nil && ctx.Err() != nil {
		first = ctx.Err()
	}
	return first
}

func (r *Result) tilePath(id TileID) string {
	return filepath.Join(r.Dir, "tiles", id.String()+".gob")
}

// Tile reads a finished tile from the work directory.
func (r *Result) Tile(id TileID) (*TileResult, error) {
	data, err := os.ReadFile(r.tilePath(id))
	if err != nil {
		return nil, err
	}
	tr, err := DecodeTileResult(data)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", r.tilePath(id), err)
	}
	return tr, nil
}

func (r *Result) writeTile(tr *TileResult) error {
	data, err := tr.Encode()
	if err != nil {
		return err
	}
	return writeAtomic(r.tilePath(tr.Tile), data)
}

// writeAtomic writes data to path through a temporary file and a rename, so
// a killed run leaves either the whole file or none.
func writeAtomic(path string, data []byte) error {
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return err
	}
	f, err := os.CreateTemp(filepath.Dir(path), ".tmp-*")
	if err != nil {
		return err
	}
	if _, err := f.Write(data); err != nil {
		f.Close()
		os.Remove(f.Name())
		return err
	}
	if err := f.Close(); err != nil {
		os.Remove(f.Name())
		return err
	}
	if err := os.Rename(f.Name(), path); err != nil {
		os.Remove(f.Name())
		return err
	}
	return nil
}

// claimDir makes dir the work directory of p: it writes plan.gob in a new
// or empty directory, accepts one holding the same plan, and refuses one
// holding another plan or other files.
func claimDir(dir string, p *Plan) error {
	data, err := p.Encode()
	if err != nil {
		return err
	}
	path := filepath.Join(dir, "plan.gob")
	old, err := os.ReadFile(path)
	if err == nil {
		if !bytes.Equal(old, data) {
			return fmt.Errorf("%w (%s: a different plan); give an empty or new --work-dir, or remove it", ErrOtherPlan, path)
		}
		return nil
	}
	if !errors.Is(err, os.ErrNotExist) {
		return err
	}
	if ents, err := os.ReadDir(dir); err == nil && len(ents) > 0 {
		return fmt.Errorf("%w (%s is not empty and holds no plan.gob); give an empty or new --work-dir", ErrOtherPlan, dir)
	}
	return writeAtomic(path, data)
}
