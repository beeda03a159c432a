package optimizers

import (
	"context"
	"testing"

	"couplet/mdo"
)

// A budget counts evaluations (analyses, plus points picked up from an
// earlier session), never repeats: a run stopped by its budget has spent
// at most MaxEvaluations analyses however many repeats it asked for.
func TestBudgetCountsEvaluations(t *testing.T) {
	tests := []struct {
		name string
		opt  Optimizer
		max  int
		// small: Sellar on the 27 integer points x, z1, z2 ∈ {1, 2, 3},
		// fewer than the budget: the GA analyses each once and asks for
		// the rest as repeats, which cost nothing, so the budget is
		// never reached.
		small bool
	}{
		{"Nelder-Mead", NelderMead{MaxEvaluations: 300}, 300, false},
		{"GA", GA{Evolution: Evolution{Population: 20, MaxEvaluations: 150}}, 150, false},
		{"particle swarm", ParticleSwarm{Evolution: Evolution{Population: 20, MaxEvaluations: 150}}, 150, false},
		{"GA on 27 integer points", GA{Evolution: Evolution{Population: 20, Generations: 20, MaxEvaluations: 150}}, 150, true},
	}
	for _, tc := range tests {
		s, err := SellarMDF()
		if err != nil {
			t.Fatal(err)
		}
		s.Seed = 1
		if tc.small {
			for k := range s.Design {
				s.Design[k].Integer, s.Design[k].Lower, s.Design[k].Upper = true, 1, 3
			}
		}
		res, err := tc.opt.Minimize(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		if tc.small {
			if res.Stop != mdo.StopIterations || res.Evaluations != 27 || res.Evaluations != res.Analyses || res.Evaluations+res.Repeats <= tc.max {
				t.Errorf("%s: %s after %v; want every one of the 27 points analysed once, more than %d asked for, and the run ended by its generations", tc.name, res.Stop, res.EvalCounters, tc.max)
			}
			continue
		}
		if res.Stop != mdo.StopBudget || res.Evaluations > tc.max || res.Evaluations != res.Analyses {
			t.Errorf("%s: %s after %v; want stopped by the budget with at most %d evaluations, all analysed", tc.name, res.Stop, res.EvalCounters, tc.max)
		}
	}
}

// Without equality constraints the particle swarm's gradient-based
// repairs count in its budget, as the GA's do: a generation leaves as
// many particles unmoved and unanalysed as the repairs of the one before
// analysed, and the last generation repairs none, so a run analyses
// Population × (Generations + 1) points. On the welded beam (inequality
// constraints only, every variable continuous) the repairs act: a
// generation that follows one without repairs and repairs itself
// analyses more than the Population, which a run without repairs never
// does. The count does not depend on the number of workers.
func TestSwarmRepairsCountInBudget(t *testing.T) {
	const n, g = 40, 30
	var first *mdo.Result
	for _, workers := range []int{1, 3} {
		s, err := WeldedBeam()
		if err != nil {
			t.Fatal(err)
		}
		s.Seed, s.Workers = 1, workers
		var perGen []int
		last := 0
		s.Progress = func(p mdo.Progress) {
			perGen = append(perGen, p.Evaluations-last)
			last = p.Evaluations
		}
		res, err := ParticleSwarm{Evolution: Evolution{Population: n, Generations: g}}.Minimize(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		if res.Stop != mdo.StopIterations || res.Analyses != n*(g+1) || res.Evaluations != res.Analyses || res.Repeats != 0 {
			t.Errorf("%d workers: %s after %v; want the run ended by its generations with %d × (%d + 1) = %d evaluations, all analysed, no repeat",
				workers, res.Stop, res.EvalCounters, n, g, n*(g+1))
		}
		repaired := 0
		for _, a := range perGen[1:] {
			if a > n {
				repaired++
			}
		}
		if len(perGen) != g+1 || perGen[0] != n || repaired == 0 || perGen[g] > n {
			t.Errorf("%d workers: analyses per generation %v; want %d generations after a first of %d, some with more than %d (repairs), the last with at most %d",
				workers, perGen, g, n, n, n)
		}
		if first == nil {
			first = res
		} else if d := sameResult(first, res); d != "" {
			t.Errorf("%d workers against 1: %s", workers, d)
		}
	}
}

// pickUpRecorder records a run's evaluations and hands back those of an
// earlier session, as a case store opened to pick a run up does.
type pickUpRecorder struct {
	evals, earlier []*mdo.Evaluation
}

func (p *pickUpRecorder) Begin(mdo.RunInfo) error        { return nil }
func (p *pickUpRecorder) Record(e *mdo.Evaluation) error { p.evals = append(p.evals, e); return nil }
func (p *pickUpRecorder) End(*mdo.Result) error          { return nil }
func (p *pickUpRecorder) PickedUp(string, uint64) ([]*mdo.Evaluation, error) {
	return p.earlier, nil
}

// A GA or particle swarm picked up from the store of a run interrupted
// half-way retraces its path although its repairs are answered from the
// store: the offspring or particles a repair leaves out are counted in
// evaluations, not analyses, so every recorded point is asked for again
// and the result is the same. (Counted in analyses, the picked-up swarm
// left out none after its first repairs, picked up 123 of the 620 points
// and ended elsewhere; the GA picked up 160 of 620 and ended at 1.7907
// against 1.9198.)
func TestEvolutionPickedUpRetracesItsRepairs(t *testing.T) {
	evo := Evolution{Population: 40, Generations: 30}
	for _, m := range []Optimizer{GA{Evolution: evo}, ParticleSwarm{Evolution: evo}} {
		run := func(earlier []*mdo.Evaluation) (*mdo.Result, *pickUpRecorder) {
			s, err := WeldedBeam()
			if err != nil {
				t.Fatal(err)
			}
			rec := &pickUpRecorder{earlier: earlier}
			s.Seed, s.Script, s.Recorder = 1, "evolution", rec
			res, err := m.Minimize(context.Background(), s)
			if err != nil {
				t.Fatal(err)
			}
			return res, rec
		}
		full, rec := run(nil)
		if want := evo.Population * (evo.Generations + 1); full.Evaluations != want {
			t.Errorf("%T: %v, want %d evaluations (repairs in the budget)", m, full.EvalCounters, want)
		}
		half := len(rec.evals) / 2
		again, _ := run(rec.evals[:half])
		if again.PickedUp != half || again.Evaluations != full.Evaluations || again.Repeats != 0 {
			t.Errorf("%T picked up: %v; want all %d recorded points picked up and %d evaluations, as the full run's %v", m, again.EvalCounters, half, full.Evaluations, full.EvalCounters)
		}
		if full.Best == nil || again.Best == nil {
			t.Errorf("%T: no best point (full run %v, picked up %v)", m, full.Best != nil, again.Best != nil)
		} else if again.Best.ID != full.Best.ID || again.Objective() != full.Objective() {
			t.Errorf("%T: picked-up run's best is evaluation %d at %.17g, the full run's %d at %.17g", m, again.Best.ID, again.Objective(), full.Best.ID, full.Objective())
		}
	}
}
