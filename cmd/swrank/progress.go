package main

import (
	"io"
	"os"
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// progressDelay is how long work runs before its progress bar shows.
const progressDelay = time.Second

// progress shows a progress bar on stderr for work that runs longer than
// progressDelay, when stderr is a terminal; otherwise it shows nothing.
// Its methods are safe for concurrent use and do nothing on a nil
// progress.
type progress struct {
	mu    sync.Mutex
	w     io.Writer
	total int
	done  int
	what  string
	start time.Time
	bar   *progressbar.ProgressBar
}

// newProgress returns a progress over total units of work, or nil when w
// is not a terminal.
func newProgress(w io.Writer, total int, what string) *progress {
	f, ok := w.(*os.File)
	if !ok || !term.IsTerminal(int(f.Fd())) || total <= 0 {
		return nil
	}
	return &progress{w: w, total: total, what: what, start: time.Now()}
}

// add records n more units done.
func (p *progress) add(n int) {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.done += n
	if p.bar == nil && time.Since(p.start) >= progressDelay {
		p.bar = progressbar.NewOptions(p.total, progressbar.OptionSetWriter(p.w), progressbar.OptionSetDescription(p.what),
			progressbar.OptionShowCount(), progressbar.OptionSetWidth(30), progressbar.OptionClearOnFinish(),
			progressbar.OptionThrottle(100*time.Millisecond))
		_ = p.bar.Add(p.done)
		return
	}
	if p.bar != nil {
		_ = p.bar.Add(n)
	}
}

// finish clears the bar.
func (p *progress) finish() {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.bar != nil {
		_ = p.bar.Finish()
	}
}
