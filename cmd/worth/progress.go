package main

import (
	"fmt"
	"io"
	"os"
	"strings"
	"time"

	"worth/compute"
)

// progressBar returns the progress callback for risk analyses: a bar on
// standard error, drawn only when it is a terminal and only once a run has
// lasted more than progressDelay; nil (no callback) otherwise.
func progressBar(f *os.File) func(compute.RiskProgress) {
	st, err := f.Stat()
	if err != nil || st.Mode()&os.ModeCharDevice == 0 {
		return nil
	}
	p := &progress{w: f, now: time.Now}
	return p.update
}

// progressDelay is how long a run goes before its bar appears: a quick run
// shows nothing.
const progressDelay = 500 * time.Millisecond

// progress draws one line that it rewrites in place.
type progress struct {
	w     io.Writer
	now   func() time.Time
	risk  string
	start time.Time
	last  time.Time
	drawn bool
}

func (p *progress) update(r compute.RiskProgress) {
	now := p.now()
	if r.Risk != p.risk || r.Done == 0 {
		p.clear()
		p.risk, p.start = r.Risk, now
		return
	}
	if r.Done >= r.Total {
		p.clear()
		return
	}
	if now.Sub(p.start) < progressDelay || (p.drawn && now.Sub(p.last) < 100*time.Millisecond) {
		return
	}
	p.last, p.drawn = now, true
	fmt.Fprintf(p.w, "\r%s\033[K", progressLine(r, 30))
}

// clear erases the line, if one was drawn.
func (p *progress) clear() {
	if p.drawn {
		fmt.Fprint(p.w, "\r\033[K")
		p.drawn = false
	}
}

// progressLine is the bar: the share of trials done, and the choice most
// often best so far with the standard error of that probability, which
// shrinks as the trials go on.
func progressLine(r compute.RiskProgress, width int) string {
	filled := width * r.Done / max(r.Total, 1)
	bar := strings.Repeat("#", filled) + strings.Repeat("-", width-filled)
	s := fmt.Sprintf("risk %s [%s] %d/%d trials", r.Risk, bar, r.Done, r.Total)
	if r.Leader != "" {
		s += fmt.Sprintf("  %s best %.1f%% ± %.2f%%", r.Leader, 100*r.Probability, 100*r.SE)
	}
	return s
}
