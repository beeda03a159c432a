package optimizers

import (
	"fmt"
	"math"
	"strings"
)

// LimitCost is what one constraint limit costs at an optimum: the
// Lagrange multiplier of the constraint in the user's units.
type LimitCost struct {
	// Constraint names the constraint; Bound says which limit ("upper",
	// "lower" or "target") and Limit its value.
	Constraint string
	Bound      string
	Limit      float64
	// Active is true when the limit binds (its multiplier is positive).
	Active bool
	// PerUnit is d(optimal objective)/d(limit), in objective units per
	// unit of the constrained quantity: "1 m more take-off field length
	// saves PerUnit·(−1) kg of take-off mass".
	PerUnit float64
}

// ParameterCost is the derivative of the optimal objective with respect
// to a fixed parameter.
type ParameterCost struct {
	Parameter string
	Value     float64
	// PerUnit is d(optimal objective)/d(parameter), in objective units per
	// unit of the parameter.
	PerUnit float64
}

// Sensitivity is the post-optimality sensitivity of a converged optimum:
// by the envelope theorem the derivative of the optimal objective with
// respect to a limit b of an active constraint is its multiplier, and
// with respect to a parameter p it is the partial derivative of the
// Lagrangian, ∂f/∂p − Σ λᵢ ∂cᵢ/∂p, at the optimum (e.g. Fiacco,
// Introduction to Sensitivity and Stability Analysis in Nonlinear
// Programming, 1983). Valid for small changes that keep the same active
// constraints.
type Sensitivity struct {
	Objective  string
	Limits     []LimitCost
	Parameters []ParameterCost
}

// String formats the sensitivity as a table, active limits first.
func (s *Sensitivity) String() string {
	if s == nil {
		return "no post-optimality sensitivity (the optimum did not converge)"
	}
	var b strings.Builder
	fmt.Fprintf(&b, "post-optimality sensitivity of %s (conceptual estimates, first order):\n", s.Objective)
	for _, active := range []bool{true, false} {
		for _, l := range s.Limits {
			if l.Active != active {
				continue
			}
			state := "active"
			if !active {
				state = "inactive"
			}
			fmt.Fprintf(&b, "  %-40s %-6s limit %-12.6g %-8s d%s/dlimit = %.6g\n", l.Constraint, l.Bound, l.Limit, state, s.Objective, l.PerUnit)
		}
	}
	for _, p := range s.Parameters {
		fmt.Fprintf(&b, "  %-40s value %-12.6g          d%s/d%s = %.6g\n", p.Parameter, p.Value, s.Objective, p.Parameter, p.PerUnit)
	}
	return b.String()
}

// sensitivity computes the post-optimality sensitivity at p with the
// multipliers lam of the subproblem solved there.
func (s *sqp) sensitivity(p *sqpPoint, lam []float64) (*Sensitivity, error) {
	st := s.r.ev.Study()
	pd, err := s.r.ev.DerivativesWith(s.r.ctx, p.u, s.o.Parameters)
	if err != nil {
		return nil, err
	}
	sense := 1.0
	if st.Objectives[0].Maximize {
		sense = -1
	}
	out := &Sensitivity{Objective: st.Objectives[0].Name}
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
		out.Limits = append(out.Limits, LimitCost{
			Constraint: c.Name, Bound: bound, Limit: row.bound,
			Active:  math.Abs(lam[i]) > 1e-12,
			PerUnit: sense * s.fscale * lam[i] * row.sign / row.scale,
		})
	}
	for j, name := range s.o.Parameters {
		d := sense * pd.ObjectivesByParameter[0][j] / s.fscale
		for i, row := range s.rows {
			d -= lam[i] * row.sign * pd.ConstraintsByParameter[row.k][j] / row.scale
		}
		v := p.ev.Outputs[st.System.Index(name)]
		out.Parameters = append(out.Parameters, ParameterCost{Parameter: name, Value: v, PerUnit: sense * s.fscale * d})
	}
	return out, nil
}
