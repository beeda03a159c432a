package optimizers

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// qpProblem is the convex quadratic programme
//
//	minimise ½ xᵀHx + cᵀx   subject to   A x = b,   G x ≥ h,
//
// with H symmetric positive semi-definite (positive definite on the
// null space of the active constraints). A and b may be nil.
type qpProblem struct {
	H    *mat.Dense
	c    []float64
	A    *mat.Dense
	b    []float64
	G    *mat.Dense
	h    []float64
	tol  float64 // default 1e-11
	iter int     // default 1000
}

// qpSolution is the solution and its multipliers: y of the equalities,
// z ≥ 0 of the inequalities, with the Lagrangian
// ½xᵀHx + cᵀx − yᵀ(Ax − b) − zᵀ(Gx − h).
type qpSolution struct {
	x, y, z    []float64
	iterations int
}

// errQPNotConverged is returned when the interior-point iteration stops
// without meeting its tolerance (an infeasible or unbounded programme).
var errQPNotConverged = errors.New("quadratic programme not solved")

// solveQP solves the programme by Mehrotra's predictor–corrector
// primal–dual interior-point method (Mehrotra, SIAM J. Optim. 2(4), 1992;
// for quadratic programmes Nocedal & Wright, Numerical Optimization, 2nd
// ed., §16.6), on gonum's dense LU. The inequalities get slacks s ≥ 0; each
// iteration factorises the reduced KKT matrix
//
//	[ H + Gᵀ(Z/S)G   −Aᵀ ] [dx]
//	[      A           0  ] [dy]
//
// once and solves it for the affine (predictor) and the centred
// (corrector) step, the centring σ = (μ_aff/μ)³; the step keeps s and z
// positive (fraction 0.99 of the way to the boundary). It stops when the
// residuals of stationarity, equalities and inequalities are below tol
// relative to the data and the mean complementarity sᵀz/m below tol/1000,
// and then re-solves the programme on the active set it found (purify)
// so that active constraints hold exactly. When the tolerance is not met
// within the iterations, the active set of the last iterate is tried the
// same way: a solution that passes purify's checks is a KKT point, hence
// optimal for the convex programme.
func solveQP(p qpProblem) (qpSolution, error) {
	n := len(p.c)
	me, mi := 0, 0
	if p.A != nil {
		me, _ = p.A.Dims()
	}
	if p.G != nil {
		mi, _ = p.G.Dims()
	}
	tol := p.tol
	if tol == 0 {
		tol = 1e-11
	}
	maxIter := p.iter
	if maxIter == 0 {
		// Mehrotra's method mostly needs 10–30 iterations; the elastic
		// subproblems of Sextant, whose slacks cost 1e4 against unit
		// gradients, have needed more than 200 (Sellar IDF with its limit
		// moved to 3.15)
		maxIter = 1000
	}
	x := make([]float64, n)
	y := make([]float64, me)
	z := make([]float64, mi)
	s := make([]float64, mi)
	gx := make([]float64, mi)
	mulVec(p.G, x, gx)
	for i := range s {
		s[i] = math.Max(1, gx[i]-p.h[i])
		z[i] = 1
	}
	scale := 1 + math.Max(infNorm(p.c), math.Max(infNorm(p.b), infNorm(p.h)))
	rd := make([]float64, n)
	rp := make([]float64, me)
	rg := make([]float64, mi)
	K := mat.NewDense(n+me, n+me, nil)
	rhs := mat.NewVecDense(n+me, nil)
	var sol mat.VecDense
	dx := make([]float64, n)
	dy := make([]float64, me)
	dz := make([]float64, mi)
	ds := make([]float64, mi)
	rc := make([]float64, mi)
	tmp := make([]float64, mi)
	var lu mat.LU
	// the iterate with the smallest residuals so far (their largest,
	// relative to the data, or the complementarity times 1000, as the
	// stopping test weighs them): its active set is tried when the
	// iteration breaks down
	bestScore := math.Inf(1)
	bestS := make([]float64, mi)
	bestZ := make([]float64, mi)
	// step solves the Newton system for the complementarity residual rc.
	step := func() error {
		for i := 0; i < mi; i++ {
			tmp[i] = rc[i]/s[i] + z[i]/s[i]*rg[i]
		}
		for i := 0; i < n; i++ {
			v := -rd[i]
			for k := 0; k < mi; k++ {
				v -= p.G.At(k, i) * tmp[k]
			}
			rhs.SetVec(i, v)
		}
		for k := 0; k < me; k++ {
			rhs.SetVec(n+k, -rp[k])
		}
		if err := lu.SolveVecTo(&sol, false, rhs); err != nil {
			var c mat.Condition
			if !errors.As(err, &c) {
				return err
			}
			// ill-conditioned near the solution (z/s large): the step
			// is still usable
		}
		for i := 0; i < n; i++ {
			dx[i] = sol.AtVec(i)
		}
		for k := 0; k < me; k++ {
			dy[k] = sol.AtVec(n + k)
		}
		mulVec(p.G, dx, ds)
		for i := 0; i < mi; i++ {
			ds[i] += rg[i]
			dz[i] = -rc[i]/s[i] - z[i]/s[i]*ds[i]
		}
		return nil
	}
	maxStep := func() float64 {
		a := 1.0
		for i := 0; i < mi; i++ {
			if ds[i] < 0 {
				a = math.Min(a, -s[i]/ds[i])
			}
			if dz[i] < 0 {
				a = math.Min(a, -z[i]/dz[i])
			}
		}
		return a
	}
	for it := 0; it < maxIter; it++ {
		// residuals
		mulVec(p.H, x, rd)
		for i := range rd {
			rd[i] += p.c[i]
		}
		for k := 0; k < me; k++ {
			v := -p.b[k]
			for i := 0; i < n; i++ {
				v += p.A.At(k, i) * x[i]
				rd[i] -= p.A.At(k, i) * y[k]
			}
			rp[k] = v
		}
		mulVec(p.G, x, gx)
		mu := 0.0
		for k := 0; k < mi; k++ {
			rg[k] = gx[k] - s[k] - p.h[k]
			for i := 0; i < n; i++ {
				rd[i] -= p.G.At(k, i) * z[k]
			}
			mu += s[k] * z[k]
		}
		if mi > 0 {
			mu /= float64(mi)
		}
		score := math.Max(math.Max(infNorm(rd), infNorm(rp)), math.Max(infNorm(rg), 1e3*mu))
		if math.IsNaN(score) || math.IsInf(score, 0) {
			// the Newton systems have lost all precision (complementarity
			// far ahead of dual feasibility: z/s spans too many orders)
			return breakdown(p, bestS, bestZ, bestScore, nonFinite(it, x, y, s, z))
		}
		if score < bestScore {
			bestScore = score
			copy(bestS, s)
			copy(bestZ, z)
		}
		if infNorm(rd) <= tol*scale && infNorm(rp) <= tol*scale && infNorm(rg) <= tol*scale && mu <= 1e-3*tol*scale {
			sol := qpSolution{x: x, y: y, z: z, iterations: it}
			if pure, ok := purify(p, s, z); ok {
				pure.iterations = it
				return pure, nil
			}
			return sol, nil
		}
		// reduced KKT matrix
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				v := p.H.At(i, j)
				for k := 0; k < mi; k++ {
					v += p.G.At(k, i) * z[k] / s[k] * p.G.At(k, j)
				}
				K.Set(i, j, v)
			}
			for k := 0; k < me; k++ {
				K.Set(i, n+k, -p.A.At(k, i))
				K.Set(n+k, i, p.A.At(k, i))
			}
		}
		lu.Factorize(K)
		// predictor
		for i := 0; i < mi; i++ {
			rc[i] = s[i] * z[i]
		}
		if err := step(); err != nil {
			return qpSolution{}, fmt.Errorf("%w: singular KKT matrix at iteration %d: %v", errQPNotConverged, it, err)
		}
		a := maxStep()
		muAff := 0.0
		for i := 0; i < mi; i++ {
			muAff += (s[i] + a*ds[i]) * (z[i] + a*dz[i])
		}
		sigma := 0.0
		if mi > 0 {
			muAff /= float64(mi)
			sigma = math.Pow(muAff/mu, 3)
		}
		// corrector
		for i := 0; i < mi; i++ {
			rc[i] = s[i]*z[i] + ds[i]*dz[i] - sigma*mu
		}
		if err := step(); err != nil {
			return qpSolution{}, fmt.Errorf("%w: singular KKT matrix at iteration %d: %v", errQPNotConverged, it, err)
		}
		a = math.Min(1, 0.99*maxStep())
		for i := range x {
			x[i] += a * dx[i]
		}
		for k := range y {
			y[k] += a * dy[k]
		}
		for k := range s {
			s[k] += a * ds[k]
			z[k] += a * dz[k]
		}
	}
	// the tolerance was not met (rounding in a badly scaled programme):
	// the active set of the last iterate still gives the solution when
	// it satisfies the optimality conditions
	if pure, ok := purify(p, s, z); ok {
		pure.iterations = maxIter
		return pure, nil
	}
	if pure, ok := purify(p, bestS, bestZ); ok {
		pure.iterations = maxIter
		return pure, nil
	}
	return qpSolution{x: x, y: y, z: z, iterations: maxIter}, errQPNotConverged
}

// breakdown ends an interior-point iteration whose iterate became
// non-finite (what says where): the active set of the best iterate before
// it (slacks s, multipliers z, with residual score) gives the solution
// when purify accepts it; otherwise the error names what broke.
func breakdown(p qpProblem, s, z []float64, score float64, what *qpNonFiniteError) (qpSolution, error) {
	if !math.IsInf(score, 1) {
		if pure, ok := purify(p, s, z); ok {
			pure.iterations = what.Iteration
			return pure, nil
		}
	}
	return qpSolution{}, what
}

// qpNonFiniteError is the breakdown of the interior-point iteration: at
// Iteration, the first non-finite component of the iterate (Quantity is
// "x", "y", "slack" or "multiplier"; Index its index: of the variables
// for x, of the equalities for y, of the inequalities for a slack or
// multiplier), or Quantity "residual" when the iterate is finite and its
// residuals are not (data that are not finite, or an overflow). It unwraps to errQPNotConverged.
type qpNonFiniteError struct {
	Iteration int
	Quantity  string
	Index     int
	Value     float64
}

func (e *qpNonFiniteError) Error() string {
	switch e.Quantity {
	case "x":
		return fmt.Sprintf("%v: the iterate became non-finite at iteration %d: variable %d is %g", errQPNotConverged, e.Iteration, e.Index, e.Value)
	case "y":
		return fmt.Sprintf("%v: the iterate became non-finite at iteration %d: the multiplier of equality %d is %g", errQPNotConverged, e.Iteration, e.Index, e.Value)
	case "slack", "multiplier":
		return fmt.Sprintf("%v: the iterate became non-finite at iteration %d: the %s of inequality %d is %g", errQPNotConverged, e.Iteration, e.Quantity, e.Index, e.Value)
	}
	return fmt.Sprintf("%v: the iterate became non-finite at iteration %d: its residuals are not finite", errQPNotConverged, e.Iteration)
}

func (e *qpNonFiniteError) Unwrap() error { return errQPNotConverged }

// nonFinite names the first non-finite component of the iterate x, y, s,
// z at iteration it.
func nonFinite(it int, x, y, s, z []float64) *qpNonFiniteError {
	for _, q := range []struct {
		name string
		v    []float64
	}{{"x", x}, {"y", y}, {"slack", s}, {"multiplier", z}} {
		for i, v := range q.v {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return &qpNonFiniteError{Iteration: it, Quantity: q.name, Index: i, Value: v}
			}
		}
	}
	return &qpNonFiniteError{Iteration: it, Quantity: "residual", Index: -1, Value: math.NaN()}
}

// purify re-solves the programme with the inequalities the interior
// point found active (z > s) held as equalities, so that the solution
// sits exactly on its active constraints (the interior point reaches
// them only within its tolerance). It returns false, and the caller keeps
// the interior-point solution, when the active set's KKT system is
// singular or its solution is not optimal (a negative multiplier or a
// violated inactive constraint).
func purify(p qpProblem, s, z []float64) (qpSolution, bool) {
	n := len(p.c)
	me := len(p.b)
	var act []int
	for i := range s {
		if z[i] > s[i] {
			act = append(act, i)
		}
	}
	m := n + len(act) + me
	K := mat.NewDense(m, m, nil)
	rhs := mat.NewVecDense(m, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			K.Set(i, j, p.H.At(i, j))
		}
		rhs.SetVec(i, -p.c[i])
		for a, k := range act {
			K.Set(i, n+a, -p.G.At(k, i))
			K.Set(n+a, i, p.G.At(k, i))
		}
		for k := 0; k < me; k++ {
			K.Set(i, n+len(act)+k, -p.A.At(k, i))
			K.Set(n+len(act)+k, i, p.A.At(k, i))
		}
	}
	for a, k := range act {
		rhs.SetVec(n+a, p.h[k])
	}
	for k := 0; k < me; k++ {
		rhs.SetVec(n+len(act)+k, p.b[k])
	}
	var lu mat.LU
	lu.Factorize(K)
	if lu.Cond() > 1e12 {
		return qpSolution{}, false
	}
	var sol mat.VecDense
	if err := lu.SolveVecTo(&sol, false, rhs); err != nil {
		return qpSolution{}, false
	}
	out := qpSolution{x: make([]float64, n), y: make([]float64, me), z: make([]float64, len(s))}
	for i := 0; i < n; i++ {
		out.x[i] = sol.AtVec(i)
	}
	for a, k := range act {
		out.z[k] = sol.AtVec(n + a)
		if out.z[k] < -1e-9*(1+infNorm(p.c)) {
			return qpSolution{}, false
		}
		out.z[k] = math.Max(out.z[k], 0)
	}
	for k := 0; k < me; k++ {
		out.y[k] = sol.AtVec(n + len(act) + k)
	}
	gx := make([]float64, len(s))
	mulVec(p.G, out.x, gx)
	for k := range gx {
		if gx[k]-p.h[k] < -1e-9*(1+math.Abs(p.h[k])) {
			return qpSolution{}, false
		}
	}
	return out, true
}

// mulVec writes m·v into dst (nothing when m is nil).
func mulVec(m *mat.Dense, v, dst []float64) {
	if m == nil {
		return
	}
	r, c := m.Dims()
	for i := 0; i < r; i++ {
		sum := 0.0
		for j := 0; j < c; j++ {
			sum += m.At(i, j) * v[j]
		}
		dst[i] = sum
	}
}

// infNorm is the largest magnitude in v (0 when empty).
func infNorm(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		m = math.Max(m, math.Abs(x))
	}
	return m
}
