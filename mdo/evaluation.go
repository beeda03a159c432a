package mdo

import (
	"math"
	"time"
)

// Evaluation is the record of one design point.
type Evaluation struct {
	// ID numbers the evaluations of a run from 0 in the order they were
	// asked for; it does not depend on the number of workers.
	ID int
	// X is the point in the unit box, Design the physical values (integer
	// variables rounded), both in the order of Evaluator.DesignNames.
	X, Design []float64
	// Objectives are the objective values as declared; F the same in
	// minimised sense (negated for maximised objectives).
	Objectives, F []float64
	// Constraints are the constrained quantities' values and Margins how
	// far each lies inside its bound (negative when violated); G is the
	// scaled form used by optimisers: G ≤ 0 when satisfied.
	Constraints, Margins, G []float64
	// Violation is the sum of the positive parts of G (0 when feasible);
	// +Inf when the analysis failed.
	Violation float64
	Feasible  bool
	// Converged is false when the analysis failed; Err gives the reason.
	Converged bool
	Err       string
	// Failure classifies a failed analysis (NotFailed when it converged,
	// or when it converged but could not be scored); Err ends with its
	// remedy.
	Failure FailureClass
	// Path names the solver path that converged the analysis: the
	// configured solver's name, or the fallback that succeeded.
	Path string
	// Iterations are the coupling iterations, DisciplineCalls the
	// discipline calls and Wall the wall time of this evaluation's analysis.
	CouplingIterations int
	DisciplineCalls    int
	Wall               time.Duration
	// Outputs are the values of Evaluator.OutputVars after the analysis;
	// nil when the analysis failed (nothing it holds was computed).
	Outputs []float64
	// PickedUp is true when the point was analysed by an earlier session
	// of the run and read from its store (see Evaluator.PickUp) rather
	// than analysed by this one.
	PickedUp bool
}

// Better reports whether a is better than b by Deb's feasibility rules on
// the first objective: a feasible point beats an infeasible one; two
// feasible points compare by objective; two infeasible ones by violation.
// Ties keep the earlier evaluation.
func Better(a, b *Evaluation) bool {
	if b == nil {
		return a != nil
	}
	if a == nil {
		return false
	}
	switch {
	case a.Feasible && !b.Feasible:
		return true
	case !a.Feasible && b.Feasible:
		return false
	case a.Feasible:
		fa, fb := a.F[0], b.F[0]
		if fa != fb {
			return fa < fb
		}
	default:
		if a.Violation != b.Violation {
			return a.Violation < b.Violation
		}
	}
	return a.ID < b.ID
}

// Dominates reports whether a Pareto-dominates b (minimised objectives
// F), with Deb's constrained domination: a feasible point dominates an
// infeasible one, and of two infeasible points the one with the smaller
// violation dominates.
func Dominates(a, b *Evaluation) bool {
	switch {
	case a.Feasible && !b.Feasible:
		return true
	case !a.Feasible && !b.Feasible:
		return a.Violation < b.Violation
	case !a.Feasible:
		return false
	}
	strictly := false
	for k := range a.F {
		if a.F[k] > b.F[k] {
			return false
		}
		if a.F[k] < b.F[k] {
			strictly = true
		}
	}
	return strictly
}

// failed fills in an evaluation whose analysis failed.
func (e *Evaluation) failed(reason string) {
	e.Converged = false
	e.Feasible = false
	e.Err = reason
	e.Violation = math.Inf(1)
	for k := range e.F {
		e.F[k] = math.Inf(1)
		e.Objectives[k] = math.NaN()
	}
	for k := range e.G {
		e.G[k] = math.Inf(1)
		e.Constraints[k] = math.NaN()
		e.Margins[k] = math.Inf(-1)
	}
}
