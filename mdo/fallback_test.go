package mdo

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"
)

// loadingError is the refusal of sizingLoop's aerodynamics: a mass per
// area it is not defined for, naming the coupling variable m.
type loadingError struct{ ratio float64 }

func (e loadingError) Error() string    { return fmt.Sprintf("loading m/s = %g above 4", e.ratio) }
func (e loadingError) Variable() string { return "m" }

// sizingLoop is an invented sizing loop of eight disciplines (no
// published source): drag d grows with the mass m squared over the area
// s, the engine's mass and fuel coefficient grow with d, the fuel with
// the range factor r, the mass is the sum, and a trim term q feeds back
// into the drag; a loop of three more (pitch, lag, settle) turns its
// iterates round as they converge (the Gauss–Seidel map of (b, cc) has
// complex eigenvalues of modulus √0.5), so that the residual of a solve
// that closes can go several iterations without a new smallest value.
// Over a grid of s and r it closes directly, closes only by a fallback
// (the guess of m is on the runaway side of the balance, or the loop
// converges too slowly for 25 iterations), or does not close (the
// aerodynamics refuses m/s above 4).
func sizingLoop(t *testing.T) *System {
	t.Helper()
	v := func(name string, def, lo, hi float64) Var {
		return Var{Name: name, Description: name, Default: def, Min: lo, Max: hi}
	}
	s, r, e := v("s", 30, 5, 80), v("r", 1, 0, 20), v("e", 1, 0.1, 10)
	m, d, we, c, f, q := v("m", 60, 0, 100), v("d", 1, 0, 1000), v("we", 1, 0, 1000), v("c", 0.1, 0, 100), v("f", 1, 0, 1000), v("q", 1, -100, 100)
	a, b, cc := v("a", 0, -100, 100), v("b", 0, -100, 100), v("cc", 0, -100, 100)
	sys, err := NewSystem(
		FuncVars("aero", []Var{m, s, q}, []Var{d}, func(in, out []float64) error {
			if in[0] > 4*in[1] {
				return loadingError{in[0] / in[1]}
			}
			out[0] = 0.02*in[1] + 0.5*in[0]*in[0]/in[1] + 0.01*in[2]
			return nil
		}),
		FuncVars("engine", []Var{d}, []Var{we, c}, func(in, out []float64) error {
			out[0], out[1] = 0.3*in[0], 0.1+0.02*in[0]
			return nil
		}),
		FuncVars("fuel", []Var{d, c, r}, []Var{f}, func(in, out []float64) error {
			out[0] = in[2] * in[1] * in[0]
			return nil
		}),
		FuncVars("weights", []Var{we, f, e, cc}, []Var{m}, func(in, out []float64) error {
			out[0] = in[2] + in[0] + in[1] + 0.1*in[3]
			return nil
		}),
		FuncVars("pitch", []Var{b, cc, m}, []Var{a}, func(in, out []float64) error {
			out[0] = -0.5*in[0] + 1.2*in[1] + 0.01*in[2]
			return nil
		}),
		FuncVars("lag", []Var{cc}, []Var{b}, func(in, out []float64) error {
			out[0] = in[0]
			return nil
		}),
		FuncVars("settle", []Var{a}, []Var{cc}, func(in, out []float64) error {
			out[0] = in[0]
			return nil
		}),
		FuncVars("stab", []Var{m}, []Var{q}, func(in, out []float64) error {
			out[0] = 0.1 * in[0]
			return nil
		}),
	)
	if err != nil {
		t.Fatal(err)
	}
	return sys
}

// TestFallbackShortcutsChangeNothing analyses a grid of sizingLoop's
// points with each solver twice: with the shortcuts of the fallback chain
// (Newton's Jacobian columns sweep only the disciplines that read the
// perturbed variable; a continuation step that would repeat the one that
// just failed is not solved again; the stall limits once the point does
// not close) and without them (SolverSettings.Exhaustive). Every point
// gets the same answer bit for bit — values, path, error, and the
// coupling reports of the points that close — and the shortcuts spend
// fewer discipline calls. The grid must hold points rescued by Newton and
// by the continuation, and points that run the whole chain and fail. (A
// continuation stall limit of 8, a Newton one of 1 or a continuation
// that gives up at its first failed step fails it.)
func TestFallbackShortcutsChangeNothing(t *testing.T) {
	sets := []SolverSettings{{Method: AitkenGaussSeidel}, {Method: AitkenGaussSeidel, MaxIterations: 25}}
	if !testing.Short() {
		sets = append(sets, SolverSettings{Method: AndersonGaussSeidel}, SolverSettings{Method: GaussSeidel}, SolverSettings{Method: Newton},
			SolverSettings{Method: AndersonGaussSeidel, MaxIterations: 25}, SolverSettings{Method: Newton, MaxIterations: 25})
	}
	for _, set := range sets {
		meth := set.Method.String()
		if set.MaxIterations > 0 {
			meth += fmt.Sprintf(" (at most %d iterations)", set.MaxIterations)
		}
		sys := sizingLoop(t)
		if err := sys.SetSolver(set); err != nil {
			t.Fatal(err)
		}
		ws := shortcutPair(t, sys, set)
		paths := map[string]int{}
		var calls [2]int
		for i := 0; i <= 20; i++ {
			for j := 0; j <= 20; j++ {
				var errs [2]error
				for k, w := range ws {
					n, err := analyzeCounting(t, w, 5+75*float64(i)/20, float64(j))
					calls[k] += n
					errs[k] = err
				}
				at := fmt.Sprintf("%s, s = %g, r = %d", meth, ws[0].Get("s"), j)
				if fmt.Sprint(errs[0]) != fmt.Sprint(errs[1]) {
					t.Errorf("%s: %v with the shortcuts, %v without", at, errs[0], errs[1])
					continue
				}
				if ws[0].Path() != ws[1].Path() {
					t.Errorf("%s: path %q with the shortcuts, %q without", at, ws[0].Path(), ws[1].Path())
				}
				if errs[0] != nil {
					// the reports of a failed analysis describe its last
					// attempt, which a stall limit cuts short
					paths["failed: "+Classify(errs[0]).String()+", "+fmt.Sprintf("%T", errs[0])]++
					continue
				}
				paths[ws[0].Path()]++
				for v := range ws[0].Values() {
					if a, b := ws[0].At(v), ws[1].At(v); math.Float64bits(a) != math.Float64bits(b) {
						t.Errorf("%s: %s = %v with the shortcuts, %v without", at, sys.Vars().At(v).Name, a, b)
					}
				}
				for g, a := range ws[0].CouplingReports() {
					b := ws[1].CouplingReports()[g]
					if a.String() != b.String() || a.Path != b.Path || !slices.Equal(a.History, b.History) {
						t.Errorf("%s: coupling report\n%s%s with the shortcuts,\n%s%s without", at, a, a.Path, b, b.Path)
					}
				}
			}
		}
		t.Logf("%s: %v; %d discipline calls with the shortcuts, %d without", meth, paths, calls[0], calls[1])
		if calls[0] >= calls[1] {
			t.Errorf("%s: %d discipline calls with the shortcuts, %d without", meth, calls[0], calls[1])
		}
		if set.Method == AitkenGaussSeidel && set.MaxIterations == 0 {
			for _, p := range []string{"fallback: newton", "fallback: continuation", "failed: does-not-close, *mdo.DisciplineError"} {
				if paths[p] == 0 {
					t.Errorf("%s: no point of the grid ends %q: the test no longer covers it", meth, p)
				}
			}
		}
	}
}

// TestFallbackCostOfPointsThatDoNotClose analyses two points of
// sizingLoop's grid that run the whole fallback chain and fail (the
// aerodynamics refuses the loading m/s the balance runs to), with and
// without the chain's shortcuts: the same error, naming the group, the
// coupling variable and its value, and the deterministic number of
// discipline calls below. A change that makes such a point cost more
// fails here; one that makes it cheaper on purpose writes its new count.
// (Before the continuation gave up at its third failed step they cost
// 6 092 and 7 844 calls; before a branch check that settles on its
// short sweeps was confirmed by one sweep more, ritzSweeps, 4 836 and
// 3 988: three and four checks of eight disciplines.)
func TestFallbackCostOfPointsThatDoNotClose(t *testing.T) {
	cases := []struct {
		s, r              float64
		calls, exhaustive int
	}{
		{5, 16, 4860, 15684},
		{8.75, 15, 4020, 9228},
	}
	sys := sizingLoop(t)
	if err := sys.SetSolver(SolverSettings{Method: AitkenGaussSeidel}); err != nil {
		t.Fatal(err)
	}
	ws := shortcutPair(t, sys, SolverSettings{Method: AitkenGaussSeidel})
	for _, c := range cases {
		var calls [2]int
		var errs [2]error
		for k, w := range ws {
			calls[k], errs[k] = analyzeCounting(t, w, c.s, c.r)
		}
		at := fmt.Sprintf("s = %g, r = %g", c.s, c.r)
		t.Logf("%s: %d discipline calls with the shortcuts, %d without: %v", at, calls[0], calls[1], errs[0])
		if Classify(errs[0]) != DoesNotClose || fmt.Sprint(errs[0]) != fmt.Sprint(errs[1]) {
			t.Errorf("%s: %v with the shortcuts, %v without; want the same does-not-close error", at, errs[0], errs[1])
			continue
		}
		var de *DisciplineError
		if !errors.As(errs[0], &de) || de.Var != "m" || de.Discipline != "aero" || !slices.Equal(de.Group, []string{"aero", "engine", "fuel", "weights", "pitch", "lag", "settle", "stab"}) ||
			!strings.Contains(errs[0].Error(), "loading m/s = ") {
			t.Errorf("%s: the error %v does not name the group, the variable m and the loading aero refuses", at, errs[0])
		}
		if calls[0] != c.calls || calls[1] != c.exhaustive {
			t.Errorf("%s: %d discipline calls with the shortcuts and %d without; want %d and %d", at, calls[0], calls[1], c.calls, c.exhaustive)
		}
	}
}

// shortcutPair returns two workspaces of sizingLoop's system sys, each
// with its reference state set at s = 30 (m guessed 1): the first solves
// with set, the second with set made Exhaustive (the fallback chain
// without its shortcuts).
func shortcutPair(t *testing.T, sys *System, set SolverSettings) [2]*Workspace {
	t.Helper()
	var ws [2]*Workspace
	for k := range ws {
		w := sys.NewWorkspace()
		solver := set
		solver.Exhaustive = k == 1
		if err := w.SetSolver(solver); err != nil {
			t.Fatal(err)
		}
		if err := w.Set("s", 30); err != nil {
			t.Fatal(err)
		}
		if err := w.SetGuess("m", 1); err != nil {
			t.Fatal(err)
		}
		if err := w.Analyze(context.Background()); err != nil {
			t.Fatalf("%s: the reference point: %v", solver.Method, err)
		}
		if err := w.SetReference(slices.Clone(w.Values())); err != nil {
			t.Fatal(err)
		}
		ws[k] = w
	}
	return ws
}

// analyzeCounting analyses sizingLoop's workspace w afresh at s and r and
// returns the discipline calls the analysis spent and its error.
func analyzeCounting(t *testing.T, w *Workspace, s, r float64) (int, error) {
	t.Helper()
	w.Reset()
	if err := w.Set("s", s); err != nil {
		t.Fatal(err)
	}
	if err := w.Set("r", r); err != nil {
		t.Fatal(err)
	}
	before := w.Counters().DisciplineCalls
	err := w.Analyze(context.Background())
	return w.Counters().DisciplineCalls - before, err
}
