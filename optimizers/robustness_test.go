package optimizers

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"

	"couplet/mdo"
)

// patchStudy is a test problem of our own whose analysis fails on most of
// its box: minimise f = (x1 − 0.3)² + (x2 − 0.3)² over [0, 1]² subject to
// s = x1 + x2 ≥ 0.8 (optimum f* = 0.02 at (0.4, 0.4), the constraint
// active), where the model holds only for x1, x2 ≤ 0.55: elsewhere (70 %
// of the box) its analysis fails, naming the region. g2 = x1 is a second
// objective for NSGA-II.
func patchStudy() (*mdo.Study, error) {
	s, _, err := funcStudy("patch", []float64{0, 0}, []float64{1, 1}, []string{"f", "s", "f2"},
		func(in, out []float64) error {
			if in[0] > 0.55 || in[1] > 0.55 {
				return fmt.Errorf("x1 = %g, x2 = %g: outside the patch x1, x2 <= 0.55 where the model holds", in[0], in[1])
			}
			out[0] = (in[0]-0.3)*(in[0]-0.3) + (in[1]-0.3)*(in[1]-0.3)
			out[1] = in[0] + in[1]
			out[2] = in[0]
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f")}
	s.Constraints = []mdo.Constraint{mdo.AtLeast("s", 0.8)}
	s.Seed = 3
	return s, nil
}

// patchOptimum is f* of patchStudy.
const patchOptimum = 0.02

// robustnessCase is one method in TestOptimizersOnHostileStudies.
type robustnessCase struct {
	opt Optimizer
	// local: the method starts from the study's baseline design and
	// evaluates it first (Nelder–Mead, Sextant); CMA-ES samples around
	// it and moves it only when none of its first samples analyses
	local bool
	// design: a design of experiments (it evaluates its points, whatever
	// they give, and neither recovers nor stops early)
	design bool
	// multi: the method needs two objectives
	multi bool
	// small: the default budget is a few dozen evaluations, spent
	// before a stall could be judged (ExpectedImprovement, 60)
	small bool
}

// hostileMethods is every method at its defaults.
func hostileMethods() []robustnessCase {
	return []robustnessCase{
		{opt: NelderMead{}, local: true},
		{opt: CMAES{}},
		{opt: Sextant{}, local: true},
		{opt: GA{}},
		{opt: DifferentialEvolution{}},
		{opt: ParticleSwarm{}},
		{opt: NSGA2{}, multi: true},
		{opt: ExpectedImprovement{}, small: true},
		{opt: RandomDesign{}, design: true},
		{opt: LatinHypercube{}, design: true},
		{opt: Halton{}, design: true},
		{opt: FullFactorial{}, design: true},
	}
}

// hostile is one study the methods meet: a start that does not analyse, a
// box where most points fail to analyse, a box with no feasible point.
type hostile struct {
	name string
	edit func(s *mdo.Study)
	// feasible: a feasible optimum f* exists (NaN: none)
	optimum float64
	// words the StopDetail must hold: always, and when the start moved
	// (local methods) or no feasible point was found
	always, moved, infeasible []string
}

// checkHostile runs one method on one hostile study and checks that it
// either recovers (a feasible best point within tol of the optimum) or
// stops early (stalled, before its budget) with a StopDetail that names
// the cause.
func checkHostile(t *testing.T, study func() (*mdo.Study, error), h hostile, c robustnessCase, tol float64) {
	t.Helper()
	s, err := study()
	if err != nil {
		t.Fatal(err)
	}
	h.edit(s)
	if c.multi {
		o := s.Objectives[0]
		s.Objectives = []mdo.Objective{o, mdo.Minimize(s.Constraints[0].Name)}
	}
	res, err := c.opt.Minimize(context.Background(), s)
	if err != nil {
		t.Fatalf("%s: %v", c.opt.Name(), err)
	}
	t.Logf("%v after %v: best %.8g (feasible %v); %s", res.Stop, res.EvalCounters, res.Objective(), res.Feasible(), res.StopDetail)
	want := append([]string(nil), h.always...)
	if c.local {
		want = append(want, h.moved...)
	}
	if 2*res.Failed > res.Evaluations {
		// most evaluations failed: the detail says so and names the
		// commonest cause
		want = append(want, "evaluations failed to analyse", "the commonest cause")
	}
	if !res.Feasible() {
		want = append(want, h.infeasible...)
	}
	for _, w := range want {
		if !strings.Contains(res.StopDetail, w) {
			t.Errorf("StopDetail %q does not say %q", res.StopDetail, w)
		}
	}
	switch {
	case math.IsNaN(h.optimum):
		if res.Feasible() {
			t.Fatalf("a feasible best point where none exists")
		}
		switch {
		case c.design:
			if res.Stop != mdo.StopComplete {
				t.Errorf("stopped %v, want the whole design (%v)", res.Stop, mdo.StopComplete)
			}
		case c.small:
			if res.Stop != mdo.StopBudget {
				t.Errorf("stopped %v, want its small budget spent (%v)", res.Stop, mdo.StopBudget)
			}
		case res.Stop != mdo.StopStalled:
			t.Errorf("stopped %v, want %v: no feasible point and the least violation stalled", res.Stop, mdo.StopStalled)
		}
	case c.design || c.multi:
		// a design is no search, NSGA-II gives a front: either finds a
		// feasible point or says why not (checked above)
	default:
		if !res.Feasible() || res.Objective() > h.optimum+tol*math.Max(1, math.Abs(h.optimum)) {
			t.Errorf("best %.8g (feasible %v), want feasible within %g of %.8g", res.Objective(), res.Feasible(), tol, h.optimum)
		}
	}
}

// Every method, at its defaults, on a study of our own where most of the
// box fails to analyse (patchStudy): from a start that does not analyse,
// and in a box with no feasible point. The searches recover (a start that
// does not analyse is moved, like Sextant's) and reach the optimum within
// 1e-3, or, where no feasible point exists, stop stalled before their
// budget (expected improvement's default budget, 60 evaluations, ends
// first) with a StopDetail that names the constraint most violated, by
// how much, and the commonest cause of failure. Before, Nelder–Mead from
// the start that does not analyse spent its 5 000 evaluations on failed
// analyses and gave no cause, and no method said why it ended
// infeasible.
func TestOptimizersOnHostileStudies(t *testing.T) {
	cases := []hostile{
		{
			name: "start that does not analyse", optimum: patchOptimum,
			edit:  func(s *mdo.Study) { startAt(s, 0.9, 0.9) },
			moved: []string{"does not analyse", "outside the patch", "started from"},
		},
		{
			// 70 % of the box fails to analyse
			name: "most of the box fails to analyse", optimum: patchOptimum,
			edit: func(s *mdo.Study) {},
		},
		{
			name: "no feasible point", optimum: math.NaN(),
			edit: func(s *mdo.Study) {
				c := s.Constraints[0]
				c.Lower = 1.5
				s.Constraints[0] = c
			},
			always:     []string{"no feasible point found in", "s >= 1.5", "violated by", "outside the patch"},
			infeasible: []string{"the constraint most violated at the least violating point"},
		},
	}
	for _, h := range cases {
		for _, c := range hostileMethods() {
			t.Run(h.name+"/"+c.opt.Name(), func(t *testing.T) {
				checkHostile(t, patchStudy, h, c, 1e-3)
			})
		}
	}
}

// aircraftMethods is every method on the business-jet example (the
// designs of experiments that patchStudy checks besides), the searches
// with budgets that keep the test short where their defaults would run
// long (CMA-ES 20 000 evaluations, GA 160 × 100, NSGA-II 100 × 200);
// where no feasible point exists the defaults run, to show the early
// stop.
func aircraftMethods(infeasible bool) []robustnessCase {
	cs := []robustnessCase{
		{opt: NelderMead{}, local: true},
		{opt: CMAES{MaxEvaluations: 6000}},
		{opt: Sextant{}, local: true},
		{opt: GA{Evolution: Evolution{Population: 80, Generations: 60}}},
		{opt: DifferentialEvolution{}},
		{opt: ParticleSwarm{}},
		{opt: NSGA2{Evolution: Evolution{Population: 40, Generations: 40}}, multi: true},
		{opt: LatinHypercube{}, design: true},
		{opt: Halton{}, design: true},
	}
	if infeasible {
		cs[1].opt, cs[3].opt, cs[6].opt = CMAES{}, GA{}, NSGA2{}
	}
	return cs
}

// The business-jet example (invented data) made hostile: every method
// either recovers or stops early and says why, as on patchStudy. The
// reference 35 166.885 kg is the example's optimum (Sextant and
// differential evolution, TestSextantOnPerturbedAircraft). With the
// aspect ratio free up to 6, 126 of 200 points of a Latin hypercube fail
// to analyse (the tail cannot be placed, the take-off mass does not
// close); with the wing area at least 136 m² no design is feasible (the
// long runs of /work/notes/s5-sextant.md end infeasible too). Before,
// Nelder–Mead from the start at 80 % of every range ended after 3 278
// evaluations, every one failed, with no point and no cause, and every
// method ended the infeasible box without saying why, running to its end
// there: Nelder–Mead 2 366 evaluations (10 outer iterations), now 1 138;
// CMA-ES 20 000 (its budget), now 14 760; differential evolution 8 040,
// now 3 920; GA 27 774 and particle swarm 13 420 with their
// gradient-based mutation on inequalities (16 160 and 8 080 before it),
// now 19 222 and 9 262.
func TestOptimizersOnHostileAircraft(t *testing.T) {
	if testing.Short() {
		t.Skip("aircraft optimisations (TestOptimizersOnHostileStudies is the fast check)")
	}
	const reference = 35166.885
	cases := []hostile{
		{
			name: "start at 80 % of every range", optimum: reference,
			edit:  func(s *mdo.Study) { startAt(s, 0.8, 0.8, 0.8, 0.8) },
			moved: []string{"does not analyse", "htail.volume", "started from"},
		},
		{
			name: "aspect ratio up to 6", optimum: reference,
			edit: func(s *mdo.Study) { s.Design[1].Upper = 6 },
		},
		{
			name: "wing area at least 136 m2", optimum: math.NaN(),
			edit:       func(s *mdo.Study) { s.Design[0].Lower = 136 },
			always:     []string{"no feasible point found in"},
			infeasible: []string{"the constraint most violated at the least violating point", "violated by"},
		},
	}
	for _, h := range cases {
		for _, c := range aircraftMethods(math.IsNaN(h.optimum)) {
			t.Run(h.name+"/"+c.opt.Name(), func(t *testing.T) {
				checkHostile(t, businessJetExample, h, c, 2e-3*reference)
			})
		}
	}
}
