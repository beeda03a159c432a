// Package optimizers minimises the studies of package mdo: gradient-free
// methods from gonum (Nelder–Mead, CMA-ES) behind penalty and
// augmented-Lagrangian constraint wrappers, evolutionary methods on the
// eaopt engine (a real-coded genetic algorithm, differential evolution,
// particle swarm) with Deb's feasibility rules, NSGA-II for several
// objectives, designs of experiments (random, Latin hypercube, Halton,
// full factorial), and the published benchmark problems used to test them.
//
// Every optimiser implements Optimizer. It searches the unit box of the
// Study (the Study maps it to physical bounds), draws every random number
// from the Study's seed, evaluates its points in batches through the
// Study's Evaluator (so the worker pool is used and the result does not
// depend on the number of workers), reports progress at each iteration and
// stops, returning the best point so far, when its context is cancelled.
//
// When a run's answer does not hold, Result.StopDetail says why: the
// start moved because it did not analyse, the commonest cause of failure
// when most evaluations failed to analyse, and, when no feasible point
// was found, the constraint most violated at the least violating point and
// by how much. The searches stop early with mdo.StopStalled when they find
// no feasible point and their least violation stops falling (a local
// minimum of the constraint violation), instead of spending their budget.
package optimizers

import (
	"context"
	"errors"
	"fmt"
	"math"

	"couplet/mdo"
)

// Optimizer is the contract of every optimiser and design of experiments.
//
// Minimize searches the study and returns its Result. The random choices
// flow from s.Seed; the same study and seed give the same Result, bit for
// bit, whatever s.Workers. When ctx is cancelled (or its deadline passes)
// Minimize stops as soon as the running analyses return and gives the
// best point found so far, with Result.Stop = mdo.StopCancelled (or
// mdo.StopDeadline) and a nil error: a cancel is a normal way to stop, like an
// exhausted budget. An error is returned for bad settings, a study that
// does not validate or that the method cannot handle, and a failing
// recorder (the Result is then still returned when one exists).
type Optimizer interface {
	// Name returns the method's name, as recorded in the Result.
	Name() string
	// Minimize runs the method on the study.
	Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error)
}

// run is the state shared by every optimiser during one Minimize call.
type run struct {
	ctx      context.Context
	ev       *mdo.Evaluator
	name     string
	maxEvals int
	iter     int
	// detail is the method's words on its stop; finish adds the
	// diagnosis of the evaluations (Result.StopDetail)
	detail string
	diag   diagnosis
	// searchedStart is set once the run has looked for an analysable
	// start (Nelder–Mead, CMA-ES)
	searchedStart bool
}

// begin validates the study, makes its evaluator and starts the record.
// settings is the optimiser's settings struct, recorded field by field.
func begin(ctx context.Context, s *mdo.Study, name string, settings any) (*run, error) {
	return beginChecked(ctx, s, name, settings, nil)
}

// beginChecked is begin with a check of the settings against the
// study's evaluator (its design variables) before the run begins.
func beginChecked(ctx context.Context, s *mdo.Study, name string, settings any, check func(*mdo.Evaluator) error) (*run, error) {
	if s == nil {
		return nil, fmt.Errorf("optimizers: %s: the study is nil", name)
	}
	if ctx == nil {
		ctx = context.Background()
	}
	ev, err := s.NewEvaluator()
	if err != nil {
		return nil, fmt.Errorf("optimizers: %s: %w", name, err)
	}
	if check != nil {
		if err := check(ev); err != nil {
			return nil, err
		}
	}
	if err := ev.Begin(name, settingsMap(settings)); err != nil {
		return nil, fmt.Errorf("optimizers: %s: %w", name, err)
	}
	return &run{ctx: ctx, ev: ev, name: name}, nil
}

// beginLocal is begin for the single-objective, continuous-only methods
// (Nelder–Mead, CMA-ES, Sextant, expected improvement): it refuses
// integer variables and several objectives, and what check refuses
// (nil: nothing more), before the run begins.
func beginLocal(ctx context.Context, s *mdo.Study, name string, settings any, check func(*mdo.Evaluator) error) (*run, error) {
	return beginChecked(ctx, s, name, settings, func(ev *mdo.Evaluator) error {
		if err := firstError(refuseIntegers(name, ev), refuseMultiObjective(name, ev)); err != nil || check == nil {
			return err
		}
		return check(ev)
	})
}

// refuseIntegers returns an error when the study has an integer design
// variable (for methods that only work on continuous variables).
func refuseIntegers(name string, ev *mdo.Evaluator) error {
	for _, d := range ev.DesignSpecs() {
		if d.Integer {
			return fmt.Errorf("optimizers: %s works on continuous variables only, but design variable %s is an integer in [%g, %g]; use GA, DifferentialEvolution, ParticleSwarm, NSGA2 or a design of experiments, or declare it continuous",
				name, d.Name, d.Lower, d.Upper)
		}
	}
	return nil
}

// refuseMultiObjective returns an error when the study has more than one
// objective (for single-objective methods).
func refuseMultiObjective(name string, ev *mdo.Evaluator) error {
	if n := ev.NumObjectives(); n > 1 {
		return fmt.Errorf("optimizers: %s minimises one objective, but study %q has %d (%v); use NSGA2 or a design of experiments, or turn all but one into constraints",
			name, ev.Study().Name, n, ev.ObjectiveNames())
	}
	return nil
}

// ctxStop returns the stop reason for a context error.
func ctxStop(err error) mdo.StopReason {
	if errors.Is(err, context.DeadlineExceeded) {
		return mdo.StopDeadline
	}
	return mdo.StopCancelled
}

// evaluate answers a batch of unit-box points. It returns a stop reason
// other than mdo.NotStopped when the batch would take the evaluations
// past the budget (nothing is evaluated then; repeats cost nothing, see
// mdo.Evaluator.Cost) or when the context was cancelled during it; err is
// a recorder failure.
func (r *run) evaluate(xs [][]float64) ([]*mdo.Evaluation, mdo.StopReason, error) {
	if err := r.ctx.Err(); err != nil {
		return nil, ctxStop(err), nil
	}
	if r.maxEvals > 0 && r.ev.Counters().Evaluations+r.ev.Cost(xs) > r.maxEvals {
		return nil, mdo.StopBudget, nil
	}
	evs, err := r.ev.Evaluate(r.ctx, xs)
	r.diag.note(evs)
	if cerr := r.ctx.Err(); cerr != nil {
		return evs, ctxStop(cerr), nil
	}
	if err != nil {
		return evs, mdo.NotStopped, fmt.Errorf("optimizers: %s: %w", r.name, err)
	}
	return evs, mdo.NotStopped, nil
}

// iteration reports the end of an optimiser iteration.
func (r *run) iteration() {
	r.iter++
	r.ev.Iteration(r.iter)
}

// finish builds the Result, its StopDetail the method's words (r.detail)
// and the diagnosis of the evaluations (see diagnosis).
func (r *run) finish(stop mdo.StopReason, err error) (*mdo.Result, error) {
	r.ev.SetStopDetail(joinDetail(r.detail, r.diag.summary(r.ev.Best(), r.ev.Constraints())))
	res, ferr := r.ev.Finish(stop)
	if err != nil {
		return res, err
	}
	if ferr != nil {
		return res, fmt.Errorf("optimizers: %s: %w", r.name, ferr)
	}
	return res, nil
}

// clip01 clips u into [0, 1].
func clip01(u float64) float64 { return math.Max(0, math.Min(1, u)) }

// Every method implements the contract.
var (
	_ Optimizer = NelderMead{}
	_ Optimizer = CMAES{}
	_ Optimizer = GA{}
	_ Optimizer = DifferentialEvolution{}
	_ Optimizer = ParticleSwarm{}
	_ Optimizer = NSGA2{}
	_ Optimizer = RandomDesign{}
	_ Optimizer = LatinHypercube{}
	_ Optimizer = Halton{}
	_ Optimizer = FullFactorial{}
)
