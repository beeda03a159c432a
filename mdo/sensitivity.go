package mdo

import (
	"fmt"
	"strings"
	"text/tabwriter"
)

// Sensitivity is the post-optimality sensitivity of a converged optimum,
// as a gradient-based optimiser gives it (optimizers.Sextant): by the
// envelope theorem the derivative of the optimal objective with respect
// to the limit b of an active constraint is the constraint's Lagrange
// multiplier, and with respect to a fixed parameter p it is the partial
// derivative of the Lagrangian, ∂f/∂p − Σ λᵢ ∂cᵢ/∂p, at the optimum
// (e.g. Fiacco, Introduction to Sensitivity and Stability Analysis in
// Nonlinear Programming, 1983). The figures are first-order estimates,
// valid for small changes that keep the same active constraints.
type Sensitivity struct {
	// Objective names the (first) objective and Unit gives its unit.
	Objective, Unit string
	// Limits lists every constraint limit, active or not.
	Limits []LimitCost
	// Parameters lists the fixed parameters asked for.
	Parameters []ParameterCost
}

// LimitCost is what one constraint limit costs at an optimum: the
// Lagrange multiplier of the constraint in the user's units.
type LimitCost struct {
	// Constraint names the constraint; Bound says which limit ("upper",
	// "lower" or "target"), Limit gives its value and Unit the unit of the
	// constrained quantity.
	Constraint string
	Bound      string
	Limit      float64
	Unit       string
	// Active is true when the limit binds (its multiplier is not zero).
	Active bool
	// PerUnit is d(optimal objective)/d(limit), in objective units per
	// unit of the constrained quantity: raising an upper limit by one
	// unit changes the optimal objective by PerUnit (negative: it helps).
	// It is NaN when NotDefined says why there is none.
	PerUnit float64
	// NotDefined, when not empty, says why an active limit has no
	// sensitivity: its multiplier is not the derivative of the optimum,
	// e.g. because the constraint does not vary with the design (held at
	// its limit by something else, as a take-off field length by engines
	// sized to it) or because the active constraints' gradients are
	// linearly dependent, so that the multipliers are not unique.
	NotDefined string
}

// ParameterCost is the derivative of the optimal objective with respect
// to a fixed parameter.
type ParameterCost struct {
	// Parameter names the parameter, Value gives its value at the optimum
	// and Unit its unit.
	Parameter string
	Value     float64
	Unit      string
	// PerUnit is d(optimal objective)/d(parameter), in objective units per
	// unit of the parameter.
	PerUnit float64
}

// SensitivityCaution qualifies every display of a sensitivity.
const SensitivityCaution = "conceptual estimates, first order: valid for small changes that keep the same active constraints"

// PerUnitLabel is the unit of a derivative of the objective with respect
// to a quantity in unit u, e.g. "kg/m". A dimensionless quantity (u ""
// or "-") is counted in units of itself: "kg per unit" (per 1.0 of a
// ratio); a dimensionless objective gives "per m", and both "per unit".
func (s *Sensitivity) PerUnitLabel(u string) string {
	dimensionless := func(u string) bool { return u == "" || u == "-" }
	switch {
	case dimensionless(u) && dimensionless(s.Unit):
		return "per unit"
	case dimensionless(u):
		return s.Unit + " per unit"
	case dimensionless(s.Unit):
		return "per " + u
	}
	return s.Unit + "/" + u
}

// cost is the text of a limit's d(objective)/d(limit): the value with
// its unit, or why it is not defined.
func (s *Sensitivity) cost(l LimitCost) string {
	if l.NotDefined != "" {
		return "not defined: " + l.NotDefined
	}
	return fmt.Sprintf("%.6g %s", l.PerUnit, s.PerUnitLabel(l.Unit))
}

// String formats the sensitivity as two tables, the limits (active ones
// first) and the parameters.
func (s *Sensitivity) String() string {
	if s == nil {
		return "no post-optimality sensitivity (the optimum did not converge)"
	}
	var b strings.Builder
	fmt.Fprintf(&b, "post-optimality sensitivity of %s [%s] (%s):\n", s.Objective, unitOr(s.Unit), SensitivityCaution)
	if len(s.Limits) > 0 {
		w := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
		fmt.Fprintf(w, "limit\tbound\tvalue\tunit\tstate\td %s / d limit\n", s.Objective)
		for _, active := range []bool{true, false} {
			for _, l := range s.Limits {
				if l.Active != active {
					continue
				}
				state := "active"
				if !active {
					state = "inactive"
				}
				fmt.Fprintf(w, "%s\t%s\t%.6g\t%s\t%s\t%s\n", l.Constraint, l.Bound, l.Limit, unitOr(l.Unit), state, s.cost(l))
			}
		}
		w.Flush()
	}
	if len(s.Parameters) > 0 {
		w := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
		fmt.Fprintf(w, "parameter\tvalue\tunit\td %s / d parameter\n", s.Objective)
		for _, p := range s.Parameters {
			fmt.Fprintf(w, "%s\t%.6g\t%s\t%.6g %s\n", p.Parameter, p.Value, unitOr(p.Unit), p.PerUnit, s.PerUnitLabel(p.Unit))
		}
		w.Flush()
	}
	return b.String()
}
