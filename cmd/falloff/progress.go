package main

import (
	"io"
	"os"
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// progress draws a bar on stderr for work that takes more than about a
// second, and only when stderr is a terminal; otherwise it does nothing.
type progress struct {
	mu          sync.Mutex
	w           io.Writer
	what        string
	total, done int
	start       time.Time
	bar         *progressbar.ProgressBar
	enabled     bool
}

// showAfter is how long work runs before the bar appears.
const showAfter = time.Second

func newProgress(s streams, what string, total int, quiet bool) *progress {
	p := &progress{w: s.err, what: what, total: total, start: time.Now()}
	if f, ok := s.err.(*os.File); ok && !quiet && term.IsTerminal(int(f.Fd())) {
		p.enabled = true
	}
	return p
}

// step records one unit of work done; safe for concurrent use.
func (p *progress) step() {
	if p == nil || !p.enabled {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.done++
	if p.bar == nil && time.Since(p.start) > showAfter && p.done < p.total {
		p.bar = progressbar.NewOptions(p.total, progressbar.OptionSetWriter(p.w),
			progressbar.OptionSetDescription(p.what), progressbar.OptionShowCount(),
			progressbar.OptionClearOnFinish(), progressbar.OptionSetElapsedTime(true))
		_ = p.bar.Set(p.done - 1)
	}
	if p.bar != nil {
		_ = p.bar.Add(1)
	}
}

// finish clears the bar.
func (p *progress) finish() {
	if p == nil || p.bar == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	_ = p.bar.Finish()
}
