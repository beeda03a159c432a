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
