package mdo

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
)

// fdTotals differentiates the analysis itself by central differences:
// re-analyse at wrt ± h (the analysis converged to 1e-14).
func fdTotals(t *testing.T, sys *System, at map[string]float64, guesses map[string]float64, of, wrt []string, once bool) [][]float64 {
	t.Helper()
	run := func(p map[string]float64) []float64 {
		w := sys.NewWorkspace()
		for n, v := range p {
			var err error
			if sys.IsParameter(n) {
				err = w.Set(n, v)
			} else {
				err = w.SetGuess(n, v)
			}
			if err != nil {
				t.Fatal(err)
			}
		}
		var err error
		if once {
			err = w.AnalyzeOnce(context.Background())
		} else {
			err = w.Analyze(context.Background())
		}
		if err != nil {
			t.Fatal(err)
		}
		out := make([]float64, len(of))
		for i, n := range of {
			out[i] = w.Get(n)
		}
		return out
	}
	J := make([][]float64, len(of))
	for i := range J {
		J[i] = make([]float64, len(wrt))
	}
	for j, n := range wrt {
		p := map[string]float64{}
		for k, v := range at {
			p[k] = v
		}
		for k, v := range guesses {
			p[k] = v
		}
		x := p[n]
		h := 1e-5 * math.Max(math.Abs(x), 1)
		p[n] = x + h
		a := run(p)
		p[n] = x - h
		b := run(p)
		for i := range of {
			J[i][j] = (a[i] - b[i]) / (2 * h)
		}
	}
	return J
}

func tightSellar(t *testing.T) *System {
	t.Helper()
	sys, err := NewSystem(Sellar()...)
	if err != nil {
		t.Fatal(err)
	}
	set := DefaultSolver()
	set.Tolerance = 1e-14
	set.MaxIterations = 1000
	if err := sys.SetSolver(set); err != nil {
		t.Fatal(err)
	}
	return sys
}

// TestSellarTotals: the coupled chain rule with the analytic partials of
// Sellar agrees with central differences of the converged analysis
// within 1e-6 relative (issue requirement), in both modes, at the usual
// start, at the published optimum (Sellar, Batill & Renaud, 1996) and at
// an arbitrary point.
func TestSellarTotals(t *testing.T) {
	sys := tightSellar(t)
	of := []string{"f", "g1", "g2", "y1", "y2", "z1"}
	wrt := []string{"x", "z1", "z2"}
	points := []map[string]float64{
		{"x": 1, "z1": 5, "z2": 2},
		{"x": 0.01, "z1": 1.97764, "z2": 0.01},
		{"x": 3, "z1": -2, "z2": 7},
	}
	for _, p := range points {
		w := sys.NewWorkspace()
		for n, v := range p {
			if err := w.Set(n, v); err != nil {
				t.Fatal(err)
			}
		}
		if err := w.Analyze(context.Background()); err != nil {
			t.Fatal(err)
		}
		want := fdTotals(t, sys, p, nil, of, wrt, false)
		for _, mode := range []DerivativeMode{DirectMode, AdjointMode, AutoMode} {
			tot, err := w.Totals(of, wrt, TotalsOptions{Mode: mode})
			if err != nil {
				t.Fatal(err)
			}
			if mode == AutoMode && tot.Mode != DirectMode {
				t.Errorf("auto with 3 variables and 6 functions chose %v, want direct", tot.Mode)
			}
			for i := range of {
				for j := range wrt {
					got := tot.J.At(i, j)
					if rel := math.Abs(got-want[i][j]) / math.Max(math.Abs(want[i][j]), 1e-3); rel > 1e-6 {
						t.Errorf("%v at %v: d%s/d%s = %.12g, finite differences %.12g (rel %.2g)", mode, p, of[i], wrt[j], got, want[i][j], rel)
					}
				}
			}
		}
	}
}

// TestAutoModeAdjoint: more variables than functions gives the adjoint.
func TestAutoModeAdjoint(t *testing.T) {
	sys := tightSellar(t)
	w := sys.NewWorkspace()
	if err := w.Analyze(context.Background()); err != nil {
		t.Fatal(err)
	}
	tot, err := w.Totals([]string{"f"}, []string{"x", "z1", "z2"}, TotalsOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if tot.Mode != AdjointMode || tot.LinearSolves != 1 {
		t.Errorf("mode %v with %d solves, want adjoint with 1", tot.Mode, tot.LinearSolves)
	}
}

// TestSellarTotalsUncoupled: the IDF derivatives (coupling variables held
// at their targets) agree with central differences of AnalyzeOnce.
func TestSellarTotalsUncoupled(t *testing.T) {
	sys := tightSellar(t)
	p := map[string]float64{"x": 2, "z1": 3, "z2": 1}
	g := map[string]float64{"y1": 4, "y2": 5}
	w := sys.NewWorkspace()
	for n, v := range p {
		_ = w.Set(n, v)
	}
	for n, v := range g {
		_ = w.SetGuess(n, v)
	}
	if err := w.AnalyzeOnce(context.Background()); err != nil {
		t.Fatal(err)
	}
	of := []string{"f", "y1", "y2"}
	wrt := []string{"x", "z1", "z2", "y1", "y2"}
	want := fdTotals(t, sys, p, g, of, wrt, true)
	for _, mode := range []DerivativeMode{DirectMode, AdjointMode} {
		tot, err := w.Totals(of, wrt, TotalsOptions{Mode: mode, Uncoupled: true})
		if err != nil {
			t.Fatal(err)
		}
		for i := range of {
			for j := range wrt {
				if rel := math.Abs(tot.J.At(i, j)-want[i][j]) / math.Max(math.Abs(want[i][j]), 1e-3); rel > 1e-6 {
					t.Errorf("%v: d%s/d%s = %.10g, want %.10g", mode, of[i], wrt[j], tot.J.At(i, j), want[i][j])
				}
			}
		}
	}
}

// TestTotalsRefusedWithoutConvergence: a group that did not converge has
// no derivatives.
func TestTotalsRefusedWithoutConvergence(t *testing.T) {
	sys, err := NewSystem(Sellar()...)
	if err != nil {
		t.Fatal(err)
	}
	if err := sys.SetSolver(SolverSettings{Method: GaussSeidel, Tolerance: 1e-12, MaxIterations: 2, NoFallback: true}); err != nil {
		t.Fatal(err)
	}
	w := sys.NewWorkspace()
	if _, err := w.Totals([]string{"f"}, []string{"x"}, TotalsOptions{}); !errors.Is(err, ErrNoDerivatives) {
		t.Errorf("totals before any analysis: %v, want ErrNoDerivatives", err)
	}
	if err := w.Analyze(context.Background()); err == nil {
		t.Fatal("two Gauss–Seidel iterations converged Sellar")
	}
	_, err = w.Totals([]string{"f"}, []string{"x"}, TotalsOptions{})
	if !errors.Is(err, ErrNoDerivatives) || !strings.Contains(err.Error(), "did not converge") {
		t.Errorf("totals of a failed analysis: %v", err)
	}
	if _, err := w.Totals([]string{"f"}, []string{"y1"}, TotalsOptions{}); err == nil || errors.Is(err, ErrNoDerivatives) && !strings.Contains(err.Error(), "converge") {
		t.Errorf("totals with respect to a produced variable: %v", err)
	}
}

// TestCheckPartials: the Sellar partials match finite differences, and a
// wrong partial is named.
func TestCheckPartials(t *testing.T) {
	for _, d := range Sellar() {
		c, err := CheckPartials(d, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		if c.Worst.RelativeDifference > 1e-7 {
			t.Errorf("%s", c)
		}
	}
	bad := WithPartials(FuncVars("bad", []Var{{Name: "a", Default: 2}, {Name: "b", Default: 3}}, []Var{{Name: "c"}},
		func(in, out []float64) error { out[0] = in[0] * in[1]; return nil }),
		func(in, jac []float64) error { jac[0], jac[1] = in[1], 2*in[0]; return nil })
	c, err := CheckPartials(bad, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	if c.Worst.Output != "c" || c.Worst.Input != "b" || math.Abs(c.Worst.RelativeDifference-1) > 1e-6 {
		t.Errorf("worst entry %+v, want ∂c/∂b analytic 4 vs 2", c.Worst)
	}
	if !strings.Contains(c.String(), "∂c/∂b") {
		t.Errorf("report %q does not name ∂c/∂b", c)
	}
	if _, err := CheckPartials(Func("plain", []string{"a"}, []string{"b"}, func(in, out []float64) error { return nil }), nil, 0); err == nil {
		t.Error("a discipline without partials was checked")
	}
}

// TestFDPartialsAtBound: at a bound the difference is one-sided and
// stays inside the range.
func TestFDPartialsAtBound(t *testing.T) {
	d := FuncVars("sq", []Var{{Name: "a", Default: 0, Min: 0, Max: 1}}, []Var{{Name: "b"}}, func(in, out []float64) error {
		if in[0] < 0 || in[0] > 1 {
			return errors.New("outside")
		}
		out[0] = in[0]*in[0] + 3*in[0]
		return nil
	})
	for _, x := range []float64{0, 1} {
		for _, how := range []Differences{Central, Forward} {
			in := []float64{x}
			out := []float64{x*x + 3*x}
			jac := []float64{0}
			if err := FDPartials(d, in, out, jac, how); err != nil {
				t.Fatal(err)
			}
			if want := 2*x + 3; math.Abs(jac[0]-want) > 1e-5 {
				t.Errorf("%v at %g: %g, want %g", how, x, jac[0], want)
			}
		}
	}
}
