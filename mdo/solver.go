package mdo

import (
	"fmt"
	"strings"
)

// Method names a coupling solver for a coupled group.
type Method int

const (
	// GaussSeidel is nonlinear block Gauss–Seidel: each discipline of the
	// group runs in turn with the latest values.
	GaussSeidel Method = iota
	// Jacobi is nonlinear block Jacobi: every discipline of the group runs
	// on the values of the previous iteration.
	Jacobi
	// AitkenGaussSeidel is Gauss–Seidel with Aitken dynamic relaxation.
	AitkenGaussSeidel
	// AitkenJacobi is Jacobi with Aitken dynamic relaxation.
	AitkenJacobi
	// Newton solves the coupling residual y − G(y) = 0 by Newton's method
	// with a forward finite-difference Jacobian.
	Newton
	// AndersonGaussSeidel is Gauss–Seidel with Anderson acceleration: each
	// new iterate combines the sweep's last outputs so as to cancel the
	// last residuals in the least-squares sense (anderson.go).
	AndersonGaussSeidel
)

var methodNames = [...]string{"gauss-seidel", "jacobi", "aitken-gauss-seidel", "aitken-jacobi", "newton", "anderson-gauss-seidel"}

// Methods lists every coupling solver.
func Methods() []Method {
	return []Method{GaussSeidel, Jacobi, AitkenGaussSeidel, AitkenJacobi, Newton, AndersonGaussSeidel}
}

// String returns the solver's name.
func (m Method) String() string {
	if m < 0 || int(m) >= len(methodNames) {
		return fmt.Sprintf("method(%d)", int(m))
	}
	return methodNames[m]
}

// ParseMethod returns the Method of a name as printed by String.
func ParseMethod(s string) (Method, error) {
	for i, n := range methodNames {
		if strings.EqualFold(s, n) {
			return Method(i), nil
		}
	}
	return 0, fmt.Errorf("mdo: unknown coupling solver %q; allowed: %s", s, strings.Join(methodNames[:], ", "))
}

// SolverSettings configures the solver of a coupled group.
type SolverSettings struct {
	Method Method
	// Tolerance on the infinity norm of the scaled residual
	// (y_new − y_old)/scale; default 1e-10.
	Tolerance float64
	// MaxIterations caps the iterations; default 200.
	MaxIterations int
	// Relaxation is the initial (Aitken) or fixed relaxation factor in
	// (0, 1]; default 1.
	Relaxation float64
	// NoFallback turns the fallback chain off: a failure of this solver
	// is the analysis's failure (see Workspace.Analyze). The chain runs
	// when any coupled group of the workspace allows it.
	NoFallback bool
	// Exhaustive runs the fallback chain and Newton's method without
	// their shortcuts: every Jacobian column sweeps the whole group, a
	// continuation step that repeats the one that just failed is solved
	// again, no attempt stops when it stalls and the continuation takes
	// every step however many fail (see Workspace.Analyze).
	// The answers are the same, bit for bit, on every point where this was
	// checked; it costs more discipline calls on points that do not close
	// and is there to check that a point's answer is not a shortcut's. The
	// chain runs without them when any coupled group asks for it.
	Exhaustive bool
	// FromReference starts the group at every point of a study from the
	// converged state of the study's reference point (its Start design,
	// analysed once by NewEvaluator) instead of the variables' defaults.
	// The start is the same for every point, so answers stay independent
	// of the evaluation order; they differ from a start at the defaults
	// within the tolerance. Workspaces outside an Evaluator start from
	// their guesses as always.
	FromReference bool
}

// DefaultSolver returns the default settings: Aitken-relaxed Gauss–Seidel,
// tolerance 1e-10, at most 200 iterations.
func DefaultSolver() SolverSettings {
	return SolverSettings{Method: AitkenGaussSeidel, Tolerance: 1e-10, MaxIterations: 200, Relaxation: 1}
}

// normalized fills in defaults and validates the settings.
func (s SolverSettings) normalized() (SolverSettings, error) {
	if s.Tolerance == 0 {
		s.Tolerance = 1e-10
	}
	if s.MaxIterations == 0 {
		s.MaxIterations = 200
	}
	if s.Relaxation == 0 {
		s.Relaxation = 1
	}
	switch {
	case s.Method < GaussSeidel || s.Method > AndersonGaussSeidel:
		return s, fmt.Errorf("mdo: solver method %d unknown; allowed: %s", int(s.Method), strings.Join(methodNames[:], ", "))
	case !(s.Tolerance > 0):
		return s, fmt.Errorf("mdo: solver tolerance %g must be > 0", s.Tolerance)
	case s.MaxIterations < 1 || s.MaxIterations > 100000:
		return s, fmt.Errorf("mdo: solver MaxIterations %d must be in [1, 100000]", s.MaxIterations)
	case !(s.Relaxation > 0 && s.Relaxation <= 1):
		return s, fmt.Errorf("mdo: solver Relaxation %g must be in (0, 1]", s.Relaxation)
	}
	return s, nil
}

// plain reports whether the settings are plain Gauss–Seidel without
// relaxation, whose converged states need no stability check (branch.go).
func (s *SolverSettings) plain() bool { return s.Method == GaussSeidel && s.Relaxation == 1 }

// VarResidual is one variable's scaled residual in a report.
type VarResidual struct {
	Name     string
	Residual float64
}

// Report describes the solution of one coupled group.
type CouplingReport struct {
	Disciplines        []string
	Method             Method
	Converged          bool
	Diverged           bool
	CouplingIterations int
	Residual           float64   // final scaled residual (infinity norm)
	Tolerance          float64   // the tolerance asked for
	History            []float64 // scaled residual after each iteration
	Worst              []VarResidual
	// Path names the solver path of the last attempt: the configured
	// method, or the fallback that ran (see Workspace.Path).
	Path string
}

// Clone returns a deep copy of the report.
func (r CouplingReport) Clone() CouplingReport {
	r.Disciplines = append([]string(nil), r.Disciplines...)
	r.History = append([]float64(nil), r.History...)
	r.Worst = append([]VarResidual(nil), r.Worst...)
	return r
}

// String formats the report on a few lines.
func (r CouplingReport) String() string {
	var b strings.Builder
	state := "converged"
	switch {
	case r.Diverged:
		state = "DIVERGED"
	case !r.Converged:
		state = "NOT CONVERGED"
	}
	fmt.Fprintf(&b, "group {%s}: %s by %s in %d iterations, residual %.3g (tolerance %.3g)\n",
		strings.Join(r.Disciplines, ", "), state, r.Method, r.CouplingIterations, r.Residual, r.Tolerance)
	if len(r.Worst) > 0 {
		b.WriteString("  worst:")
		for _, w := range r.Worst {
			fmt.Fprintf(&b, " %s %.3g", w.Name, w.Residual)
		}
		b.WriteByte('\n')
	}
	return b.String()
}
