package mdo

import (
	"fmt"
	"strings"
)

// RangeError reports a value outside a variable's validity range.
type RangeError struct {
	Discipline string // the discipline whose input it is, if known
	Var        string
	Value      float64
	Min, Max   float64
	Unit       string
	// Produced is true when the value was computed by a discipline (a
	// coupling iterate or an output) rather than given by the user.
	Produced bool
	// Producer names the discipline that computed the value, if known.
	Producer string
}

// Error implements error.
func (e *RangeError) Error() string {
	where := ""
	if e.Discipline != "" {
		where = " (input of discipline " + e.Discipline + ")"
	}
	unit := ""
	if e.Unit != "" && e.Unit != "-" {
		unit = " " + e.Unit
	}
	if e.Produced {
		// a state the design leads to, not a bad input: say who computed
		// it and what to do (the class of Classify)
		by := ""
		if e.Producer != "" {
			by = ", computed by discipline " + e.Producer + ","
		}
		return fmt.Sprintf("mdo: %s = %g%s%s is outside its validity range [%g, %g]%s; remedy: %s", e.Var, e.Value, unit, by, e.Min, e.Max, where, DoesNotClose.Remedy())
	}
	return fmt.Sprintf("mdo: %s = %g%s is outside its validity range [%g, %g]%s", e.Var, e.Value, unit, e.Min, e.Max, where)
}

// NonFiniteError reports a NaN or Inf produced by a discipline.
type NonFiniteError struct {
	Discipline string
	Var        string
	Value      float64
}

// Error implements error.
func (e *NonFiniteError) Error() string {
	return fmt.Sprintf("mdo: discipline %s produced %s = %g (not finite)", e.Discipline, e.Var, e.Value)
}

// DisciplineError wraps an error returned by a discipline's Compute (or
// a panic in it).
type DisciplineError struct {
	Discipline string
	Err        error
	// Var is set when the discipline, inside a coupled group, refused a
	// coupling variable of that group (its error has a Variable method
	// naming it): the balance of Var leaves the region where the
	// discipline is defined, and the design does not close. Group lists
	// the group's disciplines.
	Var   string
	Group []string
	// Input is set when the refused variable is a parameter of the
	// system: the user's value (or combination of values) is one the
	// discipline does not accept.
	Input string
}

// Error implements error.
func (e *DisciplineError) Error() string {
	if e.Var != "" {
		return fmt.Sprintf("does not close: the balance of %s in {%s} leaves the region where discipline %s is defined: %v; remedy: %s",
			e.Var, strings.Join(e.Group, ", "), e.Discipline, e.Err, DoesNotClose.Remedy())
	}
	if e.Input != "" {
		return fmt.Sprintf("mdo: discipline %s: %v; remedy: %s", e.Discipline, e.Err, InvalidInput.Remedy())
	}
	return fmt.Sprintf("mdo: discipline %s: %v", e.Discipline, e.Err)
}

// Unwrap returns the discipline's own error.
func (e *DisciplineError) Unwrap() error { return e.Err }

// ConvergenceError is returned when a coupled group does not converge or
// diverges. It carries the solver's report.
type ConvergenceError struct {
	CouplingReport CouplingReport
}

// Error implements error.
func (e *ConvergenceError) Error() string {
	r := &e.CouplingReport
	state := "did not converge"
	if r.Diverged {
		state = "diverged"
	}
	worst := make([]string, 0, len(r.Worst))
	for _, w := range r.Worst {
		worst = append(worst, fmt.Sprintf("%s (%.3g)", w.Name, w.Residual))
	}
	return fmt.Sprintf("mdo: coupled group {%s} %s with %s after %d iterations (scaled residual %.3g, tolerance %.3g); worst: %s; remedy: %s",
		strings.Join(r.Disciplines, ", "), state, r.Method, r.CouplingIterations, r.Residual, r.Tolerance, strings.Join(worst, ", "), SolverFailed.Remedy())
}
