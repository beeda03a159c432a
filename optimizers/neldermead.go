package optimizers

import (
	"context"
	"math"

	"gonum.org/v1/gonum/optimize"

	"couplet/mdo"
)

// NelderMead is the Nelder–Mead simplex method of gonum's optimize
// package, on the unit box folded by x = (1 − cos(π u))/2, with the
// constraints handled by Penalty (augmented Lagrangian by default). Each
// outer iteration restarts the simplex from the best point so far. It
// starts from the study's baseline design (fixed values, else defaults);
// a start that does not analyse is replaced by the first analysable point
// toward the centre of the box or spread over it, as Sextant's is (it
// spent its whole budget on failed analyses). While no feasible point has
// been found, the run stops with mdo.StopStalled when the least violation
// has not fallen by a thousandth over three outer iterations, and an
// inner search ends when it has not over StallIterations (see
// Result.StopDetail). It refuses integer design variables and several
// objectives. Zero values take the defaults.
type NelderMead struct {
	// MaxEvaluations caps the evaluations of the whole run (repeats are
	// free, see mdo.EvalCounters); default 5000.
	MaxEvaluations int
	// SimplexSize is the edge of the initial simplex in the folded
	// coordinates (1 spans the box); default 0.05, halved at each outer
	// iteration down to a tenth.
	SimplexSize float64
	// Tolerance ends an inner search when the best merit has not
	// improved by more than Tolerance·max(|merit|, 1) over
	// StallIterations iterations; default 1e-9.
	Tolerance float64
	// StallIterations; default 30·(number of variables).
	StallIterations int
	// Penalty sets the constraint handling.
	Penalty Penalty
}

// Name implements Optimizer.
func (NelderMead) Name() string { return "Nelder-Mead" }

// validate checks the settings.
func (o NelderMead) validate() error {
	const m = "NelderMead"
	return firstError(
		checkInt(m, "MaxEvaluations", o.MaxEvaluations, 1),
		checkRange(m, "SimplexSize", o.SimplexSize, 0, 1, true),
		checkRange(m, "Tolerance", o.Tolerance, 0, 1, true),
		checkInt(m, "StallIterations", o.StallIterations, 1),
		o.Penalty.validate(m),
	)
}

// Minimize implements Optimizer.
func (o NelderMead) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	if err := o.validate(); err != nil {
		return nil, err
	}
	r, err := beginLocal(ctx, s, o.Name(), o, nil)
	if err != nil {
		return nil, err
	}
	r.maxEvals = or(o.MaxEvaluations, 5000)
	dim := r.ev.Dim()
	tol := or(o.Tolerance, 1e-9)
	stall := or(o.StallIterations, 30*dim)
	size := or(o.SimplexSize, 0.05)
	inner := func(x0 []float64, m *merit, outer int) (*mdo.Evaluation, mdo.StopReason, error) {
		s := math.Max(size*math.Pow(0.5, float64(outer)), size/10)
		return gonumInner(r, &optimize.NelderMead{SimplexSize: s}, 1, x0, m, tol, stall, nil)
	}
	stop, err := outerLoop(r, o.Penalty, r.ev.Start(), inner)
	return r.finish(stop, err)
}

// gonumInner runs one inner minimisation of the merit with a gonum method
// from the box point x0, and returns the best evaluation by merit.
//
// With a repair, every sample that is infeasible is moved by the
// gradient-based repair before its merit is taken (the method still sees
// its own sample, with the merit of the repaired point: Baldwinian
// repair).
func gonumInner(r *run, method optimize.Method, tasks int, x0 []float64, m *merit, tol float64, stall int, repair *gradientRepair) (*mdo.Evaluation, mdo.StopReason, error) {
	var best *mdo.Evaluation
	bestV := math.Inf(1)
	eval := func(us [][]float64) ([]float64, mdo.StopReason, error) {
		xs := make([][]float64, len(us))
		for i, u := range us {
			xs[i] = boxPoint(u)
		}
		evs, stop, err := r.evaluate(xs)
		if stop != mdo.NotStopped || err != nil {
			return nil, stop, err
		}
		if !r.searchedStart && r.diag.analysed == 0 {
			// the run's first batch failed entirely: outerLoop looks
			// for an analysable start
			return nil, mdo.NotStopped, errNothingAnalysed
		}
		if repair != nil {
			if stop, err := repairSamples(r, repair, xs, evs); stop != mdo.NotStopped || err != nil {
				return nil, stop, err
			}
		}
		fs := make([]float64, len(evs))
		for i, ev := range evs {
			fs[i] = m.value(ev)
			if fs[i] < bestV {
				bestV, best = fs[i], ev
			}
		}
		return fs, mdo.NotStopped, nil
	}
	conv := &optimize.FunctionConverge{Absolute: tol, Relative: tol, Iterations: stall}
	conv.Init(len(x0))
	// while the run has no feasible point, the inner search also ends
	// when the least violation has not fallen by a thousandth over stall
	// iterations (the outer loop then raises the weight or stops)
	watch := infeasibleStall{window: stall}
	watch.reset()
	major := func(loc *optimize.Location) mdo.StopReason {
		r.iteration()
		if conv.Converged(loc) != optimize.NotTerminated || watch.stalled(r.ev.Best()) {
			return mdo.StopConverged
		}
		return mdo.NotStopped
	}
	stop, err := drive(method, unboxPoint(x0), tasks, eval, major)
	return best, stop, err
}

// repairSamples applies the gradient-based repair to the infeasible
// samples, replacing their evaluations by those of the repaired points.
func repairSamples(r *run, g *gradientRepair, xs [][]float64, evs []*mdo.Evaluation) (mdo.StopReason, error) {
	var chosen []*member
	var at []int
	for i, ev := range evs {
		if ev != nil && ev.Converged && !ev.Feasible {
			chosen = append(chosen, &member{x: xs[i], ev: ev})
			at = append(at, i)
		}
	}
	stop := mdo.NotStopped
	eval := func(ms []*member) error {
		pts := make([][]float64, len(ms))
		for i, m := range ms {
			pts[i] = m.x
		}
		out, st, err := r.evaluate(pts)
		if err != nil {
			return err
		}
		if st != mdo.NotStopped {
			stop = st
			return errStop
		}
		for i, m := range ms {
			m.ev = out[i]
		}
		return nil
	}
	if err := g.newton(eval, r.ev.Dim(), chosen, nil); err != nil && stop == mdo.NotStopped {
		return mdo.NotStopped, err
	}
	for k, i := range at {
		if compare(chosen[k].ev, evs[i]) <= 0 {
			evs[i] = chosen[k].ev
		}
	}
	return stop, nil
}
