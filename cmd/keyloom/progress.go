package main

import (
	"fmt"
	"io"
	"os"
	"strings"
	"sync"
	"time"
)

// progress draws a one-line progress bar on a terminal and stays silent
// otherwise (pipes, files, tests).
type progress struct {
	mu    sync.Mutex
	w     io.Writer
	on    bool
	label string
	total int64
	start time.Time
	last  time.Time
}

func newProgress(w io.Writer, label string, total int64) *progress {
	p := &progress{w: w, label: label, total: total, start: time.Now()}
	if f, ok := w.(*os.File); ok {
		if st, err := f.Stat(); err == nil && st.Mode()&os.ModeCharDevice != 0 {
			p.on = true
		}
	}
	return p
}

// set reports done units of work; it redraws at most ten times a second.
func (p *progress) set(done int64) {
	if p == nil || !p.on {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	now := time.Now()
	if now.Sub(p.last) < 100*time.Millisecond && done < p.total {
		return
	}
	p.last = now
	frac := 0.0
	if p.total > 0 {
		frac = min(1, float64(done)/float64(p.total))
	}
	const width = 30
	n := int(frac * width)
	el := now.Sub(p.start)
	eta := ""
	if frac > 0.02 && frac < 1 {
		eta = " eta " + (time.Duration(float64(el)/frac) - el).Round(time.Second).String()
	}
	fmt.Fprintf(p.w, "\r%-12s [%s%s] %5.1f%% %s%s ", p.label, strings.Repeat("#", n), strings.Repeat(".", width-n), 100*frac, el.Round(time.Second), eta)
}

// done clears the bar.
func (p *progress) done() {
	if p == nil || !p.on {
		return
	}
	fmt.Fprintf(p.w, "\r%s\r", strings.Repeat(" ", 80))
}
