package optimizers

import (
	"math"
	"math/rand"

	"gonum.org/v1/gonum/mat"

	"couplet/mdo"
)

// Gradient-based mutation of the ε-constrained method (Takahama & Sakai,
// 2006): an infeasible offspring is moved by the minimum-norm Newton step
// Δx = −∇C(x)⁺ C(x) on its constraint residuals C (the signed scaled
// residual of each equality, the positive G of each violated inequality),
// with ∇C by forward differences in the unit box, up to a few times. It is
// what lets a population follow the thin feasible set of equality
// constraints, IDF consistency among them, and, for the GA and the
// particle swarm, a thin feasible set bounded by active inequalities (the
// regional jet with a shorter take-off field, whose engines are sized for
// the longer one: 9 of the GA's 16 160 points were feasible without it).
// The differences and the steps of all the offspring chosen in a
// generation are evaluated as batches.

// gradientRepair holds the settings of the gradient-based mutation.
type gradientRepair struct {
	rate   float64 // probability that an infeasible offspring is repaired
	steps  int     // Newton steps at most
	h      float64 // forward-difference step in the unit box
	eq     []bool
	target []float64
	scale  []float64
}

// newGradientRepair prepares the repair for the constraints cs; it
// returns nil when the rate is zero or there is no equality constraint
// (no constraint at all when inequalities is true).
func newGradientRepair(rate float64, cs []mdo.Constraint, inequalities bool) *gradientRepair {
	if rate <= 0 || len(cs) == 0 || !inequalities && !hasEquality(cs) {
		return nil
	}
	g := &gradientRepair{rate: rate, steps: 3, h: 1e-7, eq: make([]bool, len(cs)), target: make([]float64, len(cs)), scale: make([]float64, len(cs))}
	for i, c := range cs {
		if c.Kind == mdo.Equal {
			g.eq[i] = true
			g.target[i] = c.Lower
			g.scale[i] = c.Scale
			if c.Scale <= 0 {
				// mdo's documented default scale of a constraint
				g.scale[i] = math.Max(math.Abs(c.Lower), 1)
			}
		}
	}
	return g
}

// residuals returns the active constraint residuals of ev (equalities
// always, inequalities when violated) and their indices.
func (g *gradientRepair) residuals(ev *mdo.Evaluation, active []int) ([]float64, []int) {
	if active == nil {
		for i := range ev.G {
			if g.eq[i] || ev.G[i] > 0 {
				active = append(active, i)
			}
		}
	}
	r := make([]float64, len(active))
	for k, i := range active {
		if g.eq[i] {
			r[k] = (ev.Constraints[i] - g.target[i]) / g.scale[i]
		} else {
			r[k] = ev.G[i]
		}
	}
	return r, active
}

// apply repairs some of the infeasible members (chosen with the engine's
// random source, in order) in place; it returns an error when the batch
// evaluation stops.
func (g *gradientRepair) apply(e *engine, ms []*member, rng *rand.Rand) error {
	if g == nil {
		return nil
	}
	var chosen []*member
	for _, m := range ms {
		if rng.Float64() < g.rate && m.ev != nil && m.ev.Converged && !m.ev.Feasible {
			chosen = append(chosen, m)
		}
	}
	return g.newton(e.evaluateAll, e.dim, chosen, e.fresh.add)
}

// newton runs the Newton steps on the chosen members in place, evaluating
// with eval. With isNew (which records the point it is given and reports
// whether it was new), a step to a point asked for before (a step clipped
// back onto the member's own point, or onto another's) is not taken and
// ends that member's repair, so that an evolutionary run asks for no
// repeat.
func (g *gradientRepair) newton(eval func([]*member) error, d int, chosen []*member, isNew func([]float64) bool) error {
	for step := 0; step < g.steps && len(chosen) > 0; step++ {
		// forward differences of every chosen member, one batch
		var probes []*member
		for _, m := range chosen {
			for k := 0; k < d; k++ {
				x := append([]float64(nil), m.x...)
				if x[k]+g.h <= 1 {
					x[k] += g.h
				} else {
					x[k] -= g.h
				}
				probes = append(probes, &member{x: x})
			}
		}
		if err := eval(probes); err != nil {
			return err
		}
		var moved []*member
		var from []*member
		for j, m := range chosen {
			r, active := g.residuals(m.ev, nil)
			if len(active) == 0 {
				continue
			}
			jac := mat.NewDense(len(active), d, nil)
			ok := true
			for k := 0; k < d; k++ {
				p := probes[j*d+k]
				if p.ev == nil || !p.ev.Converged {
					ok = false
					break
				}
				rp, _ := g.residuals(p.ev, active)
				h := p.x[k] - m.x[k]
				for a := range active {
					jac.Set(a, k, (rp[a]-r[a])/h)
				}
			}
			if !ok {
				continue
			}
			var dx mat.Dense
			if err := dx.Solve(jac, mat.NewVecDense(len(r), r)); err != nil {
				continue
			}
			x := append([]float64(nil), m.x...)
			for k := range x {
				x[k] -= dx.At(k, 0)
			}
			Clip.repairAll(x)
			if isNew != nil && !isNew(x) {
				continue
			}
			moved = append(moved, &member{x: x})
			from = append(from, m)
		}
		if len(moved) == 0 {
			return nil
		}
		if err := eval(moved); err != nil {
			return err
		}
		chosen = chosen[:0]
		for i, n := range moved {
			m := from[i]
			m.x, m.ev = n.x, n.ev
			if m.ev.Converged && !m.ev.Feasible {
				chosen = append(chosen, m)
			}
		}
	}
	return nil
}
