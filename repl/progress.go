package repl

import (
	"fmt"
	"io"
	"math"
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"

	"couplet/mdo"
)

// Progress draws the progress of running optimisations (iteration, best
// objective, feasibility, evaluations) on a terminal. Make one only when
// the output is a terminal; without one, optimisations run quietly.
type Progress struct {
	w    io.Writer
	mu   sync.Mutex
	bars []*progressbar.ProgressBar
}

// NewProgress returns a progress display writing to w.
func NewProgress(w io.Writer) *Progress { return &Progress{w: w} }

// For returns the progress callback of one study (Study.Progress). Each
// optimiser run of the study (a new mdo.Progress.Started) gets a display
// of its own.
func (p *Progress) For(label string) func(mdo.Progress) {
	if p == nil {
		return func(mdo.Progress) {}
	}
	var bar *progressbar.ProgressBar
	var started time.Time
	return func(pr mdo.Progress) {
		p.mu.Lock()
		defer p.mu.Unlock()
		if bar != nil && !pr.Started.Equal(started) {
			// a new run of the study: its own display, whose count and
			// rate start from its first evaluation
			p.finish(bar)
			bar = nil
		}
		if bar == nil {
			started = pr.Started
			bar = progressbar.NewOptions(-1,
				progressbar.OptionSetWriter(p.w),
				progressbar.OptionSpinnerType(14),
				progressbar.OptionThrottle(80*time.Millisecond),
				progressbar.OptionSetItsString("evals"),
				progressbar.OptionShowCount(),
				progressbar.OptionShowIts(),
				progressbar.OptionSetElapsedTime(true),
			)
			p.bars = append(p.bars, bar)
		}
		bar.Describe(describe(label, pr))
		_ = bar.Set(pr.Evaluations)
	}
}

// describe is the text of a progress line.
func describe(label string, pr mdo.Progress) string {
	state := "feasible"
	if !pr.Feasible {
		if math.IsInf(pr.Violation, 1) {
			state = "no feasible point yet"
		} else {
			state = fmt.Sprintf("infeasible (violation %.3g)", pr.Violation)
		}
	}
	best := "-"
	if !math.IsNaN(pr.Best) {
		best = fmt.Sprintf("%.6g", pr.Best)
	}
	if label != "" {
		label += " "
	}
	return fmt.Sprintf("%s%s iteration %d  best %s  %s", label, pr.Optimizer, pr.Iteration, best, state)
}

// Close ends the bars drawn so far, leaving their last line on screen.
func (p *Progress) Close() {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	for _, b := range p.bars {
		_ = b.Finish()
		fmt.Fprintln(p.w)
	}
	p.bars = nil
}

// finish ends one bar, leaving its last line on screen; mu is held.
func (p *Progress) finish(bar *progressbar.ProgressBar) {
	for i, b := range p.bars {
		if b == bar {
			_ = b.Finish()
			fmt.Fprintln(p.w)
			p.bars = append(p.bars[:i], p.bars[i+1:]...)
			return
		}
	}
}
