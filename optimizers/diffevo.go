package optimizers

import (
	"context"
	"math/rand"

	"couplet/mdo"
)

// DifferentialEvolution is DE/rand/1/bin (Storn & Price, 1997) on eaopt's
// engine, generation by generation: each target gets a trial vector
// a + F·(b − c) crossed binomially with it, repaired into the unit box
// (eaopt's own DiffEvo lets mutants leave the box and evaluates them one
// at a time), and the whole generation is evaluated as one batch; a trial
// replaces its target when it is at least as good by Deb's feasibility
// rules. Integer design variables are searched as continuous coordinates
// that the Evaluator rounds. A trial vector that repeats a point the run
// has asked for is moved to a new one first, by the rule of GA. Zero
// values take the defaults.
type DifferentialEvolution struct {
	// Evolution: Population is the number of agents, default 10 per
	// variable, at least 20 and at most 100.
	Evolution
	EqualityHandling
	// Weight is the differential weight F; default 0.5.
	Weight float64
	// CrossoverRate is the binomial crossover rate CR; default 0.9.
	CrossoverRate float64
	// Repair brings trial vectors back into the box; default Clip.
	Repair Repair
}

// Name implements Optimizer.
func (DifferentialEvolution) Name() string { return "differential evolution" }

// validate checks the settings.
func (o DifferentialEvolution) validate() error {
	const m = "DifferentialEvolution"
	return firstError(
		o.Evolution.validate(m, 4),
		o.EqualityHandling.validate(m),
		checkRange(m, "Weight", o.Weight, 0, 2, true),
		checkRange(m, "CrossoverRate", o.CrossoverRate, 0, 1, false),
		o.Repair.validate(m),
	)
}

// blocks implements evolutionary.
func (o DifferentialEvolution) blocks() (Evolution, EqualityHandling) {
	return o.Evolution, o.EqualityHandling
}

// Minimize implements Optimizer.
func (o DifferentialEvolution) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	e, err := newEngine(ctx, s, o, 2, false)
	if err != nil {
		return nil, err
	}
	r, dim := e.r, e.dim
	n := or(o.Population, defaultPopulation(dim))
	f := or(o.Weight, 0.5)
	cr := or(o.CrossoverRate, 0.9)
	e.initial = func(rng *rand.Rand) *member { return e.newMember(uniformPoint(dim, rng)) }
	e.generation = func(pop []*member, rng *rand.Rand) ([]*member, error) {
		trials := make([]*member, n)
		for i, t := range pop {
			a, b, c := distinct3(n, i, rng)
			jr := rng.Intn(dim)
			x := append([]float64(nil), t.x...)
			for k := range x {
				if k == jr || rng.Float64() < cr {
					x[k] = pop[a].x[k] + f*(pop[b].x[k]-pop[c].x[k])
				}
			}
			o.Repair.repairAll(x)
			trials[i] = e.newMember(x)
		}
		e.freshen(trials)
		if err := e.evaluateAll(trials); err != nil {
			return nil, err
		}
		if err := e.grad.apply(e, trials, rng, -1); err != nil {
			return nil, err
		}
		next := make([]*member, n)
		for i, t := range pop {
			next[i] = t
			if e.notWorse(trials[i].ev, t.ev) {
				next[i] = trials[i]
			}
		}
		e.rank(next)
		return next, nil
	}
	stop, err := e.evolve(n, or(o.Generations, 200))
	return r.finish(stop, err)
}

// distinct3 draws three distinct indices in [0, n), all different from i.
func distinct3(n, i int, rng *rand.Rand) (int, int, int) {
	pick := func(not ...int) int {
		for {
			j := rng.Intn(n)
			ok := true
			for _, x := range not {
				if j == x {
					ok = false
					break
				}
			}
			if ok {
				return j
			}
		}
	}
	a := pick(i)
	b := pick(i, a)
	c := pick(i, a, b)
	return a, b, c
}
