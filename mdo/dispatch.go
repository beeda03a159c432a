package mdo

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"sync"
)

// Dispatcher runs the analyses of an Evaluator's batches somewhere other
// than the Evaluator's own worker pool: in other processes, on other
// machines. The Evaluator hands it a Batch of fresh points (repeats and
// cached points never reach it) and keeps for itself everything that
// decides the result: the numbering of evaluations, the cache, the best
// point, the Pareto archive and the recorder. A dispatcher whose far side
// analyses each point with Analyst.Analyse on the same study therefore
// gives the same run, bit for bit, as the in-process pool.
//
// A Dispatcher is reached through the context given to Evaluate (see
// WithDispatcher); without one, the Evaluator uses its worker pool, as it
// always has.
type Dispatcher interface {
	// Dispatch answers the requests of b: it calls b.Finish once for
	// each of them (a second call for the same request is ignored). It
	// returns when every request is finished, or with ctx's error when
	// ctx ends first (the requests not finished are then left out of the
	// batch's answer, as cancelled ones are), or with an error of its own
	// when it cannot go on, which Evaluate returns.
	Dispatch(ctx context.Context, b *Batch) error
}

// dispatcherKey is the context key of a Dispatcher.
type dispatcherKey struct{}

// WithDispatcher returns a context under which every Evaluate call hands
// its fresh points to d instead of the Evaluator's worker pool. Pass a
// context without it (or a nil d) to analyse in-process.
func WithDispatcher(ctx context.Context, d Dispatcher) context.Context {
	return context.WithValue(ctx, dispatcherKey{}, d)
}

// DispatcherOf returns the Dispatcher ctx carries, or nil.
func DispatcherOf(ctx context.Context) Dispatcher {
	d, _ := ctx.Value(dispatcherKey{}).(Dispatcher)
	return d
}

// AnalysisRequest is one fresh point of a Batch.
type AnalysisRequest struct {
	// Index is the request's position in the batch, from 0.
	Index int
	// Design holds the physical values of the point, in the order of
	// Evaluator.DesignNames.
	Design []float64
}

// AnalysisResult is what the analysis of one point gives: everything the
// Evaluator's own pool writes into the point's Evaluation, and the name of
// the worker that ran it.
type AnalysisResult struct {
	// Analysis holds the fields the analysis fills in: objectives,
	// constraints, margins, violation, feasibility, convergence, the
	// failure and its class, the solver path, the counts, the wall time
	// and the outputs (nil when the analysis failed). Its ID, X, Design
	// and PickedUp are the Evaluator's business and are not read.
	Analysis Evaluation
	// Misnamed, if not empty, is the error of an objective or constraint
	// function that read a variable the system does not have: an error of
	// the study, which Evaluate returns.
	Misnamed string
	// Worker names the worker that analysed the point ("" for the
	// Evaluator's own pool). A failed analysis's Err says it.
	Worker string
}

// Batch is the set of fresh points one Evaluate call hands to a
// Dispatcher. Its methods are safe for concurrent use.
type Batch struct {
	e     *Evaluator
	todo  []int
	fresh []*Evaluation

	mu     sync.Mutex
	done   []bool
	left   int
	closed bool // Dispatch has returned: results are no longer taken
}

// Evaluator returns the Evaluator the batch comes from. A dispatcher may
// use its identity to tell one Evaluator's batches from another's.
func (b *Batch) Evaluator() *Evaluator { return b.e }

// Len returns the number of requests.
func (b *Batch) Len() int { return len(b.todo) }

// Request returns request k (0 <= k < Len), with a copy of its design.
func (b *Batch) Request(k int) AnalysisRequest {
	ev := b.fresh[b.todo[k]]
	return AnalysisRequest{Index: k, Design: append([]float64(nil), ev.Design...)}
}

// Left returns the number of requests not finished yet.
func (b *Batch) Left() int {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.left
}

// Finished reports whether request k has its result.
func (b *Batch) Finished(k int) bool {
	b.mu.Lock()
	defer b.mu.Unlock()
	return k >= 0 && k < len(b.done) && b.done[k]
}

// Finish gives request k its result. It reports whether the result was
// taken: false for a request that already has one (a result that arrives
// twice counts once, and so does one that comes after Dispatch returned),
// and an error for an index out of range or a result
// whose slices do not fit the study (nothing is taken then).
func (b *Batch) Finish(k int, r AnalysisResult) (bool, error) {
	if k < 0 || k >= len(b.todo) {
		return false, fmt.Errorf("mdo: result for request %d of a batch of %d", k, len(b.todo))
	}
	ev := b.fresh[b.todo[k]]
	if err := b.e.fits(r); err != nil {
		return false, fmt.Errorf("mdo: result for request %d (worker %q): %w", k, r.Worker, err)
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	if b.done[k] || b.closed {
		return false, nil
	}
	b.done[k] = true
	b.left--
	r.fill(b, ev)
	return true, nil
}

// RunHere analyses the requests not finished yet on the Evaluator's own
// worker pool, as Evaluate does without a dispatcher: a dispatcher that
// has nowhere to send a batch (or an Evaluator it does not serve) hands
// it back this way. It returns ctx's error when ctx ends first.
func (b *Batch) RunHere(ctx context.Context) error {
	var todo, ks []int
	b.mu.Lock()
	for k, d := range b.done {
		if !d && !b.closed {
			// claimed: a result that comes meanwhile is not taken
			b.done[k] = true
			b.left--
			todo, ks = append(todo, b.todo[k]), append(ks, k)
		}
	}
	b.mu.Unlock()
	cancelled := b.e.runPool(ctx, todo, b.fresh)
	b.mu.Lock()
	defer b.mu.Unlock()
	for _, k := range ks {
		if cancelled[b.todo[k]] {
			b.done[k] = false
			b.left++
		}
	}
	return ctx.Err()
}

// fill writes the result into the point's Evaluation.
func (r AnalysisResult) fill(b *Batch, ev *Evaluation) {
	a := &r.Analysis
	copy(ev.Objectives, a.Objectives)
	copy(ev.F, a.F)
	copy(ev.Constraints, a.Constraints)
	copy(ev.Margins, a.Margins)
	copy(ev.G, a.G)
	ev.Violation, ev.Feasible, ev.Converged = a.Violation, a.Feasible, a.Converged
	ev.Err, ev.Failure, ev.Path = a.Err, a.Failure, a.Path
	if r.Worker != "" && !a.Converged {
		ev.Err = fmt.Sprintf("on worker %s: %s", r.Worker, a.Err)
	}
	ev.CouplingIterations, ev.DisciplineCalls, ev.Wall = a.CouplingIterations, a.DisciplineCalls, a.Wall
	ev.Outputs = nil
	if a.Outputs != nil {
		ev.Outputs = append([]float64(nil), a.Outputs...)
	}
	if r.Misnamed != "" {
		b.e.setMisnamed(ev, errors.New(r.Misnamed))
	}
}

// fits checks that a result has the study's shape.
func (e *Evaluator) fits(r AnalysisResult) error {
	a := &r.Analysis
	no, nc := len(e.objIdx), len(e.cons)
	for _, c := range []struct {
		what string
		n    int
		want int
	}{
		{"objectives", len(a.Objectives), no}, {"minimised objectives", len(a.F), no},
		{"constraints", len(a.Constraints), nc}, {"margins", len(a.Margins), nc}, {"scaled constraints", len(a.G), nc},
	} {
		if c.n != c.want {
			return fmt.Errorf("it has %d %s, the study has %d", c.n, c.what, c.want)
		}
	}
	if a.Outputs != nil && len(a.Outputs) != len(e.outputs) {
		return fmt.Errorf("it has %d outputs, the study's system has %d variables", len(a.Outputs), len(e.outputs))
	}
	return nil
}

// result reads an analysed Evaluation back as an AnalysisResult.
func (e *Evaluator) result(ev *Evaluation) AnalysisResult {
	r := AnalysisResult{Analysis: *ev}
	r.Analysis.ID, r.Analysis.X, r.Analysis.Design = 0, nil, nil
	if err := e.takeMisnamed(ev); err != nil {
		r.Misnamed = err.Error()
	}
	return r
}

// dispatch analyses the points todo: on the dispatcher ctx carries, or on
// the worker pool. It returns which points were left unanswered and the
// dispatcher's own error.
func (e *Evaluator) dispatch(ctx context.Context, todo []int, fresh []*Evaluation) ([]bool, error) {
	d := DispatcherOf(ctx)
	if d == nil || len(todo) == 0 {
		return e.runPool(ctx, todo, fresh), nil
	}
	b := &Batch{e: e, todo: todo, fresh: fresh, done: make([]bool, len(todo)), left: len(todo)}
	err := d.Dispatch(ctx, b)
	cancelled := make([]bool, len(fresh))
	b.mu.Lock()
	defer b.mu.Unlock()
	b.closed = true
	for k, i := range todo {
		if !b.done[k] {
			cancelled[i] = true
		}
	}
	if err != nil && ctx.Err() == nil {
		return cancelled, fmt.Errorf("mdo: study %q: dispatching %d analyses: %w", e.study.Name, len(todo), err)
	}
	if err == nil && b.left > 0 && ctx.Err() == nil {
		return cancelled, fmt.Errorf("mdo: study %q: the dispatcher came back with %d of %d analyses unanswered", e.study.Name, b.left, len(todo))
	}
	return cancelled, nil
}

// Analyst analyses single points of an Evaluator's study on its
// workspaces, at most Study.Workers at once: the far side of a
// Dispatcher, in a process that rebuilt the same study, answers requests
// with it.
type Analyst struct {
	e    *Evaluator
	free chan int
}

// Analyst returns an Analyst of e's study. Use it only while e itself is
// not evaluating (in a process that serves a dispatcher, e's own Evaluate
// is the call that waits for it).
func (e *Evaluator) Analyst() *Analyst {
	a := &Analyst{e: e, free: make(chan int, len(e.spaces))}
	for w := range e.spaces {
		a.free <- w
	}
	return a
}

// Workers returns how many analyses the Analyst runs at once.
func (a *Analyst) Workers() int { return cap(a.free) }

// Analyse runs the analysis of one physical design, as the Evaluator's
// pool would, and returns its result. It waits for a free workspace. A
// design of the wrong length, with a non-finite value or outside the
// study's bounds is refused with an error naming the variable; so is an
// analysis cut short by ctx.
func (a *Analyst) Analyse(ctx context.Context, design []float64) (AnalysisResult, error) {
	e := a.e
	if len(design) != len(e.slots) {
		return AnalysisResult{}, fmt.Errorf("mdo: design of %d values, the study %q has %d coordinates", len(design), e.study.Name, len(e.slots))
	}
	ev := e.newEvaluation(make([]float64, len(design)))
	for k, s := range e.slots {
		x := design[k]
		if math.IsNaN(x) || x < s.lower || x > s.upper {
			return AnalysisResult{}, fmt.Errorf("mdo: design value %s = %g is outside its bounds [%g, %g]", s.name, x, s.lower, s.upper)
		}
		if s.integer && x != math.Round(x) {
			return AnalysisResult{}, fmt.Errorf("mdo: design value %s = %g: the variable takes whole numbers only", s.name, x)
		}
		ev.Design[k] = x
		ev.X[k] = (x - s.lower) / (s.upper - s.lower)
	}
	var w int
	select {
	case w = <-a.free:
	case <-ctx.Done():
		return AnalysisResult{}, ctx.Err()
	}
	defer func() { a.free <- w }()
	if !e.analyse(ctx, w, ev) {
		return AnalysisResult{}, fmt.Errorf("mdo: analysis of study %q cut short: %w", e.study.Name, context.Cause(ctx))
	}
	return e.result(ev), nil
}

// Fingerprint is a digest of what decides the analyses of e's study: its
// name, seed and formulation, the design coordinates with units and
// bounds, the objectives, the constraints, the system's variables and the
// starting values. Two processes that built the same study from the same
// script have the same fingerprint; a dispatcher refuses a far side whose
// fingerprint differs.
func (e *Evaluator) Fingerprint() string {
	h := sha256.New()
	str := func(s string) {
		_ = binary.Write(h, binary.LittleEndian, uint64(len(s)))
		h.Write([]byte(s))
	}
	num := func(x float64) { _ = binary.Write(h, binary.LittleEndian, math.Float64bits(x)) }
	str(e.study.Name)
	_ = binary.Write(h, binary.LittleEndian, e.study.Seed)
	str(e.study.Formulation.String())
	for _, s := range e.slots {
		str(s.name)
		str(s.unit)
		num(s.lower)
		num(s.upper)
		str(fmt.Sprint(s.integer, s.coupling))
	}
	for _, o := range e.study.Objectives {
		str("objective " + o.Name)
	}
	for _, c := range e.cons {
		str("constraint " + c.Name)
	}
	for _, v := range e.outputs {
		str(v.Name)
		str(v.Unit)
	}
	for _, x := range e.base {
		num(x)
	}
	for _, x := range e.guess {
		num(x)
	}
	return hex.EncodeToString(h.Sum(nil))
}
