package mdo

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// DerivativeMode chooses how the coupled chain rule is solved.
type DerivativeMode int

const (
	// AutoMode picks DirectMode when the variables to differentiate with
	// respect to are no more than the functions of interest, else
	// AdjointMode.
	AutoMode DerivativeMode = iota
	// DirectMode (forward): one linear solve per variable.
	DirectMode
	// AdjointMode (reverse): one linear solve per function of interest.
	AdjointMode
)

// String names the mode.
func (m DerivativeMode) String() string {
	switch m {
	case DirectMode:
		return "direct"
	case AdjointMode:
		return "adjoint"
	}
	return "auto"
}

// ErrNoDerivatives is wrapped by the error of Totals when the state has
// no derivatives: the analysis did not converge, or never ran.
var ErrNoDerivatives = errors.New("no derivatives")

// TotalsOptions set how total derivatives are computed.
type TotalsOptions struct {
	// Mode is direct, adjoint or (default) chosen by the counts.
	Mode DerivativeMode
	// Differences is the formula of the finite-difference partials of the
	// disciplines that do not implement Differentiable (default central).
	Differences Differences
	// Uncoupled differentiates the state of Workspace.AnalyzeOnce (the
	// IDF formulation): inputs produced inside a coupled group are read
	// from their guesses (the IDF targets), and Wrt may name coupling
	// variables, meaning their guesses.
	Uncoupled bool
}

// Totals are the total derivatives of a converged analysis: J[i][j] is
// d Of[i] / d Wrt[j].
type Totals struct {
	Of, Wrt []string
	J       *mat.Dense
	// Mode is the mode that was used (never AutoMode).
	Mode DerivativeMode
	// LinearSolves counts the solves with the coupled Jacobian (one LU
	// factorisation, one solve per right-hand side).
	LinearSolves int
	// DisciplineCalls counts the Compute calls of the finite-difference
	// partials and the state check.
	DisciplineCalls int
}

// At returns d of / d wrt.
func (t *Totals) At(of, wrt string) (float64, error) {
	i, j := -1, -1
	for k, n := range t.Of {
		if n == of {
			i = k
		}
	}
	for k, n := range t.Wrt {
		if n == wrt {
			j = k
		}
	}
	if i < 0 || j < 0 {
		return 0, fmt.Errorf("mdo: totals: no derivative d %s / d %s (of %v, wrt %v)", of, wrt, t.Of, t.Wrt)
	}
	return t.J.At(i, j), nil
}

// Totals returns the total derivatives of the variables of with respect
// to the parameters wrt at the state of the last analysis, by the coupled
// chain rule: writing every discipline as residuals R(u) = u − F(u, x) of
// its outputs u, the unified derivatives equation (Martins & Hwang, AIAA
// J. 51(11), 2013; for two levels the global sensitivity equations of
// Sobieszczanski-Sobieski, AIAA J. 28(1), 1990) gives
//
//	(I − ∂F/∂u) du/dx = ∂F/∂x        (direct: one solve per x)
//	(I − ∂F/∂u)ᵀ ψ = e_f,  df/dx = ψᵀ ∂F/∂x   (adjoint: one per f).
//
// The partials are analytic where a discipline is Differentiable, else
// finite differences (FDPartials). A workspace whose last analysis did not
// converge has no derivatives: the error wraps ErrNoDerivatives and names
// the group or the variable. Of may name any variable (a parameter's
// derivative is 1 with respect to itself); wrt must name parameters (or,
// with Uncoupled, coupling variables).
func (w *Workspace) Totals(of, wrt []string, opt TotalsOptions) (*Totals, error) {
	if w.cnt.Analyses == 0 {
		return nil, fmt.Errorf("mdo: totals: the workspace has not been analysed: %w", ErrNoDerivatives)
	}
	if !opt.Uncoupled {
		for _, r := range w.reports {
			if !r.Converged {
				return nil, fmt.Errorf("mdo: totals: coupled group {%s} did not converge (residual %.3g, tolerance %.3g): %w",
					joinNames(r.Disciplines), r.Residual, r.Tolerance, ErrNoDerivatives)
			}
		}
	}
	return w.sys.totals(w.val, w.guess, of, wrt, opt)
}

// totals implements Workspace.Totals on the values val (and, uncoupled,
// the guesses guess).
func (s *System) totals(val, guess []float64, of, wrt []string, opt TotalsOptions) (*Totals, error) {
	n := s.vars.Len()
	if len(val) != n || len(guess) != n {
		return nil, fmt.Errorf("mdo: totals: %d values for %d variables", len(val), n)
	}
	wrtCol := map[int]int{}   // parameter -> column
	guessCol := map[int]int{} // coupling variable (its guess) -> column
	isTear := map[int]bool{}
	tol := make([]float64, n) // state check tolerance per produced variable
	for gi, g := range s.groups {
		for _, v := range g.tear {
			isTear[v] = true
		}
		for _, d := range g.discs {
			for _, v := range s.outIdx[d] {
				if g.coupled && !opt.Uncoupled {
					tol[v] = math.Max(1e3*s.settings[gi].Tolerance, 1e-7)
				} else {
					tol[v] = 1e-9
				}
			}
		}
	}
	for j, name := range wrt {
		i := s.Index(name)
		switch {
		case i < 0:
			return nil, fmt.Errorf("mdo: totals: %w", s.unknown(name))
		case s.producer[i] < 0:
			wrtCol[i] = j
		case opt.Uncoupled && isTear[i]:
			guessCol[i] = j
		default:
			return nil, fmt.Errorf("mdo: totals: %s is produced by discipline %s; derivatives are taken with respect to parameters (inputs nobody produces) or, with TotalsOptions.Uncoupled, coupling variables",
				name, s.Producer(name))
		}
	}
	ofIdx := make([]int, len(of))
	for k, name := range of {
		ofIdx[k] = s.Index(name)
		if ofIdx[k] < 0 {
			return nil, fmt.Errorf("mdo: totals: %w", s.unknown(name))
		}
	}
	// unknowns: every produced variable
	ui := make([]int, n)
	nu := 0
	for v := 0; v < n; v++ {
		ui[v] = -1
		if s.producer[v] >= 0 {
			ui[v] = nu
			nu++
		}
	}
	// unknowns are scaled by su = max(|u|, scale): the scaled Jacobian
	// S⁻¹(I − ∂F/∂u)S has a meaningful condition number
	su := make([]float64, n)
	for v := 0; v < n; v++ {
		su[v] = math.Max(math.Abs(val[v]), s.vars.At(v).scale())
	}
	nx := len(wrt)
	t := &Totals{Of: append([]string(nil), of...), Wrt: append([]string(nil), wrt...), J: mat.NewDense(max(len(of), 1), max(nx, 1), nil)}
	if len(of) == 0 || nx == 0 {
		t.J = &mat.Dense{}
		t.Mode = DirectMode
		return t, nil
	}
	// A = S⁻¹(I − ∂F/∂u)S and B = S⁻¹ ∂F/∂x, S = diag(su)
	A := mat.NewDense(max(nu, 1), max(nu, 1), nil)
	for k := 0; k < nu; k++ {
		A.Set(k, k, 1)
	}
	B := mat.NewDense(max(nu, 1), nx, nil)
	for d, disc := range s.discs {
		idx := s.inIdx[d]
		in := make([]float64, len(idx))
		for k, v := range idx {
			if opt.Uncoupled && s.loopIn[d][k] {
				in[k] = guess[v]
			} else {
				in[k] = val[v]
			}
		}
		out := make([]float64, len(s.outIdx[d]))
		t.DisciplineCalls++
		if err := disc.Compute(in, out); err != nil {
			return nil, fmt.Errorf("mdo: totals: %w", s.wrapDisc(d, err))
		}
		for k, v := range s.outIdx[d] {
			sc := s.vars.At(v).scale()
			if !(math.Abs(out[k]-val[v]) <= tol[v]*math.Max(sc, math.Abs(val[v]))) {
				return nil, fmt.Errorf("mdo: totals: the state is not a solution of the system: %s = %g, but discipline %s gives %g from it (did the analysis converge?): %w",
					s.vars.At(v).Name, val[v], disc.Name(), out[k], ErrNoDerivatives)
			}
		}
		jac := make([]float64, len(out)*len(in))
		if _, ok := disc.(Differentiable); !ok {
			t.DisciplineCalls += len(in) * 2
		}
		if err := disciplinePartials(disc, in, out, jac, opt.Differences); err != nil {
			return nil, fmt.Errorf("mdo: totals: %w", err)
		}
		nin := len(in)
		for k, vo := range s.outIdx[d] {
			r := ui[vo]
			for j, v := range idx {
				p := jac[k*nin+j]
				if p == 0 {
					continue
				}
				switch {
				case opt.Uncoupled && s.loopIn[d][j]:
					if c, ok := guessCol[v]; ok {
						B.Set(r, c, B.At(r, c)+p/su[vo])
					}
				case s.producer[v] >= 0:
					A.Set(r, ui[v], A.At(r, ui[v])-p*su[v]/su[vo])
				default:
					if c, ok := wrtCol[v]; ok {
						B.Set(r, c, B.At(r, c)+p/su[vo])
					}
				}
			}
		}
	}
	var lu mat.LU
	lu.Factorize(A)
	if c := lu.Cond(); !(c < 1e13) {
		return nil, fmt.Errorf("mdo: totals: the coupled Jacobian I − ∂F/∂u is singular (condition %.3g): the coupled state has no unique derivatives: %w", c, ErrNoDerivatives)
	}
	mode := opt.Mode
	if mode == AutoMode {
		mode = DirectMode
		if nx > len(of) {
			mode = AdjointMode
		}
	}
	t.Mode = mode
	// rows of parameters (or, uncoupled, of guesses) among of
	self := func(i, v int) {
		if c, ok := wrtCol[v]; ok {
			t.J.Set(i, c, 1)
		}
	}
	switch mode {
	case DirectMode:
		var U mat.Dense
		if err := lu.SolveTo(&U, false, B); err != nil {
			return nil, fmt.Errorf("mdo: totals: direct solve: %w", err)
		}
		t.LinearSolves = nx
		for i, v := range ofIdx {
			if ui[v] < 0 {
				self(i, v)
				continue
			}
			for j := 0; j < nx; j++ {
				t.J.Set(i, j, su[v]*U.At(ui[v], j))
			}
		}
	default:
		e := mat.NewVecDense(max(nu, 1), nil)
		var psi mat.VecDense
		for i, v := range ofIdx {
			if ui[v] < 0 {
				self(i, v)
				continue
			}
			e.Zero()
			e.SetVec(ui[v], 1)
			if err := lu.SolveVecTo(&psi, true, e); err != nil {
				return nil, fmt.Errorf("mdo: totals: adjoint solve: %w", err)
			}
			t.LinearSolves++
			for j := 0; j < nx; j++ {
				t.J.Set(i, j, su[v]*mat.Dot(&psi, B.ColView(j)))
			}
		}
	}
	return t, nil
}

// wrapDisc wraps a discipline's error.
func (s *System) wrapDisc(d int, err error) error {
	return &DisciplineError{Discipline: s.discs[d].Name(), Err: err}
}
