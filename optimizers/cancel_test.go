package optimizers

import (
	"context"
	"testing"
	"time"

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

// slowStudy is a one-variable study whose analysis takes about 1 ms.
func slowStudy() (*mdo.Study, error) {
	s, _, err := funcStudy("slow", []float64{-1}, []float64{1}, []string{"f"}, func(in, out []float64) error {
		time.Sleep(time.Millisecond)
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

// A cancel in the middle of a run returns the best point so far within
// 100 ms (the bound; the analyses running at the cancel take about
// 1 ms each, so the bound checks that no batch is finished after it).
func TestCancelLatency(t *testing.T) {
	for _, o := range []Optimizer{
		NelderMead{}, CMAES{}, GA{Generations: 10000}, DifferentialEvolution{Generations: 10000},
		ParticleSwarm{Generations: 10000}, NSGA2{Generations: 10000}, LatinHypercube{Samples: 20000},
	} {
		s, err := slowStudy()
		if err != nil {
			t.Fatal(err)
		}
		ctx, cancel := context.WithCancel(context.Background())
		var cancelled time.Time
		timer := time.AfterFunc(60*time.Millisecond, func() { cancelled = time.Now(); cancel() })
		res, err := o.Minimize(ctx, s)
		returned := time.Now()
		timer.Stop()
		cancel()
		if err != nil {
			t.Fatalf("%s: %v", o.Name(), err)
		}
		if res.Stop != mdo.StopCancelled || (res.Evaluations > 0 && res.Best == nil) {
			t.Fatalf("%s: stop %q after %d evaluations, best %v; want cancelled with the best point so far", o.Name(), res.Stop, res.Evaluations, res.Best)
		}
		if lat := returned.Sub(cancelled); lat > 100*time.Millisecond {
			t.Errorf("%s returned %v after the cancel, want within 100 ms", o.Name(), lat)
		}
	}
}

// A deadline is reported as such.
func TestDeadline(t *testing.T) {
	s, err := slowStudy()
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), 20*time.Millisecond)
	defer cancel()
	res, err := GA{Generations: 10000}.Minimize(ctx, s)
	if err != nil {
		t.Fatal(err)
	}
	if res.Stop != mdo.StopDeadline {
		t.Errorf("Stop = %q, want %q", res.Stop, mdo.StopDeadline)
	}
}
