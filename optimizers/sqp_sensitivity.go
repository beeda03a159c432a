package optimizers

import (
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
	for i, row := range s.rows {
		c := cons[row.k]
		bound := "upper"
		switch {
		case row.eq:
			bound = "target"
		case row.sign > 0:
			bound = "lower"
		}
		l := mdo.LimitCost{Constraint: c.Name, Bound: bound, Limit: row.bound, Unit: s.unit(c.Name, c.Unit), Active: math.Abs(lam[i]) > activeMultiplier}
		if l.Active {
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
