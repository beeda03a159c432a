package mdo

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
)

// newton converges a coupled group by Newton's method on the scaled
// coupling residual R(u) = (G(y) − y)/scale, u = y/scale, where G is one
// Jacobi sweep of the group. The Jacobian comes from forward finite
// differences (gonum diff/fd); the step is solved by LU (gonum mat) and
// halved while it does not reduce the residual.
func (w *Workspace) newton(ctx context.Context, g *group, set SolverSettings, rep *Report) error {
	nt := len(g.tear)
	scale := w.scale[:nt]
	u := make([]float64, nt)
	for k, v := range g.tear {
		u[k] = w.val[v] / scale[k]
	}
	var evalErr error
	first := true
	resid := func(dst, x []float64) {
		if evalErr != nil {
			for k := range dst {
				dst[k] = math.NaN()
			}
			return
		}
		for k, v := range g.tear {
			w.val[v] = x[k] * scale[k]
		}
		err := w.sweep(g, true, first)
		first = false
		if err != nil {
			evalErr = err
			for k := range dst {
				dst[k] = math.NaN()
			}
			return
		}
		for k, v := range g.tear {
			dst[k] = w.val[v]/scale[k] - x[k]
		}
	}
	norm := func(r []float64) float64 {
		m := 0.0
		for _, x := range r {
			if a := math.Abs(x); a > m || math.IsNaN(a) {
				m = a
			}
		}
		return m
	}
	r := make([]float64, nt)
	trial := make([]float64, nt)
	rTrial := make([]float64, nt)
	jac := mat.NewDense(nt, nt, nil)
	step := make([]float64, nt)
	var lu mat.LU
	resid(r, u)
	if evalErr != nil {
		return evalErr
	}
	for it := 1; it <= set.MaxIterations; it++ {
		if err := ctx.Err(); err != nil {
			return fmt.Errorf("mdo: coupled group {%s} cancelled at iteration %d: %w", joinNames(g.names), it, err)
		}
		n0 := norm(r)
		rep.Iterations = it
		rep.Residual = n0
		rep.History = append(rep.History, n0)
		w.cnt.Iterations++
		if n0 <= set.Tolerance {
			rep.Converged = true
			w.fillWorst(g, r, rep)
			// leave the values at G(u): one last sweep from u
			resid(r, u)
			return evalErr
		}
		if !(n0 < divergeLimit) {
			rep.Diverged = true
			break
		}
		fd.Jacobian(jac, resid, u, &fd.JacobianSettings{Formula: fd.Forward, OriginValue: r, Step: 1e-7})
		if evalErr != nil {
			return evalErr
		}
		lu.Factorize(jac)
		rhs := mat.NewVecDense(nt, nil)
		for k := range r {
			rhs.SetVec(k, -r[k])
		}
		var dx mat.VecDense
		if err := lu.SolveVecTo(&dx, false, rhs); err != nil {
			// singular Jacobian: fall back to a fixed-point step
			for k := range step {
				step[k] = r[k]
			}
		} else {
			for k := range step {
				step[k] = dx.AtVec(k)
			}
		}
		lambda := 1.0
		for tries := 0; tries < 20; tries++ {
			for k := range u {
				trial[k] = u[k] + lambda*step[k]
			}
			resid(rTrial, trial)
			if evalErr != nil {
				return evalErr
			}
			if norm(rTrial) < n0 || tries == 19 {
				break
			}
			lambda /= 2
		}
		copy(u, trial)
		copy(r, rTrial)
	}
	w.fillWorst(g, r, rep)
	return &ConvergenceError{Report: rep.Clone()}
}
