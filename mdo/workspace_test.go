package mdo

import (
	"context"
	"errors"
	"math"
	"testing"
)

// A discipline that fails after writing part of its outputs (which a
// Gauss–Seidel run writes straight into the values) leaves the values as
// they were before the run: those of its last successful run.
func TestFailedRunLeavesValues(t *testing.T) {
	calls := 0
	a := FuncVars("a", []Var{{Name: "p", Default: 1, Min: 0, Max: 10}, {Name: "b", Default: 1, Min: -1e6, Max: 1e6}},
		[]Var{{Name: "a1", Default: 1, Min: -1e6, Max: 1e6}, {Name: "a2", Default: 1, Min: -1e6, Max: 1e6}},
		func(in, out []float64) error {
			calls++
			out[0], out[1] = 0.5*in[1]+in[0], 7
			if calls == 3 {
				out[0], out[1] = 999, math.NaN()
				return errors.New("refused on the third call")
			}
			if calls == 5 {
				out[0], out[1] = 888, math.Inf(1)
			}
			return nil
		})
	b := FuncVars("b", []Var{{Name: "a1", Default: 1, Min: -1e6, Max: 1e6}}, []Var{{Name: "b", Default: 1, Min: -1e6, Max: 1e6}},
		func(in, out []float64) error {
			out[0] = 0.5 * in[0]
			return nil
		})
	sys, err := NewSystem(a, b)
	if err != nil {
		t.Fatal(err)
	}
	if err := sys.SetSolver(SolverSettings{Method: GaussSeidel, NoFallback: true}); err != nil {
		t.Fatal(err)
	}
	w := sys.NewWorkspace()
	// sweep 1: a1 = 0.5·1 + 1 = 1.5, b = 0.75; sweep 2: a1 = 1.375,
	// b = 0.6875; sweep 3: a fails, so a1 stays 1.375 and a2 7
	err = w.Analyze(context.Background())
	var de *DisciplineError
	if !errors.As(err, &de) || de.Discipline != "a" {
		t.Fatalf("want the error of discipline a, got %v", err)
	}
	for _, c := range []struct {
		name string
		want float64
	}{{"a1", 1.375}, {"a2", 7}, {"b", 0.6875}} {
		if got := w.Get(c.name); got != c.want {
			t.Errorf("after the failed run %s = %g, want %g (the last run's)", c.name, got, c.want)
		}
	}
	// from the guesses again, call 4 (sweep 1) gives a1 = 1.5; in call 5
	// a's second output is +Inf
	calls = 3
	err = w.Analyze(context.Background())
	var nf *NonFiniteError
	if !errors.As(err, &nf) || nf.Var != "a2" || nf.Discipline != "a" {
		t.Fatalf("want a non-finite a2 from discipline a, got %v", err)
	}
	if got := w.Get("a1"); got != 1.5 {
		t.Errorf("after the non-finite output a1 = %g, want 1.5 (the last run's)", got)
	}
}

// The outputs of each discipline are numbered consecutively, which lets
// a run write them straight into the values.
func TestOutputsNumberedConsecutively(t *testing.T) {
	sys, err := NewSystem(Sellar()...)
	if err != nil {
		t.Fatal(err)
	}
	for d := range sys.discs {
		for k, i := range sys.outIdx[d] {
			if i != sys.outStart[d]+k {
				t.Errorf("discipline %s: output %d has index %d, want %d", sys.discs[d].Name(), k, i, sys.outStart[d]+k)
			}
		}
	}
}

// A converged report names its worst residuals, largest first, when it
// is read: the largest is the report's residual.
func TestConvergedReportNamesWorst(t *testing.T) {
	for _, m := range Methods() {
		w := sellarWorkspace(t, m, 1e-10)
		if err := w.Analyze(context.Background()); err != nil {
			t.Fatal(err)
		}
		for _, rep := range [][]CouplingReport{w.CouplingReports(), w.Snapshot().CouplingReports} {
			r := rep[0]
			if len(r.Worst) != 2 || r.Worst[0].Residual != r.Residual || r.Worst[1].Residual > r.Worst[0].Residual {
				t.Errorf("%s: worst %v, want y1 and y2, the first with the residual %g", m, r.Worst, r.Residual)
				continue
			}
			if names := r.Worst[0].Name + r.Worst[1].Name; names != "y1y2" && names != "y2y1" {
				t.Errorf("%s: worst names %s and %s, want y1 and y2", m, r.Worst[0].Name, r.Worst[1].Name)
			}
		}
	}
}

// A residual scaled by a power of two is multiplied by the exact
// reciprocal, which gives the quotient bit for bit; other scales divide.
func TestScaledResidualIsTheQuotient(t *testing.T) {
	xs := []float64{0, math.Copysign(0, -1), 1, -3.7, 1e-300, 5e-324, -2.5e-310, 1.7e308, math.Inf(1), math.Inf(-1), math.NaN(), 0.1, 1.0 / 3}
	for _, c := range []struct {
		scale float64
		pow2  bool
	}{{1, true}, {2, true}, {1024, true}, {0.25, true}, {math.Ldexp(1, 1023), true}, {math.Ldexp(1, -1060), false},
		{3, false}, {0.1, false}, {50000, false}} {
		sys, err := NewSystem(
			FuncVars("a", []Var{{Name: "v", Default: 1, Scale: c.scale}}, []Var{{Name: "u", Default: 1}}, func(in, out []float64) error { out[0] = in[0]; return nil }),
			FuncVars("b", []Var{{Name: "u", Default: 1}}, []Var{{Name: "v", Default: 1, Scale: c.scale}}, func(in, out []float64) error { out[0] = in[0]; return nil }))
		if err != nil {
			t.Fatal(err)
		}
		g := &sys.groups[0]
		if g.pow2 != c.pow2 {
			t.Errorf("scale %g: pow2 %v, want %v", c.scale, g.pow2, c.pow2)
		}
		k := 1 // v
		if g.tearNames[k] != "v" {
			k = 0
		}
		for _, x := range xs {
			got, want := g.scaled(k, x), x/c.scale
			if math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
				t.Errorf("scale %g: %g scaled is %g, want %g", c.scale, x, got, want)
			}
		}
	}
}

// Plain Gauss–Seidel gives up, like the other fixed-point loops, after
// w.stall iterations without a new smallest residual when the fallback
// chain sets a stall limit. The loop a = 2 − b, b = a oscillates between
// (2, 2) and (0, 0) from (0, 0) with a residual of 2 in every sweep.
func TestPlainGaussSeidelStalls(t *testing.T) {
	a := FuncVars("a", []Var{{Name: "b", Default: 0, Min: -10, Max: 10}}, []Var{{Name: "a", Default: 0, Min: -10, Max: 10}},
		func(in, out []float64) error { out[0] = 2 - in[0]; return nil })
	b := FuncVars("b", []Var{{Name: "a", Default: 0, Min: -10, Max: 10}}, []Var{{Name: "b", Default: 0, Min: -10, Max: 10}},
		func(in, out []float64) error { out[0] = in[0]; return nil })
	for _, c := range []struct{ stall, want int }{{0, 50}, {5, 6}} {
		sys, err := NewSystem(a, b)
		if err != nil {
			t.Fatal(err)
		}
		if err := sys.SetSolver(SolverSettings{Method: GaussSeidel, MaxIterations: 50, NoFallback: true}); err != nil {
			t.Fatal(err)
		}
		w := sys.NewWorkspace()
		w.stall = c.stall
		var ce *ConvergenceError
		if err := w.Analyze(context.Background()); !errors.As(err, &ce) {
			t.Fatalf("stall %d: want a convergence error, got %v", c.stall, err)
		}
		if it := ce.CouplingReport.CouplingIterations; it != c.want {
			t.Errorf("stall %d: %d iterations, want %d", c.stall, it, c.want)
		}
	}
}

// A discipline that panics after writing part of its outputs leaves the
// values as they were before its run too, under Gauss–Seidel (which
// writes into the values) and Jacobi (which writes into a buffer).
func TestPanickedRunLeavesValues(t *testing.T) {
	for _, m := range []Method{GaussSeidel, Jacobi} {
		calls := 0
		a := FuncVars("a", []Var{{Name: "b", Default: 1, Min: -1e6, Max: 1e6}}, []Var{{Name: "a", Default: 1, Min: -1e6, Max: 1e6}},
			func(in, out []float64) error {
				calls++
				out[0] = 0.5*in[0] + 1
				if calls == 3 {
					out[0] = 999
					panic("third call")
				}
				return nil
			})
		b := FuncVars("b", []Var{{Name: "a", Default: 1, Min: -1e6, Max: 1e6}}, []Var{{Name: "b", Default: 1, Min: -1e6, Max: 1e6}},
			func(in, out []float64) error { out[0] = 0.5 * in[0]; return nil })
		sys, err := NewSystem(a, b)
		if err != nil {
			t.Fatal(err)
		}
		if err := sys.SetSolver(SolverSettings{Method: m, NoFallback: true}); err != nil {
			t.Fatal(err)
		}
		w := sys.NewWorkspace()
		err = w.Analyze(context.Background())
		var de *DisciplineError
		if !errors.As(err, &de) || de.Discipline != "a" {
			t.Fatalf("%s: want the panic of discipline a, got %v", m, err)
		}
		// Gauss–Seidel: a = 1.5, b = 0.75, a = 1.375, b = 0.6875, then the
		// panic; Jacobi: (a, b) = (1.5, 0.5), (1.25, 0.75), then the panic
		want := map[Method]float64{GaussSeidel: 1.375, Jacobi: 1.25}[m]
		if got := w.Get("a"); got != want {
			t.Errorf("%s: after the panic a = %g, want %g (the last run's)", m, got, want)
		}
	}
}

// TestNotFinite checks the output test of the hot path against
// math.IsNaN || math.IsInf on the edges of the float64 format: NaNs of
// either sign and any payload, infinities, the largest finite values,
// subnormals and signed zeros.
func TestNotFinite(t *testing.T) {
	for _, x := range []float64{
		math.NaN(), -math.NaN(), math.Float64frombits(0x7ff0000000000001), math.Float64frombits(0xfff8000000000123),
		math.Inf(1), math.Inf(-1), math.MaxFloat64, -math.MaxFloat64, math.SmallestNonzeroFloat64,
		-math.SmallestNonzeroFloat64, 0, math.Copysign(0, -1), 1, -1e308, 0x1p-1022, math.Nextafter(math.Inf(1), 0),
	} {
		if got, want := notFinite(x), math.IsNaN(x) || math.IsInf(x, 0); got != want {
			t.Errorf("notFinite(%g) (bits %#x) = %v, want %v", x, math.Float64bits(x), got, want)
		}
	}
}
