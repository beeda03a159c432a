package mdo

import (
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"
)

// lin makes a discipline out = a·in + b over named variables.
func lin(name string, ins []string, out string, coef []float64, b float64) Discipline {
	return Func(name, ins, []string{out}, func(in, o []float64) error {
		s := b
		for k, x := range in {
			s += coef[k] * x
		}
		o[0] = s
		return nil
	})
}

func TestExecutionOrder(t *testing.T) {
	tests := []struct {
		name    string
		discs   []Discipline
		groups  [][]string
		coupled int
	}{
		{
			name: "chain declared backwards",
			discs: []Discipline{
				lin("c", []string{"b"}, "cout", []float64{1}, 0),
				lin("b", []string{"a"}, "b", []float64{1}, 0),
				lin("a", []string{"p"}, "a", []float64{1}, 0),
			},
			groups: [][]string{{"a"}, {"b"}, {"c"}},
		},
		{
			name: "two separate loops",
			discs: []Discipline{
				lin("l1a", []string{"p", "v"}, "u", []float64{1, 0.1}, 0),
				lin("l2a", []string{"q", "s"}, "r", []float64{1, 0.1}, 0),
				lin("l1b", []string{"u"}, "v", []float64{0.5}, 0),
				lin("l2b", []string{"r"}, "s", []float64{0.5}, 0),
			},
			groups:  [][]string{{"l1a", "l1b"}, {"l2a", "l2b"}},
			coupled: 2,
		},
		{
			name: "second loop needs the first",
			discs: []Discipline{
				lin("down1", []string{"u", "n"}, "m", []float64{1, 0.1}, 0),
				lin("down2", []string{"m"}, "n", []float64{0.5}, 0),
				lin("up1", []string{"p", "v"}, "u", []float64{1, 0.1}, 0),
				lin("up2", []string{"u"}, "v", []float64{0.5}, 0),
				lin("last", []string{"m", "u"}, "w", []float64{1, 1}, 0),
			},
			groups:  [][]string{{"up1", "up2"}, {"down1", "down2"}, {"last"}},
			coupled: 2,
		},
		{
			name: "self loop is a coupled group",
			discs: []Discipline{
				lin("self", []string{"p", "x"}, "x", []float64{1, 0.5}, 0),
			},
			groups:  [][]string{{"self"}},
			coupled: 1,
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sys, err := NewSystem(tc.discs...)
			if err != nil {
				t.Fatal(err)
			}
			if got := sys.Groups(); !reflect.DeepEqual(got, tc.groups) {
				t.Errorf("groups = %v, want %v", got, tc.groups)
			}
			if got := len(sys.CoupledGroups()); got != tc.coupled {
				t.Errorf("%d coupled groups, want %d", got, tc.coupled)
			}
			w := sys.NewWorkspace()
			if err := w.Analyze(context.Background()); err != nil {
				t.Fatal(err)
			}
		})
	}
}

func TestTwoProducers(t *testing.T) {
	_, err := NewSystem(
		lin("first", []string{"p"}, "y", []float64{1}, 0),
		lin("second", []string{"q"}, "y", []float64{1}, 0),
	)
	if err == nil {
		t.Fatal("two producers of y accepted")
	}
	for _, want := range []string{"y", "first", "second"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("error %q does not name %q", err, want)
		}
	}
}

func TestParametersAndDSM(t *testing.T) {
	sys, err := NewSystem(Sellar()...)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, p := range sys.Parameters() {
		names = append(names, p.Name)
	}
	if want := []string{"z1", "z2", "x"}; !reflect.DeepEqual(names, want) {
		t.Errorf("parameters %v, want %v", names, want)
	}
	dsm := sys.DSM()
	for _, want := range []string{"sellar1", "sellar2", "sellar_functions", "sellar1 -> sellar2: y1", "sellar2 -> sellar1: y2", "coupled"} {
		if !strings.Contains(dsm, want) {
			t.Errorf("DSM lacks %q:\n%s", want, dsm)
		}
	}
	if !strings.Contains(sys.Vars().String(), "coupling variable of discipline 1") {
		t.Errorf("variable table lacks descriptions:\n%s", sys.Vars())
	}
}

// sellarAt converges Sellar at a design point from initial guesses.
func sellarAt(t testing.TB, m Method, x, z1, z2, g1, g2 float64) (*Workspace, error) {
	t.Helper()
	sys, err := NewSystem(Sellar()...)
	if err != nil {
		t.Fatal(err)
	}
	if err := sys.SetSolver(SolverSettings{Method: m, Tolerance: 1e-13, MaxIterations: 500}); err != nil {
		t.Fatal(err)
	}
	w := sys.NewWorkspace()
	for n, v := range map[string]float64{"x": x, "z1": z1, "z2": z2} {
		if err := w.Set(n, v); err != nil {
			t.Fatal(err)
		}
	}
	_ = w.SetGuess("y1", g1)
	_ = w.SetGuess("y2", g2)
	return w, w.Analyze(context.Background())
}

func TestSellarMDAAllSolvers(t *testing.T) {
	// Published optimum point (Sellar, Batill & Renaud, AIAA 96-0714):
	// z = (1.97764, 0), x = 0 gives y1 = 3.16, y2 = 3.75528 (values given
	// to 5-6 digits, so compared to 1e-4 relative).
	guesses := [][2]float64{{1, 1}, {10, -5}, {0.1, 10}, {50, 15}}
	var ref [2]float64
	first := true
	for _, m := range Methods() {
		for _, g := range guesses {
			w, err := sellarAt(t, m, 0, 1.97764, 0, g[0], g[1])
			if err != nil {
				t.Fatalf("%s from %v: %v", m, g, err)
			}
			y1, _ := w.Lookup("y1")
			y2, _ := w.Lookup("y2")
			if first {
				ref = [2]float64{y1, y2}
				first = false
			}
			if math.Abs(y1-ref[0]) > 1e-10 || math.Abs(y2-ref[1]) > 1e-10 {
				t.Errorf("%s from %v: (y1, y2) = (%.15g, %.15g), differs from (%.15g, %.15g) by more than 1e-10", m, g, y1, y2, ref[0], ref[1])
			}
		}
	}
	if math.Abs(ref[0]-3.16)/3.16 > 1e-4 || math.Abs(ref[1]-3.75528)/3.75528 > 1e-4 {
		t.Errorf("y1, y2 = %.6g, %.6g; published 3.16, 3.75528", ref[0], ref[1])
	}
}

func TestAitkenBeatsGaussSeidel(t *testing.T) {
	iters := map[Method]int{}
	for _, m := range []Method{GaussSeidel, AitkenGaussSeidel} {
		w, err := sellarAt(t, m, 1, 5, 2, 1, 1)
		if err != nil {
			t.Fatal(err)
		}
		iters[m] = w.CouplingReports()[0].CouplingIterations
	}
	if iters[AitkenGaussSeidel] >= iters[GaussSeidel] {
		t.Errorf("Aitken took %d iterations, Gauss–Seidel %d: relaxation should need fewer", iters[AitkenGaussSeidel], iters[GaussSeidel])
	}
	t.Logf("iterations from the default start: %v", iters)
}

// gain4 is the loop y1 = 2·y2 + 1, y2 = 2·y1.
func gain4(t *testing.T) *System {
	t.Helper()
	sys, err := NewSystem(
		lin("d1", []string{"y2"}, "y1", []float64{2}, 1),
		lin("d2", []string{"y1"}, "y2", []float64{2}, 0),
	)
	if err != nil {
		t.Fatal(err)
	}
	return sys
}

func TestDivergentCoupling(t *testing.T) {
	// y1 = 2·y2 + 1, y2 = 2·y1: the fixed-point map has gain 4, so plain
	// Gauss–Seidel and Jacobi must diverge; without the fallback chain
	// that is the analysis's error.
	for _, m := range []Method{GaussSeidel, Jacobi} {
		sys := gain4(t)
		if err := sys.SetSolver(SolverSettings{Method: m, MaxIterations: 100, NoFallback: true}); err != nil {
			t.Fatal(err)
		}
		w := sys.NewWorkspace()
		err := w.Analyze(context.Background())
		var ce *ConvergenceError
		if !errors.As(err, &ce) {
			t.Fatalf("%s: want a ConvergenceError, got %v", m, err)
		}
		if ce.CouplingReport.Converged || len(ce.CouplingReport.History) == 0 || len(ce.CouplingReport.Worst) == 0 {
			t.Errorf("%s: report %+v", m, ce.CouplingReport)
		}
		if !strings.Contains(err.Error(), "d1") || !strings.Contains(err.Error(), "y1") {
			t.Errorf("%s: message %q names neither the group nor the worst variable", m, err)
		}
		if c := Classify(err); c != SolverFailed {
			t.Errorf("%s: class %v, want %v", m, c, SolverFailed)
		}
	}
}

func TestFallbackSolvesDivergentCoupling(t *testing.T) {
	// The same gain-4 loop has the solution y1 = −1/3, y2 = −2/3: with
	// the fallback chain on, the analysis finds it and says which path did.
	for _, m := range []Method{GaussSeidel, Jacobi} {
		sys := gain4(t)
		if err := sys.SetSolver(SolverSettings{Method: m, MaxIterations: 100}); err != nil {
			t.Fatal(err)
		}
		w := sys.NewWorkspace()
		if err := w.Analyze(context.Background()); err != nil {
			t.Fatalf("%s: %v", m, err)
		}
		y1, _ := w.Lookup("y1")
		y2, _ := w.Lookup("y2")
		if math.Abs(y1+1.0/3) > 1e-9 || math.Abs(y2+2.0/3) > 1e-9 {
			t.Errorf("%s: y1 = %g, y2 = %g, want −1/3, −2/3", m, y1, y2)
		}
		if !strings.HasPrefix(w.Path(), "fallback: ") {
			t.Errorf("%s: path %q, want a fallback", m, w.Path())
		}
	}
}

func TestNoSolutionIsASolverFailure(t *testing.T) {
	// y1 = y2 + 1, y2 = y1 has no solution and no range to run into:
	// every path fails and the failure is numerical.
	sys, err := NewSystem(
		lin("d1", []string{"y2"}, "y1", []float64{1}, 1),
		lin("d2", []string{"y1"}, "y2", []float64{1}, 0),
	)
	if err != nil {
		t.Fatal(err)
	}
	err = sys.NewWorkspace().Analyze(context.Background())
	var ce *ConvergenceError
	if !errors.As(err, &ce) || Classify(err) != SolverFailed {
		t.Fatalf("want a ConvergenceError classed %v, got %v (%v)", SolverFailed, err, Classify(err))
	}
}

// runaway returns a loop whose solution lies outside a validity range:
// y1 = 0.5·y2 − 2 − p and y2 = y1, with y1 ≥ 0 for d2; the balance asks
// for y1 = −4 − 2p.
func runaway(t *testing.T) *System {
	t.Helper()
	y1 := Var{Name: "y1", Default: 1, Min: 0, Max: 100}
	y2 := Var{Name: "y2", Default: 1, Min: -100, Max: 100}
	p := Var{Name: "p", Default: 0, Min: 0, Max: 10}
	sys, err := NewSystem(
		FuncVars("d1", []Var{y2, p}, []Var{y1}, func(in, out []float64) error { out[0] = 0.5*in[0] - 2 - in[1]; return nil }),
		FuncVars("d2", []Var{y1}, []Var{y2}, func(in, out []float64) error { out[0] = in[0]; return nil }),
	)
	if err != nil {
		t.Fatal(err)
	}
	return sys
}

func TestRunawayDoesNotClose(t *testing.T) {
	for _, m := range Methods() {
		sys := runaway(t)
		if err := sys.SetSolver(SolverSettings{Method: m}); err != nil {
			t.Fatal(err)
		}
		err := sys.NewWorkspace().Analyze(context.Background())
		var nc *NotClosingError
		if !errors.As(err, &nc) || Classify(err) != DoesNotClose {
			t.Fatalf("%s: want a NotClosingError, got %v", m, err)
		}
		// iterates are projected: d2 sees y1 = 0, so y2 = 0 and d1 gives −2
		if nc.Var != "y1" || nc.Discipline != "d2" || nc.Limit != 0 || math.Abs(nc.Value+2) > 1e-9 {
			t.Errorf("%s: %+v", m, nc)
		}
		for _, want := range []string{"does not close", "y1", "d2", "below its lower limit 0", "remedy"} {
			if !strings.Contains(err.Error(), want) {
				t.Errorf("%s: message %q lacks %q", m, err, want)
			}
		}
	}
}

func TestNonConvergedWithinCap(t *testing.T) {
	w, err := func() (*Workspace, error) {
		sys, _ := NewSystem(Sellar()...)
		_ = sys.SetSolver(SolverSettings{Method: GaussSeidel, MaxIterations: 2, Tolerance: 1e-14})
		w := sys.NewWorkspace()
		return w, w.Analyze(context.Background())
	}()
	var ce *ConvergenceError
	if !errors.As(err, &ce) || ce.CouplingReport.Diverged || ce.CouplingReport.CouplingIterations != 2 {
		t.Fatalf("want not converged after 2 iterations, got %v", err)
	}
	if w.CouplingReports()[0].Converged {
		t.Error("workspace report says converged")
	}
}

func TestNaNNamesDiscipline(t *testing.T) {
	sys, err := NewSystem(
		Func("source", []string{"p"}, []string{"a"}, func(in, out []float64) error { out[0] = in[0]; return nil }),
		Func("broken", []string{"a"}, []string{"b"}, func(in, out []float64) error { out[0] = math.NaN(); return nil }),
	)
	if err != nil {
		t.Fatal(err)
	}
	err = sys.NewWorkspace().Analyze(context.Background())
	var nf *NonFiniteError
	if !errors.As(err, &nf) || nf.Discipline != "broken" || nf.Var != "b" {
		t.Fatalf("want NonFiniteError from broken/b, got %v", err)
	}
	if !strings.Contains(err.Error(), "broken") {
		t.Errorf("message %q does not name the discipline", err)
	}
}

func TestOutOfRangeInput(t *testing.T) {
	sys, err := NewSystem(Sellar()...)
	if err != nil {
		t.Fatal(err)
	}
	w := sys.NewWorkspace()
	err = w.Set("x", 12)
	var re *RangeError
	if !errors.As(err, &re) || re.Var != "x" {
		t.Fatalf("Set x = 12: want RangeError on x, got %v", err)
	}
	for _, want := range []string{"x", "12", "[0, 10]"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message %q lacks %q", err, want)
		}
	}
	// A coupling iterate leaving its range during the solve is projected
	// back: from y2 = 100, y1 = −20 would reach sellar2's sqrt, which its
	// range refuses; the projected iteration converges to the solution on
	// the limit, y1 = y2 = 0.
	_ = w.Set("z1", 0)
	_ = w.Set("z2", 0)
	_ = w.Set("x", 0)
	_ = w.SetGuess("y2", 100)
	if err := w.Analyze(context.Background()); err != nil {
		t.Fatal(err)
	}
	if y1, _ := w.Lookup("y1"); math.Abs(y1) > 1e-9 {
		t.Errorf("y1 = %g, want 0", y1)
	}
}

func TestBadSpecsRefused(t *testing.T) {
	tests := []struct {
		name string
		v    Var
		want string
	}{
		{"upper case", Var{Name: "Wing.Area"}, "Wing.Area"},
		{"min above max", Var{Name: "a", Min: 2, Max: 1}, "Min > Max"},
		{"default outside", Var{Name: "a", Default: 5, Min: 0, Max: 1}, "default 5"},
	}
	for _, tc := range tests {
		_, err := NewSystem(FuncVars("d", []Var{tc.v}, []Var{{Name: "o"}}, func(in, out []float64) error { return nil }))
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v, want mention of %q", tc.name, err, tc.want)
		}
	}
	if _, err := ParseMethod("gauss"); err == nil || !strings.Contains(err.Error(), "gauss-seidel") {
		t.Errorf("ParseMethod error %v should list the allowed names", err)
	}
	sys, _ := NewSystem(Sellar()...)
	if err := sys.SetSolver(SolverSettings{Tolerance: -1}); err == nil || !strings.Contains(err.Error(), "tolerance") {
		t.Errorf("negative tolerance accepted: %v", err)
	}
}

func TestCancelledSolve(t *testing.T) {
	sys, _ := NewSystem(Sellar()...)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	err := sys.NewWorkspace().Analyze(ctx)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("want context.Canceled, got %v", err)
	}
}

func TestAnalyzeAllocatesNothing(t *testing.T) {
	for _, m := range []Method{GaussSeidel, Jacobi, AitkenGaussSeidel, AitkenJacobi} {
		sys, _ := NewSystem(Sellar()...)
		_ = sys.SetSolver(SolverSettings{Method: m})
		w := sys.NewWorkspace()
		ctx := context.Background()
		allocs := testing.AllocsPerRun(50, func() {
			if err := w.Analyze(ctx); err != nil {
				t.Fatal(err)
			}
		})
		if allocs != 0 {
			t.Errorf("%s: %v allocations per analysis, want 0", m, allocs)
		}
	}
}

func TestWorkspacesIndependent(t *testing.T) {
	sys, _ := NewSystem(Sellar()...)
	a, b := sys.NewWorkspace(), sys.NewWorkspace()
	_ = a.Set("z1", 2)
	ctx := context.Background()
	if err := a.Analyze(ctx); err != nil {
		t.Fatal(err)
	}
	if err := b.Analyze(ctx); err != nil {
		t.Fatal(err)
	}
	ya, _ := a.Lookup("y1")
	yb, _ := b.Lookup("y1")
	if ya == yb {
		t.Errorf("workspaces share state: y1 = %g in both", ya)
	}
}

func TestSolutionSnapshot(t *testing.T) {
	sys, _ := NewSystem(Sellar()...)
	sol, err := sys.Analyze(context.Background(), map[string]float64{"x": 1, "z1": 5, "z2": 2})
	if err != nil {
		t.Fatal(err)
	}
	// Sellar at the usual start x = 1, z = (5, 2): y1 = 25.5883, y2 =
	// 12.0585 (from memory; common value in MDO tutorials), f = 28.5883.
	if y1 := sol.Get("y1"); math.Abs(y1-25.5883) > 1e-3 {
		t.Errorf("y1 = %g, want 25.5883", y1)
	}
	if !sol.Converged() || !strings.Contains(sol.String(), "y2") {
		t.Errorf("solution:\n%s", sol)
	}
	if _, err := sol.Lookup("nope"); err == nil {
		t.Error("unknown name accepted")
	}
}

func TestDSMSummarisesLongLists(t *testing.T) {
	var outs []string
	for i := 0; i < 15; i++ {
		outs = append(outs, fmt.Sprintf("v%02d", i))
	}
	src := Func("src", []string{"p"}, outs, func(in, out []float64) error { return nil })
	sink := Func("sink", outs, []string{"s"}, func(in, out []float64) error { return nil })
	sys, err := NewSystem(src, sink)
	if err != nil {
		t.Fatal(err)
	}
	dsm := sys.DSM()
	if !strings.Contains(dsm, "src -> sink: v00, v01") || !strings.Contains(dsm, "v11, … and 3 more") || strings.Contains(dsm, "v12") {
		t.Errorf("long coupling list not summarised:\n%s", dsm)
	}
}

func TestOutOfRangeFromEarlierGroup(t *testing.T) {
	// an output of an upstream group outside the range a coupled group's
	// discipline accepts is caught on the group's first sweep
	src := Func("upstream", []string{"p"}, []string{"a"}, func(in, out []float64) error { out[0] = 50; return nil })
	loop1 := FuncVars("loop1", []Var{{Name: "a", Min: 0, Max: 10}, {Name: "v"}}, []Var{{Name: "u"}},
		func(in, out []float64) error { out[0] = in[0] + 0.1*in[1]; return nil })
	loop2 := Func("loop2", []string{"u"}, []string{"v"}, func(in, out []float64) error { out[0] = 0.5 * in[0]; return nil })
	sys, err := NewSystem(src, loop1, loop2)
	if err != nil {
		t.Fatal(err)
	}
	err = sys.NewWorkspace().Analyze(context.Background())
	var re *RangeError
	if !errors.As(err, &re) || re.Var != "a" || re.Discipline != "loop1" || re.Value != 50 {
		t.Fatalf("want a range error on a = 50 for loop1, got %v", err)
	}
}
