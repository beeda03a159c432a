package optimizers

import (
	"fmt"
	"math"
	"math/rand"
)

// Evolution is the settings block that the population-based methods (GA,
// DifferentialEvolution, ParticleSwarm and NSGA2) embed. Zero values take
// the defaults.
//
// A run that has found no feasible point stops with mdo.StopStalled when
// its least violation has not fallen by a thousandth over a fifth of its
// Generations (at least 20), counted once the ε level of GA and
// ParticleSwarm has fallen to 0; Result.StopDetail names the constraint
// most violated.
type Evolution struct {
	// Population is the number of individuals (agents, particles); its
	// default depends on the method and the number of variables (see the
	// method). At most 100 000: each individual and each offspring holds
	// its point and an evaluation with every output of the system (about
	// 2 kB for 250 variables), 0.4 GB at the limit.
	Population int
	// Generations after the first population; default 200 (100 for
	// ParticleSwarm, and for GA without equality constraints). Without
	// MaxEvaluations, Population × (Generations + 1) must be at most 10⁹
	// (the smallest population of the method counting for a default
	// Population): a longer run cannot end in a working day and its
	// record would take hundreds of gigabytes.
	Generations int
	// MaxEvaluations caps the evaluations: analyses, plus points picked
	// up from the store of an earlier session; repeats answered from the
	// cache cost nothing (see mdo.EvalCounters). 0: no cap besides
	// Generations. A generation that would pass it is not run.
	MaxEvaluations int
}

// validate checks the block; minPopulation is the method's smallest
// population.
func (b Evolution) validate(method string, minPopulation int) error {
	var planned error
	if pop := max(b.Population, minPopulation); b.MaxEvaluations == 0 && b.Generations > 0 &&
		float64(pop)*(float64(b.Generations)+1) > maxPlannedEvaluations {
		who := fmt.Sprintf("Population = %d", b.Population)
		if b.Population == 0 {
			who = fmt.Sprintf("the smallest population of %d", pop)
		}
		planned = settingError(method, "Generations", b.Generations, fmt.Sprintf(
			"with %s plans %g evaluations; Population × (Generations + 1) must be at most %g without MaxEvaluations: a longer run cannot end in a working day and its record would take hundreds of gigabytes (set MaxEvaluations to cap it)",
			who, float64(pop)*(float64(b.Generations)+1), float64(maxPlannedEvaluations)))
	}
	return firstError(
		checkInt(method, "Population", b.Population, minPopulation),
		checkMax(method, "Population", b.Population, maxPopulation, "each individual and each offspring holds its point and an evaluation with every output of the system (about 2 kB for 250 variables), 0.4 GB at the limit"),
		checkInt(method, "Generations", b.Generations, 1),
		checkInt(method, "MaxEvaluations", b.MaxEvaluations, 1),
		planned,
	)
}

// EqualityHandling is the settings block of the equality-constraint
// handling that the single-objective evolutionary methods (GA,
// DifferentialEvolution, ParticleSwarm) embed: the gradient-based mutation
// and the ε-level comparison of Takahama & Sakai (2006). It acts in a
// study with an equality constraint; the ε level of GA and ParticleSwarm
// also acts in a study with inequality constraints only, and so does
// their gradient-based mutation when every design variable is
// continuous. Zero values take the defaults.
type EqualityHandling struct {
	// GradientRate is the probability that an infeasible offspring gets
	// the gradient-based mutation (up to 3 Newton steps on its constraint
	// residuals, the Jacobian by forward differences, which GA and
	// ParticleSwarm take once and update by Broyden's formula when there
	// is no equality constraint; then the GA's count in its budget);
	// default 0.05, negative for none.
	GradientRate float64
	// Relax is the fraction of the generations during which constraints
	// are relaxed by the ε-level comparison; default 0.5, negative for
	// Deb's rules throughout.
	Relax float64
}

// validate checks the block.
func (h EqualityHandling) validate(method string) error {
	if h.GradientRate > 1 || math.IsNaN(h.GradientRate) {
		return settingError(method, "GradientRate", h.GradientRate, "must be at most 1 (0 means the default 0.05, negative means none)")
	}
	if h.Relax > 1 || math.IsNaN(h.Relax) {
		return settingError(method, "Relax", h.Relax, "must be at most 1 (0 means the default 0.5, negative means no relaxation)")
	}
	return nil
}

// gradientRate returns the gradient-mutation rate: 0.05 by default, none
// when negative.
func (h EqualityHandling) gradientRate() float64 { return defaultOrNone(h.GradientRate, 0.05) }

// relaxFraction returns the ε-level fraction of the run: 0.5 by default,
// none when negative.
func (h EqualityHandling) relaxFraction() float64 { return defaultOrNone(h.Relax, 0.5) }

// defaultOrNone returns v, def when v is 0, and 0 (none) when v is
// negative.
func defaultOrNone(v, def float64) float64 {
	switch {
	case v == 0:
		return def
	case v < 0:
		return 0
	}
	return v
}

// Variation is the settings block of the real-coded variation operators,
// simulated binary crossover and polynomial mutation (Deb & Agrawal), that
// GA and NSGA2 embed. Zero values take the defaults.
type Variation struct {
	// CrossoverRate is the probability that a pair is crossed; default 0.9.
	CrossoverRate float64
	// CrossoverIndex is the SBX distribution index ηc; default 15.
	CrossoverIndex float64
	// MutationRate is the per-coordinate mutation probability; default
	// 1/(number of variables).
	MutationRate float64
	// MutationIndex is the polynomial-mutation distribution index ηm;
	// default 20.
	MutationIndex float64
}

// validate checks the block.
func (v Variation) validate(method string) error {
	return firstError(
		checkRange(method, "CrossoverRate", v.CrossoverRate, 0, 1, false),
		checkRange(method, "CrossoverIndex", v.CrossoverIndex, 0, 1000, true),
		checkRange(method, "MutationRate", v.MutationRate, 0, 1, false),
		checkRange(method, "MutationIndex", v.MutationIndex, 0, 1000, true),
	)
}

// variation is a Variation with its defaults resolved.
type variation struct{ pc, etaC, pm, etaM float64 }

// resolved returns the operators' parameters for dim variables.
func (v Variation) resolved(dim int) variation {
	return variation{pc: or(v.CrossoverRate, 0.9), etaC: or(v.CrossoverIndex, 15),
		pm: or(v.MutationRate, 1/float64(dim)), etaM: or(v.MutationIndex, 20)}
}

// pair crosses two children with probability pc and mutates both, in
// place.
func (v variation) pair(c1, c2 []float64, rng *rand.Rand) {
	if rng.Float64() < v.pc {
		sbx(c1, c2, v.etaC, rng)
	}
	polynomialMutation(c1, v.pm, v.etaM, rng)
	polynomialMutation(c2, v.pm, v.etaM, rng)
}
