package mdo

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// newtonScratch holds Newton's buffers for groups of n coupling variables,
// allocated the first time Newton runs on a workspace.
type newtonScratch struct {
	n                                int
	u, r, trial, rTrial, col, du, jr []float64
	// gu is P(G(u))/scale at the current iterate u (so r = gu − u), gLast
	// the same for the last residual evaluated
	gu, gLast []float64
	jac       *mat.Dense
	lu        mat.LU
	rhs, dx   *mat.VecDense
	// plans holds each coupled group's fdPlan once made, by the
	// group's position in the execution order
	plans []*fdPlan
	fd    *fdPlan // the plan of the group being solved
	ran   []bool  // per discipline of the system: computed by the current column
}

// fdPlan says, for one coupled group, which disciplines a Jacobian column
// must run: per coupling variable, the disciplines of the group that read
// it (in the group's order) and the one that computes it.
type fdPlan struct {
	readers  [][]int
	producer []int
}

// newNewtonScratch allocates the buffers for n coupling variables.
func newNewtonScratch(n int) *newtonScratch {
	f := func() []float64 { return make([]float64, n) }
	return &newtonScratch{n: n, u: f(), r: f(), trial: f(), rTrial: f(), col: f(), du: f(), jr: f(), gu: f(), gLast: f(),
		jac: mat.NewDense(n, n, nil), rhs: mat.NewVecDense(n, nil), dx: mat.NewVecDense(n, nil)}
}

// usePlan makes the fdPlan of group g the current one, making it the
// first time.
func (w *Workspace) usePlan(g *group) {
	s := w.nw
	if s.plans == nil {
		s.plans = make([]*fdPlan, len(w.sys.groups))
		s.ran = make([]bool, len(w.sys.discs))
	}
	gi := 0
	for gi < len(w.sys.groups) && &w.sys.groups[gi] != g {
		gi++
	}
	if s.plans[gi] == nil {
		fp := &fdPlan{readers: make([][]int, len(g.tear)), producer: make([]int, len(g.tear))}
		for k, v := range g.tear {
			fp.producer[k] = w.sys.producer[v]
			for _, d := range g.discs {
				p := &w.plan[d]
				for _, i := range p.loop {
					if p.inIdx[i] == v {
						fp.readers[k] = append(fp.readers[k], d)
						break
					}
				}
			}
		}
		s.plans[gi] = fp
	}
	s.fd = s.plans[gi]
}

// newton converges a coupled group by Newton's method on the scaled
// coupling residual R(u) = P(G(y))/scale − u, u = y/scale, where G is one
// Jacobi sweep of the group and P the projection onto the validity
// ranges (see solve).
//
//   - Scaling: every coupling variable is divided by its scale, so the
//     residual and the step are dimensionless and of order one.
//   - Jacobian: forward finite differences (step 1e-7 in scaled units,
//     backward where the forward step would leave the range), computed at
//     the first iteration and then kept up to date by Broyden's rank-one
//     update; a fresh finite-difference Jacobian is computed only when the
//     line search fails with an updated one. One Jacobian costs n sweeps
//     of the disciplines that read the perturbed variable (the others
//     would compute what they computed at u), an update none.
//   - Globalisation: a backtracking line search on ‖R‖₂ (Armijo test with
//     c = 1e-4, at most 12 halvings); each trial point is clipped into the
//     scaled ranges, and a trial on which a discipline fails counts as no
//     decrease. When even a fresh Jacobian gives no decrease the step
//     falls back to one fixed-point sweep u ← u + R(u).
func (w *Workspace) newton(ctx context.Context, g *group, set SolverSettings, p solvePath, rep *CouplingReport) error {
	nt := len(g.tear)
	if w.nw == nil || w.nw.n != nt {
		w.nw = newNewtonScratch(nt)
	}
	s := w.nw
	scale := w.scale[:nt]
	u, r, trial, rTrial := s.u, s.r, s.trial, s.rTrial
	lo := func(k int) float64 { return g.lo[k] / scale[k] }
	hi := func(k int) float64 { return g.hi[k] / scale[k] }
	for k, v := range g.tear {
		u[k] = w.val[v] / scale[k]
	}
	first := true
	resid := func(dst, x []float64) error {
		for k, v := range g.tear {
			w.val[v] = x[k] * scale[k]
		}
		if err := w.sweep(g, true, first); err != nil {
			return err
		}
		first = false
		for k, v := range g.tear {
			s.gLast[k] = clip(w.val[v], g.lo[k], g.hi[k]) / scale[k]
			dst[k] = s.gLast[k] - x[k]
		}
		return nil
	}
	if err := resid(r, u); err != nil {
		return w.loopError(g, err, p)
	}
	copy(s.gu, s.gLast)
	w.usePlan(g)
	fresh, haveJac := false, false
	watch := stallWatch{best: math.Inf(1), shrink: newtonShrink}
	for it := 1; it <= set.MaxIterations; it++ {
		if err := ctx.Err(); err != nil {
			return fmt.Errorf("mdo: coupled group {%s} cancelled at iteration %d: %w", joinNames(g.names), it, err)
		}
		n0 := infNorm(r)
		if done := w.logIteration(rep, it, n0, set.Tolerance, &watch); done {
			if rep.Converged {
				// the values are those of the last sweep, G(u)
				w.fillWorst(g, r, rep)
				return w.closure(g, p)
			}
			break
		}
		if !haveJac {
			if err := w.fdJacobian(g, u, r, lo, hi, set.Exhaustive); err != nil {
				return w.loopError(g, err, p)
			}
			haveJac, fresh = true, true
		}
		s.lu.Factorize(s.jac)
		for k := range r {
			s.rhs.SetVec(k, -r[k])
		}
		if err := s.lu.SolveVecTo(s.dx, false, s.rhs); err != nil {
			copy(s.du, r) // singular: a fixed-point step
		} else {
			for k := range s.du {
				s.du[k] = s.dx.AtVec(k)
			}
		}
		m0 := twoNorm(r)
		accepted := false
		lambda := 1.0
		for tries := 0; tries < 12; tries++ {
			for k := range u {
				trial[k] = math.Max(lo(k), math.Min(hi(k), u[k]+lambda*s.du[k]))
			}
			if err := resid(rTrial, trial); err == nil && twoNorm(rTrial) <= (1-1e-4*lambda)*m0 {
				accepted = true
				copy(s.gu, s.gLast)
				break
			}
			lambda /= 2
		}
		if !accepted && !fresh {
			haveJac = false // retry this iterate with a fresh Jacobian
			continue
		}
		if !accepted {
			for k := range u {
				trial[k] = math.Max(lo(k), math.Min(hi(k), u[k]+r[k]))
			}
			if err := resid(rTrial, trial); err != nil {
				return w.loopError(g, err, p)
			}
			copy(s.gu, s.gLast)
		}
		w.broyden(trial, rTrial)
		copy(u, trial)
		copy(r, rTrial)
		fresh = false
	}
	w.fillWorst(g, r, rep)
	if err := w.closure(g, p); err != nil {
		return err
	}
	return &ConvergenceError{CouplingReport: rep.Clone()}
}

// fdJacobian fills the Newton Jacobian by finite differences at u, where
// the residual is r.
func (w *Workspace) fdJacobian(g *group, u, r []float64, lo, hi func(int) float64, exhaustive bool) error {
	s := w.nw
	copy(s.trial, u)
	for j := range u {
		h := 1e-7 * math.Max(1, math.Abs(u[j]))
		if u[j]+h > hi(j) {
			h = -h
		}
		s.trial[j] = u[j] + h
		err := w.fdColumn(g, j, s.trial, s.col, exhaustive)
		if err != nil {
			h = -h
			s.trial[j] = u[j] + h
			err = w.fdColumn(g, j, s.trial, s.col, exhaustive)
		}
		s.trial[j] = u[j]
		if err != nil {
			return err
		}
		for i := range r {
			s.jac.Set(i, j, (s.col[i]-r[i])/h)
		}
	}
	return nil
}

// fdColumn writes to dst the residual at x, which differs from the
// iterate u in coupling variable j alone: the Jacobi sweep of the group
// at x, run only for the disciplines that read variable j. Every other
// discipline would get the inputs it had at u, so it would compute u's
// outputs bit for bit (a discipline is a function of its inputs): the
// residual of the variables it computes is u's (from s.gu), and its
// values in the workspace are left as they are: nothing reads them before
// a sweep of every discipline overwrites them (the iterates Newton
// accepts, and so the values of a converged group, come from such
// sweeps). The error is the whole sweep's too: the disciplines left out
// succeeded on these inputs at u.
func (w *Workspace) fdColumn(g *group, j int, x, dst []float64, exhaustive bool) error {
	s := w.nw
	scale := w.scale[:len(g.tear)]
	for k, v := range g.tear {
		w.val[v] = x[k] * scale[k]
	}
	if exhaustive {
		if err := w.sweep(g, true, false); err != nil {
			return err
		}
		for k, v := range g.tear {
			dst[k] = clip(w.val[v], g.lo[k], g.hi[k])/scale[k] - x[k]
		}
		return nil
	}
	ds := s.fd.readers[j]
	for _, d := range ds {
		if err := w.gatherLoop(d); err != nil {
			return err
		}
	}
	for _, d := range ds {
		if err := w.compute(d); err != nil {
			return err
		}
	}
	for _, d := range ds {
		w.scatter(d)
		s.ran[d] = true
	}
	for k, v := range g.tear {
		if s.ran[s.fd.producer[k]] {
			dst[k] = clip(w.val[v], g.lo[k], g.hi[k])/scale[k] - x[k]
		} else {
			dst[k] = s.gu[k] - x[k]
		}
	}
	for _, d := range ds {
		s.ran[d] = false
	}
	return nil
}

// broyden applies Broyden's rank-one update for the step from s.u (where
// the residual is s.r) to x (residual rx): J += (Δr − J Δu) Δuᵀ / (Δuᵀ Δu).
func (w *Workspace) broyden(x, rx []float64) {
	s := w.nw
	den := 0.0
	for k := range x {
		s.du[k] = x[k] - s.u[k]
		den += s.du[k] * s.du[k]
	}
	if !(den > 0) {
		return
	}
	for i := range x {
		jd := 0.0
		for j := range x {
			jd += s.jac.At(i, j) * s.du[j]
		}
		s.jr[i] = (rx[i] - s.r[i] - jd) / den
	}
	for i := range x {
		for j := range x {
			s.jac.Set(i, j, s.jac.At(i, j)+s.jr[i]*s.du[j])
		}
	}
}

// infNorm is the largest magnitude of r (NaN when any entry is NaN).
func infNorm(r []float64) float64 {
	m := 0.0
	for _, x := range r {
		if a := math.Abs(x); a > m || math.IsNaN(a) {
			m = a
		}
	}
	return m
}

// twoNorm is the Euclidean norm of r.
func twoNorm(r []float64) float64 {
	s := 0.0
	for _, x := range r {
		s += x * x
	}
	return math.Sqrt(s)
}
