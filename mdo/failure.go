package mdo

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// FailureClass says why an analysis failed, in terms a user can act on.
// Classify derives it from the analysis error; every failed Evaluation
// carries one.
type FailureClass int

const (
	// NotFailed is the class of a converged analysis.
	NotFailed FailureClass = iota
	// DoesNotClose: the coupled problem has no solution inside the
	// variables' validity ranges at this point — a balance (a mass, a
	// force, a fraction …) runs away to a limit of its range. The
	// design is physically infeasible; the solver is not at fault.
	DoesNotClose
	// SolverFailed: the coupling solver, and every fallback, stopped
	// without converging although no balance was found at a limit — a
	// numerical failure.
	SolverFailed
	// InvalidInput: a value the user gave (a parameter or design value)
	// is outside its validity range or not finite.
	InvalidInput
	// DisciplineFailed: a discipline returned an error or panicked on
	// inputs inside their ranges.
	DisciplineFailed
)

var failureNames = [...]string{"", "does-not-close", "solver-failed", "invalid-input", "discipline-failed"}

var failureRemedies = [...]string{
	"",
	"no physical solution here: move the design away from this region or relax the requirement that drives the runaway quantity",
	"numerical failure: try another coupling solver (mdo.SolverSettings.Method), a larger MaxIterations or a smaller Relaxation",
	"correct the value named in the message to lie inside its validity range",
	"the discipline named in the message rejected its inputs: check its documentation for the inputs it accepts",
}

// String returns the class's name: "does-not-close", "solver-failed",
// "invalid-input", "discipline-failed", or "" for NotFailed.
func (c FailureClass) String() string {
	if c < 0 || int(c) >= len(failureNames) {
		return fmt.Sprintf("failure(%d)", int(c))
	}
	return failureNames[c]
}

// Remedy returns a one-line remedy for the class.
func (c FailureClass) Remedy() string {
	if c < 0 || int(c) >= len(failureRemedies) {
		return ""
	}
	return failureRemedies[c]
}

// ParseFailureClass returns the class of a name as printed by String;
// "" is NotFailed.
func ParseFailureClass(s string) (FailureClass, error) {
	for i, n := range failureNames {
		if s == n {
			return FailureClass(i), nil
		}
	}
	return 0, fmt.Errorf("mdo: unknown failure class %q; allowed: %s", s, strings.Join(failureNames[1:], ", "))
}

// NotClosingError reports a coupled group whose solution lies outside the
// validity range of a coupling variable: the solver, kept inside the
// ranges, converged onto a limit (or ran away to it), so no state inside
// the ranges satisfies every discipline at once.
type NotClosingError struct {
	Group      []string // the coupled group's disciplines
	Var        string   // the coupling variable that runs away
	Desc       string   // its description
	Unit       string
	Value      float64 // the value the balance asks for (the producer's output)
	Limit      float64 // the range limit it crosses
	Discipline string  // the discipline whose input range it leaves
	Path       string  // the solver path that reached the limit
}

// Excess returns how far Value lies beyond Limit, relative to the limit
// (or absolute when the limit is zero).
func (e *NotClosingError) Excess() float64 {
	d := math.Abs(e.Value - e.Limit)
	if e.Limit != 0 {
		return d / math.Abs(e.Limit)
	}
	return d
}

// Error implements error.
func (e *NotClosingError) Error() string {
	unit := ""
	if e.Unit != "" && e.Unit != "-" {
		unit = " " + e.Unit
	}
	dir := "above its upper limit"
	if e.Value < e.Limit {
		dir = "below its lower limit"
	}
	what := e.Var
	if e.Desc != "" {
		what += " (" + e.Desc + ")"
	}
	by := fmt.Sprintf("%.3g%s", math.Abs(e.Value-e.Limit), unit)
	if e.Limit != 0 {
		by += fmt.Sprintf(", %.1f %%", 100*e.Excess())
	}
	return fmt.Sprintf("does not close: the balance of %s in {%s} runs away to %.6g%s, %s %g%s for discipline %s by %s; remedy: %s",
		what, strings.Join(e.Group, ", "), e.Value, unit, dir, e.Limit, unit, e.Discipline, by, DoesNotClose.Remedy())
}

// Classify returns the class of an analysis error; nil is NotFailed.
func Classify(err error) FailureClass {
	if err == nil {
		return NotFailed
	}
	var nc *NotClosingError
	var be *BranchError
	var ce *ConvergenceError
	var re *RangeError
	var nf *NonFiniteError
	var de *DisciplineError
	switch {
	case errors.As(err, &nc), errors.As(err, &be):
		return DoesNotClose
	case errors.As(err, &ce):
		return SolverFailed
	case errors.As(err, &nf):
		return DisciplineFailed
	case errors.As(err, &re):
		if re.Produced {
			// a converged state outside the range of a later discipline
			return DoesNotClose
		}
		return InvalidInput
	case errors.As(err, &de):
		switch {
		case de.Var != "":
			return DoesNotClose
		case de.Input != "":
			return InvalidInput
		}
		return DisciplineFailed
	}
	return SolverFailed
}

// ClassOf returns the failure class of an evaluation (NotFailed when it
// converged).
func ClassOf(ev *Evaluation) FailureClass {
	if ev == nil || ev.Converged {
		return NotFailed
	}
	return ev.Failure
}
