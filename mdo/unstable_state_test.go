package mdo

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
)

// saddleLoop is the loop y1 = y2, y2 = p + 0.2·y1² (invented, no source)
// with a downstream discipline z = 2·y1 after it. Its fixed points are
// W = (1 ± √(1 − 0.8p))/0.4: a stable one (loop gain 0.4·W < 1) and a
// runaway one (gain > 1), at p = 1 1.382 and 3.618, at p = 1.1 1.634 and
// 3.366. The coupling variables' validity range starts at lo; their
// default guess is guess; the solver is Newton.
func saddleLoop(t *testing.T, lo, guess float64, fromRef bool) *System {
	t.Helper()
	p := Var{Name: "p", Default: 1, Min: 0, Max: 1.25}
	y1 := Var{Name: "y1", Default: guess, Min: lo, Max: 100}
	y2 := Var{Name: "y2", Default: guess, Min: lo, Max: 100}
	z := Var{Name: "z", Default: 0, Min: 0, Max: 1000}
	sys, err := NewSystem(
		FuncVars("pass", []Var{y2}, []Var{y1}, func(in, out []float64) error { out[0] = in[0]; return nil }),
		FuncVars("grow", []Var{y1, p}, []Var{y2}, func(in, out []float64) error { out[0] = in[1] + 0.2*in[0]*in[0]; return nil }),
		FuncVars("after", []Var{y1}, []Var{z}, func(in, out []float64) error { out[0] = 2 * in[0]; return nil }),
	)
	if err != nil {
		t.Fatal(err)
	}
	if err := sys.SetSolver(SolverSettings{Method: Newton, FromReference: fromRef}); err != nil {
		t.Fatal(err)
	}
	return sys
}

// saddleRoots returns the stable and the runaway fixed point at p.
func saddleRoots(p float64) (stable, runaway float64) {
	s := math.Sqrt(1 - 0.8*p)
	return (1 - s) / 0.4, (1 + s) / 0.4
}

// TestUnstableStateComputesLaterGroups analyses the saddle loop at p = 1
// with the stable fixed point (1.382) below the range's start (1.5):
// Newton from 3 finds the runaway one, plain and relaxed Gauss–Seidel
// stop at the range limit, Gauss–Seidel beside the runaway state runs
// into the limit on one side and away on the other, and with no
// reference state the runaway state is kept. The group after the loop
// must be computed on it (before, z kept its default 0: only the groups
// up to the rejected one had run), and Unstable must name the group, the
// gain and the variable.
func TestUnstableStateComputesLaterGroups(t *testing.T) {
	w := saddleLoop(t, 1.5, 3, false).NewWorkspace()
	if err := w.Analyze(context.Background()); err != nil {
		t.Fatal(err)
	}
	_, runaway := saddleRoots(1)
	y1, z := w.Get("y1"), w.Get("z")
	if math.Abs(y1-runaway) > 1e-6 {
		t.Fatalf("y1 = %.10g by %s, want the runaway fixed point %.10g", y1, w.Path(), runaway)
	}
	if z != 2*y1 {
		t.Errorf("z = %g, want 2·y1 = %g computed on the kept state", z, 2*y1)
	}
	var be *BranchError
	if err := w.Unstable(); !errors.As(err, &be) || strings.Join(be.Group, ",") != "pass,grow" || be.Gain < 1.2 {
		t.Fatalf("Unstable() = %v, want a BranchError of {pass, grow} with a gain above 1", err)
	}
	if !strings.Contains(w.Path(), "unstable branch") {
		t.Errorf("Path() = %q does not say the state is on an unstable branch", w.Path())
	}
	// the next analysis, on a stable state, holds none
	if err := w.Set("p", 1.1); err != nil {
		t.Fatal(err)
	}
	if err := w.SetGuess("y1", 1.6); err != nil {
		t.Fatal(err)
	}
	if err := w.Analyze(context.Background()); err != nil || w.Unstable() != nil {
		t.Fatalf("at p = 1.1 from 1.6: %v, Unstable() = %v", err, w.Unstable())
	}
}

// TestDescentFindsStableClosure starts the saddle loop (range from 0) at
// p = 1 from 5, above the runaway fixed point: Newton finds the runaway
// state, plain and relaxed Gauss–Seidel run away into the range limit.
// Plain Gauss–Seidel started just below the runaway state, along the
// direction the iteration leaves it by, reaches the stable closure 1.382
// (before, the runaway state 3.618 was the answer).
func TestDescentFindsStableClosure(t *testing.T) {
	w := saddleLoop(t, 0, 5, false).NewWorkspace()
	if err := w.Analyze(context.Background()); err != nil {
		t.Fatal(err)
	}
	stable, _ := saddleRoots(1)
	if y1 := w.Get("y1"); math.Abs(y1-stable) > 1e-6 || w.Unstable() != nil {
		t.Fatalf("y1 = %.10g by %s (Unstable: %v), want the stable fixed point %.10g", y1, w.Path(), w.Unstable(), stable)
	}
	if got, want := w.Path(), pathDescent.String(); got != want {
		t.Errorf("Path() = %q, want %q", got, want)
	}
	if w.Get("z") != 2*w.Get("y1") {
		t.Errorf("z = %g, y1 = %g", w.Get("z"), w.Get("y1"))
	}
}

// TestUnstableReferenceRefused is a study of the saddle loop over p in
// [0.9, 1.2] whose reference point, p = 1, finds only the runaway state
// (TestUnstableStateComputesLaterGroups), with FromReference. Before, the
// runaway state 3.618 became the study's reference and every point's
// guess: at p = 1.1, whose runaway state 3.366 lies below it, every path
// ran away or found the runaway state, and the point failed. Refused,
// the points start from the defaults (3) and p = 1.1 closes at its
// stable state 1.634; the reference point itself fails, naming the group
// and the runaway variable.
func TestUnstableReferenceRefused(t *testing.T) {
	st := &Study{Name: "saddle", System: saddleLoop(t, 1.5, 3, true), Design: []DesignVar{Continuous("p", 0.9, 1.2)},
		Objectives: []Objective{Minimize("z")}, Workers: 1, CacheLimit: -1}
	e, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	for _, c := range []struct {
		p         float64
		converged bool
	}{{1.1, true}, {1, false}, {1.15, true}} {
		ev, err := e.EvaluateOne(ctx, e.ToUnit([]float64{c.p}))
		if err != nil {
			t.Fatal(err)
		}
		stable, _ := saddleRoots(c.p)
		switch {
		case c.converged && !ev.Converged:
			t.Errorf("p = %g fails: %s; want the stable closure y1 = %.6g", c.p, ev.Err, stable)
		case c.converged && math.Abs(ev.Objectives[0]-2*stable) > 1e-6:
			t.Errorf("p = %g: z = %.10g by %s, want 2·%.10g (the stable closure)", c.p, ev.Objectives[0], ev.Path, stable)
		case !c.converged && (ev.Converged || ev.Failure != DoesNotClose || !strings.Contains(ev.Err, "{pass, grow}") || !strings.Contains(ev.Err, "loop gain")):
			t.Errorf("p = %g: converged %v, failure %s, %q; want a failure naming the group {pass, grow} and its loop gain", c.p, ev.Converged, ev.Failure, ev.Err)
		}
	}
}

// TestProducedOutOfRangeNamesProducer analyses a system whose upstream
// discipline computes a value below the validity range of the coupled
// group's discipline that reads it (invented, no source; the business
// jet's wide box met it: stability.neutral_point = −103.7 m, computed by
// neutral_point, read by stability, range [−100, 300]). The point fails
// as not closing, and its reason names the variable, its value, the
// range, the discipline that computed it, the one that reads it and the
// remedy (before: no producer and no remedy).
func TestProducedOutOfRangeNamesProducer(t *testing.T) {
	p := Var{Name: "p", Default: 1, Min: -10, Max: 10}
	np := Var{Name: "np", Default: 0, Min: -1000, Max: 1000}
	npIn := Var{Name: "np", Default: 0, Min: -1, Max: 1}
	a := Var{Name: "a", Default: 0, Min: -100, Max: 100}
	b := Var{Name: "b", Default: 0, Min: -100, Max: 100}
	sys, err := NewSystem(
		FuncVars("upstream", []Var{p}, []Var{np}, func(in, out []float64) error { out[0] = -20 * in[0]; return nil }),
		FuncVars("reader", []Var{npIn, b}, []Var{a}, func(in, out []float64) error { out[0] = in[0] + 0.5*in[1]; return nil }),
		FuncVars("back", []Var{a}, []Var{b}, func(in, out []float64) error { out[0] = 0.5 * in[0]; return nil }),
	)
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range Methods() {
		if err := sys.SetSolver(SolverSettings{Method: m}); err != nil {
			t.Fatal(err)
		}
		st := &Study{Name: "produced", System: sys, Design: []DesignVar{Continuous("p", -1, 1)}, Objectives: []Objective{Minimize("a")}, Workers: 1, CacheLimit: -1}
		e, err := st.NewEvaluator()
		if err != nil {
			t.Fatal(err)
		}
		ev, err := e.EvaluateOne(context.Background(), []float64{1})
		if err != nil {
			t.Fatal(err)
		}
		if ev.Converged || ev.Failure != DoesNotClose {
			t.Fatalf("%s: converged %v, failure %s: %s", m, ev.Converged, ev.Failure, ev.Err)
		}
		for _, want := range []string{"np = -20", "[-1, 1]", "computed by discipline upstream", "input of discipline reader", "remedy: " + DoesNotClose.Remedy()} {
			if !strings.Contains(ev.Err, want) {
				t.Errorf("%s: reason %q does not say %q", m, ev.Err, want)
			}
		}
	}
}
