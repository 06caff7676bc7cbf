package main

import (
	"io"
	"os"
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// progress reports the advance of a long run on stderr, only when stderr is a
// terminal and only once the run has taken more than a second.
type progress struct {
	mu      sync.Mutex
	w       io.Writer
	label   string
	start   time.Time
	bar     *progressbar.ProgressBar
	enabled bool
}

func newProgress(w io.Writer, label string) *progress {
	p := &progress{w: w, label: label, start: time.Now()}
	if f, ok := w.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		p.enabled = true
	}
	return p
}

// set records the share done (0..1).
func (p *progress) set(done float64) {
	if p == nil || !p.enabled {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.bar == nil {
		if time.Since(p.start) < time.Second {
			return
		}
		p.bar = progressbar.NewOptions(1000, progressbar.OptionSetWriter(p.w), progressbar.OptionSetDescription(p.label),
			progressbar.OptionClearOnFinish(), progressbar.OptionThrottle(100*time.Millisecond))
	}
	p.bar.Set(int(done * 1000))
}

// done clears the bar.
func (p *progress) done() {
	if p == nil || p.bar == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.bar.Finish()
}
