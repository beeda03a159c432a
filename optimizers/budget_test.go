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
		// integer design variables: the GA asks for many repeats
		integer bool
	}{
		{"Nelder-Mead", NelderMead{MaxEvaluations: 300}, 300, false},
		{"GA", GA{Evolution: Evolution{Population: 20, MaxEvaluations: 150}}, 150, false},
		{"particle swarm", ParticleSwarm{Evolution: Evolution{Population: 20, MaxEvaluations: 150}}, 150, false},
		{"GA on integers", GA{Evolution: Evolution{Population: 20, MaxEvaluations: 150}}, 150, true},
	}
	for _, tc := range tests {
		s, err := SellarMDF()
		if err != nil {
			t.Fatal(err)
		}
		s.Seed = 1
		if tc.integer {
			for k := range s.Design {
				s.Design[k].Integer = true
			}
		}
		res, err := tc.opt.Minimize(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		if res.Stop != mdo.StopBudget || res.Evaluations > tc.max || res.Evaluations != res.Analyses {
			t.Errorf("%s: %s after %v; want stopped by the budget with at most %d evaluations, all analysed", tc.name, res.Stop, res.EvalCounters, tc.max)
		}
		if tc.integer && res.Evaluations+res.Repeats <= tc.max {
			t.Errorf("%s: %v; the case should ask for more points than the budget, repeats included", tc.name, res.EvalCounters)
		}
	}
}
