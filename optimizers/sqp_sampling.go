package optimizers

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"

	"couplet/mdo"
)

// Gradient sampling: aircraft models size components to the hardest of
// several requirements (the engines to the larger of the take-off and the
// cruise thrust, say), so their objective and constraints have kinks, and
// an optimum often lies on one: where two requirements are equal. There the
// gradient jumps, the quadratic model of one side predicts a decrease the
// other side denies, and the ordinary line search fails. Sextant then
// samples gradients at points around the current one and solves the
// subproblem with every sampled linearisation, the SQP-GS method of Curtis
// & Overton (SIAM J. Optim. 22(2), 2012; gradient sampling of Burke, Lewis
// & Overton, SIAM J. Optim. 15(3), 2005): the objective is modelled by the
// largest of its sampled linearisations and each constraint must hold in
// every one. Its optimality measure uses the bundle's multipliers, so that
// it is small at a point where a convex combination of the sampled
// gradients balances the constraints (a Clarke-stationary point, to the
// sampling radius); the radius is divided by ten until it reaches
// gsRadiusMin.
const (
	// gsRadius0 is the first sampling radius, in the unit box.
	gsRadius0 = 1e-3
	// gsRadiusMin is the smallest sampling radius: a point that passes the
	// optimality test with samples this close has converged. Well above
	// the finite-difference steps of the partials (about 6e-6 of a
	// variable's value), so that the samples on either side of a kink see
	// the gradient of their own side.
	gsRadiusMin = 1e-4
)

// samples evaluates n+1 points drawn uniformly from the box of half-width
// eps around p (clipped to the unit box), with their gradients; points whose
// analysis fails are left out.
func (s *sqp) samples(p *sqpPoint, eps float64, rng *rand.Rand) ([]*sqpPoint, error) {
	n := len(p.u)
	us := make([][]float64, n+1)
	for k := range us {
		us[k] = make([]float64, n)
		for j := range us[k] {
			us[k][j] = clip01(p.u[j] + eps*(2*rng.Float64()-1))
		}
	}
	evs, stop, err := s.r.evaluate(us)
	if err != nil {
		return nil, err
	}
	if stop != mdo.NotStopped {
		return nil, errSQPStop{stop}
	}
	var out []*sqpPoint
	for k, ev := range evs {
		if ev == nil || !ev.Converged || ev.Err != "" {
			continue
		}
		q := &sqpPoint{u: us[k], ev: ev}
		s.values(q)
		if err := s.gradients(q); err != nil {
			return nil, err
		}
		out = append(out, q)
	}
	return out, nil
}

// bundleSubproblem solves the elastic subproblem at p with the sampled
// linearisations of the bundle (see Gradient sampling above):
//
//	min ½ dᵀd + z + ρ(Σv + Σ(p+q))
//	s.t. z ≥ ∇f_kᵀd, ∇cᵢ_kᵀd + cᵢ + vᵢₖ ≥ 0 for every sampled point k,
//	     ∇cₑᵀd + cₑ + pₑ − qₑ = 0, 0 ≤ u + d ≤ 1, v, p, q ≥ 0.
//
// It returns the step, the rows' multipliers (summed over the points), the
// model's change of the objective z, the L1 violation of the linearised
// constraints and the optimality measure at p.
func (s *sqp) bundleSubproblem(p *sqpPoint, bundle []*sqpPoint) (d, lam []float64, model, lin, measure float64, err error) {
	n := len(p.u)
	// the sampled points only: p itself lies on the kink, within the
	// finite-difference steps of the partials, which straddle it and
	// give no gradient of either side
	pts := bundle
	if len(pts) == 0 {
		pts = []*sqpPoint{p}
	}
	nb := len(pts)
	// the rows the subproblem at p keeps (rowsAt), at every sampled point
	if err := s.rowsAt(p); err != nil {
		return nil, nil, 0, 0, 0, err
	}
	ineq, eq := s.kinds(p)
	mi, me := len(ineq), len(eq)
	iz := n          // z
	iv := n + 1      // v, one per inequality and point
	ip := iv + mi*nb // p
	iq := ip + me    // q
	nv := iq + me    // all variables
	// the identity, not the quasi-Newton matrix (whose curvature across a
	// kink is the gradient's jump): the step is then minus the smallest
	// element of the sampled Lagrangian gradients' hull, and its length
	// the optimality measure (Burke, Lewis & Overton 2005)
	H := mat.NewDense(nv, nv, nil)
	for i := 0; i < n; i++ {
		H.Set(i, i, 1)
	}
	c := make([]float64, nv)
	c[iz] = 1
	for k := iv; k < nv; k++ {
		c[k] = elasticPrice
	}
	ng := nb + nb*mi + (nv - iv) + 2*n
	G := mat.NewDense(ng, nv, nil)
	h := make([]float64, ng)
	row := 0
	for _, q := range pts {
		for j := 0; j < n; j++ {
			G.Set(row, j, -q.g[j])
		}
		G.Set(row, iz, 1)
		row++
	}
	first := row
	for a, i := range ineq {
		for k, q := range pts {
			for j := 0; j < n; j++ {
				G.Set(row, j, q.jc[i][j])
			}
			G.Set(row, iv+a*nb+k, 1)
			h[row] = interior - p.c[i]
			row++
		}
	}
	elasticTail(G, h, row, iv, nv, p.u)
	A, b := s.equalityRows(p, eq, nv, ip, iq)
	sol, err := solveQP(qpProblem{H: H, c: c, A: A, b: b, G: G, h: h})
	if err != nil {
		return nil, nil, 0, 0, 0, fmt.Errorf("optimizers: Sextant: the sampled subproblem at %v: %w", p.ev.Design, err)
	}
	d = sol.x[:n]
	model = sol.x[iz]
	for k := iv; k < nv; k++ {
		lin += math.Max(0, sol.x[k])
	}
	lin += s.leftOutViolation(p, d)
	// the Lagrangian's gradient with the bundle's multipliers
	gl := make([]float64, n)
	for k, q := range pts {
		for j := range gl {
			gl[j] += sol.z[k] * q.g[j]
		}
	}
	lam = make([]float64, len(s.rows))
	row = first
	for _, i := range ineq {
		for _, q := range pts {
			l := sol.z[row]
			if l < 0.5*elasticPrice {
				// a row at the elastic price is a sampled linearisation
				// no step satisfies (a constraint flat on one side of a
				// kink): its violation is judged by the feasibility
				// tolerance, and it is no multiplier of the limit
				lam[i] += l
			}
			for j := range gl {
				gl[j] -= l * q.jc[i][j]
			}
			row++
		}
	}
	for a, i := range eq {
		lam[i] = sol.y[a]
		for j := range gl {
			gl[j] -= sol.y[a] * p.jc[i][j]
		}
	}
	s.shareMultipliers(p, lam)
	all, _ := s.kinds(nil)
	measure = s.optimality(p, d, gl, lam, all)

	return d, lam, model, lin, measure, nil
}

// boundTol is the distance, in the unit box, within which a point or the
// end of a step counts as on a bound in the optimality measure: the
// interior-point subproblem ends its steps within about 1e-9 of a bound
// it holds (and boxStep puts only those within 1e-10 on it).
const boundTol = 1e-8

// optimality is the optimality measure at p: the largest component of the
// Lagrangian's gradient gl that does not point out of the box at a bound
// p lies on or the step d holds, and the complementarity |λᵢcᵢ| of the
// inequalities. A component at a bound that points out of the box is the
// bound's multiplier, of the right sign (the first-order conditions of a
// bound-constrained problem, Nocedal & Wright, Numerical Optimization,
// 2nd ed., §12.3 and §16.7): the step of the subproblem, which its
// interior-point solver ends within about 1e-9 of the bound rather than
// on it, does not decide it, and a point within boundTol of a bound is on
// it.
func (s *sqp) optimality(p *sqpPoint, d, gl, lam []float64, ineq []int) float64 {
	measure := 0.0
	for j, v := range gl {
		// the step's end decides only for a short step: a long one
		// that reaches a bound says the variable should go there, not
		// that it is held there (its gradient is not a multiplier)
		short := math.Abs(d[j]) <= boundTol
		lower := p.u[j] <= boundTol || (short && p.u[j]+d[j] <= boundTol)
		upper := p.u[j] >= 1-boundTol || (short && p.u[j]+d[j] >= 1-boundTol)
		if (lower && v > 0) || (upper && v < 0) {
			continue
		}
		measure = math.Max(measure, math.Abs(v))
	}
	for _, i := range ineq {
		measure = math.Max(measure, math.Abs(lam[i]*p.c[i]))
	}
	return measure
}
