package external_test

import (
	"context"
	"errors"
	"math"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"couplet/mdo"
	"couplet/mdo/external"
)

// TestProgramAsDiscipline runs the test program as the Sellar functions
// discipline and compares it with the built-in one bit for bit at a few
// points; the second pass over the same points is answered by the cache.
func TestProgramAsDiscipline(t *testing.T) {
	prog := buildSellarProg(t)
	for _, mode := range []string{"ok", "json"} {
		t.Run(mode, func(t *testing.T) {
			p := sellarFunctions(prog, mode, t.TempDir())
			if mode == "json" {
				p.OutputFile = "out.json"
			}
			d, err := external.New(p, external.AllowAll())
			if err != nil {
				t.Fatal(err)
			}
			var builtin mdo.Discipline
			for _, s := range mdo.Sellar() {
				if s.Name() == "sellar_functions" {
					builtin = s
				}
			}
			points := [][]float64{{0, 0, 3.16, 3.75528}, {1, 2, 25.588, 12.058}, {0.3, 1e-9, 7.123456789012345, -2.5}}
			for pass := 0; pass < 2; pass++ {
				for _, in := range points {
					got, want := make([]float64, 3), make([]float64, 3)
					if err := d.Compute(in, got); err != nil {
						t.Fatal(err)
					}
					if err := builtin.Compute(in, want); err != nil {
						t.Fatal(err)
					}
					for i := range got {
						if got[i] != want[i] {
							t.Errorf("input %v output %d: program %v, built-in %v (must be identical)", in, i, got[i], want[i])
						}
					}
				}
			}
			if d.Runs() != int64(len(points)) {
				t.Errorf("the program ran %d times for %d distinct inputs asked twice each", d.Runs(), len(points))
			}
		})
	}
}

// TestConcurrentRequestsRunOnce asks for one input from many goroutines:
// the program runs once and every caller gets its answer.
func TestConcurrentRequestsRunOnce(t *testing.T) {
	d, err := external.New(sellarFunctions(buildSellarProg(t), "ok", t.TempDir()), external.AllowAll())
	if err != nil {
		t.Fatal(err)
	}
	in := []float64{0.5, 1, 4, 2}
	want := 0.25 + 1 + 4 + math.Exp(-2) // f of Sellar's functions discipline
	var wg sync.WaitGroup
	errs := make([]error, 8)
	got := make([]float64, 8)
	for i := range errs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			out := make([]float64, 3)
			errs[i] = d.Compute(in, out)
			got[i] = out[0]
		}()
	}
	wg.Wait()
	for i := range errs {
		if errs[i] != nil || got[i] != want {
			t.Errorf("caller %d: f = %v, %v; want %v", i, got[i], errs[i], want)
		}
	}
	if d.Runs() != 1 {
		t.Errorf("the program ran %d times for one input, want 1", d.Runs())
	}
}

// TestFailedRunsAreFailedEvaluations checks that a non-zero exit, bad
// output and a time-out each become a failed evaluation of class
// discipline-failed whose reason says what happened.
func TestFailedRunsAreFailedEvaluations(t *testing.T) {
	prog := buildSellarProg(t)
	cases := []struct {
		mode    string
		timeout time.Duration
		retries int
		want    []string
		kept    string // a file the kept working folder holds
	}{
		{"exit", 0, 1, []string{"failed after 2 run(s)", "exit status 3", "solver diverged at iteration 12"}, "input.txt"},
		{"garbage", 0, 0, []string{"bad output: f", "f = ******"}, "input.txt"},
		{"hang", 300 * time.Millisecond, 0, []string{"time-out: killed after 300ms"}, "hang.txt"},
	}
	for _, c := range cases {
		t.Run(c.mode, func(t *testing.T) {
			work := t.TempDir()
			p := sellarFunctions(prog, c.mode, work)
			p.Timeout, p.Retries = c.timeout, c.retries
			d, err := external.New(p, external.AllowAll())
			if err != nil {
				t.Fatal(err)
			}
			e, err := sellarWith(t, d, 2).NewEvaluator()
			if err != nil {
				t.Fatal(err)
			}
			evs, err := e.Evaluate(context.Background(), [][]float64{e.Start()})
			if err != nil {
				t.Fatal(err)
			}
			got := evs[0]
			if got.Converged || got.Failure != mdo.DisciplineFailed {
				t.Fatalf("evaluation: converged %v, class %v; want a failed evaluation of class %v", got.Converged, got.Failure, mdo.DisciplineFailed)
			}
			for _, w := range append(c.want, "sellar_functions", prog) {
				if !strings.Contains(got.Err, w) {
					t.Errorf("reason %q does not say %q", got.Err, w)
				}
			}
			folders, _ := filepath.Glob(filepath.Join(work, "sellar_functions-*", c.kept))
			if len(folders) == 0 {
				t.Errorf("no kept working folder holds %s", c.kept)
			}
			// the reference analysis and the evaluation ask for the same
			// input: the failure is answered from the cache
			if runs := d.Runs(); runs != int64(1+c.retries) {
				t.Errorf("the program ran %d times for one input with %d retries, want %d", runs, c.retries, 1+c.retries)
			}
			var pe *external.ProgramError
			if !errors.As(d.Compute(make([]float64, 4), make([]float64, 3)), &pe) {
				t.Errorf("Compute's error is not a *ProgramError")
			}
		})
	}
}
