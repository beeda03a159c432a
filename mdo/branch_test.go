package mdo

import (
	"context"
	"math"
	"testing"
)

// twoBranches is the loop y2 = 1 + 0.2·y1², y1 = y2: the fixed points are
// W = (1 ± √0.2)/0.4, a stable one at 1.382 (loop gain 0.4·W = 0.55)
// and a runaway one at 3.618 (gain 1.45).
func twoBranches(t *testing.T) *System {
	t.Helper()
	y1 := Var{Name: "y1", Default: 3.5, Min: 0, Max: 100}
	y2 := Var{Name: "y2", Default: 3.5, Min: 0, Max: 100}
	sys, err := NewSystem(
		FuncVars("pass", []Var{y2}, []Var{y1}, func(in, out []float64) error { out[0] = in[0]; return nil }),
		FuncVars("grow", []Var{y1}, []Var{y2}, func(in, out []float64) error { out[0] = 1 + 0.2*in[0]*in[0]; return nil }),
	)
	if err != nil {
		t.Fatal(err)
	}
	return sys
}

func TestRunawayBranchRejected(t *testing.T) {
	stable := (1 - math.Sqrt(0.2)) / 0.4
	for _, m := range Methods() {
		sys := twoBranches(t)
		if err := sys.SetSolver(SolverSettings{Method: m}); err != nil {
			t.Fatal(err)
		}
		// from 3.5, Newton's nearest root is the runaway one
		w := sys.NewWorkspace()
		if err := w.Analyze(context.Background()); err != nil {
			t.Fatalf("%s: %v", m, err)
		}
		if y, _ := w.Lookup("y1"); math.Abs(y-stable) > 1e-8 {
			t.Errorf("%s: y1 = %.10g (path %s), want the stable branch %.10g", m, y, w.Path(), stable)
		}
	}
}

func TestRunawayBranchReportedWithoutFallback(t *testing.T) {
	sys := twoBranches(t)
	if err := sys.SetSolver(SolverSettings{Method: Newton, NoFallback: true}); err != nil {
		t.Fatal(err)
	}
	err := sys.NewWorkspace().Analyze(context.Background())
	be, ok := err.(*BranchError)
	if !ok || be.Gain < 1.2 || be.Gain > 1.7 || Classify(err) != DoesNotClose {
		t.Fatalf("want a BranchError with gain about 1.45, got %v", err)
	}
}
