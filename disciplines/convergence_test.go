package disciplines

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"strings"
	"testing"
	"time"

	"couplet/mdo"
)

// The convergence benchmark: for every demonstration aircraft a grid over
// wing area and aspect ratio at two sweeps, and a Latin hypercube over the
// design box of every example study, each point analysed by every coupling
// solver through the Evaluator, as a study would. TestConvergence runs a
// small version and asserts what the solvers promise; BenchmarkConvergence
// runs the full sweep and prints the table.

// convBox is one design variable's range in a convergence case.
type convBox struct {
	name      string
	lower, hi float64
}

// convCase is one family of points: a scenario, fixed overrides, the
// design box and the points (physical values in the box's order).
type convCase struct {
	label  string
	scen   Scenario
	fixed  map[string]float64
	box    []convBox
	points [][]float64
	grid   [2]int // the grid's shape (aspect ratios, areas) per sweep; zero for a hypercube
}

// gridCase is an n × n grid over wing area and aspect ratio at each sweep.
func gridCase(label string, s Scenario, area, ar [2]float64, sweeps [2]float64, n int) convCase {
	c := convCase{label: label, scen: s, box: []convBox{{"wing.area", area[0], area[1]}, {"wing.aspect_ratio", ar[0], ar[1]}, {"wing.sweep", math.Min(sweeps[0], sweeps[1]), math.Max(sweeps[0], sweeps[1])}}, grid: [2]int{n, n}}
	for _, sw := range sweeps {
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				a := area[0] + (area[1]-area[0])*float64(j)/float64(n-1)
				r := ar[0] + (ar[1]-ar[0])*float64(i)/float64(n-1)
				c.points = append(c.points, []float64{a, r, sw})
			}
		}
	}
	return c
}

// lhsCase is an n-point Latin hypercube over a study's design box, drawn
// from a fixed seed.
func lhsCase(label string, s Scenario, fixed map[string]float64, box []convBox, n int, seed uint64) convCase {
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	c := convCase{label: label, scen: s, fixed: fixed, box: box}
	perm := make([][]int, len(box))
	for k := range box {
		perm[k] = rng.Perm(n)
	}
	for i := 0; i < n; i++ {
		p := make([]float64, len(box))
		for k, b := range box {
			u := (float64(perm[k][i]) + rng.Float64()) / float64(n)
			p[k] = b.lower + u*(b.hi-b.lower)
		}
		c.points = append(c.points, p)
	}
	return c
}

// convergenceCases returns the cases: n × n grids and m-point hypercubes.
func convergenceCases(n, m int) []convCase {
	short := map[string]float64{"mission.range": 5.5e6}
	jetBox := []convBox{{"wing.area", 100, 220}, {"wing.aspect_ratio", 1.8, 3.6}, {"wing.sweep", 52, 64}, {"wing.thickness_ratio", 0.024, 0.05}}
	doeBox := []convBox{{"wing.area", 100, 220}, {"wing.aspect_ratio", 1.8, 3.6}, {"wing.sweep", 52, 64}, {"wing.thickness_ratio", 0.03, 0.05}}
	frontBox := []convBox{{"wing.area", 100, 220}, {"wing.aspect_ratio", 1.8, 2.8}, {"wing.thickness_ratio", 0.036, 0.05}}
	rjBox := []convBox{{"wing.area", 60, 110}, {"wing.aspect_ratio", 7, 12}, {"wing.sweep", 15, 32}, {"wing.thickness_ratio", 0.09, 0.15}}
	return []convCase{
		gridCase("business jet grid", Swiftlet(), [2]float64{100, 220}, [2]float64{1.8, 3.6}, [2]float64{52, 64}, n),
		gridCase("forward-swept jet grid", SwiftletForwardSwept(), [2]float64{100, 220}, [2]float64{1.8, 3.6}, [2]float64{-40, -50}, n),
		gridCase("three-engine jet grid", SwiftletTrijet(), [2]float64{100, 220}, [2]float64{1.8, 3.6}, [2]float64{52, 64}, n),
		gridCase("regional jet grid", Kestrel(), [2]float64{60, 110}, [2]float64{7, 12}, [2]float64{15, 32}, n),
		gridCase("supersonic airliner grid", Condor(), [2]float64{150, 260}, [2]float64{1.8, 3.2}, [2]float64{55, 65}, n),
		lhsCase("business_jet.study box", Swiftlet(), nil, jetBox, m, 1),
		lhsCase("business_jet_wing_doe.study box", Swiftlet(), short, doeBox, m, 2),
		lhsCase("business_jet_front.study box", Swiftlet(), short, frontBox, m, 3),
		lhsCase("regional_jet.study box", Kestrel(), nil, rjBox, m, 4),
	}
}

// convTally sums the outcomes of one case under one solver.
type convTally struct {
	points, converged, notClosing, solverFailed, invalid, other int
	unclassified                                                int
	iterations                                                  int // coupling iterations of converged points
	calls                                                       int // discipline calls of converged points
	wall                                                        time.Duration
	jumps                                                       int
	reasons                                                     map[string]int
}

// add counts one evaluation.
func (t *convTally) add(ev *mdo.Evaluation) {
	t.points++
	if t.reasons == nil {
		t.reasons = map[string]int{}
	}
	if ev.Converged {
		t.converged++
		t.iterations += ev.CouplingIterations
		t.calls += ev.DisciplineCalls
		t.wall += ev.Wall
		return
	}
	switch mdo.ClassOf(ev) {
	case mdo.DoesNotClose:
		t.notClosing++
	case mdo.SolverFailed:
		t.solverFailed++
	case mdo.InvalidInput:
		t.invalid++
	case mdo.NotFailed:
		t.unclassified++
		t.other++
	default:
		t.other++
	}
	t.reasons[shortReason(ev.Err)]++
}

// shortReason cuts a failure message to its kind for the tally.
func shortReason(s string) string {
	if i := strings.Index(s, " = "); i > 0 && i < 80 {
		return s[:i]
	}
	if len(s) > 70 {
		return s[:70]
	}
	return s
}

// runCase evaluates a case's points with one solver through an Evaluator
// with the given number of workers and returns the evaluations in the
// order of the points.
func runCase(ctx context.Context, c convCase, m mdo.Method, workers int) ([]*mdo.Evaluation, error) {
	return runCaseAfterPickUp(ctx, c, m, workers, nil)
}

// runCaseAfterPickUp is runCase on an Evaluator that first picks up the
// evaluations prev (of an earlier session of the same run).
func runCaseAfterPickUp(ctx context.Context, c convCase, m mdo.Method, workers int, prev []*mdo.Evaluation) ([]*mdo.Evaluation, error) {
	sys, err := c.scen.NewSystem()
	if err != nil {
		return nil, err
	}
	set := mdo.DefaultSolver()
	set.Method = m
	if err := sys.SetSolver(set); err != nil {
		return nil, err
	}
	fixed := copyMap(c.scen.Parameters)
	for k, v := range c.fixed {
		fixed[k] = v
	}
	st := &mdo.Study{Name: c.label, System: sys, Objectives: []mdo.Objective{mdo.Minimize("mass.takeoff")}, Fixed: fixed, Workers: workers, CacheLimit: -1}
	for _, b := range c.box {
		st.Design = append(st.Design, mdo.Continuous(b.name, b.lower, b.hi))
	}
	ev, err := st.NewEvaluator()
	if err != nil {
		return nil, err
	}
	ev.PickUp(prev)
	xs := make([][]float64, len(c.points))
	for i, p := range c.points {
		xs[i] = ev.ToUnit(p)
	}
	return ev.Evaluate(ctx, xs)
}

// branchJumps counts the jumps between solution branches on a grid: a
// pair of neighbouring converged points (one step of aspect ratio or area
// apart), both of whose adjacent pairs on the same grid line converged
// too, whose take-off masses differ by more than 5 % and by more than
// three times the difference of each adjacent pair — a step, where a
// steep but smooth trend changes by similar amounts from pair to pair.
func branchJumps(c convCase, evs []*mdo.Evaluation, mto int) int {
	if c.grid[0] == 0 {
		return 0
	}
	n := c.grid[0]
	jumps := 0
	for s := 0; s < 2; s++ {
		for line := 0; line < n; line++ {
			for _, byRow := range []bool{false, true} {
				m := make([]float64, n)
				for k := 0; k < n; k++ {
					i, j := line, k
					if byRow {
						i, j = k, line
					}
					ev := evs[s*n*n+i*n+j]
					m[k] = math.NaN()
					if ev.Converged {
						m[k] = ev.Outputs[mto]
					}
				}
				d := func(k int) float64 { // |m[k+1] − m[k]|, NaN outside the line
					if k < 0 || k+1 >= n {
						return math.NaN()
					}
					return math.Abs(m[k+1] - m[k])
				}
				for k := 0; k+1 < n; k++ {
					dk := d(k)
					if !(dk > 0.05*math.Min(m[k], m[k+1])) {
						continue
					}
					prev, next := d(k-1), d(k+1)
					if math.IsNaN(prev) || math.IsNaN(next) {
						// judged only between closing points: next to a
						// point that does not close the mass grows steeply
						// along its one branch
						continue
					}
					if dk > 3*prev && dk > 3*next {
						jumps++
					}
				}
			}
		}
	}
	return jumps
}

// convTable runs every case under every solver and returns the table and
// the tallies per solver.
func convTable(ctx context.Context, cases []convCase) (string, map[mdo.Method]*convTally, error) {
	var b strings.Builder
	fmt.Fprintf(&b, "%-34s %-20s %6s %9s %11s %13s %13s %11s %10s %10s %11s %6s\n", "case", "solver", "points", "converged", "not closing", "solver failed", "invalid input", "disc failed", "mean iter", "mean calls", "mean time", "jumps")
	total := map[mdo.Method]*convTally{}
	reasons := map[string]int{}
	for _, m := range mdo.Methods() {
		total[m] = &convTally{}
		for _, c := range cases {
			evs, err := runCase(ctx, c, m, 1)
			if err != nil {
				return "", nil, err
			}
			var t convTally
			for _, ev := range evs {
				t.add(ev)
			}
			sys, _ := c.scen.NewSystem()
			t.jumps = branchJumps(c, evs, sys.Index("mass.takeoff"))
			b.WriteString(t.row(c.label, m.String()))
			tt := total[m]
			tt.points += t.points
			tt.converged += t.converged
			tt.notClosing += t.notClosing
			tt.solverFailed += t.solverFailed
			tt.other += t.other
			tt.invalid += t.invalid
			tt.unclassified += t.unclassified
			tt.iterations += t.iterations
			tt.calls += t.calls
			tt.wall += t.wall
			tt.jumps += t.jumps
			for r, k := range t.reasons {
				reasons[m.String()+": "+r] += k
			}
		}
	}
	for _, m := range mdo.Methods() {
		b.WriteString(total[m].row("ALL", m.String()))
	}
	keys := make([]string, 0, len(reasons))
	for k := range reasons {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	b.WriteString("failure reasons:\n")
	for _, k := range keys {
		fmt.Fprintf(&b, "  %5d  %s\n", reasons[k], k)
	}
	return b.String(), total, nil
}

// row formats one line of the table.
func (t *convTally) row(label, solver string) string {
	share := func(k int) string { return fmt.Sprintf("%.1f%%", 100*float64(k)/float64(t.points)) }
	iter, calls, wall := 0.0, 0.0, time.Duration(0)
	if t.converged > 0 {
		iter = float64(t.iterations) / float64(t.converged)
		calls = float64(t.calls) / float64(t.converged)
		wall = t.wall / time.Duration(t.converged)
	}
	return fmt.Sprintf("%-34s %-20s %6d %9s %11s %13s %13s %11s %10.1f %10.1f %11s %6d\n", label, solver, t.points, share(t.converged), share(t.notClosing), share(t.solverFailed), share(t.invalid), share(t.other), iter, calls, wall.Round(100*time.Nanosecond), t.jumps)
}

// TestConvergence runs a small version of the benchmark (3 × 3 grids, 12
// hypercube points per study box), prints its table with -v, and asserts
// that every failure is classified, that at most 1 % of the points are
// solver failures and that every solver converges the same points.
func TestConvergence(t *testing.T) {
	table, total, err := convTable(context.Background(), convergenceCases(3, 12))
	if err != nil {
		t.Fatal(err)
	}
	t.Log("\n" + table)
	for _, m := range mdo.Methods() {
		tt := total[m]
		if tt.unclassified > 0 {
			t.Errorf("%s: %d failed evaluations carry no failure class", m, tt.unclassified)
		}
		// at most 1 % of the points may be solver failures
		if 100*tt.solverFailed > tt.points {
			t.Errorf("%s: %d of %d points are solver failures", m, tt.solverFailed, tt.points)
		}
		// every solver converges the same points (one branch, whatever
		// the method)
		if g := total[mdo.GaussSeidel]; tt.converged != g.converged {
			t.Errorf("%s: %d points converged, by Gauss–Seidel %d", m, tt.converged, g.converged)
		}
	}
}

// BenchmarkConvergence runs the full sweep (11 × 11 grids at two sweeps
// for each aircraft, 200 hypercube points per example study box) once per
// iteration and prints the table.
func BenchmarkConvergence(b *testing.B) {
	cases := convergenceCases(11, 200)
	for i := 0; i < b.N; i++ {
		table, _, err := convTable(context.Background(), cases)
		if err != nil {
			b.Fatal(err)
		}
		if i == 0 {
			fmt.Print(table)
		}
	}
}

// TestConvergedStateIndependentOfStart analyses every point of small
// grids from three initial guesses — the variables' defaults, the
// converged reference state of the scenario and that state perturbed by
// ±10 % — and asserts that the converged coupling states agree within
// 1e-8 relative (of the value, or of the variable's scale near zero).
func TestConvergedStateIndependentOfStart(t *testing.T) {
	ctx := context.Background()
	for _, c := range convergenceCases(5, 0)[:5] {
		w, err := c.scen.Workspace()
		if err != nil {
			t.Fatal(err)
		}
		w.Reset()
		for k, v := range c.scen.Parameters {
			if err := w.Set(k, v); err != nil {
				t.Fatal(err)
			}
		}
		if err := w.Analyze(ctx); err != nil {
			t.Fatalf("%s: the reference point: %v", c.label, err)
		}
		sys := w.System()
		coupling := sys.CouplingVars()
		ref := append([]float64(nil), w.Values()...)
		if err := w.SetReference(ref); err != nil {
			t.Fatal(err)
		}
		starts := map[string]func(i int, v mdo.Var) float64{
			"defaults":  func(i int, v mdo.Var) float64 { return v.Default },
			"reference": func(i int, v mdo.Var) float64 { return ref[sys.Index(v.Name)] },
			"perturbed": func(i int, v mdo.Var) float64 { return ref[sys.Index(v.Name)] * (1 + 0.1*float64(1-2*(i%2))) },
		}
		closing := 0
		for pi, p := range c.points {
			var states [][]float64
			for _, name := range []string{"defaults", "reference", "perturbed"} {
				for i, v := range coupling {
					if err := w.SetGuess(v.Name, starts[name](i, v)); err != nil {
						t.Fatal(err)
					}
				}
				for k, b := range c.box {
					if err := w.Set(b.name, p[k]); err != nil {
						t.Fatal(err)
					}
				}
				if err := w.Analyze(ctx); err != nil {
					states = append(states, nil)
					continue
				}
				st := make([]float64, len(coupling))
				for i, v := range coupling {
					st[i] = w.Values()[sys.Index(v.Name)]
				}
				states = append(states, st)
			}
			if (states[0] == nil) != (states[1] == nil) || (states[0] == nil) != (states[2] == nil) {
				t.Errorf("%s point %d %v: converged from some starts only (%v %v %v)", c.label, pi, p, states[0] != nil, states[1] != nil, states[2] != nil)
				continue
			}
			if states[0] == nil {
				continue
			}
			closing++
			for s := 1; s < 3; s++ {
				for i, v := range coupling {
					a, b := states[0][i], states[s][i]
					if d := math.Abs(a - b); d > 1e-8*math.Max(math.Abs(a), math.Max(v.Scale, math.Max(math.Abs(v.Default), 1))) {
						t.Errorf("%s point %d %v: %s = %.12g from the defaults, %.12g from start %d", c.label, pi, p, v.Name, a, b, s)
					}
				}
			}
		}
		if closing == 0 {
			t.Errorf("%s: no grid point closes", c.label)
		}
	}
}

// sameAnswer reports the first field in which two evaluations of one point
// differ bit for bit, ignoring the timing, the ID and how the point was
// answered.
func sameAnswer(a, b *mdo.Evaluation) string {
	same := func(x, y []float64) bool {
		if len(x) != len(y) {
			return false
		}
		for k := range x {
			if math.Float64bits(x[k]) != math.Float64bits(y[k]) {
				return false
			}
		}
		return true
	}
	switch {
	case !same(a.Design, b.Design), !same(a.X, b.X):
		return "design"
	case a.Err != b.Err, a.Failure != b.Failure, a.Converged != b.Converged:
		return "failure"
	case a.Path != b.Path:
		return "path"
	case a.CouplingIterations != b.CouplingIterations, a.DisciplineCalls != b.DisciplineCalls:
		return "work"
	case !same(a.Objectives, b.Objectives), !same(a.F, b.F), !same(a.Constraints, b.Constraints), !same(a.G, b.G), !same(a.Margins, b.Margins):
		return "objectives or constraints"
	case !same(a.Outputs, b.Outputs), math.Float64bits(a.Violation) != math.Float64bits(b.Violation), a.Feasible != b.Feasible:
		return "outputs"
	}
	return ""
}

// TestConvergenceIndependentOfOrder evaluates the small benchmark's points
// with one worker in order, with two workers in reverse order, and after
// picking up the first half from the first run: every point, fallbacks
// included, gets the same answer bit for bit.
func TestConvergenceIndependentOfOrder(t *testing.T) {
	ctx := context.Background()
	for _, c := range convergenceCases(3, 12) {
		a, err := runCase(ctx, c, mdo.AitkenGaussSeidel, 1)
		if err != nil {
			t.Fatal(err)
		}
		rev := c
		rev.points = nil
		for i := len(c.points) - 1; i >= 0; i-- {
			rev.points = append(rev.points, c.points[i])
		}
		b, err := runCase(ctx, rev, mdo.AitkenGaussSeidel, 2)
		if err != nil {
			t.Fatal(err)
		}
		for i := range a {
			if d := sameAnswer(a[i], b[len(b)-1-i]); d != "" {
				t.Errorf("%s point %d: %s differs between 1 worker in order and 2 in reverse", c.label, i, d)
			}
		}
		half := len(c.points) / 2
		p, err := runCaseAfterPickUp(ctx, c, mdo.AitkenGaussSeidel, 2, a[:half])
		if err != nil {
			t.Fatal(err)
		}
		for i := range a {
			if d := sameAnswer(a[i], p[i]); d != "" {
				t.Errorf("%s point %d: %s differs after a pick-up", c.label, i, d)
			}
		}
	}
}

// TestNewtonFromTheDefaultStart: Newton alone (no fallback) converges
// every demonstration aircraft from the variables' defaults, on the same
// state as Gauss–Seidel.
func TestNewtonFromTheDefaultStart(t *testing.T) {
	for _, sc := range []Scenario{Swiftlet(), SwiftletForwardSwept(), SwiftletTrijet(), Kestrel(), Condor()} {
		var mto [2]float64
		for k, m := range []mdo.Method{mdo.GaussSeidel, mdo.Newton} {
			sys, err := sc.NewSystem()
			if err != nil {
				t.Fatal(err)
			}
			if err := sys.SetSolver(mdo.SolverSettings{Method: m, NoFallback: true}); err != nil {
				t.Fatal(err)
			}
			w := sys.NewWorkspace()
			for _, name := range sortedKeys(sc.Parameters) {
				if err := w.Set(name, sc.Parameters[name]); err != nil {
					t.Fatal(err)
				}
			}
			if err := w.Analyze(context.Background()); err != nil {
				t.Fatalf("%s, %s: %v", sc.Name, m, err)
			}
			mto[k] = w.Values()[sys.Index("mass.takeoff")]
		}
		if math.Abs(mto[0]-mto[1]) > 1e-8*mto[0] {
			t.Errorf("%s: take-off mass %.10g by Gauss–Seidel, %.10g by Newton", sc.Name, mto[0], mto[1])
		}
	}
}
