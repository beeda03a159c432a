package optimizers

import (
	"errors"
	"fmt"
	"math"

	"couplet/mdo"
)

// PenaltyMethod says how Nelder–Mead and CMA-ES fold the constraints into
// the one function they minimise.
type PenaltyMethod int

const (
	// AugmentedLagrangian (Powell–Hestenes–Rockafellar, for inequalities):
	// minimise f/s + Σ [max(0, λᵢ + ρ gᵢ)² − λᵢ²]/(2ρ), then update
	// λᵢ ← max(0, λᵢ + ρ gᵢ), and grow ρ when the violation did not fall
	// to a quarter. The default: it converges onto active constraints
	// without an unbounded weight.
	AugmentedLagrangian PenaltyMethod = iota
	// QuadraticPenalty (sequential exterior penalty): minimise
	// f/s + ρ Σ max(0, gᵢ)², growing ρ at every outer iteration.
	QuadraticPenalty
)

// String returns the method's name.
func (p PenaltyMethod) String() string {
	switch p {
	case AugmentedLagrangian:
		return "augmented Lagrangian"
	case QuadraticPenalty:
		return "quadratic penalty"
	}
	return fmt.Sprintf("penalty(%d)", int(p))
}

// Penalty holds the constraint-handling settings of Nelder–Mead and CMA-ES.
// An inequality enters through its scaled form gᵢ (mdo.Evaluation.G, ≤ 0
// when satisfied); an equality through its signed scaled residual
// hᵢ = (value − target)/scale, aimed at zero (λᵢ hᵢ + ρ hᵢ²/2 with a
// multiplier of either sign; ρ hᵢ² for the quadratic penalty), its
// tolerance deciding only feasibility. Zero values take the defaults.
type Penalty struct {
	// Method is AugmentedLagrangian (default) or QuadraticPenalty.
	Method PenaltyMethod
	// Weight is the initial penalty weight ρ; default 100.
	Weight float64
	// Growth multiplies ρ when the violation did not shrink enough;
	// default 10.
	Growth float64
	// MaxWeight caps ρ; default 1e9.
	MaxWeight float64
	// OuterIterations is the number of inner minimisations (multiplier or
	// weight updates); default 10 (3 restarts for an unconstrained
	// study). Each runs until its own convergence test is met.
	OuterIterations int
	// Tolerance ends the outer iterations when two successive feasible
	// results differ by at most Tolerance·max(|f|, 1); default 1e-7.
	Tolerance float64
	// ObjectiveScale divides the objective so that it is of order one;
	// default max(|f|, 1) at the first point evaluated.
	ObjectiveScale float64
	// FailedValue is the merit given to a point whose analysis failed;
	// default 1e30.
	FailedValue float64
}

// validate checks the settings.
func (p Penalty) validate(method string) error {
	m := method + ".Penalty"
	if p.Method != AugmentedLagrangian && p.Method != QuadraticPenalty {
		return settingError(m, "Method", int(p.Method), "must be AugmentedLagrangian or QuadraticPenalty")
	}
	if err := checkRange(m, "Weight", p.Weight, 0, 1e12, true); err != nil {
		return err
	}
	if p.Growth != 0 && !(p.Growth >= 1 && p.Growth <= 1e6) {
		return settingError(m, "Growth", p.Growth, "must lie in [1, 1e6] (0 means the default 10)")
	}
	if err := checkRange(m, "MaxWeight", p.MaxWeight, 0, 1e300, true); err != nil {
		return err
	}
	if max := or(p.MaxWeight, 1e9); p.Weight > max {
		return settingError(m, "Weight", p.Weight, fmt.Sprintf("must be at most MaxWeight (%g)", max))
	}
	if err := checkInt(m, "OuterIterations", p.OuterIterations, 1); err != nil {
		return err
	}
	if err := checkRange(m, "Tolerance", p.Tolerance, 0, 1, true); err != nil {
		return err
	}
	if err := checkRange(m, "ObjectiveScale", p.ObjectiveScale, 0, math.MaxFloat64, true); err != nil {
		return err
	}
	if err := checkRange(m, "FailedValue", p.FailedValue, 0, math.MaxFloat64, true); err != nil {
		return err
	}
	return nil
}

// merit is the penalised function of one outer iteration. An equality
// constraint enters through its signed scaled residual h = (v − target)/s
// (multiplier of either sign), an inequality through G.
type merit struct {
	p       Penalty
	eq      []bool
	eqScale []float64
	eqTgt   []float64
	rho     float64
	lambda  []float64
	fscale  float64
	maxRho  float64
	growth  float64
	failed  float64
	lastVio float64
}

// newMerit prepares the merit for the constraints cs.
func newMerit(p Penalty, cs []mdo.Constraint) *merit {
	nc := len(cs)
	m := &merit{p: p, rho: or(p.Weight, 100), lambda: make([]float64, nc), fscale: p.ObjectiveScale,
		maxRho: or(p.MaxWeight, 1e9), growth: or(p.Growth, 10), failed: or(p.FailedValue, 1e30), lastVio: math.Inf(1),
		eq: make([]bool, nc), eqScale: make([]float64, nc), eqTgt: make([]float64, nc)}
	for i, c := range cs {
		if c.Kind == mdo.Equal {
			m.eq[i] = true
			m.eqTgt[i] = c.Lower
			m.eqScale[i] = c.Scale
			if c.Scale <= 0 {
				// mdo's documented default scale of a constraint
				m.eqScale[i] = math.Max(math.Abs(c.Lower), 1)
			}
		}
	}
	return m
}

// residual returns the term of constraint i at ev: the signed scaled
// residual of an equality, G of an inequality.
func (m *merit) residual(ev *mdo.Evaluation, i int) float64 {
	if m.eq[i] {
		return (ev.Constraints[i] - m.eqTgt[i]) / m.eqScale[i]
	}
	return ev.G[i]
}

// value is the merit of an evaluation.
func (m *merit) value(ev *mdo.Evaluation) float64 {
	if ev == nil || !ev.Converged {
		return m.failed
	}
	if m.fscale == 0 {
		m.fscale = math.Max(math.Abs(ev.F[0]), 1)
	}
	v := ev.F[0] / m.fscale
	for i := range ev.G {
		g := m.residual(ev, i)
		switch {
		case m.eq[i] && m.p.Method == AugmentedLagrangian:
			v += m.lambda[i]*g + m.rho*g*g/2
		case m.eq[i]:
			v += m.rho * g * g
		case m.p.Method == AugmentedLagrangian:
			t := m.lambda[i] + m.rho*g
			if t > 0 {
				v += (t*t - m.lambda[i]*m.lambda[i]) / (2 * m.rho)
			} else {
				v -= m.lambda[i] * m.lambda[i] / (2 * m.rho)
			}
		default:
			if g > 0 {
				v += m.rho * g * g
			}
		}
	}
	if math.IsNaN(v) || v > m.failed {
		return m.failed
	}
	return v
}

// update moves the multipliers and the weight after an outer iteration
// ended at ev.
func (m *merit) update(ev *mdo.Evaluation) {
	if ev == nil || !ev.Converged {
		m.rho = math.Min(m.rho*m.growth, m.maxRho)
		return
	}
	vio := 0.0
	for _, g := range ev.G {
		vio += math.Max(g, 0)
	}
	switch m.p.Method {
	case AugmentedLagrangian:
		for i := range ev.G {
			g := m.residual(ev, i)
			if m.eq[i] {
				m.lambda[i] += m.rho * g
			} else {
				m.lambda[i] = math.Max(0, m.lambda[i]+m.rho*g)
			}
		}
		if vio > 0.25*m.lastVio {
			m.rho = math.Min(m.rho*m.growth, m.maxRho)
		}
	default:
		m.rho = math.Min(m.rho*m.growth, m.maxRho)
	}
	m.lastVio = vio
}

// innerFunc runs one inner minimisation from the box point x0 with the
// given merit; it returns the best evaluation by merit, why it stopped and
// an error.
type innerFunc func(x0 []float64, m *merit, outer int) (best *mdo.Evaluation, stop mdo.StopReason, err error)

// outerStallWindow is the number of outer iterations without a feasible
// point over which the least violation must fall by a thousandth, or the
// run stops stalled.
const outerStallWindow = 3

// outerLoop runs the penalty or augmented-Lagrangian outer iterations
// around inner minimisations, starting from the box point x0.
//
// When the run's first batch fails to analyse entirely (an inner search
// returns errNothingAnalysed), the search starts again from the first
// analysable point toward the centre of the box (run.analysableStart), or
// stops stalled when there is none. While no feasible point has been
// found, the run stops stalled when the least violation has not fallen
// by a thousandth over outerStallWindow outer iterations (the weight
// having grown meanwhile): a local minimum of the constraint violation.
func outerLoop(r *run, p Penalty, x0 []float64, inner innerFunc) (mdo.StopReason, error) {
	m := newMerit(p, r.ev.Constraints())
	outer := or(p.OuterIterations, 10)
	if r.ev.NumConstraints() == 0 && p.OuterIterations == 0 {
		outer = 3 // restarts of an unconstrained search
	}
	x := append([]float64(nil), x0...)
	prevF := math.NaN()
	stall := infeasibleStall{window: outerStallWindow}
	stall.reset()
	for k := 0; k < outer; k++ {
		best, stop, err := inner(x, m, k)
		if errors.Is(err, errNothingAnalysed) {
			r.searchedStart = true
			u, ev, detail, stop, err := r.analysableStart(x)
			if err != nil || stop != mdo.NotStopped {
				return stop, err
			}
			r.detail = detail
			if ev == nil {
				return mdo.StopStalled, nil
			}
			if detail != "" {
				// moved: the same outer iteration from the new start
				x = append(x[:0], u...)
				k--
			}
			continue
		}
		if err != nil || (stop != mdo.NotStopped && stop != mdo.StopConverged) {
			return stop, err
		}
		if best == nil {
			return mdo.StopConverged, nil
		}
		x = append(x[:0], best.X...)
		m.update(best)
		f := best.F[0]
		if best.Feasible && k > 0 && math.Abs(f-prevF) <= or(p.Tolerance, 1e-7)*math.Max(1, math.Abs(f)) {
			return mdo.StopConverged, nil
		}
		if best.Feasible {
			prevF = f
		} else {
			prevF = math.NaN()
		}
		if stall.stalled(r.ev.Best()) {
			r.detail = joinDetail(r.detail, stall.stallDetail(fmt.Sprintf("outer iterations (penalty weight now %.3g)", m.rho)))
			return mdo.StopStalled, nil
		}
	}
	return mdo.StopIterations, nil
}
