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
package optimizers

import (
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"sort"

	"couplet/mdo"
)

// Optimizer is the contract of every optimiser and design of experiments.
//
// Minimize searches the study and returns its Result. The random choices
// flow from s.Seed; the same study and seed give the same Result, bit for
// bit, whatever s.Workers. When ctx is cancelled (or its deadline passes)
// Minimize stops as soon as the running analyses return and gives the
// best point found so far, with Result.Stop = StopCancelled (or
// StopDeadline) and a nil error: a cancel is a normal way to stop, like an
// exhausted budget. An error is returned for bad settings, a study that
// does not validate or that the method cannot handle, and a failing
// recorder (the Result is then still returned when one exists).
type Optimizer interface {
	// Name returns the method's name, as recorded in the Result.
	Name() string
	// Minimize runs the method on the study.
	Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error)
}

// Reasons an optimiser stops, as given in mdo.Result.Stop.
const (
	// StopConverged: the method's own convergence test was met.
	StopConverged = "converged"
	// StopBudget: the evaluation budget (MaxEvaluations) was spent.
	StopBudget = "budget"
	// StopIterations: the number of generations or iterations was reached.
	StopIterations = "iterations"
	// StopComplete: a design of experiments evaluated all its points.
	StopComplete = "complete"
	// StopCancelled: the context was cancelled.
	StopCancelled = "cancelled"
	// StopDeadline: the context's deadline passed.
	StopDeadline = "deadline"
)

// run is the state shared by every optimiser during one Minimize call.
type run struct {
	ctx      context.Context
	ev       *mdo.Evaluator
	name     string
	maxEvals int
	iter     int
}

// begin validates the study, makes its evaluator and starts the record.
// settings is the optimiser's settings struct, recorded field by field.
func begin(ctx context.Context, s *mdo.Study, name string, settings any) (*run, error) {
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
	if err := ev.Begin(name, settingsMap(settings)); err != nil {
		return nil, fmt.Errorf("optimizers: %s: %w", name, err)
	}
	return &run{ctx: ctx, ev: ev, name: name}, nil
}

// refuseIntegers returns an error when the study has an integer design
// variable (for methods that only work on continuous variables).
func (r *run) refuseIntegers() error {
	for _, d := range r.ev.DesignSpecs() {
		if d.Integer {
			return fmt.Errorf("optimizers: %s works on continuous variables only, but design variable %s is an integer in [%g, %g]; use GA, DifferentialEvolution, ParticleSwarm, NSGA2 or a design of experiments, or declare it continuous",
				r.name, d.Name, d.Lower, d.Upper)
		}
	}
	return nil
}

// refuseMultiObjective returns an error when the study has more than one
// objective (for single-objective methods).
func (r *run) refuseMultiObjective() error {
	if n := r.ev.NumObjectives(); n > 1 {
		return fmt.Errorf("optimizers: %s minimises one objective, but study %q has %d (%v); use NSGA2 or a design of experiments, or turn all but one into constraints",
			r.name, r.ev.Study().Name, n, r.ev.ObjectiveNames())
	}
	return nil
}

// ctxStop returns the stop reason for a context error.
func ctxStop(err error) string {
	if errors.Is(err, context.DeadlineExceeded) {
		return StopDeadline
	}
	return StopCancelled
}

// evaluate answers a batch of unit-box points. It returns a non-empty stop
// reason when the batch would exceed the evaluation budget (nothing is
// evaluated then) or when the context was cancelled during it; err is a
// recorder failure.
func (r *run) evaluate(xs [][]float64) ([]*mdo.Evaluation, string, error) {
	if err := r.ctx.Err(); err != nil {
		return nil, ctxStop(err), nil
	}
	if r.maxEvals > 0 && r.ev.Counters().Evaluations+len(xs) > r.maxEvals {
		return nil, StopBudget, nil
	}
	evs, err := r.ev.Evaluate(r.ctx, xs)
	if cerr := r.ctx.Err(); cerr != nil {
		return evs, ctxStop(cerr), nil
	}
	if err != nil {
		return evs, "", fmt.Errorf("optimizers: %s: %w", r.name, err)
	}
	return evs, "", nil
}

// iteration reports the end of an optimiser iteration.
func (r *run) iteration() {
	r.iter++
	r.ev.Iteration(r.iter)
}

// finish builds the Result.
func (r *run) finish(stop string, err error) (*mdo.Result, error) {
	res, ferr := r.ev.Finish(stop)
	if err != nil {
		return res, err
	}
	if ferr != nil {
		return res, fmt.Errorf("optimizers: %s: %w", r.name, ferr)
	}
	return res, nil
}

// settingsMap records a settings struct as field name → value.
func settingsMap(settings any) map[string]string {
	out := map[string]string{}
	if settings == nil {
		return out
	}
	v := reflect.ValueOf(settings)
	for v.Kind() == reflect.Pointer {
		if v.IsNil() {
			return out
		}
		v = v.Elem()
	}
	if v.Kind() != reflect.Struct {
		return out
	}
	t := v.Type()
	for i := 0; i < t.NumField(); i++ {
		if !t.Field(i).IsExported() {
			continue
		}
		f := v.Field(i)
		if f.Kind() == reflect.Struct {
			for k, s := range settingsMap(f.Interface()) {
				out[t.Field(i).Name+"."+k] = s
			}
			continue
		}
		out[t.Field(i).Name] = fmt.Sprint(f.Interface())
	}
	return out
}

// settingError is the error of a setting out of its allowed range.
func settingError(method, setting string, value any, allowed string) error {
	return fmt.Errorf("optimizers: %s.%s = %v, %s", method, setting, value, allowed)
}

// checkInt checks an integer setting: 0 means the default, else it must be
// at least min.
func checkInt(method, setting string, v, min int) error {
	if v != 0 && v < min {
		return settingError(method, setting, v, fmt.Sprintf("must be >= %d (0 means the default)", min))
	}
	return nil
}

// checkRange checks a float setting: 0 means the default, else it must lie
// in (lo, hi] (open at lo when open is true, closed otherwise).
func checkRange(method, setting string, v, lo, hi float64, openLo bool) error {
	bad := math.IsNaN(v) || v > hi || v < lo || (openLo && v == lo)
	if v == 0 && !math.IsNaN(v) {
		bad = false
	}
	if bad {
		lb := "["
		if openLo {
			lb = "("
		}
		return settingError(method, setting, v, fmt.Sprintf("must lie in %s%g, %g] (0 means the default)", lb, lo, hi))
	}
	return nil
}

// or returns v, or def when v is zero.
func or[T int | float64](v, def T) T {
	if v == 0 {
		return def
	}
	return v
}

// compare orders two evaluations by Deb's feasibility rules on the first
// objective without the evaluation-number tie-break of mdo.Better: −1 when
// a is better, +1 when b is, 0 when they are equally good.
func compare(a, b *mdo.Evaluation) int {
	switch {
	case a == nil && b == nil:
		return 0
	case b == nil:
		return -1
	case a == nil:
		return 1
	case a.Feasible && !b.Feasible:
		return -1
	case !a.Feasible && b.Feasible:
		return 1
	case a.Feasible:
		return cmpFloat(a.F[0], b.F[0])
	}
	return cmpFloat(a.Violation, b.Violation)
}

// cmpFloat compares two floats.
func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// violation returns the violation of an evaluation (+Inf for none).
func violation(e *mdo.Evaluation) float64 {
	if e == nil {
		return math.Inf(1)
	}
	return e.Violation
}

// compareEps is the ε-level comparison (Takahama & Sakai, 2006): points
// whose violation is at most eps compare by objective as if feasible; the
// others by violation, after them. With eps = 0 it is compare.
func compareEps(a, b *mdo.Evaluation, eps float64) int {
	if eps <= 0 {
		return compare(a, b)
	}
	va, vb := violation(a), violation(b)
	aOK, bOK := va <= eps, vb <= eps
	switch {
	case aOK && bOK:
		if c := cmpFloat(a.F[0], b.F[0]); c != 0 {
			return c
		}
		return cmpFloat(va, vb)
	case aOK:
		return -1
	case bOK:
		return 1
	}
	return cmpFloat(va, vb)
}

// sortByDeb sorts indices of evs best first by the ε-level comparison
// (Deb's rules when eps = 0), stable.
func sortByDeb(idx []int, evs []*mdo.Evaluation, eps float64) {
	sort.SliceStable(idx, func(i, j int) bool { return compareEps(evs[idx[i]], evs[idx[j]], eps) < 0 })
}

// clip01 clips u into [0, 1].
func clip01(u float64) float64 { return math.Max(0, math.Min(1, u)) }
