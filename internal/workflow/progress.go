package workflow

import (
	"fmt"
	"io"
	"strings"
	"sync"
	"time"
)

// Progress is a snapshot of a long-running job.
type Progress struct {
	Stage   string // "generate", "calibrate", "analyse", "report"
	Done    int
	Total   int
	Skipped int // items already recorded by an earlier run
	Failed  int // items that could not be examined
}

// ProgressFunc receives progress snapshots. It is called from one
// goroutine at a time, and must return quickly.
type ProgressFunc func(Progress)

// NewProgressPrinter returns a ProgressFunc that writes to w: a redrawn
// bar when w is an interactive terminal, and otherwise a plain line at
// most every interval (and at the end of each stage), so logs do not fill
// with carriage-return frames. now supplies the clock.
func NewProgressPrinter(w io.Writer, terminal bool, interval time.Duration, now func() time.Time) ProgressFunc {
	p := &printer{w: w, terminal: terminal, interval: interval, now: now}
	return p.update
}

type printer struct {
	mu       sync.Mutex
	w        io.Writer
	terminal bool
	interval time.Duration
	now      func() time.Time
	stage    string
	start    time.Time
	last     time.Time
}

func (p *printer) update(pr Progress) {
	p.mu.Lock()
	defer p.mu.Unlock()
	t := p.now()
	if pr.Stage != p.stage {
		if p.terminal && p.stage != "" {
			fmt.Fprintln(p.w)
		}
		p.stage, p.start, p.last = pr.Stage, t, time.Time{}
	}
	final := pr.Total > 0 && pr.Done >= pr.Total
	if !p.terminal && !final && !p.last.IsZero() && t.Sub(p.last) < p.interval {
		return
	}
	p.last = t
	rate := ""
	if el := t.Sub(p.start).Seconds(); el > 0 && pr.Done > 0 {
		rate = fmt.Sprintf(" %.0f/min", float64(pr.Done)/el*60)
	}
	extra := ""
	if pr.Skipped > 0 {
		extra += fmt.Sprintf(", %d already recorded", pr.Skipped)
	}
	if pr.Failed > 0 {
		extra += fmt.Sprintf(", %d not examined", pr.Failed)
	}
	if p.terminal {
		const width = 30
		fill := 0
		if pr.Total > 0 {
			fill = width * pr.Done / pr.Total
		}
		fmt.Fprintf(p.w, "\r%-10s [%s%s] %d/%d%s%s\x1b[K", pr.Stage,
			strings.Repeat("#", fill), strings.Repeat(".", width-fill), pr.Done, pr.Total, rate, extra)
		if final {
			fmt.Fprintln(p.w)
			p.stage = ""
		}
		return
	}
	fmt.Fprintf(p.w, "%s: %d/%d%s%s\n", pr.Stage, pr.Done, pr.Total, rate, extra)
}
