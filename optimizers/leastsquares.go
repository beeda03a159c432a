package optimizers

import (
	"context"
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"couplet/mdo"
)

// FitProblem is a weighted nonlinear least-squares problem: find the
// parameters p that minimise Σ wᵢ (yᵢ − fᵢ(p))², with wᵢ = 1/σᵢ² when
// per-point uncertainties Sigma are given and wᵢ = 1 otherwise.
type FitProblem struct {
	// Names are the parameters' names, used in results and errors.
	Names []string
	// Start is the starting point, one value per name.
	Start []float64
	// Observed are the measured values yᵢ.
	Observed []float64
	// Sigma, when not nil, holds each point's standard uncertainty σᵢ (> 0).
	Sigma []float64
	// Predict writes the model's predictions fᵢ(p) into pred
	// (len(pred) == len(Observed)). An error stops the fit.
	Predict func(ctx context.Context, p, pred []float64) error
	// Jacobian, when not nil, writes ∂fᵢ/∂pⱼ into jac (points × parameters).
	// Without it the Jacobian is taken by central differences.
	Jacobian func(p []float64, jac *mat.Dense) error
}

// LeastSquares fits a FitProblem by the Levenberg–Marquardt method
// (Levenberg 1944, Marquardt 1963) with the scaling and damping update of
// Moré (1978, "The Levenberg–Marquardt algorithm: implementation and
// theory") and Nielsen (1999): each step solves the damped linear least-
// squares problem [J; √λ·D] δ = [−r; 0] by a QR factorisation (gonum's
// mat.QR), D holding the largest column norms of the weighted Jacobian met
// so far. The zero value is ready to use.
//
// It stops when one of its convergence tests is met (FitResult.Test says
// which): the relative change of the weighted sum of squares (actual and
// predicted) is below FTol; the step is below XTol relative to the
// parameters; or the largest cosine between the residual vector and a
// column of the Jacobian is below GTol (the gradient test of MINPACK).
type LeastSquares struct {
	// MaxIterations caps the accepted and rejected steps (default 500; >= 1).
	MaxIterations int
	// MaxEvaluations caps the calls of Predict, Jacobian columns included
	// (default 100 000; >= 1).
	MaxEvaluations int
	// FTol is the relative change of the sum of squares that counts as
	// converged (default 1e-14; in (0, 1]).
	FTol float64
	// XTol is the relative step that counts as converged (default 1e-12;
	// in (0, 1]).
	XTol float64
	// GTol is the gradient cosine that counts as converged (default 1e-12;
	// in (0, 1]).
	GTol float64
	// Step is the relative step of the central differences (default ∛ε ≈ 6e-6;
	// in (0, 1]).
	// Raise it when the predictions carry solver noise (a coupled analysis).
	Step float64
	// RankTol is the ratio of the smallest to the largest singular value of
	// the column-scaled Jacobian below which parameters count as not told
	// apart by the data (default 1e-8; in (0, 1]).
	RankTol float64
}

// FitResult is the outcome of LeastSquares.Fit.
type FitResult struct {
	// Names are the parameters' names.
	Names []string
	// Params are the fitted parameters.
	Params []float64
	// StdErr are the parameters' standard errors, √diag(σ² (JᵀWJ)⁻¹), with
	// σ² = RSS/(n − p); NaN when the Jacobian is rank-deficient.
	StdErr []float64
	// Covariance is σ² (JᵀWJ)⁻¹, one row per parameter.
	Covariance [][]float64
	// Correlation is the covariance scaled to unit diagonal.
	Correlation [][]float64
	// Predicted are the predictions fᵢ at the solution.
	Predicted []float64
	// Residuals are yᵢ − fᵢ at the solution (not weighted).
	Residuals []float64
	// RSS is the weighted residual sum of squares Σ wᵢ rᵢ².
	RSS float64
	// DoF is the degrees of freedom n − p.
	DoF int
	// ResidualSD is √(RSS/DoF), the residual standard deviation.
	ResidualSD float64
	// Iterations counts the steps tried; Evaluations the calls of Predict;
	// Failed the trial points whose prediction failed (each counted as a
	// rejected step: the fit tries a shorter one).
	Iterations, Evaluations, Failed int
	// Stop says why the fit stopped (mdo.StopConverged, StopIterations,
	// StopBudget, StopCancelled or StopDeadline).
	Stop mdo.StopReason
	// Test names the convergence test met, or what stopped the fit.
	Test string
	// Indistinct lists the groups of parameters the data cannot tell apart
	// (empty for a full-rank Jacobian at the solution).
	Indistinct [][]string
}

// IndistinctError is returned, with the FitResult, when the Jacobian at the
// solution is rank-deficient: the data do not determine some combinations
// of the parameters, and their standard errors are not defined.
type IndistinctError struct {
	// Groups are the parameter groups that cannot be told apart.
	Groups [][]string
}

// Error names the groups.
func (e *IndistinctError) Error() string {
	s := "optimizers: least squares: the Jacobian at the solution is rank-deficient; the data cannot tell apart"
	for i, g := range e.Groups {
		if i > 0 {
			s += ";"
		}
		if len(g) == 1 {
			s += " " + g[0] + " from nothing (no data depends on it)"
			continue
		}
		s += " " + joinAnd(g)
	}
	return s + " (fix all but one of each group, or add data that separates them)"
}

func joinAnd(names []string) string {
	switch len(names) {
	case 0:
		return "(no parameter)"
	case 1:
		return names[0]
	}
	s := ""
	for i, n := range names {
		switch {
		case i == 0:
		case i == len(names)-1:
			s += " and "
		default:
			s += ", "
		}
		s += n
	}
	return s
}

// defaults returns the settings with zero fields filled.
func (o LeastSquares) defaults() LeastSquares {
	if o.MaxIterations == 0 {
		o.MaxIterations = 500
	}
	if o.MaxEvaluations == 0 {
		o.MaxEvaluations = 100000
	}
	if o.FTol == 0 {
		o.FTol = 1e-14
	}
	if o.XTol == 0 {
		o.XTol = 1e-12
	}
	if o.GTol == 0 {
		o.GTol = 1e-12
	}
	if o.Step == 0 {
		o.Step = math.Cbrt(0x1p-52)
	}
	if o.RankTol == 0 {
		o.RankTol = 1e-8
	}
	return o
}

// checkSettings refuses a setting out of its range, naming it as
// method.Field with its value and the allowed range: a count must be >= 1,
// a tolerance, the difference step and RankTol must lie in (0, 1] (0 takes
// the default).
func (o LeastSquares) checkSettings(method string) error {
	return firstError(
		checkInt(method, "MaxIterations", o.MaxIterations, 1),
		checkInt(method, "MaxEvaluations", o.MaxEvaluations, 1),
		checkRange(method, "FTol", o.FTol, 0, 1, true),
		checkRange(method, "XTol", o.XTol, 0, 1, true),
		checkRange(method, "GTol", o.GTol, 0, 1, true),
		checkRange(method, "Step", o.Step, 0, 1, true),
		checkRange(method, "RankTol", o.RankTol, 0, 1, true),
	)
}

// validate checks the problem.
func (o LeastSquares) validate(pr *FitProblem) error {
	p, n := len(pr.Start), len(pr.Observed)
	switch {
	case pr.Predict == nil:
		return errors.New("optimizers: least squares: the problem has no Predict function")
	case p == 0:
		return errors.New("optimizers: least squares: the problem has no parameters (Start is empty)")
	case len(pr.Names) != p:
		return fmt.Errorf("optimizers: least squares: %d names for %d starting values", len(pr.Names), p)
	case n <= p:
		return fmt.Errorf("optimizers: least squares: %d observations for %d parameters; at least %d are needed", n, p, p+1)
	case pr.Sigma != nil && len(pr.Sigma) != n:
		return fmt.Errorf("optimizers: least squares: %d uncertainties for %d observations", len(pr.Sigma), n)
	}
	for j, v := range pr.Start {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("optimizers: least squares: start of %s is %g; it must be finite", pr.Names[j], v)
		}
	}
	for i, s := range pr.Sigma {
		if !(s > 0) || math.IsInf(s, 0) {
			return fmt.Errorf("optimizers: least squares: uncertainty of point %d is %g; it must be finite and > 0", i+1, s)
		}
	}
	for i, y := range pr.Observed {
		if math.IsNaN(y) || math.IsInf(y, 0) {
			return fmt.Errorf("optimizers: least squares: observation %d is %g; it must be finite", i+1, y)
		}
	}
	return nil
}

// lmState holds the work of one fit.
type lmState struct {
	o      LeastSquares
	pr     *FitProblem
	ctx    context.Context
	sw     []float64 // √wᵢ
	evals  int
	failed int // trial points the model could not answer
	pred   []float64
	stop   mdo.StopReason
	reason string
}

// residuals writes the weighted residuals √wᵢ(yᵢ − fᵢ(p)) into r and
// returns their sum of squares. ok is false when the fit must stop (budget,
// context); err is a failure of Predict.
func (s *lmState) residuals(p, r []float64) (float64, bool, error) {
	if err := s.ctx.Err(); err != nil {
		s.stop, s.reason = ctxStop(err), "the context ended: "+err.Error()
		return 0, false, nil
	}
	if s.evals >= s.o.MaxEvaluations {
		s.stop, s.reason = mdo.StopBudget, fmt.Sprintf("the evaluation budget (%d) was spent", s.o.MaxEvaluations)
		return 0, false, nil
	}
	s.evals++
	if err := s.pr.Predict(s.ctx, p, s.pred); err != nil {
		if cerr := s.ctx.Err(); cerr != nil {
			s.stop, s.reason = ctxStop(cerr), "the context ended: "+cerr.Error()
			return 0, false, nil
		}
		return 0, false, fmt.Errorf("optimizers: least squares: prediction at %v: %w", p, err)
	}
	ss := 0.0
	for i, f := range s.pred {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return 0, false, fmt.Errorf("optimizers: least squares: prediction %d at %v is %g", i+1, p, f)
		}
		r[i] = s.sw[i] * (s.pr.Observed[i] - f)
		ss += r[i] * r[i]
	}
	return ss, true, nil
}

// jacobian writes the Jacobian of the weighted residuals, −√wᵢ ∂fᵢ/∂pⱼ,
// into jac.
func (s *lmState) jacobian(p []float64, jac *mat.Dense) (bool, error) {
	n, np := jac.Dims()
	if s.pr.Jacobian != nil {
		if err := s.pr.Jacobian(p, jac); err != nil {
			return false, fmt.Errorf("optimizers: least squares: Jacobian at %v: %w", p, err)
		}
		for i := range n {
			for j := range np {
				jac.Set(i, j, -s.sw[i]*jac.At(i, j))
			}
		}
		return true, nil
	}
	q := append([]float64(nil), p...)
	rp, rm := make([]float64, n), make([]float64, n)
	for j := range np {
		h := s.o.Step * math.Max(math.Abs(p[j]), s.o.Step)
		q[j] = p[j] + h
		hp := q[j] - p[j]
		if _, ok, err := s.residuals(q, rp); !ok {
			return false, err
		}
		q[j] = p[j] - h
		hm := p[j] - q[j]
		if _, ok, err := s.residuals(q, rm); !ok {
			return false, err
		}
		q[j] = p[j]
		for i := range n {
			jac.Set(i, j, (rp[i]-rm[i])/(hp+hm))
		}
	}
	return true, nil
}

// Fit minimises the weighted sum of squares of the problem from its start.
// It returns the result when the fit ran, whatever stopped it; the error is
// a bad problem or settings, a failing Predict or Jacobian, or an
// *IndistinctError (with the result) when the data cannot tell some
// parameters apart.
func (o LeastSquares) Fit(ctx context.Context, pr FitProblem) (*FitResult, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if err := o.checkSettings("LeastSquares"); err != nil {
		return nil, err
	}
	o = o.defaults()
	if err := o.validate(&pr); err != nil {
		return nil, err
	}
	n, np := len(pr.Observed), len(pr.Start)
	s := &lmState{o: o, pr: &pr, ctx: ctx, sw: make([]float64, n), pred: make([]float64, n)}
	for i := range s.sw {
		s.sw[i] = 1
		if pr.Sigma != nil {
			s.sw[i] = 1 / pr.Sigma[i]
		}
	}
	p := append([]float64(nil), pr.Start...)
	r := make([]float64, n)
	ss, ok, err := s.residuals(p, r)
	if err != nil {
		return nil, err
	}
	if !ok {
		return nil, fmt.Errorf("optimizers: least squares: stopped before the first evaluation: %s", s.reason)
	}
	jac := mat.NewDense(n, np, nil)
	d := make([]float64, np)
	lambda, nu := 1e-3, 2.0
	iter := 0
	trial, rt := make([]float64, np), make([]float64, n)
	aug := mat.NewDense(n+np, np, nil)
	rhs := mat.NewDense(n+np, 1, nil)
	var step mat.Dense
	var qr mat.QR
	fresh := true // the Jacobian must be recomputed at p
	for s.stop == mdo.NotStopped {
		if fresh {
			if ok, err := s.jacobian(p, jac); err != nil {
				return nil, err
			} else if !ok {
				break
			}
			for j := range np {
				d[j] = math.Max(d[j], mat.Norm(jac.ColView(j), 2))
			}
			fresh = false
			// Gradient test: the largest cosine between r and a column of J.
			gmax := 0.0
			rn := math.Sqrt(ss)
			for j := range np {
				cn := mat.Norm(jac.ColView(j), 2)
				if cn == 0 || rn == 0 {
					continue
				}
				gmax = math.Max(gmax, math.Abs(mat.Dot(jac.ColView(j), mat.NewVecDense(n, r)))/(cn*rn))
			}
			if gmax <= o.GTol {
				s.stop, s.reason = mdo.StopConverged, fmt.Sprintf("gradient: largest cosine between the residuals and a Jacobian column %.3g ≤ GTol %g", gmax, o.GTol)
				break
			}
		}
		if iter >= o.MaxIterations {
			s.stop, s.reason = mdo.StopIterations, fmt.Sprintf("the iteration limit (%d) was reached", o.MaxIterations)
			break
		}
		iter++
		// Solve [J; √λ D] δ = [−r; 0].
		aug.Zero()
		rhs.Zero()
		for i := range n {
			for j := range np {
				aug.Set(i, j, jac.At(i, j))
			}
			rhs.Set(i, 0, -r[i])
		}
		for j := range np {
			dj := d[j]
			if dj == 0 {
				dj = 1
			}
			aug.Set(n+j, j, math.Sqrt(lambda)*dj)
		}
		qr.Factorize(aug)
		if err := qr.SolveTo(&step, false, rhs); err != nil {
			lambda *= nu
			nu *= 2
			continue
		}
		// Predicted sum of squares ‖r + Jδ‖².
		predSS := 0.0
		for i := range n {
			v := r[i]
			for j := range np {
				v += jac.At(i, j) * step.At(j, 0)
			}
			predSS += v * v
		}
		stepNorm, pNorm := 0.0, 0.0
		for j := range np {
			trial[j] = p[j] + step.At(j, 0)
			stepNorm += (d[j] * step.At(j, 0)) * (d[j] * step.At(j, 0))
			pNorm += (d[j] * p[j]) * (d[j] * p[j])
		}
		stepNorm, pNorm = math.Sqrt(stepNorm), math.Sqrt(pNorm)
		tss, ok, err := s.residuals(trial, rt)
		if err != nil {
			// A trial the model cannot answer is a rejected step: a
			// shorter one is tried.
			s.failed++
			lambda *= nu
			nu *= 2
			continue
		}
		if !ok {
			break
		}
		actual, predicted := ss-tss, ss-predSS
		rho := -1.0
		if predicted > 0 {
			rho = actual / predicted
		}
		if rho > 0 && tss <= ss {
			copy(p, trial)
			copy(r, rt)
			old := ss
			ss = tss
			fresh = true
			lambda *= math.Max(1.0/3, 1-math.Pow(2*rho-1, 3))
			nu = 2
			if actual <= o.FTol*old && predicted <= o.FTol*old {
				s.stop, s.reason = mdo.StopConverged, fmt.Sprintf("sum of squares: relative change %.3g ≤ FTol %g", actual/math.Max(old, math.SmallestNonzeroFloat64), o.FTol)
			} else if stepNorm <= o.XTol*pNorm {
				s.stop, s.reason = mdo.StopConverged, fmt.Sprintf("step: relative size %.3g ≤ XTol %g", stepNorm/pNorm, o.XTol)
			} else if ss == 0 {
				s.stop, s.reason = mdo.StopConverged, "the residuals are zero"
			}
		} else {
			lambda *= nu
			nu *= 2
			if stepNorm <= o.XTol*pNorm || math.IsInf(lambda, 0) {
				s.stop, s.reason = mdo.StopConverged, fmt.Sprintf("step: no better point within relative size %.3g (XTol %g)", stepNorm/math.Max(pNorm, math.SmallestNonzeroFloat64), o.XTol)
			}
		}
	}
	if fresh {
		// The point moved after the last Jacobian: take it at the solution
		// (the budget may have ended the fit; then the last one is kept).
		saved := s.stop
		s.stop = mdo.NotStopped
		if ok, err := s.jacobian(p, jac); err != nil {
			return nil, err
		} else if !ok && s.stop != mdo.NotStopped {
			saved = s.stop
		}
		s.stop = saved
	}
	res := &FitResult{
		Names: append([]string(nil), pr.Names...), Params: p,
		RSS: ss, DoF: n - np, Iterations: iter, Evaluations: s.evals, Failed: s.failed,
		Stop: s.stop, Test: s.reason,
	}
	res.ResidualSD = math.Sqrt(ss / float64(res.DoF))
	res.Predicted, res.Residuals = make([]float64, n), make([]float64, n)
	for i := range n {
		res.Residuals[i] = r[i] / s.sw[i]
		res.Predicted[i] = pr.Observed[i] - res.Residuals[i]
	}
	res.Indistinct = covariance(res, jac, o.RankTol)
	if len(res.Indistinct) > 0 {
		return res, &IndistinctError{Groups: res.Indistinct}
	}
	return res, nil
}

// covariance fills the covariance, standard errors and correlation of res
// from the weighted Jacobian at the solution, by the singular value
// decomposition of the column-scaled Jacobian, and returns the groups of
// parameters that the data cannot tell apart.
func covariance(res *FitResult, jac *mat.Dense, rankTol float64) [][]string {
	n, np := jac.Dims()
	scale := make([]float64, np)
	js := mat.NewDense(n, np, nil)
	for j := range np {
		scale[j] = mat.Norm(jac.ColView(j), 2)
		if scale[j] == 0 {
			scale[j] = 1
		}
		for i := range n {
			js.Set(i, j, jac.At(i, j)/scale[j])
		}
	}
	res.StdErr = make([]float64, np)
	res.Covariance, res.Correlation = square(np), square(np)
	var svd mat.SVD
	if !svd.Factorize(js, mat.SVDThin) {
		for j := range np {
			res.StdErr[j] = math.NaN()
		}
		return [][]string{append([]string(nil), res.Names...)}
	}
	sv := svd.Values(nil)
	var v mat.Dense
	svd.VTo(&v)
	var groups [][]string
	for k := range np {
		if sv[k] > rankTol*sv[0] {
			continue
		}
		// The null direction: the parameters with a sizeable share in it.
		var g []string
		for j := range np {
			if math.Abs(v.At(j, k)) > 0.1 {
				g = append(g, res.Names[j])
			}
		}
		groups = append(groups, g)
	}
	sigma2 := res.RSS / float64(res.DoF)
	for a := range np {
		for b := range np {
			c := math.NaN()
			if len(groups) == 0 {
				c = 0
				for k := range np {
					c += v.At(a, k) * v.At(b, k) / (sv[k] * sv[k])
				}
				c *= sigma2 / (scale[a] * scale[b])
			}
			res.Covariance[a][b] = c
		}
	}
	for a := range np {
		res.StdErr[a] = math.Sqrt(res.Covariance[a][a])
	}
	for a := range np {
		for b := range np {
			res.Correlation[a][b] = res.Covariance[a][b] / (res.StdErr[a] * res.StdErr[b])
		}
	}
	return groups
}

// square returns an n×n table of zeros.
func square(n int) [][]float64 {
	t := make([][]float64, n)
	for i := range t {
		t[i] = make([]float64, n)
	}
	return t
}
