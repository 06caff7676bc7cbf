package reach

import (
	"context"
	"sync"

	"glidereach/terrain"
)

// scratchKeep is how many buffers of one kind a free list keeps.
const scratchKeep = 2

// Scratch buffers. A fresh heap page costs a kernel page fault on this
// project's machines, which measured more than a run's own first pass over
// it; a caller that makes many runs in a row (a field's backward run in
// each wind of a --wind-error set, a RequiredFrom per field) opens a scope
// with WithScratch, and the propagations run under it take their per-cell
// buffers from the buffers the finished ones gave back. Without a scope
// every run allocates its own, as before: a pool that outlives its batch
// only holds memory (measured: the demo, whose steps' windows rarely fit
// each other's buffers, faulted 10-20 % more pages with one process-wide
// pool; DEVELOPERS.md "Scratch buffers").

type scratchKey struct{}

// scratch is the pools of one scope.
type scratch struct {
	recs scratchPool[cellRec]
	f32  scratchPool[float32]
}

// WithScratch returns a context under which the solvers' runs (Required,
// RequiredFrom, Footprint, FootprintFromState, Coverage) reuse the
// per-cell buffers of the runs before them that finished; the buffers are
// dropped with the context. The results are the same bit for bit: every
// cell of a reused buffer is initialised before it is read.
func WithScratch(ctx context.Context) context.Context {
	if scratchOf(ctx) != nil {
		return ctx
	}
	return context.WithValue(ctx, scratchKey{}, &scratch{})
}

// scratchOf returns ctx's scratch pools, nil outside a WithScratch scope.
func scratchOf(ctx context.Context) *scratch {
	s, _ := ctx.Value(scratchKey{}).(*scratch)
	return s
}

// scratchPool is a best-fit free list of buffers: a get returns the
// smallest kept buffer that holds n elements (so a small run does not take
// the buffer a large one needs), or a new one. A nil pool always
// allocates.
type scratchPool[T any] struct {
	mu sync.Mutex
	fl scratchList[T]
}

// scratchList is the free list of a scratchPool, at most scratchKeep long.
type scratchList[T any] struct{ bufs [][]T }

// get returns a buffer of length n.
func (sp *scratchPool[T]) get(n int) []T {
	if sp != nil {
		sp.mu.Lock()
		b := sp.fl.take(n)
		sp.mu.Unlock()
		if b != nil {
			return b
		}
	}
	return make([]T, n)
}

// put gives b back for a later get; the caller must not use b after.
func (sp *scratchPool[T]) put(b []T) {
	if sp == nil || cap(b) == 0 {
		return
	}
	sp.mu.Lock()
	sp.fl.keep(b)
	sp.mu.Unlock()
}

// take removes and returns the smallest kept buffer whose capacity holds n
// elements, cut to length n; nil when none does.
func (fl *scratchList[T]) take(n int) []T {
	best := -1
	for i, b := range fl.bufs {
		if cap(b) >= n && (best < 0 || cap(b) < cap(fl.bufs[best])) {
			best = i
		}
	}
	if best < 0 {
		return nil
	}
	b := fl.bufs[best][:n]
	last := len(fl.bufs) - 1
	fl.bufs[best], fl.bufs[last] = fl.bufs[last], nil
	fl.bufs = fl.bufs[:last]
	return b
}

// keep adds b to the list; a full list drops its smallest buffer (left to
// the collector) for b when b is larger, else drops b.
func (fl *scratchList[T]) keep(b []T) {
	if len(fl.bufs) < scratchKeep {
		fl.bufs = append(fl.bufs, b)
		return
	}
	small := 0
	for i, x := range fl.bufs {
		if cap(x) < cap(fl.bufs[small]) {
			small = i
		}
	}
	if cap(b) > cap(fl.bufs[small]) {
		fl.bufs[small] = b
	}
}

// recPool and f32Pool return the scope's pools (nil ones, which
// allocate, outside a scope).
func (s *scratch) recPool() *scratchPool[cellRec] {
	if s == nil {
		return nil
	}
	return &s.recs
}

func (s *scratch) f32Pool() *scratchPool[float32] {
	if s == nil {
		return nil
	}
	return &s.f32
}

// cropScratch is l.CropCells(c0, r0, c1, r1) with the copy's elevations in
// a buffer from s (a propagation that owns the crop gives it back in
// release).
func cropScratch(s *scratch, l *terrain.Local, c0, r0, c1, r1 int) *terrain.Local {
	return l.CropCellsInto(c0, r0, c1, r1, s.f32Pool().get((c1-c0+1)*(r1-r0+1)))
}

// release gives the propagation's per-cell buffers (its records, its
// values and, when ownsGround, its ground's elevations) back to the
// scratch pools. The caller must hold no slice of them: after release p
// must not be used.
func (p *propagation) release() {
	p.scratch.recPool().put(p.c)
	p.scratch.f32Pool().put(p.val)
	if p.ownsGround {
		p.scratch.f32Pool().put(p.l.Elev)
	}
	p.c, p.val, p.l = nil, nil, nil
}

// descentKeep is how many descent tables descentCache keeps.
const descentKeep = 4

// descentCache keeps the descent tables last built from a speed-to-fly
// Table, by their exact arguments, so that the runs of one command that
// ask for the same table share one build (in the demo 15 of 78 builds
// repeat one before them: the fields' backward runs on one window and
// wind, the reconciling footprints). A descent is read-only once built, and
// the table returned is the one newDescent would build from the same
// arguments, so sharing it changes no result. A Table is immutable once
// made (NewTable), so its pointer names its losses.
var descentCache descentTables

type descentTables struct {
	mu   sync.Mutex
	ents [descentKeep]*descentEntry
	next int
}

type descentEntry struct {
	t          *Table
	hBot, hTop float64
	done       chan struct{} // closed when d and err are set
	d          *descent
	err        error
}

// get returns the table for (t, hBot, hTop), calling build once for it
// when it is not kept; a caller asking while another builds it waits.
func (c *descentTables) get(t *Table, hBot, hTop float64, build func() (*descent, error)) (*descent, error) {
	c.mu.Lock()
	for _, e := range c.ents {
		if e != nil && e.t == t && e.hBot == hBot && e.hTop == hTop {
			c.mu.Unlock()
			<-e.done
			return e.d, e.err
		}
	}
	e := &descentEntry{t: t, hBot: hBot, hTop: hTop, done: make(chan struct{})}
	c.ents[c.next] = e
	c.next = (c.next + 1) % descentKeep
	c.mu.Unlock()
	e.d, e.err = build()
	close(e.done)
	return e.d, e.err
}
