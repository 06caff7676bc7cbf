package reach

import (
	"sync"

	"glidereach/terrain"
)

// scratchKeep is how many buffers of one kind a free list keeps.
const scratchKeep = 4

// scratchPool keeps the per-cell buffers of finished propagations for the
// next propagation to use, so a command that makes many runs in a row (a
// field's backward run in each wind of a --wind-error set, a
// RequiredFrom per field) writes into memory it already has instead of
// fresh heap pages: on this project's machines a fresh page costs a kernel
// page fault, which measured more than the run's own first pass over it.
//
// A get returns the smallest kept buffer that holds n elements (best fit,
// so a small run does not take the buffer a large one needs), or a new
// one. The kept buffers live in a sync.Pool, so a collection may drop them
// as it drops any pooled object: an idle program does not hold them.
//
// Every user writes every element it reads before reading it (the
// propagation's set-up initialises each cell), so a reused buffer's old
// contents never reach a result.
type scratchPool[T any] struct{ lists sync.Pool }

// scratchList is one free list of a scratchPool, at most scratchKeep long.
type scratchList[T any] struct{ bufs [][]T }

// get returns a buffer of length n.
func (sp *scratchPool[T]) get(n int) []T {
	if fl, _ := sp.lists.Get().(*scratchList[T]); fl != nil {
		b := fl.take(n)
		sp.lists.Put(fl)
		if b != nil {
			return b
		}
	}
	return make([]T, n)
}

// put gives b back for a later get; the caller must not use b after.
func (sp *scratchPool[T]) put(b []T) {
	if cap(b) == 0 {
		return
	}
	fl, _ := sp.lists.Get().(*scratchList[T])
	if fl == nil {
		fl = &scratchList[T]{}
	}
	fl.keep(b)
	sp.lists.Put(fl)
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

var (
	scratchRecs    scratchPool[cellRec]
	scratchFloat32 scratchPool[float32]
)

// cropScratch is l.CropCells(c0, r0, c1, r1) with the copy's elevations in
// a buffer from scratchFloat32 (a propagation that owns the crop gives it
// back in release).
func cropScratch(l *terrain.Local, c0, r0, c1, r1 int) *terrain.Local {
	return l.CropCellsInto(c0, r0, c1, r1, scratchFloat32.get((c1-c0+1)*(r1-r0+1)))
}

// release gives the propagation's per-cell buffers (its records, its
// values and, when ownsGround, its ground's elevations) back to the
// scratch pools. The caller must hold no slice of them: after release p
// must not be used.
func (p *propagation) release() {
	scratchRecs.put(p.c)
	scratchFloat32.put(p.val)
	if p.ownsGround {
		scratchFloat32.put(p.l.Elev)
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
