package optimizers

import (
	"context"
	"errors"
	"math"
	"math/rand"
	"sort"

	"github.com/MaxHalford/eaopt"

	"couplet/mdo"
)

// The genetic algorithm, differential evolution and particle swarm run on
// eaopt's GA engine (one population, its generations, random source,
// callback and early stop), with a Model of their own per method. eaopt
// would evaluate each genome on its own (possibly from several goroutines,
// in an order that is not fixed); here every generation is evaluated as one
// batch through the Study's Evaluator before eaopt asks for a fitness, so
// the worker pool is used and the result is the same with any number of
// workers. A genome's fitness is its rank in the population by Deb's
// feasibility rules, so eaopt's sorting and tournament selection follow
// those rules exactly.
//
// Equality constraints (IDF consistency among them) leave a feasible set
// too thin for a population to find by Deb's rules alone. In a study with
// an equality constraint the methods therefore compare by the ε level of
// Takahama & Sakai (2006): during the first part of the run a point whose
// violation is at most ε counts as feasible, ε falling from the violation
// of the first population's best fifth (θ = 0.2) to 0 as (1 − t/Tc)^5.
// From generation Tc on, and always for the best point of the Result, the
// plain rules apply.
//
// The GA and the particle swarm compare by the ε level in a study with
// inequality constraints only too, from the violation of the first
// population's member at four fifths (θ = 0.8), at most 2: their variation moves few
// coordinates at a time, and an optimum where constraints are active (the
// welded beam), or a ladder of integer values each with its own
// constrained optimum (the pressure vessel's plate thicknesses), is
// reached from a neighbouring one only across slightly infeasible points.
// With Deb's rules their populations settled 5–45 % above those optima;
// differential evolution, whose trial vectors move most coordinates at
// once along the population's spread, reaches them with Deb's rules and
// was measured worse with the ε level, so it keeps them.

// member is one individual: a point of the unit box and its evaluation.
type member struct {
	x  []float64
	ev *mdo.Evaluation
	// rank is the position in the population by Deb's rules (0 best).
	rank int
	// particle swarm only: velocity and personal best.
	vel   []float64
	bestX []float64
	best  *mdo.Evaluation
	// id is a particle's place on the swarm's ring.
	id  int
	eng *engine
}

// Evaluate implements eaopt.Genome: the rank, after the member's batch has
// been evaluated.
func (m *member) Evaluate() (float64, error) {
	if m.ev == nil {
		if err := m.eng.flush(); err != nil {
			return 0, err
		}
	}
	return float64(m.rank), nil
}

// Mutate implements eaopt.Genome; the models vary the members themselves.
func (m *member) Mutate(*rand.Rand) {}

// Crossover implements eaopt.Genome; the models vary the members
// themselves.
func (m *member) Crossover(eaopt.Genome, *rand.Rand) {}

// Clone implements eaopt.Genome.
func (m *member) Clone() eaopt.Genome {
	c := *m
	c.x = append([]float64(nil), m.x...)
	c.vel = append([]float64(nil), m.vel...)
	c.bestX = append([]float64(nil), m.bestX...)
	return &c
}

// The quantiles of the first population's violations that start the ε
// level: Takahama & Sakai's θ = 0.2 with equality constraints, 0.8 for the
// inequalities the GA and the particle swarm relax (measured on the welded
// beam and the pressure vessel: with 0.2 the level starts at 0 on the
// pressure vessel, whose first population is mostly feasible). The level
// for inequalities starts at most at inequalityLevelCap, twice a
// constraint's scale: from a higher level (about 9 000 on g06, whose
// constraints are not scaled) the population ignores the constraints long
// enough to lose a thin feasible region.
const (
	equalityTheta      = 0.2
	inequalityTheta    = 0.8
	inequalityLevelCap = 2.0
)

// errStop ends eaopt's run when the budget is spent or the context is
// cancelled in the middle of a generation.
var errStop = errors.New("optimizers: evolution stopped")

// evolutionary is a single-objective evolutionary method (GA,
// DifferentialEvolution, ParticleSwarm): its checks and the settings
// blocks the engine reads.
type evolutionary interface {
	Name() string
	validate() error
	blocks() (Evolution, EqualityHandling)
}

// newEngine starts a single-objective evolutionary run of method o, whose
// random numbers come from stream of the study's seed: it
// checks o's settings, validates the study, refuses several objectives,
// and sets the evaluation budget and the equality handling
// (gradient-based mutation rate and ε-level relaxation) from o's blocks.
// With inequalities (GA, ParticleSwarm) the ε level acts in a study with
// inequality constraints only too, and so does the gradient-based
// mutation when every design variable is continuous (the differences of
// a rounded integer coordinate vanish, so the Newton step moves only the
// continuous ones, onto the constrained optimum of the integer values it
// has: on the pressure vessel a particle swarm settled 4.3 % above the
// best known cost, seed 6, on the plate thicknesses next to the best).
func newEngine(ctx context.Context, s *mdo.Study, o evolutionary, stream uint64, inequalities bool) (*engine, error) {
	if err := o.validate(); err != nil {
		return nil, err
	}
	evo, eq := o.blocks()
	r, err := beginChecked(ctx, s, o.Name(), o, func(ev *mdo.Evaluator) error {
		if err := refuseMultiObjective(o.Name(), ev); err != nil {
			return err
		}
		if c, ok := o.(interface{ checkStudy(*mdo.Evaluator) error }); ok {
			return c.checkStudy(ev)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	r.maxEvals = evo.MaxEvaluations
	grad := newGradientRepair(eq.gradientRate(), r.ev.Constraints(), inequalities && !r.ev.HasInteger())
	if grad != nil {
		// GA and ParticleSwarm update the repair's Jacobians by Broyden's
		// formula without equality constraints (see gradientRepair)
		grad.broyden = inequalities && !hasEquality(r.ev.Constraints())
	}
	return &engine{r: r, dim: r.ev.Dim(), relax: eq.relaxFraction(), relaxInequalities: inequalities,
		grad: grad, stream: stream, fresh: newFreshPoints(r.ev, freshStream+stream)}, nil
}

// engine ties eaopt's GA to a run.
type engine struct {
	r       *run
	dim     int
	pending []*member
	stop    mdo.StopReason
	err     error
	// generation is called for each generation after the first with the
	// population (sorted best first) and the random source; it returns
	// the next population, evaluated and sorted best first.
	generation func(pop []*member, rng *rand.Rand) ([]*member, error)
	// eps is the current ε level of the comparison (0: Deb's rules);
	// eps0 its initial value, relaxGens the generations over which it
	// falls to 0, gen the current generation.
	eps, eps0 float64
	relax     float64
	relaxGens int
	gen       int
	// relaxInequalities applies the ε level in a study with inequality
	// constraints only, from the first population's violation at quantile
	// inequalityTheta.
	relaxInequalities bool
	// grad is the gradient-based mutation (nil when off).
	grad *gradientRepair
	// initial draws a member of the first population.
	initial func(rng *rand.Rand) *member
	// fresh keeps the points asked for, so that only new ones are sent.
	fresh *freshPoints
	// stream is the method's random stream of the study seed.
	stream uint64
	// watch stops a run that finds no feasible point (stallWindow)
	watch infeasibleStall
}

// stallWindow is the number of generations without a feasible point
// over which the least violation must fall by a thousandth (once the ε
// level has fallen to 0), or the run stops stalled: a fifth of the
// generations, at least 20.
func stallWindow(generations int) int { return max(20, generations/5) }

// stalledInfeasible reports, before each generation, whether the run has
// stalled without a feasible point; the Result's detail then says so.
func (e *engine) stalledInfeasible() bool {
	if e.gen < e.relaxGens {
		// constraints are relaxed: the population is not aiming at the
		// least violation yet
		e.watch.reset()
		return false
	}
	if !e.watch.stalled(e.r.ev.Best()) {
		return false
	}
	e.r.detail = joinDetail(e.r.detail, e.watch.stallDetail("generations"))
	return true
}

// freshStream offsets the random stream of a method's fresh-point moves
// from the method's own.
const freshStream = 10

// freshen moves, in place, every member that repeats a point asked for
// before (see freshPoints) and reports which moved.
func (e *engine) freshen(ms []*member) []bool {
	moved := make([]bool, len(ms))
	for i, m := range ms {
		moved[i] = e.fresh.fresh(m.x)
	}
	return moved
}

// evaluateAll evaluates members as one batch.
func (e *engine) evaluateAll(ms []*member) error {
	xs := make([][]float64, len(ms))
	for i, m := range ms {
		xs[i] = m.x
		e.fresh.record(m.x)
	}
	evs, stop, err := e.r.evaluate(xs)
	if err != nil {
		e.err = err
		return err
	}
	if stop != mdo.NotStopped {
		e.stop = stop
		return errStop
	}
	for i, m := range ms {
		m.ev = evs[i]
	}
	return nil
}

// flush evaluates the members created since the last flush (the first
// population) and ranks them.
func (e *engine) flush() error {
	ms := e.pending
	e.pending = nil
	e.freshen(ms)
	if err := e.evaluateAll(ms); err != nil {
		return err
	}
	e.startEpsilon(ms)
	e.rank(ms)
	return nil
}

// startEpsilon sets the initial ε level from the first population: the
// violation of its member at the fifth (Takahama & Sakai's θ = 0.2) in a
// study with an equality constraint, at four fifths but at most
// inequalityLevelCap when only inequalities are relaxed
// (relaxInequalities), ignoring failed analyses.
func (e *engine) startEpsilon(ms []*member) {
	if e.relaxGens <= 0 {
		return
	}
	var v []float64
	for _, m := range ms {
		if x := violation(m.ev); !math.IsInf(x, 0) {
			v = append(v, x)
		}
	}
	if len(v) == 0 {
		return
	}
	sort.Float64s(v)
	if hasEquality(e.r.ev.Constraints()) {
		e.eps0 = v[int(equalityTheta*float64(len(v)-1))]
	} else {
		e.eps0 = math.Min(v[int(inequalityTheta*float64(len(v)-1))], inequalityLevelCap)
	}
	e.eps = e.eps0
}

// nextEpsilon lowers the ε level for generation e.gen:
// ε = ε0 (1 − t/Tc)^5 until Tc, then 0 (Takahama & Sakai's schedule).
func (e *engine) nextEpsilon() {
	e.gen++
	if e.relaxGens <= 0 || e.gen >= e.relaxGens {
		e.eps = 0
		return
	}
	e.eps = e.eps0 * math.Pow(1-float64(e.gen)/float64(e.relaxGens), 5)
}

// rank sorts members best first by the current comparison.
func (e *engine) rank(ms []*member) {
	rankBy(ms, e.eps, func(m *member) *mdo.Evaluation { return m.ev })
}

// notWorse reports whether a is at least as good as b by the current
// comparison.
func (e *engine) notWorse(a, b *mdo.Evaluation) bool { return compareEps(a, b, e.eps) <= 0 }

// rankBy is the ranking of every single-objective evolutionary method: it
// sorts members best first by the ε-level comparison (Deb's rules for
// eps = 0) of the evaluation key gives (a member's own, or a particle's
// personal best), stable, and sets their ranks.
func rankBy(ms []*member, eps float64, key func(*member) *mdo.Evaluation) {
	evs := make([]*mdo.Evaluation, len(ms))
	idx := make([]int, len(ms))
	for i, m := range ms {
		evs[i] = key(m)
		idx[i] = i
	}
	sortByDeb(idx, evs, eps)
	sorted := make([]*member, len(ms))
	for k, i := range idx {
		sorted[k] = ms[i]
		sorted[k].rank = k
	}
	copy(ms, sorted)
}

// Apply implements eaopt.Model: one generation.
func (e *engine) Apply(pop *eaopt.Population) error {
	cur := make([]*member, len(pop.Individuals))
	for i, ind := range pop.Individuals {
		cur[i] = ind.Genome.(*member)
	}
	e.nextEpsilon()
	next, err := e.generation(cur, pop.RNG)
	if err != nil {
		return err
	}
	for i, m := range next {
		pop.Individuals[i] = eaopt.Individual{Genome: m, Fitness: float64(m.rank), Evaluated: true, ID: pop.Individuals[i].ID}
	}
	return nil
}

// Validate implements eaopt.Model.
func (e *engine) Validate() error { return nil }

// evolve runs eaopt's GA engine with popSize members for generations
// generations (the first population counts as generation 0), drawing
// from the method's random stream, and returns why it stopped.
func (e *engine) evolve(popSize, generations int) (mdo.StopReason, error) {
	rng := newRand(e.r.ev.Seed(), e.stream)
	e.dim = e.r.ev.Dim()
	if cs := e.r.ev.Constraints(); e.relax > 0 && (hasEquality(cs) || e.relaxInequalities && len(cs) > 0) {
		e.relaxGens = int(math.Ceil(e.relax * float64(generations)))
	}
	e.watch = infeasibleStall{window: stallWindow(generations)}
	e.watch.reset()
	ga, err := eaopt.GAConfig{
		NPops:        1,
		PopSize:      uint(popSize),
		NGenerations: uint(generations),
		HofSize:      1,
		Model:        e,
		ParallelEval: false,
		RNG:          rng,
		Callback:     func(*eaopt.GA) { e.r.iteration() },
		EarlyStop: func(*eaopt.GA) bool {
			if err := e.r.ctx.Err(); err != nil {
				e.stop = ctxStop(err)
			}
			if e.stop == mdo.NotStopped && e.stalledInfeasible() {
				e.stop = mdo.StopStalled
			}
			return e.stop != mdo.NotStopped
		},
	}.NewGA()
	if err != nil {
		return mdo.NotStopped, err
	}
	err = ga.Minimize(func(rng *rand.Rand) eaopt.Genome {
		m := e.initial(rng)
		m.eng = e
		e.pending = append(e.pending, m)
		return m
	})
	switch {
	case e.err != nil:
		return mdo.NotStopped, e.err
	case errors.Is(err, errStop) || e.stop != mdo.NotStopped:
		return e.stop, nil
	case err != nil:
		return mdo.NotStopped, err
	}
	return mdo.StopIterations, nil
}

// newMember returns a member at x, tied to the engine.
func (e *engine) newMember(x []float64) *member {
	return &member{x: x, eng: e}
}

// survivors keeps the best n of pop ∪ off by the current comparison,
// parents first among equals (the (μ + λ) selection).
func (e *engine) survivors(pop, off []*member, n int) []*member {
	all := append(append([]*member(nil), pop...), off...)
	e.rank(all)
	out := all[:n]
	for k, m := range out {
		m.rank = k
	}
	return out
}

// hasEquality reports whether any constraint is an equality.
func hasEquality(cs []mdo.Constraint) bool {
	for _, c := range cs {
		if c.Kind == mdo.Equal {
			return true
		}
	}
	return false
}
