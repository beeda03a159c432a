package mdo

import (
	"context"
	"fmt"
)

// PointDerivatives are the derivatives of one evaluated point of a Study
// with respect to its unit-box coordinates (Evaluator.Derivatives).
type PointDerivatives struct {
	// Eval is the point's evaluation.
	Eval *Evaluation
	// Objectives[k][j] is d Eval.Objectives[k] / d u_j (the objective in
	// its own sense and unit, not minimised sense).
	Objectives [][]float64
	// Constraints[k][j] is d Eval.Constraints[k] / d u_j: the derivative
	// of the constrained quantity (for IDF's consistency constraints,
	// the scaled residual).
	Constraints [][]float64
	// Parameters names the fixed parameters asked for
	// (Evaluator.DerivativesWith); ObjectivesByParameter[k][j] and
	// ConstraintsByParameter[k][j] are the derivatives of objective and
	// constraint k with respect to parameter j, in physical units.
	Parameters                                    []string
	ObjectivesByParameter, ConstraintsByParameter [][]float64
	// LinearSolves and DisciplineCalls count the work of the totals
	// (see Totals).
	LinearSolves, DisciplineCalls int
}

// Derivatives evaluates the unit-box point x (an ordinary evaluation:
// counted, cached, recorded) and returns the derivatives of its
// objectives and constraint quantities with respect to the unit-box
// coordinates, by the coupled chain rule at the converged state (see
// Workspace.Totals; under IDF the uncoupled totals, the coupling targets
// being coordinates too). Objectives and constraints given as functions
// of the values are differentiated by central differences along the
// total derivative of every variable. A point whose analysis failed has
// no derivatives: the error wraps ErrNoDerivatives and gives the reason.
func (e *Evaluator) Derivatives(ctx context.Context, x []float64) (*PointDerivatives, error) {
	return e.DerivativesWith(ctx, x, nil)
}

// DerivativesWith is Derivatives that also differentiates with respect
// to the named parameters of the system (inputs nobody produces that are
// not design variables: the study's fixed values, such as the payload),
// for post-optimality sensitivities.
func (e *Evaluator) DerivativesWith(ctx context.Context, x []float64, params []string) (*PointDerivatives, error) {
	for _, p := range params {
		i := e.sys.Index(p)
		if i < 0 {
			return nil, fmt.Errorf("mdo: derivatives: %w", e.sys.unknown(p))
		}
		if e.sys.producer[i] >= 0 {
			return nil, fmt.Errorf("mdo: derivatives: %s is produced by discipline %s, not a parameter", p, e.sys.Producer(p))
		}
		for _, s := range e.slots {
			if s.name == p {
				return nil, fmt.Errorf("mdo: derivatives: %s is a design variable of study %q, not a fixed parameter", p, e.study.Name)
			}
		}
	}
	if len(x) != len(e.slots) {
		return nil, fmt.Errorf("mdo: derivatives: point has %d coordinates, the study %d", len(x), len(e.slots))
	}
	evs, err := e.Evaluate(ctx, [][]float64{x})
	if err != nil {
		return nil, err
	}
	ev := evs[0]
	if ev == nil {
		return nil, fmt.Errorf("mdo: derivatives: the evaluation was cancelled: %w", ctx.Err())
	}
	if !ev.Converged || ev.Err != "" || len(ev.Outputs) != e.sys.vars.Len() {
		return nil, fmt.Errorf("mdo: derivatives at %v: the analysis failed (%s): %w", ev.Design, ev.Err, ErrNoDerivatives)
	}
	val := append([]float64(nil), ev.Outputs...)
	guess := append([]float64(nil), e.guess...)
	wrt := make([]string, len(e.slots), len(e.slots)+len(params))
	for k, s := range e.slots {
		wrt[k] = s.name
		if s.coupling {
			guess[s.idx] = ev.Design[k]
		}
	}
	wrt = append(wrt, params...)
	hasFunc := false
	for _, i := range e.objIdx {
		hasFunc = hasFunc || i < 0
	}
	for _, i := range e.consIdx {
		hasFunc = hasFunc || i == -1
	}
	// the variables to differentiate: all of them when a function reads
	// the values, else the objectives', constraints' and coupling ones
	var of []string
	row := map[int]int{}
	add := func(i int) {
		if _, ok := row[i]; !ok {
			row[i] = len(of)
			of = append(of, e.sys.vars.At(i).Name)
		}
	}
	if hasFunc {
		for i := 0; i < e.sys.vars.Len(); i++ {
			add(i)
		}
	} else {
		for _, i := range e.objIdx {
			add(i)
		}
		for _, i := range e.consIdx {
			if i >= 0 {
				add(i)
			}
		}
		for _, i := range e.coupling {
			add(i)
		}
	}
	tot, err := e.sys.totals(val, guess, of, wrt, TotalsOptions{Uncoupled: len(e.coupling) > 0})
	if err != nil {
		return nil, fmt.Errorf("mdo: derivatives at %v: %w", ev.Design, err)
	}
	nu := len(e.slots)
	span := make([]float64, len(wrt))
	for k := range span {
		span[k] = 1 // parameters: physical units
	}
	for k, s := range e.slots {
		span[k] = s.upper - s.lower
	}
	isTarget := func(j, c int) bool { return j < nu && e.slots[j].coupling && e.slots[j].idx == c }
	// dv/du_j for variable i
	dvar := func(i, j int) float64 { return tot.J.At(row[i], j) * span[j] }
	// a function of the values, differentiated along the totals
	dfunc := func(fn func(Values) float64, j int) float64 {
		h := 1e-6
		if j < nu && e.slots[j].integer {
			h = 1e-3
		}
		p := make([]float64, len(val))
		m := make([]float64, len(val))
		for i := range val {
			d := dvar(i, j)
			p[i] = val[i] + h*d
			m[i] = val[i] - h*d
		}
		return (fn(Values{sys: e.sys, val: p}) - fn(Values{sys: e.sys, val: m})) / (2 * h)
	}
	pd := &PointDerivatives{Eval: ev, LinearSolves: tot.LinearSolves, DisciplineCalls: tot.DisciplineCalls}
	for k, i := range e.objIdx {
		g := make([]float64, len(wrt))
		for j := range g {
			if i >= 0 {
				g[j] = dvar(i, j)
			} else {
				g[j] = dfunc(e.study.Objectives[k].Func, j)
			}
		}
		pd.Objectives = append(pd.Objectives, g)
	}
	for k, i := range e.consIdx {
		g := make([]float64, len(wrt))
		for j := range g {
			switch {
			case i >= 0:
				g[j] = dvar(i, j)
			case i == -1:
				g[j] = dfunc(e.cons[k].Func, j)
			default:
				// consistency (y − target)/scale of coupling variable c
				c := e.coupling[k-e.nUserCons]
				d := dvar(c, j)
				if isTarget(j, c) {
					d -= span[j]
				}
				g[j] = d / e.sys.vars.At(c).scale()
			}
		}
		pd.Constraints = append(pd.Constraints, g)
	}
	if len(params) > 0 {
		pd.Parameters = append([]string(nil), params...)
		for k, g := range pd.Objectives {
			pd.ObjectivesByParameter = append(pd.ObjectivesByParameter, g[nu:])
			pd.Objectives[k] = g[:nu:nu]
		}
		for k, g := range pd.Constraints {
			pd.ConstraintsByParameter = append(pd.ConstraintsByParameter, g[nu:])
			pd.Constraints[k] = g[:nu:nu]
		}
	}
	return pd, nil
}
