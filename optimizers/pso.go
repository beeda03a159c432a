package optimizers

import (
	"context"
	"math/rand"

	"couplet/mdo"
)

// ParticleSwarm is a global-best particle swarm with Clerc–Kennedy
// constriction (χ = 0.7298, c1 = c2 = 1.49618) on eaopt's engine, updated
// synchronously: every particle moves, is repaired into the unit box (its
// velocity component zeroed when clipped, reversed when reflected), and the
// swarm is evaluated as one batch; personal and global bests follow Deb's
// feasibility rules. (eaopt's own SPSO lets particles leave the box,
// evaluates them one at a time and, in v0.4.2, moves a particle to
// w·v + a random unit vector, which does not converge.) Integer design
// variables are searched as continuous coordinates that the Evaluator
// rounds. A particle that lands on a point the run has asked for before
// (its velocity died out, or its integer coordinates round as before) is
// moved to a new one by the rule of GA and takes that move as its
// velocity, so a collapsed swarm keeps searching instead of asking for
// repeats. Zero values take the defaults.
type ParticleSwarm struct {
	// Evolution: Population is the number of particles, default 10 per
	// variable, at least 20 and at most 100; Generations count the swarms
	// after the first.
	Evolution
	EqualityHandling
	// Inertia is the constriction factor χ; default 0.7298.
	Inertia float64
	// Cognitive and Social are the acceleration coefficients c1, c2;
	// default 1.49618 each.
	Cognitive, Social float64
	// Repair brings particles back into the box; default Clip.
	Repair Repair
}

// Name implements Optimizer.
func (ParticleSwarm) Name() string { return "particle swarm" }

// validate checks the settings.
func (o ParticleSwarm) validate() error {
	const m = "ParticleSwarm"
	return firstError(
		o.Evolution.validate(m, 2),
		o.EqualityHandling.validate(m),
		checkRange(m, "Inertia", o.Inertia, 0, 1, true),
		checkRange(m, "Cognitive", o.Cognitive, 0, 4, true),
		checkRange(m, "Social", o.Social, 0, 4, true),
		o.Repair.validate(m),
	)
}

// blocks implements evolutionary.
func (o ParticleSwarm) blocks() (Evolution, EqualityHandling) { return o.Evolution, o.EqualityHandling }

// Minimize implements Optimizer.
func (o ParticleSwarm) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	e, err := newEngine(ctx, s, o, 3)
	if err != nil {
		return nil, err
	}
	r, dim := e.r, e.dim
	n := or(o.Population, defaultPopulation(dim))
	chi := or(o.Inertia, 0.7298)
	c1 := or(o.Cognitive, 1.49618)
	c2 := or(o.Social, 1.49618)
	e.initial = func(rng *rand.Rand) *member {
		x := uniformPoint(dim, rng)
		v := make([]float64, dim)
		for k := range v {
			v[k] = (rng.Float64() - x[k]) / 2
		}
		m := e.newMember(x)
		m.vel = v
		m.bestX = append([]float64(nil), x...)
		return m
	}
	first := true
	e.generation = func(pop []*member, rng *rand.Rand) ([]*member, error) {
		if first {
			for _, p := range pop {
				p.best = p.ev
			}
			first = false
		}
		// the global best: the best personal best (pop is sorted by it)
		g := pop[0].bestX
		next := make([]*member, n)
		for i, p := range pop {
			q := &member{eng: e, x: make([]float64, dim), vel: make([]float64, dim), bestX: p.bestX, best: p.best}
			for k := range q.x {
				r1, r2 := rng.Float64(), rng.Float64()
				v := chi * (p.vel[k] + c1*r1*(p.bestX[k]-p.x[k]) + c2*r2*(g[k]-p.x[k]))
				x, out := o.Repair.apply(p.x[k] + v)
				if out {
					if o.Repair == Reflect {
						v = -v
					} else {
						v = 0
					}
				}
				q.x[k], q.vel[k] = x, v
			}
			next[i] = q
		}
		// a particle moved off a repeated point takes the move as its
		// velocity
		for i, moved := range e.freshen(next) {
			if moved {
				for k := range next[i].vel {
					next[i].vel[k] = next[i].x[k] - pop[i].x[k]
				}
			}
		}
		if err := e.evaluateAll(next); err != nil {
			return nil, err
		}
		if err := e.grad.apply(e, next, rng); err != nil {
			return nil, err
		}
		for _, q := range next {
			if e.notWorse(q.ev, q.best) {
				q.best = q.ev
				q.bestX = append([]float64(nil), q.x...)
			}
		}
		rankBy(next, e.eps, func(p *member) *mdo.Evaluation { return p.best })
		return next, nil
	}
	stop, err := e.evolve(n, or(o.Generations, 200))
	return r.finish(stop, err)
}
