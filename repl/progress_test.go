package repl

import (
	"bytes"
	"testing"
	"time"

	"couplet/mdo"
)

// Each optimiser run of a study gets a progress display of its own: the
// second run (a new Started) finishes the first run's bar and starts a
// new one, so that its count and rate start from its own first
// evaluation. Before, the first bar was reused and showed a wrong rate.
func TestOneProgressDisplayPerRun(t *testing.T) {
	var out bytes.Buffer
	p := NewProgress(&out)
	show := p.For("study")
	first := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	second := first.Add(time.Minute)
	show(mdo.Progress{Optimizer: "cmaes", Iteration: 1, Evaluations: 10, Started: first})
	show(mdo.Progress{Optimizer: "cmaes", Iteration: 2, Evaluations: 20, Started: first})
	if len(p.bars) != 1 {
		t.Fatalf("%d bars during one run, want 1", len(p.bars))
	}
	bar1 := p.bars[0]
	show(mdo.Progress{Optimizer: "cmaes", Iteration: 1, Evaluations: 10, Started: second})
	if len(p.bars) != 1 || p.bars[0] == bar1 {
		t.Fatalf("the second run reuses the first run's display (%d bars)", len(p.bars))
	}
	if !bar1.IsFinished() {
		t.Error("the first run's display was not finished")
	}
	if got := p.bars[0].State().CurrentNum; got != 10 {
		t.Errorf("the second run's display counts %d, want 10", got)
	}
	p.Close()
	if len(p.bars) != 0 {
		t.Errorf("%d bars left after Close", len(p.bars))
	}
}
