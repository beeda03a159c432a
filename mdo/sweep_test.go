package mdo

import (
	"context"
	"errors"
	"math"
	"testing"
)

// sweepSystem is a small coupled system for the first sweep's input
// checks (invented data, demo only), solved by plain Gauss–Seidel without
// fallback: src gives p = a, then the coupled group d1: y1 = 0.5·p −
// 0.1·y2, d2: y2 = y1 + q, whose inputs from outside the group (p of d1,
// q of d2) lie in [0, 10].
func sweepSystem(t *testing.T) *Workspace {
	t.Helper()
	a := Var{Name: "a", Default: 1, Min: -100, Max: 100}
	p := Var{Name: "p", Default: 1, Min: 0, Max: 10}
	q := Var{Name: "q", Default: 1, Min: 0, Max: 10}
	y1 := Var{Name: "y1", Default: 1, Min: -100, Max: 100}
	y2 := Var{Name: "y2", Default: 1, Min: -100, Max: 100}
	src := FuncVars("src", []Var{a}, []Var{{Name: "p", Default: 1, Min: -100, Max: 100}}, func(in, out []float64) error {
		out[0] = in[0]
		return nil
	})
	d1 := FuncVars("d1", []Var{p, y2}, []Var{y1}, func(in, out []float64) error {
		out[0] = 0.5*in[0] - 0.1*in[1]
		return nil
	})
	d2 := FuncVars("d2", []Var{y1, q}, []Var{y2}, func(in, out []float64) error {
		out[0] = in[0] + in[1]
		return nil
	})
	sys, err := NewSystem(src, d1, d2)
	if err != nil {
		t.Fatal(err)
	}
	if err := sys.SetSolver(SolverSettings{Method: GaussSeidel, Tolerance: 1e-12, NoFallback: true}); err != nil {
		t.Fatal(err)
	}
	return sys.NewWorkspace()
}

// TestFirstSweepChecksInputsInOrder checks that the first Gauss–Seidel
// sweep of a coupled group refuses an input from outside the group that
// lies outside its range as a run-by-run check does: the disciplines
// before the one it feeds have computed (their outputs are in the
// values and counted), the error names that discipline and input, and an
// analysis inside the ranges afterwards is the same as on a fresh
// workspace. The expected states are worked out from the equations (no
// published source: a check of the framework's bookkeeping).
func TestFirstSweepChecksInputsInOrder(t *testing.T) {
	for _, c := range []struct {
		name     string
		a, q     float64
		disc, in string
		value    float64
		calls    int     // discipline calls of the failed analysis
		y1       float64 // y1 after it
	}{
		// src runs (1 call), d1 refuses p = 20 before computing: y1 keeps its default
		{name: "first discipline's input", a: 20, q: 1, disc: "d1", in: "p", value: 20, calls: 1, y1: 1},
		// src and d1 run (2 calls, y1 = 0.5·2 − 0.1·1 = 0.9), d2 refuses q = 20
		{name: "second discipline's input", a: 2, q: 20, disc: "d2", in: "q", value: 20, calls: 2, y1: 0.9},
	} {
		t.Run(c.name, func(t *testing.T) {
			w := sweepSystem(t)
			if err := w.Set("a", c.a); err != nil {
				t.Fatal(err)
			}
			w.SetIndex(w.System().Index("q"), c.q) // unchecked: a value the range refuses
			err := w.Analyze(context.Background())
			var re *RangeError
			if !errors.As(err, &re) {
				t.Fatalf("error %v (%T), want a *RangeError", err, err)
			}
			if re.Discipline != c.disc || re.Var != c.in || re.Value != c.value {
				t.Errorf("refused %s of %s = %g, want %s of %s = %g", re.Var, re.Discipline, re.Value, c.in, c.disc, c.value)
			}
			if got := w.Counters().DisciplineCalls; got != c.calls {
				t.Errorf("%d discipline calls, want %d", got, c.calls)
			}
			if got := w.Get("y1"); got != c.y1 {
				t.Errorf("y1 = %.17g after the failure, want %.17g", got, c.y1)
			}
			// back inside the ranges: the same answer as a fresh workspace
			if err := w.Set("a", 2); err != nil {
				t.Fatal(err)
			}
			if err := w.Set("q", 1); err != nil {
				t.Fatal(err)
			}
			fresh := sweepSystem(t)
			if err := fresh.Set("a", 2); err != nil {
				t.Fatal(err)
			}
			for _, x := range []*Workspace{w, fresh} {
				if err := x.Analyze(context.Background()); err != nil {
					t.Fatal(err)
				}
			}
			for _, v := range []string{"y1", "y2"} {
				if a, b := w.Get(v), fresh.Get(v); math.Float64bits(a) != math.Float64bits(b) {
					t.Errorf("%s = %.17g after the failure, %.17g on a fresh workspace", v, a, b)
				}
			}
			// y1 = 0.5·2 − 0.1·(y1 + 1) closes at y1 = 0.9/1.1
			if got, want := w.Get("y1"), 0.9/1.1; math.Abs(got-want) > 1e-10 {
				t.Errorf("y1 = %.12g, want %.12g", got, want)
			}
		})
	}
}
