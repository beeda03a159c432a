package optimizers

import (
	"context"
	"math"
	"testing"

	"couplet/mdo"
)

// allOptimizers lists every optimiser with small budgets.
func allOptimizers() []Optimizer {
	return []Optimizer{
		NelderMead{MaxEvaluations: 600},
		CMAES{MaxEvaluations: 600},
		GA{Evolution: Evolution{Population: 20, Generations: 15}},
		DifferentialEvolution{Evolution: Evolution{Population: 20, Generations: 15}},
		ParticleSwarm{Evolution: Evolution{Population: 20, Generations: 15}},
		NSGA2{Evolution: Evolution{Population: 20, Generations: 15}},
		RandomDesign{Samples: 50, BatchSize: 16},
		LatinHypercube{Samples: 50, BatchSize: 16},
		Halton{Samples: 50, BatchSize: 16},
		FullFactorial{Levels: 4, BatchSize: 16},
	}
}

// sameResult reports the first difference between two results.
func sameResult(a, b *mdo.Result) string {
	if a.Stop != b.Stop {
		return "stop " + a.Stop.String() + " vs " + b.Stop.String()
	}
	if a.EvalCounters != b.EvalCounters {
		return "counters differ"
	}
	if (a.Best == nil) != (b.Best == nil) {
		return "best missing"
	}
	if a.Best != nil {
		if a.Best.ID != b.Best.ID {
			return "best ID differs"
		}
		for k := range a.Best.X {
			if math.Float64bits(a.Best.X[k]) != math.Float64bits(b.Best.X[k]) {
				return "best X differs"
			}
		}
		for k := range a.Best.F {
			if math.Float64bits(a.Best.F[k]) != math.Float64bits(b.Best.F[k]) {
				return "best F differs"
			}
		}
	}
	if len(a.History) != len(b.History) {
		return "history length differs"
	}
	for i := range a.History {
		if a.History[i] != b.History[i] {
			return "history differs"
		}
	}
	if len(a.Front) != len(b.Front) {
		return "front size differs"
	}
	for i := range a.Front {
		if a.Front[i].ID != b.Front[i].ID {
			return "front differs"
		}
	}
	return ""
}

// Every random choice flows from the seed: the same seed gives the same
// result, bit for bit, with 1 and with 2 workers (DESIGN.md, core rules).
func TestSameSeedSameResultAnyWorkers(t *testing.T) {
	for _, o := range allOptimizers() {
		t.Run(o.Name(), func(t *testing.T) {
			var res [2]*mdo.Result
			for i, w := range []int{1, 2} {
				s, err := SellarMDF()
				if err != nil {
					t.Fatal(err)
				}
				s.Seed, s.Workers = 7, w
				if res[i], err = o.Minimize(context.Background(), s); err != nil {
					t.Fatal(err)
				}
			}
			if d := sameResult(res[0], res[1]); d != "" {
				t.Errorf("workers 1 and 2 differ: %s", d)
			}
		})
	}
	// under IDF, through the ε-level comparison and the gradient repairs
	for _, o := range []Optimizer{GA{Evolution: Evolution{Population: 20, Generations: 10}}, DifferentialEvolution{Evolution: Evolution{Population: 20, Generations: 10}},
		ParticleSwarm{Evolution: Evolution{Population: 20, Generations: 10}}, CMAES{MaxEvaluations: 800}, NelderMead{MaxEvaluations: 300}} {
		var res [2]*mdo.Result
		for i, w := range []int{1, 2} {
			s, err := SellarIDF()
			if err != nil {
				t.Fatal(err)
			}
			s.Seed, s.Workers = 5, w
			if res[i], err = o.Minimize(context.Background(), s); err != nil {
				t.Fatal(err)
			}
		}
		if d := sameResult(res[0], res[1]); d != "" {
			t.Errorf("%s under IDF, workers 1 and 2 differ: %s", o.Name(), d)
		}
	}
	// and a multi-objective front
	var res [2]*mdo.Result
	for i, w := range []int{1, 2} {
		s, err := ZDT1(6)
		if err != nil {
			t.Fatal(err)
		}
		s.Seed, s.Workers = 3, w
		if res[i], err = (NSGA2{Evolution: Evolution{Population: 24, Generations: 10}}).Minimize(context.Background(), s); err != nil {
			t.Fatal(err)
		}
	}
	if d := sameResult(res[0], res[1]); d != "" {
		t.Errorf("NSGA-II on ZDT1, workers 1 and 2 differ: %s", d)
	}
}

// A different seed changes a stochastic method's path.
func TestSeedMatters(t *testing.T) {
	for _, o := range []Optimizer{GA{Evolution: Evolution{Population: 20, Generations: 5}}, CMAES{MaxEvaluations: 200}, RandomDesign{Samples: 20}} {
		var ids [2]int
		var x [2][]float64
		for i, seed := range []uint64{1, 2} {
			s, err := SellarMDF()
			if err != nil {
				t.Fatal(err)
			}
			s.Seed = seed
			r, err := o.Minimize(context.Background(), s)
			if err != nil {
				t.Fatal(err)
			}
			ids[i], x[i] = r.Best.ID, r.Best.X
		}
		if ids[0] == ids[1] && x[0][0] == x[1][0] && x[0][1] == x[1][1] {
			t.Errorf("%s: seeds 1 and 2 gave the same best point", o.Name())
		}
	}
}
