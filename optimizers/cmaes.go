package optimizers

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"

	"couplet/mdo"
)

// CMAES is the covariance matrix adaptation evolution strategy of gonum's
// optimize package (CmaEsChol), on the unit box folded by
// x = (1 − cos(π u))/2, with the constraints handled by Penalty
// (augmented Lagrangian by default). Each generation is evaluated as one
// batch on the study's workers; each outer iteration restarts the strategy
// from the best point so far with a smaller step. Its random numbers come
// from the study's seed. When none of its first samples analyses, it
// starts again from the first analysable point toward the centre of the
// box, and while no feasible point has been found it stops stalled as
// NelderMead does. It refuses integer design variables and several
// objectives. Zero values take the defaults.
type CMAES struct {
	// MaxEvaluations caps the evaluations of the whole run (repeats are
	// free, see mdo.EvalCounters); default 20000.
	MaxEvaluations int
	// Population is the number of samples per generation, evaluated as
	// one batch; default max(4 + ⌊3 ln n⌋, 4 (n + 1)) for n variables
	// (gonum's default, 4 + ⌊3 ln n⌋, is slow on curved valleys). At
	// most 100 000: each sample holds its point and an evaluation with
	// every output of the system (about 2 kB for 250 variables).
	Population int
	// StepSize is the initial standard deviation in the folded
	// coordinates (1 spans the box); default 0.3, divided by 3 at each
	// outer iteration down to a tenth.
	StepSize float64
	// Tolerance ends an inner search when the best merit has not
	// improved by more than Tolerance·max(|merit|, 1) over
	// StallGenerations generations; default 1e-9.
	Tolerance float64
	// StallGenerations; default 100 (gonum's CMA-ES can rest on a
	// plateau of its best value for tens of generations before it
	// descends again).
	StallGenerations int
	// GradientSteps is the number of forward-difference Newton steps of
	// the gradient-based repair (Takahama & Sakai's gradient mutation)
	// applied to every infeasible sample of a study with an equality
	// constraint, the sample getting the merit of the repaired point;
	// default 3, negative for none.
	GradientSteps int
	// Penalty sets the constraint handling.
	Penalty Penalty
}

// Name implements Optimizer.
func (CMAES) Name() string { return "CMA-ES" }

// validate checks the settings.
func (o CMAES) validate() error {
	const m = "CMAES"
	return firstError(
		checkInt(m, "MaxEvaluations", o.MaxEvaluations, 1),
		checkInt(m, "Population", o.Population, 2),
		checkMax(m, "Population", o.Population, maxPopulation, "each sample of a generation holds its point and an evaluation with every output of the system (about 2 kB for 250 variables), 0.2 GB at the limit"),
		checkRange(m, "StepSize", o.StepSize, 0, 10, true),
		checkRange(m, "Tolerance", o.Tolerance, 0, 1, true),
		checkInt(m, "StallGenerations", o.StallGenerations, 1),
		o.Penalty.validate(m),
	)
}

// Minimize implements Optimizer.
func (o CMAES) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	if err := o.validate(); err != nil {
		return nil, err
	}
	r, err := beginLocal(ctx, s, o.Name(), o, nil)
	if err != nil {
		return nil, err
	}
	r.maxEvals = or(o.MaxEvaluations, 20000)
	dim := r.ev.Dim()
	pop := o.Population
	if pop == 0 {
		pop = max(4+int(3*math.Log(float64(dim))), 4*(dim+1))
	}
	tol := or(o.Tolerance, 1e-9)
	stall := or(o.StallGenerations, 100)
	step := or(o.StepSize, 0.3)
	seed := r.ev.Seed()
	var repair *gradientRepair
	if o.GradientSteps >= 0 {
		if repair = newGradientRepair(1, r.ev.Constraints(), false); repair != nil {
			repair.steps = or(o.GradientSteps, 3)
		}
	}
	inner := func(x0 []float64, m *merit, outer int) (*mdo.Evaluation, mdo.StopReason, error) {
		sigma := math.Max(step*math.Pow(1.0/3, float64(outer)), step/10)
		// gonum samples from N(mean, C) with C the Cholesky factor's
		// matrix, I by default; the step enters through C = σ² I.
		var chol mat.Cholesky
		if !chol.Factorize(mat.NewDiagDense(dim, fill(dim, sigma*sigma))) {
			return nil, mdo.NotStopped, fmt.Errorf("optimizers: CMAES: step %g gives no covariance", sigma)
		}
		cma := &optimize.CmaEsChol{
			InitStepSize: sigma,
			InitCholesky: &chol,
			Population:   pop,
			Src:          rand.NewPCG(seed, mix(seed, uint64(outer)+1000)),
		}
		return gonumInner(r, cma, pop, x0, m, tol, stall, repair)
	}
	stop, err := outerLoop(r, o.Penalty, r.ev.Start(), inner)
	return r.finish(stop, err)
}

// fill returns n copies of v.
func fill(n int, v float64) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = v
	}
	return out
}
