package optimizers

import (
	"context"
	"fmt"
	"math/rand"

	"github.com/MaxHalford/eaopt"

	"couplet/mdo"
)

// GA is a real-coded genetic algorithm on eaopt's engine: tournament
// selection (eaopt's SelTournament on the Deb rank), simulated binary
// crossover and polynomial mutation in the unit box (Deb & Agrawal), and
// (μ + λ) survival by Deb's feasibility rules, so the best point is never
// lost. Integer design variables are searched as continuous coordinates
// that the Evaluator rounds. Zero values take the defaults.
//
// Only new points are analysed (the rule of every evolutionary method
// here, NSGA2 included): an offspring whose physical point (integers
// rounded) the run has asked for before, in an earlier generation or
// earlier in its own, is moved by a polynomial mutation of one coordinate
// drawn at random, an integer coordinate by at least one whole step, until
// it is new (at most 16 moves, then at most 16 uniform draws in the box;
// only a nearly exhausted integer space keeps a repeat, which costs
// nothing). The moves draw from a random stream of their own, so a run
// that would ask for no repeat is unchanged by the rule.
//
// In a constrained study the GA compares by the ε level of Takahama &
// Sakai during the first half of its generations, inequalities included
// (see EqualityHandling.Relax), and gives the gradient-based mutation to
// a twentieth of its infeasible offspring, inequalities included when
// every design variable is continuous (EqualityHandling.GradientRate;
// each costs at most n + 3 analyses for n design variables): with it the
// GA reaches a feasible set bounded by active inequalities, which it
// otherwise hardly met (a regional jet whose take-off field limit is
// shorter than the field its engines are sized for: 5.0 % above the
// optimum, now 0.4 %). Without equality constraints the repairs count
// in the budget: a generation makes as many offspring fewer as the
// repairs of the generation before analysed, repairs no more offspring
// than half a population pays for at their worst cost, and the last
// generation repairs none, so that a run analyses Population ×
// (Generations + 1) points, as one without repairs does (the business
// jet's GA run of 100 for 99 generations: 10 000 analyses, 14 753 when
// the repairs came on top, the best point 35 168.4 kg against
// 35 168.5 kg). With an equality constraint, whose thin feasible set the
// population follows only by the repairs, they come on top (each up to
// 3·(n + 1) analyses; counted in the budget, the GA ended Sellar IDF
// 2.2e-3 above its optimum in 20 100 analyses instead of reaching it
// within 1e-3 in 12 329).
// Without equality constraints its defaults
// favour a broad search: 40 individuals per variable (at least 80, at most
// 400) for 100 generations, the budget of 20 per variable for 200, and a
// mutation rate of 2/(number of variables), at most 1. With them the
// default GA reaches the welded beam's and the pressure vessel's best
// known costs within 1 % (seeds 1–20; EVALUATIONS.md); with the former
// defaults and Deb's rules it ended up to 45 % and 23 % above them. With
// an equality constraint (IDF consistency among them), where the
// population must close in on a thin feasible set, the defaults stay 20
// per variable (at least 40, at most 200) for 200 generations with a
// mutation rate of 1/(number of variables): the broad ones ended Sellar
// IDF 0.8 % above its optimum.
type GA struct {
	// Evolution: Population is the number of individuals; its default
	// and that of Generations are given above.
	Evolution
	EqualityHandling
	// Tournament is the number of contestants per selection; default 2.
	Tournament int
	// Variation: MutationRate's default is given above.
	Variation
}

// Name implements Optimizer.
func (GA) Name() string { return "GA" }

// validate checks the settings.
func (o GA) validate() error {
	const m = "GA"
	var contest error
	if o.Tournament > 0 && o.Population > 0 && o.Tournament > o.Population-1 {
		contest = settingError(m, "Tournament", o.Tournament, "must be less than Population")
	}
	return firstError(
		o.Evolution.validate(m, 4),
		o.EqualityHandling.validate(m),
		checkInt(m, "Tournament", o.Tournament, 1),
		contest,
		o.Variation.validate(m),
	)
}

// defaultPopulation is 10 per variable within [20, 100].
func defaultPopulation(dim int) int { return min(max(10*dim, 20), 100) }

// blocks implements evolutionary.
func (o GA) blocks() (Evolution, EqualityHandling) { return o.Evolution, o.EqualityHandling }

// gaSizes are the GA's default population, generations and mutation
// rate for dim variables, broad without equality constraints.
func gaSizes(dim int, broad bool) (population, generations int, mutation float64) {
	if broad {
		return min(max(40*dim, 80), 400), 100, min(1, 2/float64(dim))
	}
	return min(max(20*dim, 40), 200), 200, 1 / float64(dim)
}

// checkStudy checks, before the run begins, the Tournament that the
// default population of the study bounds.
func (o GA) checkStudy(ev *mdo.Evaluator) error {
	n, _, _ := gaSizes(ev.Dim(), !hasEquality(ev.Constraints()))
	if n = or(o.Population, n); o.Tournament > n-1 {
		return settingError("GA", "Tournament", o.Tournament, fmt.Sprintf("must be less than Population (%d, the default for this study)", n))
	}
	return nil
}

// Minimize implements Optimizer.
func (o GA) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	e, err := newEngine(ctx, s, o, 1, true)
	if err != nil {
		return nil, err
	}
	r, dim := e.r, e.dim
	broad := !hasEquality(r.ev.Constraints())
	n, gens, pm := gaSizes(dim, broad)
	n = or(o.Population, n)
	k := or(o.Tournament, 2)
	if k > n-1 {
		k = n - 1
	}
	vary := o.Variation.resolved(dim)
	if o.MutationRate == 0 {
		vary.pm = pm
	}
	e.initial = func(rng *rand.Rand) *member { return e.newMember(uniformPoint(dim, rng)) }
	sel := eaopt.SelTournament{NContestants: uint(k)}
	generations := or(o.Generations, gens)
	// owed is what the last generation's repair evaluated (counted in
	// evaluations, not analyses, so that a run picked up from its store,
	// whose repairs are answered from it, leaves out as many): without
	// equality constraints this generation makes that many offspring
	// fewer
	owed := 0
	e.generation = func(pop []*member, rng *rand.Rand) ([]*member, error) {
		lambda, budget := n, -1
		if broad {
			lambda, budget = n-owed, n/2
			if e.gen >= generations {
				// no generation after it to pay for a repair
				budget = 0
			}
		}
		inds := make(eaopt.Individuals, len(pop))
		for i, m := range pop {
			inds[i] = eaopt.Individual{Genome: m, Fitness: float64(m.rank), Evaluated: true}
		}
		off := make([]*member, 0, lambda)
		for len(off) < lambda {
			picked, _, err := sel.Apply(2, inds, rng)
			if err != nil {
				return nil, err
			}
			c1 := append([]float64(nil), picked[0].Genome.(*member).x...)
			c2 := append([]float64(nil), picked[1].Genome.(*member).x...)
			vary.pair(c1, c2, rng)
			off = append(off, e.newMember(c1))
			if len(off) < lambda {
				off = append(off, e.newMember(c2))
			}
		}
		e.freshen(off)
		if err := e.evaluateAll(off); err != nil {
			return nil, err
		}
		before := r.ev.Counters().Evaluations
		if err := e.grad.apply(e, off, rng, budget); err != nil {
			return nil, err
		}
		owed = r.ev.Counters().Evaluations - before
		return e.survivors(pop, off, n), nil
	}
	stop, err := e.evolve(n, generations)
	return r.finish(stop, err)
}
