package optimizers

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distmv"
	"gonum.org/v1/gonum/stat/samplemv"

	"couplet/mdo"
)

// Sextant is a gradient-based constrained optimiser: sequential quadratic
// programming (SQP) with a damped BFGS approximation of the Hessian of
// the Lagrangian (Powell, "A fast algorithm for nonlinearly constrained
// optimization calculations", 1978), in the unit box of the study.
//
// Each iteration takes the gradients of the objective and of every
// constraint at the current point from the coupled chain rule
// (mdo.Evaluator.Derivatives: one analysis, then linear solves), solves
// the quadratic subproblem
//
//	min ½ dᵀBd + ∇fᵀd   s.t.  ∇cᵢᵀd + cᵢ ≥ 0 (inequalities),
//	                           ∇cₑᵀd + cₑ = 0 (equalities),  0 ≤ u + d ≤ 1
//
// in its elastic form (every linearised constraint may be violated at the
// cost ρ per unit, so the subproblem is always feasible) with the
// interior-point solver of qp.go, and searches along d by backtracking on
// the L1 merit function φ = f + ν(Σ|cₑ| + Σ max(0, −cᵢ)), ν kept above
// 1.5 × the largest multiplier below ρ/2 (ρ = 1e4) (Han 1977; Powell 1978). The objective is
// divided by max(|f(start)|, 1); the constraints are scaled by their
// Scale (see mdo.Constraint), band constraints give two inequalities and
// equalities are solved exactly (their tolerance only judges feasibility).
//
// It has converged when the largest scaled violation is at most
// FeasibilityTolerance and the optimality measure, the larger of the
// projected gradient of the Lagrangian (with the subproblem's multipliers;
// components pointing out of the box at an active bound do not count) and
// the complementarity |λᵢcᵢ|, is at most OptimalityTolerance (and the
// Evaluator finds the point feasible, or one more step was tried). When
// the line search finds no decrease along a step whose model predicts one
// within 10 trials, the objective or a constraint has a kink there (a
// component sized to the larger of two requirements); the method then
// goes on by gradient sampling (SQP-GS, Curtis & Overton 2012; see
// sqp_sampling.go): the same test, with the Lagrangian's gradient from the
// gradients sampled within a radius of the point, certifies the optimum
// when the radius has come down to 1e-4 of the box (Optimum.Sampled). The
// run stops with mdo.StopStalled (Optimum.Converged false) when no sampled
// step decreases the merit either: the search has then reached the
// precision of the analysis and its derivatives, or, at an infeasible
// point, a local minimum of the constraint violation.
//
// A start that does not analyse is replaced by the first analysable point
// toward the centre of the box or spread over it. Starts > 1 runs it again
// from Starts − 1 points of a scrambled Halton sequence drawn from the
// study's seed (deterministic) and keeps the best point; Explore reports
// how many distinct optima the starts found. While no start has found a
// feasible point, up to Restarts further starts follow. Whenever a start
// ends short of the convergence test or is moved, Result.StopDetail says
// why (a start that does not analyse, no feasible point found and the
// constraint most violated, a stalled search, a limit reached). It refuses
// integer design variables and several objectives. Zero values take the
// defaults.
type Sextant struct {
	// MaxIterations caps the iterations of each start; default 100.
	MaxIterations int
	// MaxEvaluations caps the evaluations of the whole run (repeats are
	// free); default 2000.
	MaxEvaluations int
	// OptimalityTolerance; default 1e-6 (the default major optimality
	// tolerance of SNOPT, Gill, Murray & Saunders, SIAM Rev. 47, 2005).
	OptimalityTolerance float64
	// FeasibilityTolerance on the largest scaled violation; default 1e-8.
	FeasibilityTolerance float64
	// Starts is the number of starting points, the study's baseline
	// design first; default 1, at most 10 000 (the points are drawn
	// before the first start, and each start is a whole SQP run that
	// keeps its report).
	Starts int
	// Restarts is the number of further starts, from points of a
	// scrambled Halton sequence drawn from the study's seed, tried one
	// after the other while every start so far has ended without a
	// feasible point (at a local minimum of the constraint violation, or
	// where nothing analyses): a local method cannot leave such a
	// minimum, where the violated constraints may not even have a
	// gradient (a thrust sized to a requirement, say); default 8,
	// negative for none, at most 10 000 (their points are drawn before
	// the first start).
	Restarts int
	// Parameters names fixed parameters of the study (inputs nobody
	// produces that are not design variables, e.g. mission.payload) whose
	// effect on the optimal objective the post-optimality sensitivity
	// gives (Result.Sensitivity and StartsReport.Sensitivity).
	Parameters []string
}

// Name implements Optimizer.
func (Sextant) Name() string { return "Sextant" }

// validate checks the settings.
func (o Sextant) validate() error {
	const m = "Sextant"
	return firstError(
		checkInt(m, "MaxIterations", o.MaxIterations, 1),
		checkInt(m, "MaxEvaluations", o.MaxEvaluations, 1),
		checkRange(m, "OptimalityTolerance", o.OptimalityTolerance, 0, 1, true),
		checkRange(m, "FeasibilityTolerance", o.FeasibilityTolerance, 0, 1, true),
		checkInt(m, "Starts", o.Starts, 1),
		checkMax(m, "Starts", o.Starts, maxStarts, "the starting points are drawn before the first start and each start is a whole SQP run that keeps its report"),
		checkMax(m, "Restarts", o.Restarts, maxStarts, "the restart points are drawn before the first start and each restart is a whole SQP run that keeps its report"),
	)
}

// Optimum is where one start of a multi-start run ended.
type Optimum struct {
	// Start and X are the starting and final points in the unit box,
	// Design the final physical values.
	Start, X, Design []float64
	// Objective is the first objective as declared.
	Objective float64
	Feasible  bool
	// Converged is true when the convergence test was met (not a budget
	// or iteration limit).
	Converged bool
	// Sampled is true when the line search met a kink (or the precision
	// of the analysis) and the start went on by gradient sampling
	// (sqp_sampling.go): an optimum on a kink, such as one where two
	// sizing requirements are equal.
	Sampled    bool
	Iterations int
	// Optimality and Violation are the last measures of the test.
	Optimality, Violation float64
	// Multipliers are the Lagrange multipliers of the study's constraints
	// at the end, one per constraint of mdo.Evaluator.Constraints, in
	// the constraint's scaled units (see Sextant); 0 when inactive.
	Multipliers []float64
	// Sensitivity is the post-optimality sensitivity in the user's units;
	// nil unless the start converged.
	Sensitivity *mdo.Sensitivity
}

// StartsReport describes a multi-start run (Sextant.Explore).
type StartsReport struct {
	// Optima lists every start's end, in the order of the starts.
	Optima []Optimum
	// Distinct counts the distinct converged feasible optima: two are the
	// same when their points are within 1e-3 of the box in every
	// coordinate.
	Distinct int
	// Sensitivity is that of the best converged feasible optimum (nil if
	// none): what each limit costs and the derivatives of the optimal
	// objective with respect to Sextant.Parameters.
	Sensitivity *mdo.Sensitivity
	// LinearSolves and DisciplineCalls count the work of the gradients.
	LinearSolves, DisciplineCalls int
}

// Minimize implements Optimizer.
func (o Sextant) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	res, _, err := o.Explore(ctx, s)
	return res, err
}

// checkStudy checks the settings that depend on the study, before the run
// begins: Parameters must name its fixed parameters, and the starting and
// restart points drawn from a Halton sequence need at most maxHaltonDim
// design variables.
func (o Sextant) checkStudy(ev *mdo.Evaluator) error {
	s := ev.Study()
	for _, p := range o.Parameters {
		if !s.System.IsParameter(p) || slices.Contains(ev.DesignNames(), p) {
			return settingError("Sextant", "Parameters", fmt.Sprintf("%q", p), fmt.Sprintf("must name fixed parameters of study %q (inputs nobody produces that are not design variables)", s.Name))
		}
	}
	if d := ev.Dim(); d > maxHaltonDim {
		if or(o.Starts, 1) > 1 {
			return settingError("Sextant", "Starts", o.Starts, fmt.Sprintf("draws the starts after the first from a Halton sequence, which handles at most %d variables; the study has %d: set Starts = 1", maxHaltonDim, d))
		}
		if o.Restarts >= 0 {
			return settingError("Sextant", "Restarts", o.Restarts, fmt.Sprintf("(0 means 8) draws the restart points from a Halton sequence, which handles at most %d variables; the study has %d: set Restarts = -1 (none)", maxHaltonDim, d))
		}
	}
	return nil
}

// Explore runs the method like Minimize and also reports where each start
// ended and how many distinct optima were found.
func (o Sextant) Explore(ctx context.Context, s *mdo.Study) (*mdo.Result, *StartsReport, error) {
	if err := o.validate(); err != nil {
		return nil, nil, err
	}
	r, err := beginLocal(ctx, s, o.Name(), o, o.checkStudy)
	if err != nil {
		return nil, nil, err
	}
	r.maxEvals = or(o.MaxEvaluations, 2000)
	starts := [][]float64{r.ev.Start()}
	var restartPoints [][]float64
	if n := or(o.Starts, 1); n > 1 {
		d := r.ev.Dim()
		seed := r.ev.Seed()
		batch := mat.NewDense(n-1, d, nil)
		samplemv.Halton{Kind: samplemv.Owen, Q: distmv.NewUnitUniform(d, nil), Src: rand.NewPCG(seed, mix(seed, 11))}.Sample(batch)
		starts = append(starts, rows(batch)...)
	}
	restarts := o.Restarts
	if restarts == 0 {
		restarts = 8
	}
	if restarts > 0 {
		// further starts while none has found a feasible point
		d := r.ev.Dim()
		seed := r.ev.Seed()
		batch := mat.NewDense(restarts, d, nil)
		samplemv.Halton{Kind: samplemv.Owen, Q: distmv.NewUnitUniform(d, nil), Src: rand.NewPCG(seed, mix(seed, 19))}.Sample(batch)
		restartPoints = rows(batch)
	}
	rep := &StartsReport{}
	stop := mdo.NotStopped
	var details []string
	last := ""
	planned := len(starts)
	for k := 0; k < len(starts); k++ {
		x0 := starts[k]
		sq := newSQP(r, o)
		opt, st, err := sq.run(x0)
		rep.LinearSolves += sq.solves
		rep.DisciplineCalls += sq.calls
		sq.explain(opt, st)
		switch {
		case k >= planned:
			// of the restarts, the last one's words only
			last = ""
			if sq.detail != "" {
				last = fmt.Sprintf("start %d: %s", k+1, sq.detail)
			}
		case sq.detail != "":
			details = append(details, fmt.Sprintf("start %d: %s", k+1, sq.detail))
		}
		if err != nil {
			r.detail = strings.Join(details, "; ")
			res, ferr := r.finish(mdo.NotStopped, err)
			return res, rep, ferr
		}
		if opt != nil {
			rep.Optima = append(rep.Optima, *opt)
		}
		if st != mdo.NotStopped && st != mdo.StopConverged && st != mdo.StopIterations && st != mdo.StopStalled {
			stop = st
			break
		}
		stop = st
		if k == len(starts)-1 && len(restartPoints) > 0 {
			// every start so far ended without a feasible point (a
			// local minimum of the constraint violation, or no
			// analysable point): go on from the next restart point
			if b := r.ev.Best(); b == nil || !b.Feasible {
				starts = append(starts, restartPoints[0])
				restartPoints = restartPoints[1:]
			}
		}
	}
	if len(starts) == 1 && len(details) == 1 {
		details[0] = strings.TrimPrefix(details[0], "start 1: ")
	}
	if len(starts) > planned {
		details = append(details, fmt.Sprintf("restarted from %d spread points (Restarts) as no start had found a feasible point", len(starts)-planned))
		if last != "" {
			details = append(details, last)
		}
	}
	r.detail = strings.Join(details, "; ")
	rep.Distinct = countDistinct(rep.Optima)
	bestF := math.Inf(1)
	for _, o := range rep.Optima {
		f := o.Objective
		if s.Objectives[0].Maximize {
			f = -f
		}
		if o.Converged && o.Feasible && o.Sensitivity != nil && f < bestF {
			bestF, rep.Sensitivity = f, o.Sensitivity
		}
	}
	// handed over before Finish: the recorder's End records it
	r.ev.SetSensitivity(rep.Sensitivity)
	res, err := r.finish(stop, nil)
	return res, rep, err
}

// countDistinct counts the distinct converged feasible optima.
func countDistinct(opts []Optimum) int {
	var kept [][]float64
	for _, o := range opts {
		if !o.Converged || !o.Feasible {
			continue
		}
		same := false
		for _, k := range kept {
			d := 0.0
			for j := range k {
				d = math.Max(d, math.Abs(k[j]-o.X[j]))
			}
			if d <= 1e-3 {
				same = true
				break
			}
		}
		if !same {
			kept = append(kept, o.X)
		}
	}
	return len(kept)
}

// sqpRow is one scalar constraint of the subproblem:
// c = sign·(g_k − bound)/scale, c ≥ 0 or (eq) c = 0.
type sqpRow struct {
	k           int // index into the study's constraints
	sign, bound float64
	scale       float64
	eq          bool
}

// limit names the limit of the constraint the row holds: "upper",
// "lower" or "target" (an equality).
func (r sqpRow) limit() string {
	switch {
	case r.eq:
		return "target"
	case r.sign > 0:
		return "lower"
	}
	return "upper"
}

// sqpPoint is an evaluated point with its gradients.
type sqpPoint struct {
	u  []float64
	ev *mdo.Evaluation
	f  float64
	g  []float64
	c  []float64   // per row
	jc [][]float64 // per row
	// the rows the subproblems at this point keep (rowsAt): rep[i] is
	// the row whose linearisation stands for row i (i itself when the
	// row is kept, −1 when it is left out), share[i] the part of rep's
	// multiplier that is row i's
	rep   []int
	share []float64
}

// sqp is the state of one start.
type sqp struct {
	r             *run
	o             Sextant
	rows          []sqpRow
	fscale        float64
	solves, calls int
	// detail says why the start ended where it did when the convergence
	// test was not met or the start was moved (Result.StopDetail)
	detail string
}

// newSQP prepares the rows of the study's constraints.
func newSQP(r *run, o Sextant) *sqp {
	s := &sqp{r: r, o: o}
	for k, c := range r.ev.Constraints() {
		sc := c.EffectiveScale()
		switch c.Kind {
		case mdo.LessEqual:
			s.rows = append(s.rows, sqpRow{k: k, sign: -1, bound: c.Upper, scale: sc})
		case mdo.GreaterEqual:
			s.rows = append(s.rows, sqpRow{k: k, sign: 1, bound: c.Lower, scale: sc})
		case mdo.Equal:
			s.rows = append(s.rows, sqpRow{k: k, sign: 1, bound: c.Lower, scale: sc, eq: true})
		case mdo.InBand:
			s.rows = append(s.rows, sqpRow{k: k, sign: 1, bound: c.Lower, scale: sc}, sqpRow{k: k, sign: -1, bound: c.Upper, scale: sc})
		}
	}
	return s
}

// errSQPStop carries a stop reason out of point.
type errSQPStop struct{ stop mdo.StopReason }

func (e errSQPStop) Error() string { return "stopped: " + e.stop.String() }

// values fills the scaled objective and constraint values of ev.
func (s *sqp) values(p *sqpPoint) {
	p.f = p.ev.F[0] / s.fscale
	p.c = make([]float64, len(s.rows))
	for i, row := range s.rows {
		p.c[i] = row.sign * (p.ev.Constraints[row.k] - row.bound) / row.scale
	}
}

// trial evaluates u without gradients; nil when the analysis failed.
func (s *sqp) trial(u []float64) (*sqpPoint, error) {
	evs, stop, err := s.r.evaluate([][]float64{u})
	if err != nil {
		return nil, err
	}
	if stop != mdo.NotStopped {
		return nil, errSQPStop{stop}
	}
	if !analysable(evs[0]) {
		return nil, nil
	}
	return s.point(u, evs[0]), nil
}

// point is the point u analysed by ev, with its scaled values (the first
// point analysed sets the objective's scale).
func (s *sqp) point(u []float64, ev *mdo.Evaluation) *sqpPoint {
	p := &sqpPoint{u: u, ev: ev}
	if s.fscale == 0 {
		s.fscale = math.Max(math.Abs(ev.F[0]), 1)
	}
	s.values(p)
	return p
}

// explain completes s.detail for a start that ended at opt with stop st:
// a limit reached before the convergence test was met, or the test met
// at a point the Evaluator finds infeasible.
func (s *sqp) explain(opt *Optimum, st mdo.StopReason) {
	if opt == nil || opt.X == nil {
		return
	}
	var what string
	switch {
	case opt.Converged && !opt.Feasible:
		what = fmt.Sprintf("the convergence test was met at a point that breaks a limit by rounding (largest scaled violation %.3g), which the Evaluator does not count as feasible", opt.Violation)
	case opt.Converged:
		return
	case st == mdo.StopBudget:
		what = fmt.Sprintf("the evaluation budget (MaxEvaluations %d) was spent before the convergence test was met (optimality %.3g, largest scaled violation %.3g)", or(s.o.MaxEvaluations, 2000), opt.Optimality, opt.Violation)
	case st == mdo.StopIterations:
		what = fmt.Sprintf("the iteration limit (MaxIterations %d) was reached before the convergence test was met (optimality %.3g, largest scaled violation %.3g)", or(s.o.MaxIterations, 100), opt.Optimality, opt.Violation)
	default:
		return
	}
	if s.detail != "" {
		s.detail += "; "
	}
	s.detail += what
}

// start returns the first point to descend from: u0 when it analyses,
// otherwise the first analysable point toward the centre of the box or
// spread over it (run.analysableStart; as in the line search, a failed
// analysis is met by moving back toward the interior). It is nil when
// none analyses; s.detail says what happened.
func (s *sqp) start(u0 []float64) (*sqpPoint, error) {
	u, ev, detail, stop, err := s.r.analysableStart(u0)
	if err != nil {
		return nil, err
	}
	if stop != mdo.NotStopped {
		return nil, errSQPStop{stop}
	}
	if detail != "" {
		s.detail = detail
	}
	if ev == nil {
		return nil, nil
	}
	return s.point(u, ev), nil
}

// stalled says why a start ended at p without meeting the convergence
// test: what happened, and which of the test's measures (opt's) failed.
func (s *sqp) stalled(opt *Optimum, p *sqpPoint, what string) string {
	optTol := or(s.o.OptimalityTolerance, 1e-6)
	feasTol := or(s.o.FeasibilityTolerance, 1e-8)
	msg := "stalled: " + what
	if opt.Violation > feasTol {
		worst, at := 0.0, -1
		for i, row := range s.rows {
			v := math.Max(0, -p.c[i])
			if row.eq {
				v = math.Abs(p.c[i])
			}
			if v > worst {
				worst, at = v, i
			}
		}
		name := ""
		if at >= 0 {
			name = " (" + s.r.ev.Constraints()[s.rows[at].k].Name + ")"
		}
		msg += fmt.Sprintf("; no feasible point found near the end point, a local minimum of the constraint violation: the largest scaled violation %.3g%s is above the feasibility tolerance %g", opt.Violation, name, feasTol)
	}
	if opt.Optimality > optTol {
		msg += fmt.Sprintf("; the optimality measure %.3g is above the tolerance %g", opt.Optimality, optTol)
	}
	return msg
}

// gradients adds the gradients at p.
func (s *sqp) gradients(p *sqpPoint) error {
	if err := s.r.ctx.Err(); err != nil {
		return errSQPStop{ctxStop(err)}
	}
	pd, err := s.r.ev.Derivatives(s.r.ctx, p.u)
	if err != nil {
		if cerr := s.r.ctx.Err(); cerr != nil {
			return errSQPStop{ctxStop(cerr)}
		}
		return err
	}
	s.solves += pd.LinearSolves
	s.calls += pd.DisciplineCalls
	sense := 1.0
	if s.r.ev.Study().Objectives[0].Maximize {
		sense = -1
	}
	p.g = make([]float64, len(p.u))
	for j := range p.g {
		p.g[j] = sense * pd.Objectives[0][j] / s.fscale
	}
	p.jc = make([][]float64, len(s.rows))
	for i, row := range s.rows {
		p.jc[i] = make([]float64, len(p.u))
		for j := range p.u {
			p.jc[i][j] = row.sign * pd.Constraints[row.k][j] / row.scale
		}
	}
	return nil
}

// violation is the L1 violation and the largest single violation.
func (s *sqp) violation(c []float64) (sum, worst float64) {
	for i, row := range s.rows {
		v := math.Max(0, -c[i])
		if row.eq {
			v = math.Abs(c[i])
		}
		sum += v
		worst = math.Max(worst, v)
	}
	return sum, worst
}

// run runs SQP from x0 and returns where it ended.
func (s *sqp) run(x0 []float64) (*Optimum, mdo.StopReason, error) {
	stopOf := func(err error) (mdo.StopReason, error) {
		var st errSQPStop
		if errors.As(err, &st) {
			return st.stop, nil
		}
		return mdo.NotStopped, err
	}
	u0 := make([]float64, len(x0))
	for j := range x0 {
		u0[j] = clip01(x0[j])
	}
	p, err := s.start(u0)
	if err == nil && p != nil {
		err = s.gradients(p)
	}
	if err != nil {
		st, err := stopOf(err)
		return nil, st, err
	}
	opt := &Optimum{Start: u0}
	if p == nil {
		// no analysable point to descend from (s.detail says why)
		opt.X = u0
		return opt, mdo.StopStalled, nil
	}
	n := len(u0)
	B := mat.NewDense(n, n, nil)
	for j := 0; j < n; j++ {
		B.Set(j, j, 1)
	}
	nu := 1.0
	maxIter := or(s.o.MaxIterations, 100)
	optTol := or(s.o.OptimalityTolerance, 1e-6)
	feasTol := or(s.o.FeasibilityTolerance, 1e-8)
	first := true
	stop := mdo.StopIterations
	var lam []float64
	// eps is the radius of the gradient sampling (sqp_sampling.go), 0
	// while the ordinary steps succeed
	eps := 0.0
	var rng *rand.Rand
	polished := false
	for it := 0; it < maxIter; it++ {
		var bundle []*sqpPoint
		if eps > 0 {
			if bundle, err = s.samples(p, eps, rng); err != nil {
				st, err := stopOf(err)
				s.fill(opt, p, lam)
				return opt, st, err
			}
		}
		subproblem := func() (d, lam []float64, model, lin, measure float64, err error) {
			if eps > 0 {
				return s.bundleSubproblem(p, bundle)
			}
			d, lam, lin, measure, err = s.subproblem(p, B)
			if err == nil {
				model = dot(p.g, d)
			}
			return d, lam, model, lin, measure, err
		}
		d, lamRows, model, lin, measure, err := subproblem()
		if err != nil {
			// restart the quasi-Newton model once and try again
			resetHessian(B)
			d, lamRows, model, lin, measure, err = subproblem()
		}
		if err != nil {
			// the subproblem has no solution the solver finds: the
			// point reached so far stands, and the Result says why
			s.detail = fmt.Sprintf("stalled at iteration %d: %v", it, err)
			s.fill(opt, p, lam)
			return opt, mdo.StopStalled, nil
		}
		lam = lamRows
		_, worst := s.violation(p.c)
		opt.Iterations = it
		opt.Optimality, opt.Violation = measure, worst
		// a point within the feasibility tolerance that the Evaluator
		// finds infeasible (its limits hold only to rounding) takes the
		// subproblem's step, which asks them to hold with a margin, once
		polish := !p.ev.Feasible && !polished
		if worst <= feasTol && measure <= optTol && polish {
			polished = true
		} else if worst <= feasTol && measure <= optTol {
			if eps == 0 || eps <= gsRadiusMin {
				stop = mdo.StopConverged
				opt.Converged = true
				break
			}
			// stationary to this radius: sample closer
			eps /= 10
			continue
		}
		for _, l := range lam {
			// a multiplier at the elastic price belongs to a
			// linearisation no step satisfies: it does not set ν
			if math.Abs(l) < 0.5*elasticPrice {
				nu = math.Max(nu, 1.5*math.Abs(l))
			}
		}
		viol, _ := s.violation(p.c)
		phi := p.f + nu*viol
		dphi := model - nu*(viol-lin)
		if infNorm(d) <= 1e-15 {
			// no step: stationary for the subproblem, but the test
			// above was not met
			stop = mdo.StopStalled
			s.detail = s.stalled(opt, p, "the subproblem's step is zero")
			break
		}
		// backtracking on the merit function, with one second-order
		// correction of the full step (against the Maratos effect)
		var next *sqpPoint
		alpha := 1.0
		accept := func(q *sqpPoint, alpha float64) bool {
			if q == nil {
				return false
			}
			qv, _ := s.violation(q.c)
			return q.f+nu*qv <= phi+1e-4*alpha*math.Min(dphi, 0)
		}
		// a model that predicts a decrease the function denies
		// within maxBacktracks trials meets a kink: sample (see
		// sqp_sampling.go); a step predicting none (the precision of the
		// analysis) is searched to the end
		limit := 40
		if eps > 0 || dphi < 0 {
			limit = maxBacktracks
		}
		for ls := 0; ls < limit && next == nil; ls++ {
			u := boxStep(p.u, d, alpha)
			if ls > 0 && infNorm(subv(u, p.u)) == 0 {
				break
			}
			q, err := s.trial(u)
			if err != nil {
				st, err := stopOf(err)
				s.fill(opt, p, lam)
				return opt, st, err
			}
			if accept(q, alpha) {
				next = q
				break
			}
			if ls == 0 && q != nil && eps == 0 {
				if dc := s.correction(p, q, d, lam); dc != nil {
					qc, err := s.trial(boxStep(p.u, dc, 1))
					if err != nil {
						st, err := stopOf(err)
						s.fill(opt, p, lam)
						return opt, st, err
					}
					if accept(qc, 1) {
						next = qc
						break
					}
				}
			}
			alpha /= 2
		}
		if next == nil {
			switch {
			case eps == 0:
				// a kink, or the precision of the analysis: sample the
				// gradients around p
				eps = gsRadius0
				opt.Sampled = true
				seed := s.r.ev.Seed()
				rng = rand.New(rand.NewPCG(seed, mix(seed, 13)))
				continue
			case eps > gsRadiusMin:
				eps /= 10
				continue
			}
			// no decrease along the sampled step either: the search has
			// reached the precision of the analysis (Optimum.Converged
			// stays false)
			stop = mdo.StopStalled
			s.detail = s.stalled(opt, p, "the line search found no decrease of the merit function, even with gradients sampled within 1e-4 of the box")
			break
		}
		if err := s.gradients(next); err != nil {
			st, err := stopOf(err)
			s.fill(opt, p, lam)
			return opt, st, err
		}
		if eps == 0 {
			s.update(B, p, next, lam, first)
			first = false
		}
		p = next
		s.r.iteration()
	}
	s.fill(opt, p, lam)
	if opt.Converged {
		sens, err := s.sensitivity(p, lam)
		if err != nil && s.r.ctx.Err() != nil {
			// cancelled after converging: the optimum stands without
			// its sensitivity
			return opt, ctxStop(s.r.ctx.Err()), nil
		}
		if err != nil {
			st, err := stopOf(err)
			if err != nil {
				return opt, mdo.NotStopped, fmt.Errorf("optimizers: Sextant: sensitivity at the optimum: %w", err)
			}
			return opt, st, nil
		}
		s.flatLimits(p, sens)
		opt.Sensitivity = sens
	}
	return opt, stop, nil
}

// flatLimits marks in sens the limits of the rows the subproblem at p
// left out as not varying with the design (rowsAt) that hold only at
// their limit (an equality, or an inequality short of the interior
// margin): they bind, but their multiplier is no derivative (not
// defined, with the reason sqp_sensitivity.go gives a flat active row).
// The rows left out with a margin stay inactive.
func (s *sqp) flatLimits(p *sqpPoint, sens *mdo.Sensitivity) {
	if p.rep == nil || len(sens.Limits) != len(s.rows) {
		return
	}
	mark := make([]float64, len(s.rows))
	found := false
	for i, row := range s.rows {
		if p.rep[i] < 0 && (row.eq || p.c[i] < interior) {
			mark[i], found = 1, true
		}
	}
	if !found {
		return
	}
	why := s.undefinedMultipliers(p, mark)
	for i, m := range mark {
		if m != 0 && why[i] != "" {
			l := &sens.Limits[i]
			l.Active, l.PerUnit, l.NotDefined = true, math.NaN(), why[i]
		}
	}
}

// maxBacktracks is the number of trial steps of a line search along a
// step whose model predicts a decrease: the step is halved at most
// maxBacktracks − 1 times (to 1/512) before the search samples the
// gradients around the point (sqp_sampling.go).
const maxBacktracks = 10

// elasticPrice is ρ, the price per unit of violation of a linearised
// constraint in the elastic subproblem (scaled units).
const elasticPrice = 1e4

// resetHessian sets B to the identity times the mean of its diagonal.
func resetHessian(B *mat.Dense) {
	n, _ := B.Dims()
	m := 0.0
	for j := 0; j < n; j++ {
		m += B.At(j, j) / float64(n)
	}
	if !(m > 0) || math.IsInf(m, 0) {
		m = 1
	}
	B.Zero()
	for j := 0; j < n; j++ {
		B.Set(j, j, m)
	}
}

// interior is the margin, in scaled units, by which the subproblem asks
// each inequality to hold: the end point then satisfies its active
// constraints strictly, as the Evaluator's feasibility test requires,
// at a cost in the objective of the multiplier times 1e-10.
const interior = 1e-10

// boxStep returns u + alpha·d in the box; a coordinate within 1e-10 of a
// bound is put on it (the interior-point subproblem reaches a bound only
// within its tolerance).
func boxStep(u, d []float64, alpha float64) []float64 {
	out := make([]float64, len(u))
	for j := range u {
		out[j] = clip01(u[j] + alpha*d[j])
		if out[j] < 1e-10 {
			out[j] = 0
		} else if out[j] > 1-1e-10 {
			out[j] = 1
		}
	}
	return out
}

// subv is a − b.
func subv(a, b []float64) []float64 {
	o := make([]float64, len(a))
	for i := range a {
		o[i] = a[i] - b[i]
	}
	return o
}

// correction is the second-order correction of the step d from p, whose
// trial point q failed the merit test: d + d̂ with d̂ the least-norm step
// that, to first order, restores the constraints active in the
// subproblem (equalities, inequalities with a positive multiplier) to
// their linearised values, J_A d̂ = −(c_A(q) − c_A(p) − J_A d), on the
// coordinates not held at a bound (Nocedal & Wright, 2006, §18.3). nil
// when no constraint is active or the system is singular.
func (s *sqp) correction(p, q *sqpPoint, d, lam []float64) []float64 {
	n := len(p.u)
	var act []int
	for i, row := range s.rows {
		// of the rows the subproblem merged or left out (rowsAt), none
		if (row.eq || lam[i] > 0) && (p.rep == nil || p.rep[i] == i) {
			act = append(act, i)
		}
	}
	var free []int
	for j := 0; j < n; j++ {
		if e := p.u[j] + d[j]; e > 1e-10 && e < 1-1e-10 {
			free = append(free, j)
		}
	}
	if len(act) == 0 || len(act) > len(free) {
		return nil
	}
	J := mat.NewDense(len(act), len(free), nil)
	r := mat.NewVecDense(len(act), nil)
	for a, i := range act {
		lin := p.c[i]
		for j := 0; j < n; j++ {
			lin += p.jc[i][j] * d[j]
		}
		target := lin
		if !s.rows[i].eq {
			target = math.Max(lin, interior)
		}
		r.SetVec(a, target-q.c[i])
		for b, j := range free {
			J.Set(a, b, p.jc[i][j])
		}
	}
	var JJt mat.Dense
	JJt.Mul(J, J.T())
	var w mat.VecDense
	if err := w.SolveVec(&JJt, r); err != nil {
		return nil
	}
	var dh mat.VecDense
	dh.MulVec(J.T(), &w)
	out := append([]float64(nil), d...)
	for b, j := range free {
		out[j] += dh.AtVec(b)
	}
	return out
}

// fill records the end point of a start.
func (s *sqp) fill(opt *Optimum, p *sqpPoint, lam []float64) {
	opt.X = append([]float64(nil), p.u...)
	opt.Design = append([]float64(nil), p.ev.Design...)
	opt.Objective = p.ev.Objectives[0]
	opt.Feasible = p.ev.Feasible
	opt.Multipliers = make([]float64, len(s.r.ev.Constraints()))
	for i, row := range s.rows {
		if i < len(lam) {
			// λ is per scaled row; the study's sign: positive when the
			// limit binds
			opt.Multipliers[row.k] += lam[i]
		}
	}
}

// lagrangianGradient is ∇f − Σ λᵢ ∇cᵢ at p.
func (s *sqp) lagrangianGradient(p *sqpPoint, lam []float64) []float64 {
	g := append([]float64(nil), p.g...)
	for i := range s.rows {
		for j := range g {
			g[j] -= lam[i] * p.jc[i][j]
		}
	}
	return g
}

// update applies the damped BFGS update (Powell 1978) to B.
func (s *sqp) update(B *mat.Dense, p, q *sqpPoint, lam []float64, first bool) {
	n := len(p.u)
	sv := make([]float64, n)
	for j := range sv {
		sv[j] = q.u[j] - p.u[j]
	}
	g0 := s.lagrangianGradient(p, lam)
	g1 := s.lagrangianGradient(q, lam)
	y := make([]float64, n)
	for j := range y {
		y[j] = g1[j] - g0[j]
	}
	sy := dot(sv, y)
	if first && sy > 0 {
		// Shanno–Phua scaling of the initial matrix
		sc := dot(y, y) / sy
		for j := 0; j < n; j++ {
			B.Set(j, j, sc)
		}
	}
	bs := make([]float64, n)
	mulVec(B, sv, bs)
	sbs := dot(sv, bs)
	if !(sbs > 1e-300) {
		return
	}
	theta := 1.0
	if sy < 0.2*sbs {
		theta = 0.8 * sbs / (sbs - sy)
	}
	rv := make([]float64, n)
	for j := range rv {
		rv[j] = theta*y[j] + (1-theta)*bs[j]
	}
	sr := dot(sv, rv)
	if !(sr > 1e-300) {
		return
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			B.Set(i, j, B.At(i, j)+rv[i]*rv[j]/sr-bs[i]*bs[j]/sbs)
		}
	}
}

// subproblem solves the elastic QP at p. It returns the step, the
// multipliers of the rows, the L1 violation of the linearised
// constraints at the step and the optimality measure at p.
func (s *sqp) subproblem(p *sqpPoint, B *mat.Dense) (d, lam []float64, lin, measure float64, err error) {
	if err := s.rowsAt(p); err != nil {
		return nil, nil, 0, 0, err
	}
	n := len(p.u)
	ineq, eq := s.kinds(p)
	mi, me := len(ineq), len(eq)
	nv := n + mi + 2*me // d, v (ineq slacks), p, q (eq slacks)
	rho := elasticPrice
	H := mat.NewDense(nv, nv, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			H.Set(i, j, B.At(i, j))
		}
	}
	c := make([]float64, nv)
	copy(c, p.g)
	for k := n; k < nv; k++ {
		c[k] = rho
	}
	ng := mi + (mi + 2*me) + 2*n
	G := mat.NewDense(ng, nv, nil)
	h := make([]float64, ng)
	row := 0
	for a, i := range ineq {
		for j := 0; j < n; j++ {
			G.Set(row, j, p.jc[i][j])
		}
		G.Set(row, n+a, 1)
		h[row] = interior - p.c[i]
		row++
	}
	elasticTail(G, h, row, n, nv, p.u)
	A, b := s.equalityRows(p, eq, nv, n+mi, n+mi+me)
	sol, err := solveQP(qpProblem{H: H, c: c, A: A, b: b, G: G, h: h})
	if err != nil {
		return nil, nil, 0, 0, fmt.Errorf("optimizers: Sextant: the quadratic subproblem at %v%s: %w", p.ev.Design, s.brokenRow(err, ineq, eq), err)
	}
	d = sol.x[:n]
	for k := n; k < nv; k++ {
		lin += math.Max(0, sol.x[k])
	}
	lin += s.leftOutViolation(p, d)
	lam = make([]float64, len(s.rows))
	for a, i := range ineq {
		lam[i] = sol.z[a]
	}
	for a, i := range eq {
		lam[i] = sol.y[a]
	}
	s.shareMultipliers(p, lam)
	// optimality: the projected gradient of the Lagrangian and the
	// complementarity
	all, _ := s.kinds(nil)
	measure = s.optimality(p, d, s.lagrangianGradient(p, lam), lam, all)
	return d, lam, lin, measure, nil
}

// kinds splits the rows the subproblems at p keep (every row when p is
// nil) into inequalities and equalities.
func (s *sqp) kinds(p *sqpPoint) (ineq, eq []int) {
	for i, row := range s.rows {
		switch {
		case p != nil && p.rep[i] != i:
		case row.eq:
			eq = append(eq, i)
		default:
			ineq = append(ineq, i)
		}
	}
	return ineq, eq
}

// Thresholds of the rows the subproblem leaves out or merges (rowsAt).
const (
	// parallelRows is the largest difference, component by component, of
	// two rows' unit gradients, and relative of their values over their
	// gradients' norms, that counts as rounding: such rows are one
	// linearisation (the same constraint declared twice, or twice over
	// different scales).
	parallelRows = 1e-14
)

// errFlatViolated is the subproblem of a point where a constraint that
// does not vary with the design is violated: no step satisfies its
// linearisation.
var errFlatViolated = errors.New("a violated constraint does not vary with the design")

// rowsAt chooses the rows the subproblems at p pass to the QP (p.rep,
// p.share), which the interior-point iteration needs linearly
// independent and not void:
//   - a row whose gradient is exactly zero (a constraint that does not
//     vary with the design, such as a scripted constant) is left out when
//     its violation is within the feasibility tolerance, with a zero
//     multiplier; when it is violated beyond it no step satisfies the
//     linearisation, and rowsAt returns an error (errFlatViolated) that
//     names the constraint, its value and its limit;
//   - rows of the same kind whose gradients point the same way and whose
//     values over their gradients' norms agree, both to rounding
//     (parallelRows), are one linearisation ĝᵀd + ĉ ≥ 0 (or = 0): the
//     subproblem keeps the tighter inequality (the smallest ĉ; of
//     equalities only those with the same ĉ are merged). The rows tied
//     with the kept one share its multiplier equally, in the units of the
//     unit gradient (λᵢ‖∇cᵢ‖ = λ‖∇c‖/m for m rows), so the Lagrangian's
//     gradient is unchanged and the sensitivity finds the multipliers of
//     such limits not unique (sqp_sensitivity.go); a looser row gets none
//     (it is inactive wherever the tighter one holds).
//
// Without it the interior-point iteration breaks down on such rows (a
// flat row at its limit cannot hold with the interior margin, two
// identical rows share their multiplier in any proportion).
func (s *sqp) rowsAt(p *sqpPoint) error {
	if p.rep != nil {
		return nil
	}
	m := len(s.rows)
	rep := make([]int, m)
	share := make([]float64, m)
	norms := make([]float64, m)
	feasTol := or(s.o.FeasibilityTolerance, 1e-8)
	var flat []string
	for i, row := range s.rows {
		rep[i], share[i] = i, 1
		norms[i] = norm2(p.jc[i])
		if norms[i] != 0 {
			continue
		}
		v := math.Max(0, -p.c[i])
		if row.eq {
			v = math.Abs(p.c[i])
		}
		rep[i], share[i] = -1, 0
		if v > feasTol {
			flat = append(flat, s.flatViolation(p, i, v))
		}
	}
	if len(flat) > 0 {
		return fmt.Errorf("optimizers: Sextant: at %v %w, so no step can satisfy it: %s", p.ev.Design, errFlatViolated, strings.Join(flat, "; "))
	}
	same := func(i, j int) (parallel, tie bool) {
		for k := range p.jc[i] {
			if math.Abs(p.jc[i][k]/norms[i]-p.jc[j][k]/norms[j]) > parallelRows {
				return false, false
			}
		}
		ci, cj := p.c[i]/norms[i], p.c[j]/norms[j]
		return true, math.Abs(ci-cj) <= parallelRows*math.Max(1, math.Max(math.Abs(ci), math.Abs(cj)))
	}
	for i := range s.rows {
		if rep[i] != i {
			continue
		}
		// the group of the rows parallel to i after it, and the tightest
		group := []int{i}
		for j := i + 1; j < m; j++ {
			if rep[j] != j || s.rows[j].eq != s.rows[i].eq {
				continue
			}
			if par, tie := same(i, j); par && (tie || !s.rows[i].eq) {
				group = append(group, j)
			}
		}
		if len(group) == 1 {
			continue
		}
		kept := group[0]
		for _, j := range group[1:] {
			if p.c[j]/norms[j] < p.c[kept]/norms[kept] {
				kept = j
			}
		}
		var tied []int
		for _, j := range group {
			rep[j], share[j] = kept, 0
			if _, tie := same(kept, j); tie {
				tied = append(tied, j)
			}
		}
		for _, j := range tied {
			share[j] = norms[kept] / (float64(len(tied)) * norms[j])
		}
	}
	p.rep, p.share = rep, share
	return nil
}

// brokenRow names the constraint of the QP row that broke the
// interior-point iteration (err a *qpNonFiniteError of a linearised
// constraint's multiplier or slack; ineq and eq the rows passed to the
// QP, first in its inequalities and equalities), "" when none did.
func (s *sqp) brokenRow(err error, ineq, eq []int) string {
	var nf *qpNonFiniteError
	if !errors.As(err, &nf) {
		return ""
	}
	rows, what := ineq, nf.Quantity
	switch nf.Quantity {
	case "y":
		rows, what = eq, "multiplier"
	case "slack", "multiplier":
	default:
		return ""
	}
	if nf.Index >= len(rows) {
		return ""
	}
	return fmt.Sprintf(" (the %s of the linearisation of constraint %q broke down)", what, s.r.ev.Constraints()[s.rows[rows[nf.Index]].k].Name)
}

// flatViolation says which limit the row i, which does not vary with the
// design, breaks at p by v (scaled).
func (s *sqp) flatViolation(p *sqpPoint, i int, v float64) string {
	row := s.rows[i]
	c := s.r.ev.Constraints()[row.k]
	what := "above its upper limit"
	switch row.limit() {
	case "target":
		what = "off its target"
	case "lower":
		what = "below its lower limit"
	}
	return fmt.Sprintf("constraint %q is %g, %s %g (its gradient is exactly zero; scaled violation %.3g)", c.Name, p.ev.Constraints[row.k], what, row.bound, v)
}

// shareMultipliers gives the rows the subproblem at p merged into
// another (rowsAt) their part of its multiplier in lam.
func (s *sqp) shareMultipliers(p *sqpPoint, lam []float64) {
	kept := append([]float64(nil), lam...)
	for i, r := range p.rep {
		switch {
		case r < 0:
			lam[i] = 0
		case r != i || p.share[i] != 1:
			lam[i] = p.share[i] * kept[r]
		}
	}
}

// leftOutViolation is the L1 violation, at the step d, of the
// linearisations of the rows the subproblem at p left out or merged
// (rowsAt), which the QP's elastic slacks do not count.
func (s *sqp) leftOutViolation(p *sqpPoint, d []float64) float64 {
	sum := 0.0
	for i, r := range p.rep {
		if r == i {
			continue
		}
		l := p.c[i] + dot(p.jc[i], d)
		if s.rows[i].eq {
			sum += math.Abs(l)
		} else {
			sum += math.Max(0, -l)
		}
	}
	return sum
}

// elasticTail writes, from row on, the rows of the elastic slacks ≥ 0
// (columns from to nv) and of the box 0 ≤ u + d ≤ 1 of the step (the
// first len(u) columns).
func elasticTail(G *mat.Dense, h []float64, row, from, nv int, u []float64) {
	for k := from; k < nv; k++ {
		G.Set(row, k, 1)
		row++
	}
	for j := range u {
		G.Set(row, j, 1)
		h[row] = -u[j]
		G.Set(row+1, j, -1)
		h[row+1] = u[j] - 1
		row += 2
	}
}

// equalityRows are the linearised equalities ∇cₑᵀd + cₑ + pₑ − qₑ = 0 at
// p, their slacks p and q in the columns ip+a and iq+a (nil when there are
// none).
func (s *sqp) equalityRows(p *sqpPoint, eq []int, nv, ip, iq int) (*mat.Dense, []float64) {
	if len(eq) == 0 {
		return nil, nil
	}
	A := mat.NewDense(len(eq), nv, nil)
	b := make([]float64, len(eq))
	for a, i := range eq {
		for j := range p.u {
			A.Set(a, j, p.jc[i][j])
		}
		A.Set(a, ip+a, 1)
		A.Set(a, iq+a, -1)
		b[a] = -p.c[i]
	}
	return A, b
}

// dot is the inner product.
func dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

// Sextant implements the contract.
var _ Optimizer = Sextant{}
