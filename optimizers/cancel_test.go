package optimizers

import (
	"context"
	"sync"
	"testing"

	"couplet/mdo"
)

// Cancelling from the progress callback stops the run at once with the
// best point so far, Stop = "cancelled" and no error.
func TestCancelReturnsBestSoFar(t *testing.T) {
	for _, o := range allOptimizers() {
		t.Run(o.Name(), func(t *testing.T) {
			s, err := SellarMDF()
			if err != nil {
				t.Fatal(err)
			}
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			calls := 0
			s.Progress = func(p mdo.Progress) {
				calls++
				if calls == 2 {
					cancel()
				}
			}
			res, err := o.Minimize(ctx, s)
			if err != nil {
				t.Fatalf("cancel gave an error: %v", err)
			}
			if res == nil || res.Best == nil {
				t.Fatal("no best point after cancel")
			}
			if res.Stop != mdo.StopCancelled {
				t.Errorf("Stop = %q, want %q", res.Stop, mdo.StopCancelled)
			}
			if calls != 2 {
				t.Errorf("%d progress reports, want the run to stop after the 2nd", calls)
			}
		})
	}
}

// countingStudy is a one-variable study with two workers whose analysis
// counts its calls; at the cancelAt-th it calls cancel, and it counts the
// analyses that start after that.
type countingStudy struct {
	mu        sync.Mutex
	calls     int
	cancelAt  int
	cancelled bool
	after     int
}

func (c *countingStudy) study(cancel func()) (*mdo.Study, error) {
	s, _, err := funcStudy("counted", []float64{-1}, []float64{1}, []string{"f"}, func(in, out []float64) error {
		c.mu.Lock()
		c.calls++
		if c.cancelled {
			c.after++
		}
		if c.calls == c.cancelAt {
			c.cancelled = true
			cancel()
		}
		c.mu.Unlock()
		out[0] = in[0] * in[0]
		return nil
	})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f")}
	s.Workers = 2
	return s, nil
}

// A cancel in the middle of a run returns the best point so far, and no
// analysis starts after it but the one the other worker may have begun
// at that moment: no batch is finished after the cancel.
func TestCancelStopsAnalysing(t *testing.T) {
	for _, o := range []Optimizer{
		NelderMead{}, CMAES{}, GA{Evolution: Evolution{Generations: 10000}}, DifferentialEvolution{Evolution: Evolution{Generations: 10000}},
		ParticleSwarm{Evolution: Evolution{Generations: 10000}}, NSGA2{Evolution: Evolution{Generations: 10000}}, LatinHypercube{Samples: 20000},
	} {
		t.Run(o.Name(), func(t *testing.T) {
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			c := &countingStudy{cancelAt: 40}
			s, err := c.study(cancel)
			if err != nil {
				t.Fatal(err)
			}
			res, err := o.Minimize(ctx, s)
			if err != nil {
				t.Fatal(err)
			}
			if !c.cancelled {
				t.Fatalf("the run ended after %d analyses, before the cancel", c.calls)
			}
			if res.Stop != mdo.StopCancelled || res.Best == nil {
				t.Fatalf("stop %q after %d evaluations, best %v; want cancelled with the best point so far", res.Stop, res.Evaluations, res.Best)
			}
			if c.after > s.Workers-1 {
				t.Errorf("%d analyses started after the cancel, want at most %d (the other worker's)", c.after, s.Workers-1)
			}
		})
	}
}

// expiringContext is a context whose deadline passes when expire is
// called, so a test chooses the moment by a count, not a clock.
type expiringContext struct {
	context.Context
	once sync.Once
	done chan struct{}
}

func newExpiringContext() *expiringContext {
	return &expiringContext{Context: context.Background(), done: make(chan struct{})}
}

func (c *expiringContext) expire() { c.once.Do(func() { close(c.done) }) }

func (c *expiringContext) Done() <-chan struct{} { return c.done }

func (c *expiringContext) Err() error {
	select {
	case <-c.done:
		return context.DeadlineExceeded
	default:
		return nil
	}
}

// A deadline passing in the middle of a run is reported as such.
func TestDeadline(t *testing.T) {
	ctx := newExpiringContext()
	c := &countingStudy{cancelAt: 100}
	s, err := c.study(ctx.expire)
	if err != nil {
		t.Fatal(err)
	}
	res, err := GA{Evolution: Evolution{Generations: 10000}}.Minimize(ctx, s)
	if err != nil {
		t.Fatal(err)
	}
	if res.Stop != mdo.StopDeadline || res.Best == nil {
		t.Errorf("Stop = %q, best %v; want %q with the best point so far", res.Stop, res.Best, mdo.StopDeadline)
	}
}
