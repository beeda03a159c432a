package optimizers

import (
	"fmt"
	"math"

	"couplet/mdo"
)

// sensitivity computes the post-optimality sensitivity at p with the
// multipliers lam of the subproblem solved there.
func (s *sqp) sensitivity(p *sqpPoint, lam []float64) (*mdo.Sensitivity, error) {
	st := s.r.ev.Study()
	pd, err := s.r.ev.DerivativesWith(s.r.ctx, p.u, s.o.Parameters)
	if err != nil {
		return nil, err
	}
	sense := 1.0
	if st.Objectives[0].Maximize {
		sense = -1
	}
	out := &mdo.Sensitivity{Objective: st.Objectives[0].Name, Unit: s.unit(st.Objectives[0].Name, st.Objectives[0].Unit)}
	cons := s.r.ev.Constraints()
	why := s.undefinedMultipliers(p, lam)
	for i, row := range s.rows {
		c := cons[row.k]
		l := mdo.LimitCost{Constraint: c.Name, Bound: row.limit(), Limit: row.bound, Unit: s.unit(c.Name, c.Unit), Active: math.Abs(lam[i]) > activeMultiplier}
		switch {
		case why[i] != "":
			l.PerUnit, l.NotDefined = math.NaN(), why[i]
		case l.Active:
			l.PerUnit = sense * s.fscale * lam[i] * row.sign / row.scale
		}
		out.Limits = append(out.Limits, l)
	}
	for j, name := range s.o.Parameters {
		d := sense * pd.ObjectivesByParameter[0][j] / s.fscale
		for i, row := range s.rows {
			d -= lam[i] * row.sign * pd.ConstraintsByParameter[row.k][j] / row.scale
		}
		v := p.ev.Outputs[st.System.Index(name)]
		out.Parameters = append(out.Parameters, mdo.ParameterCost{Parameter: name, Value: v, Unit: s.unit(name, ""), PerUnit: sense * s.fscale * d})
	}
	return out, nil
}

// unit is the declared unit, else that of the system variable name.
func (s *sqp) unit(name, declared string) string {
	if declared != "" {
		return declared
	}
	if v, err := s.r.ev.Study().System.Var(name); err == nil {
		return v.Unit
	}
	return ""
}

// activeMultiplier is the smallest multiplier, in the scaled units of the
// subproblem (objective over its starting magnitude, constraint over its
// Scale), of an active limit: below it the multiplier is the rounding of
// the subproblem's solution.
const activeMultiplier = 1e-7

// Thresholds of a multiplier that is no sensitivity (undefinedMultipliers).
const (
	// flatConstraint is the largest gradient norm, in units of the
	// constraint's Scale per width of the design box, of a constraint that
	// does not vary with the design: across the whole box it moves by
	// less than a millionth of its scale.
	flatConstraint = 1e-6
	// dependentGradient is the largest share of an active constraint's
	// gradient left outside the span of the other active constraints' and
	// bounds' gradients when the active set is degenerate.
	dependentGradient = 1e-6
)

// undefinedMultipliers says, for each row active at p (multiplier lam
// above activeMultiplier), why its multiplier is not the derivative of
// the optimum with respect to its limit ("" when it is). By the KKT
// conditions the multipliers solve ∇f = Σ λᵢ∇cᵢ + Σ μⱼeⱼ over the active
// constraints and bounds (e.g. Nocedal & Wright, Numerical Optimization,
// 2nd ed., ch. 12); they are unique, and so the derivatives of the
// optimal objective, only when those gradients are linearly independent
// (LICQ). A row is not defined when
//   - its gradient is zero (flatConstraint): the constraint does not vary
//     with the design, and another rule holds it at its limit (a take-off
//     field length met by engines sized to it): the subproblem prices it
//     at anything up to its elastic price;
//   - its gradient is a combination of the other active rows' and the
//     bounds' (dependentGradient): the multipliers are not unique;
//   - its multiplier reached the elastic price: it is the price of a
//     linearisation no step satisfies, not a derivative.
func (s *sqp) undefinedMultipliers(p *sqpPoint, lam []float64) []string {
	why := make([]string, len(s.rows))
	var basis [][]float64 // orthonormal, per active row or bound
	add := func(v []float64) {
		if r := residual(v, basis); norm2(r) > dependentGradient*norm2(v) {
			basis = append(basis, scaled(r, 1/norm2(r)))
		}
	}
	// the bounds the optimum lies on
	n := len(p.u)
	for j, u := range p.u {
		if u == 0 || u == 1 {
			e := make([]float64, n)
			e[j] = 1
			add(e)
		}
	}
	var active []int
	for i := range s.rows {
		if math.Abs(lam[i]) <= activeMultiplier {
			continue
		}
		g := norm2(p.jc[i])
		switch {
		case g <= flatConstraint:
			why[i] = fmt.Sprintf("the constraint does not vary with the design here (its gradient is %.2g of its scale per width of the design box): something other than the design holds it at its limit", g)
		case math.Abs(lam[i]) >= 0.5*elasticPrice:
			why[i] = "its multiplier is the subproblem's price of a linearisation no step satisfies, not a derivative"
		default:
			active = append(active, i)
		}
	}
	// each remaining active row against the span of the bounds and the
	// other active rows
	for _, i := range active {
		saved := basis
		for _, k := range active {
			if k != i {
				add(p.jc[k])
			}
		}
		if r := norm2(residual(p.jc[i], basis)); r <= dependentGradient*norm2(p.jc[i]) {
			why[i] = fmt.Sprintf("its gradient is a combination of those of the other active limits and bounds (%.2g of it left outside them): the multipliers are not unique", r/norm2(p.jc[i]))
		}
		basis = saved
	}
	return why
}

// residual is v less its projection on the orthonormal basis (modified
// Gram–Schmidt, twice for rounding).
func residual(v []float64, basis [][]float64) []float64 {
	r := append([]float64(nil), v...)
	for range 2 {
		for _, b := range basis {
			d := dot(r, b)
			for j := range r {
				r[j] -= d * b[j]
			}
		}
	}
	return r
}

// norm2 is the Euclidean norm of v.
func norm2(v []float64) float64 { return math.Sqrt(dot(v, v)) }

// scaled is a·v.
func scaled(v []float64, a float64) []float64 {
	o := make([]float64, len(v))
	for j := range v {
		o[j] = a * v[j]
	}
	return o
}
