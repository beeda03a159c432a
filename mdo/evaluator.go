package mdo

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"
	"time"
)

// Evaluator turns points of the unit box into Evaluations of a Study. It
// runs analyses on a pool of workers, one System workspace each, caches
// repeated points, keeps the best point and the Pareto archive, and feeds
// the study's recorder. Results do not depend on the number of workers.
//
// An Evaluator is driven from one goroutine (the optimiser's); it runs
// its own workers inside Evaluate.
type Evaluator struct {
	study     Study
	sys       *System
	slots     []designSlot
	objIdx    []int
	cons      []Constraint
	consIdx   []int
	nUserCons int
	coupling  []int
	base      []float64
	guess     []float64
	spaces    []*Workspace
	resid     [][]float64
	outputs   []Var

	cache    designMap[*Evaluation] // by physical design
	batch    designMap[int]         // Evaluate's and Cost's points of one batch
	scratch  []float64              // the physical designs of a batch
	rows     [][]float64            // scratch, one design a point
	pickedUp map[*Evaluation]bool   // picked-up points not yet asked for
	// misnamed holds, for the points of the batch being analysed, an
	// objective or constraint function's read of a variable the system
	// does not have (the point is then not accepted); rare, so kept
	// beside the points rather than in every Evaluation
	misnamedMu sync.Mutex
	misnamed   map[*Evaluation]error
	nextID     int
	best       *Evaluation
	archive    paretoArchive
	history    []HistoryPoint
	cnt        EvalCounters
	started    time.Time
	began      bool
	optName    string
	settings   map[string]string
	recErr     error
	// stopDetail is the optimiser's words on its stop (SetStopDetail)
	stopDetail string
	// sensitivity is the best point's sensitivity (SetSensitivity)
	sensitivity *Sensitivity
	progress    Progress
}

// designSlot maps one unit-box coordinate to a system variable.
type designSlot struct {
	name         string
	unit         string
	idx          int
	lower, upper float64
	integer      bool
	coupling     bool // IDF target of a coupling variable
}

// EvalCounters count the work of an Evaluator.
//
// An evaluation is a design point answered by an analysis: one run by
// this Evaluator (an analysis) or one run by the earlier session of a run
// this one picks up (a picked-up point, read from its store). Evaluations
// is therefore Analyses + PickedUp, one row each in the store, and it is
// what the optimisers' budgets (MaxEvaluations) count. A repeat is a point
// asked for again and answered from the cache: it costs nothing and is not
// an evaluation.
type EvalCounters struct {
	Evaluations        int // Analyses + PickedUp
	Analyses           int // coupled analyses run by this Evaluator
	PickedUp           int // points answered from the store of the run picked up
	Repeats            int // points asked for again, answered from the cache
	Failed             int // evaluations whose analysis failed (infeasible with a reason), picked-up ones included
	DisciplineCalls    int
	CouplingIterations int
}

// String says the counts in the words of the type's doc: "1476
// evaluations (1476 analysed, 0 picked up, 0 failed), 18 repeats".
func (c EvalCounters) String() string {
	return fmt.Sprintf("%d evaluations (%d analysed, %d picked up, %d failed), %d repeats",
		c.Evaluations, c.Analyses, c.PickedUp, c.Failed, c.Repeats)
}

// HistoryPoint is one step of the best-so-far history: recorded whenever
// the best point changes.
type HistoryPoint struct {
	Evaluations int     // evaluations so far (see EvalCounters)
	Best        float64 // first objective in minimised sense
	Violation   float64
	Feasible    bool
}

// NewEvaluator validates the study and prepares its workers.
func (s *Study) NewEvaluator() (*Evaluator, error) {
	if err := s.validate(); err != nil {
		return nil, err
	}
	e := &Evaluator{study: *s, sys: s.System}
	e.cache.design = func(ev *Evaluation) []float64 { return ev.Design }
	e.batch.design = func(i int) []float64 { return e.rows[i] }
	sys := s.System
	n := sys.vars.Len()
	e.base = make([]float64, n)
	e.guess = make([]float64, n)
	for i := 0; i < n; i++ {
		e.base[i] = sys.vars.At(i).Default
		e.guess[i] = e.base[i]
	}
	for name, x := range s.Fixed {
		e.base[sys.Index(name)] = x
	}
	for _, d := range s.Design {
		v, _ := sys.Var(d.Name)
		e.slots = append(e.slots, designSlot{name: d.Name, unit: v.Unit, idx: sys.Index(d.Name), lower: d.Lower, upper: d.Upper, integer: d.Integer})
	}
	for _, o := range s.Objectives {
		if o.Func != nil {
			e.objIdx = append(e.objIdx, -1)
		} else {
			e.objIdx = append(e.objIdx, sys.Index(o.Name))
		}
	}
	e.cons = append(e.cons, s.Constraints...)
	for _, c := range s.Constraints {
		if c.Func != nil {
			e.consIdx = append(e.consIdx, -1)
		} else {
			e.consIdx = append(e.consIdx, sys.Index(c.Name))
		}
	}
	e.nUserCons = len(e.cons)
	if s.Formulation == IDF {
		tol := s.ConsistencyTolerance
		if tol == 0 {
			tol = 1e-4
		}
		isCoupling := map[string]bool{}
		for _, v := range sys.CouplingVars() {
			isCoupling[v.Name] = true
		}
		for name := range s.CouplingBounds {
			if !isCoupling[name] {
				return nil, fmt.Errorf("mdo: coupling bounds given for %s, which is not a coupling variable of the system", name)
			}
		}
		for _, v := range sys.CouplingVars() {
			lo, hi := v.Min, v.Max
			if b, ok := s.CouplingBounds[v.Name]; ok {
				lo, hi = b[0], b[1]
			} else if v.Unbounded() {
				return nil, fmt.Errorf("mdo: IDF needs bounds for coupling variable %s; give it a validity range in its discipline or Study.CouplingBounds", v.Name)
			}
			i := sys.Index(v.Name)
			e.coupling = append(e.coupling, i)
			e.slots = append(e.slots, designSlot{name: v.Name, unit: v.Unit, idx: i, lower: lo, upper: hi, coupling: true})
			c := EqualTo("consistency."+v.Name, 0, tol)
			c.Scale = 1
			e.cons = append(e.cons, c)
			e.consIdx = append(e.consIdx, -2)
		}
	}
	for i := 0; i < n; i++ {
		e.outputs = append(e.outputs, sys.vars.At(i))
	}
	workers := s.Workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	for k := 0; k < workers; k++ {
		e.spaces = append(e.spaces, sys.NewWorkspace())
		e.resid = append(e.resid, make([]float64, len(e.coupling)))
	}
	if e.study.CacheLimit == 0 {
		e.study.CacheLimit = 50000
	}
	e.setReference()
	e.started = time.Now()
	if r, ok := s.Recorder.(PickUpRecorder); ok {
		prev, err := r.PickedUp(s.Script, s.Seed)
		if err != nil {
			return nil, fmt.Errorf("mdo: study %q: picking up the recorder's run: %w", s.Name, err)
		}
		e.PickUp(prev)
	}
	return e, nil
}

// Dim returns the number of unit-box coordinates (under IDF, the design
// variables followed by the coupling targets).
func (e *Evaluator) Dim() int { return len(e.slots) }

// NumObjectives returns the number of objectives.
func (e *Evaluator) NumObjectives() int { return len(e.objIdx) }

// NumConstraints returns the number of constraints, IDF consistency
// constraints included.
func (e *Evaluator) NumConstraints() int { return len(e.cons) }

// Seed returns the study's seed.
func (e *Evaluator) Seed() uint64 { return e.study.Seed }

// Study returns a copy of the study being evaluated.
func (e *Evaluator) Study() Study { return e.study }

// Integers reports, per coordinate, whether it is an integer variable.
func (e *Evaluator) Integers() []bool {
	out := make([]bool, len(e.slots))
	for k, s := range e.slots {
		out[k] = s.integer
	}
	return out
}

// HasInteger reports whether any design variable is an integer.
func (e *Evaluator) HasInteger() bool {
	for _, s := range e.slots {
		if s.integer {
			return true
		}
	}
	return false
}

// DesignNames returns the names of the coordinates.
func (e *Evaluator) DesignNames() []string {
	out := make([]string, len(e.slots))
	for k, s := range e.slots {
		out[k] = s.name
	}
	return out
}

// DesignSpecs describes the coordinates with units and bounds.
func (e *Evaluator) DesignSpecs() []DesignSpec {
	out := make([]DesignSpec, len(e.slots))
	for k, s := range e.slots {
		out[k] = DesignSpec{Name: s.name, Unit: s.unit, Lower: s.lower, Upper: s.upper, Integer: s.integer}
	}
	return out
}

// ObjectiveNames returns the objectives' labels.
func (e *Evaluator) ObjectiveNames() []string {
	out := make([]string, len(e.study.Objectives))
	for k, o := range e.study.Objectives {
		out[k] = o.Name
	}
	return out
}

// Constraints returns the constraints, IDF consistency ones included.
func (e *Evaluator) Constraints() []Constraint { return append([]Constraint(nil), e.cons...) }

// OutputVars returns the variables whose values each Evaluation keeps in
// Outputs.
func (e *Evaluator) OutputVars() []Var { return append([]Var(nil), e.outputs...) }

// ToPhysical maps a unit-box point to physical values (integers rounded).
func (e *Evaluator) ToPhysical(x []float64) []float64 {
	out := make([]float64, len(x))
	for k, s := range e.slots {
		out[k] = s.physical(x[k])
	}
	return out
}

// AppendPhysical appends the physical values of unit-box point x (as
// ToPhysical gives them) to dst and returns the extended slice; it
// allocates nothing when dst has room.
func (e *Evaluator) AppendPhysical(dst, x []float64) []float64 {
	for k, s := range e.slots {
		dst = append(dst, s.physical(x[k]))
	}
	return dst
}

// ToUnit maps physical values to the unit box.
func (e *Evaluator) ToUnit(p []float64) []float64 {
	out := make([]float64, len(p))
	for k, s := range e.slots {
		out[k] = (p[k] - s.lower) / (s.upper - s.lower)
	}
	return out
}

// Start returns the unit-box position of the baseline design (fixed
// values, else defaults, clipped into the bounds).
func (e *Evaluator) Start() []float64 {
	out := make([]float64, len(e.slots))
	for k, s := range e.slots {
		v := e.base[s.idx]
		if s.coupling {
			v = e.guess[s.idx]
		}
		out[k] = math.Max(0, math.Min(1, (v-s.lower)/(s.upper-s.lower)))
	}
	return out
}

// physical maps one unit coordinate.
func (s designSlot) physical(u float64) float64 {
	u = math.Max(0, math.Min(1, u))
	v := s.lower + u*(s.upper-s.lower)
	if s.integer {
		v = math.Round(v)
	}
	return v
}

// Counters returns the work counters.
func (e *Evaluator) Counters() EvalCounters { return e.cnt }

// Best returns the best evaluation so far by Deb's rules on the first
// objective, or nil.
func (e *Evaluator) Best() *Evaluation { return e.best }

// Front returns the current non-dominated feasible evaluations (for
// multi-objective studies), sorted by the first objective. With two
// objectives it is exactly the non-dominated set of every feasible
// evaluation so far; with three or more the archive is bounded and pruned
// by crowding distance (the rule is documented on paretoArchive).
func (e *Evaluator) Front() []*Evaluation { return e.archive.members() }

// PickUp adds the recorded evaluations of an earlier session of the run
// (read from its store, to pick the run up) to the cache: when the
// optimiser asks for one of their points again it is answered without
// analysis or re-recording, and counted as an evaluation, picked up.
func (e *Evaluator) PickUp(evals []*Evaluation) {
	if e.pickedUp == nil {
		e.pickedUp = map[*Evaluation]bool{}
	}
	for _, ev := range evals {
		if _, ok := e.cache.get(ev.Design); ok {
			continue
		}
		c := *ev
		c.PickedUp = true
		e.cache.put(c.Design, &c)
		e.pickedUp[&c] = true
	}
}

// designKey is the bits of a physical design as a string, the key of
// designMap's overflow.
func designKey(d []float64) string {
	b := make([]byte, 0, 8*len(d))
	for _, x := range d {
		u := math.Float64bits(x)
		for s := 0; s < 64; s += 8 {
			b = append(b, byte(u>>s))
		}
	}
	return string(b)
}

// Cost returns how many evaluations answering xs would add to
// Counters().Evaluations: the points neither answered before nor repeated
// earlier in xs (a picked-up point costs one the first time it is asked
// for). Repeats cost nothing. Optimisers check their budgets with it.
func (e *Evaluator) Cost(xs [][]float64) int {
	n := 0
	designs := e.batchDesigns(len(xs))
	defer e.batch.reset()
	for i, x := range xs {
		if len(x) != len(e.slots) {
			n++ // Evaluate refuses it
			continue
		}
		d := designs[i]
		e.physicalInto(d, x)
		if _, ok := e.batch.get(d); ok {
			continue
		}
		e.batch.put(d, i)
		if c, ok := e.cache.get(d); !ok || e.pickedUp[c] {
			n++
		}
	}
	return n
}

// batchDesigns returns n slices of Dim values each (the designs the batch
// map reads back by index), in storage the next call reuses.
func (e *Evaluator) batchDesigns(n int) [][]float64 {
	dim := len(e.slots)
	if cap(e.scratch) < n*dim {
		e.scratch = make([]float64, n*dim)
	}
	if cap(e.rows) < n {
		e.rows = make([][]float64, n)
	}
	buf, out := e.scratch[:n*dim], e.rows[:n]
	for i := range out {
		out[i] = buf[i*dim : (i+1)*dim : (i+1)*dim]
	}
	return out
}

// physicalInto writes the physical design of unit-box point x, as the
// cache keys it, to d.
func (e *Evaluator) physicalInto(d, x []float64) {
	for k, s := range e.slots {
		d[k] = s.physical(x[k])
	}
}

// Evaluate answers a batch of unit-box points, in order. Points seen
// before come from the cache; the others are analysed in parallel. When
// ctx is cancelled the points not yet analysed are nil in the result and
// the context's error is returned. When an objective or constraint
// function reads a variable the system does not have, its points are nil
// and the error (wrapping an *UnknownVariableError) names the function
// and the variable.
func (e *Evaluator) Evaluate(ctx context.Context, xs [][]float64) ([]*Evaluation, error) {
	out := make([]*Evaluation, len(xs))
	fresh := make([]*Evaluation, len(xs))
	dupOf := make([]int, len(xs))
	var todo []int
	designs := e.batchDesigns(len(xs))
	defer e.batch.reset()
	for i, x := range xs {
		dupOf[i] = -1
		if len(x) != len(e.slots) {
			return nil, fmt.Errorf("mdo: point %d has %d coordinates, the study has %d", i, len(x), len(e.slots))
		}
		for k, u := range x {
			if math.IsNaN(u) {
				return nil, fmt.Errorf("mdo: point %d: coordinate %s is NaN", i, e.slots[k].name)
			}
		}
		d := designs[i]
		e.physicalInto(d, x)
		if c, ok := e.cache.get(d); ok {
			out[i] = c
			continue
		}
		if j, ok := e.batch.get(d); ok {
			dupOf[i] = j
			continue
		}
		e.batch.put(d, i)
		fresh[i] = e.newEvaluation(x)
		todo = append(todo, i)
	}
	cancelled, derr := e.dispatch(ctx, todo, fresh)
	var misnamed error
	for i := range xs {
		switch {
		case out[i] != nil:
			out[i] = e.answerCached(out[i])
		case dupOf[i] >= 0:
			if fresh[dupOf[i]] != nil && !cancelled[dupOf[i]] {
				out[i] = fresh[dupOf[i]]
				e.cnt.Repeats++
			}
		case cancelled[i]:
			// left nil
		default:
			if err := e.takeMisnamed(fresh[i]); err != nil {
				// left nil: the study is at fault, not the point
				if misnamed == nil {
					misnamed = err
				}
				continue
			}
			e.accept(fresh[i])
			out[i] = fresh[i]
		}
	}
	e.forgetMisnamed()
	if err := ctx.Err(); err != nil {
		return out, err
	}
	if derr != nil {
		return out, derr
	}
	if misnamed != nil {
		return out, misnamed
	}
	return out, e.recErr
}

// EvaluateOne answers a single point.
func (e *Evaluator) EvaluateOne(ctx context.Context, x []float64) (*Evaluation, error) {
	evs, err := e.Evaluate(ctx, [][]float64{x})
	if len(evs) == 0 {
		return nil, err
	}
	return evs[0], err
}

// newEvaluation allocates the record of a point: its slices share one
// array (each capped at its length, so an append to one cannot write into
// the next), Outputs empty with room for every output.
func (e *Evaluator) newEvaluation(x []float64) *Evaluation {
	n, no, nc, nv := len(x), len(e.objIdx), len(e.cons), len(e.outputs)
	buf := make([]float64, 2*n+2*no+3*nc+nv)
	take := func(k int) []float64 {
		s := buf[:k:k]
		buf = buf[k:]
		return s
	}
	ev := &Evaluation{
		X:           take(n),
		Design:      take(n),
		Objectives:  take(no),
		F:           take(no),
		Constraints: take(nc),
		Margins:     take(nc),
		G:           take(nc),
	}
	ev.Outputs = buf[:0:nv]
	for k, s := range e.slots {
		ev.X[k] = math.Max(0, math.Min(1, x[k]))
		ev.Design[k] = s.physical(x[k])
	}
	return ev
}

// runPool analyses the points todo on the workers. It returns which
// points were cut short by cancellation.
func (e *Evaluator) runPool(ctx context.Context, todo []int, fresh []*Evaluation) []bool {
	cancelled := make([]bool, len(fresh))
	workers := len(e.spaces)
	if workers > len(todo) {
		workers = len(todo)
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	work := func(w int) {
		defer wg.Done()
		for {
			j := int(next.Add(1)) - 1
			if j >= len(todo) {
				return
			}
			i := todo[j]
			if ctx.Err() != nil {
				cancelled[i] = true
				continue
			}
			if !e.analyse(ctx, w, fresh[i]) {
				cancelled[i] = true
			}
		}
	}
	wg.Add(workers)
	for w := 1; w < workers; w++ {
		go work(w)
	}
	if workers > 0 {
		work(0)
	}
	wg.Wait()
	return cancelled
}

// analyse runs one point on worker w. It returns false when the analysis
// was cut short by cancellation (the point then says nothing).
func (e *Evaluator) analyse(ctx context.Context, w int, ev *Evaluation) (ok bool) {
	ws := e.spaces[w]
	start := time.Now()
	before := ws.cnt
	copy(ws.val, e.base)
	copy(ws.guess, e.guess)
	for k, s := range e.slots {
		if s.coupling {
			ws.guess[s.idx] = ev.Design[k]
		} else {
			ws.val[s.idx] = ev.Design[k]
		}
	}
	var err error
	if len(e.coupling) > 0 {
		err = ws.AnalyzeOnce(ctx)
	} else if err = ws.Analyze(ctx); err == nil {
		// a state kept on an unstable branch is no closure of the loop:
		// the point fails, naming the group and the runaway variable
		err = ws.Unstable()
	}
	defer func() {
		ev.Wall = time.Since(start)
		ev.CouplingIterations = ws.cnt.CouplingIterations - before.CouplingIterations
		ev.DisciplineCalls = ws.cnt.DisciplineCalls - before.DisciplineCalls
	}()
	if err != nil {
		if ctx.Err() != nil {
			return false
		}
		ev.failed(err.Error())
		ev.Failure = Classify(err)
		// a failed analysis computed nothing that can be trusted: it
		// records no outputs (the workspace still holds defaults and
		// partial values, which would read as if computed)
		ev.Outputs = nil
		return true
	}
	ev.Converged = true
	ev.Path = ws.Path()
	ev.Outputs = append(ev.Outputs[:0], ws.val...)
	vals := Values{sys: e.sys, val: ws.val}
	reason, misnamed := e.score(vals, ws, w, ev)
	if reason != "" {
		ev.failed(reason)
	}
	if misnamed != nil {
		e.setMisnamed(ev, misnamed)
	}
	return true
}

// setMisnamed notes point ev's misnamed read (safe for concurrent use).
func (e *Evaluator) setMisnamed(ev *Evaluation, err error) {
	e.misnamedMu.Lock()
	defer e.misnamedMu.Unlock()
	if e.misnamed == nil {
		e.misnamed = map[*Evaluation]error{}
	}
	e.misnamed[ev] = err
}

// forgetMisnamed forgets the misnamed reads of the batch (those of points
// cut short).
func (e *Evaluator) forgetMisnamed() {
	e.misnamedMu.Lock()
	defer e.misnamedMu.Unlock()
	clear(e.misnamed)
}

// takeMisnamed returns point ev's misnamed read, or nil, and forgets it.
func (e *Evaluator) takeMisnamed(ev *Evaluation) error {
	e.misnamedMu.Lock()
	defer e.misnamedMu.Unlock()
	err := e.misnamed[ev]
	delete(e.misnamed, ev)
	return err
}

// setReference analyses the study's reference point (Start: the fixed
// values or defaults of the design variables) from the default guesses
// and, when it converges on a stable branch, makes its state the reference of every
// workspace's fallback chain (Workspace.SetReference) and, for the groups
// whose solver settings ask for it (SolverSettings.FromReference), its
// coupling variables the starting guesses of every point. It depends on the
// study alone, so every point's answer stays independent of the
// evaluation order. IDF studies solve no coupled group and keep none.
//
// A reference state kept on an unstable branch (Workspace.Unstable: no
// path found a stable closure) is refused: as every point's guess it
// would start each point on the runaway closure, and the continuation
// would march from it; the points then start from the defaults and have
// no continuation.
func (e *Evaluator) setReference() {
	if len(e.coupling) > 0 || len(e.sys.CoupledGroups()) == 0 {
		return
	}
	ws := e.spaces[0]
	copy(ws.val, e.base)
	copy(ws.guess, e.guess)
	start := e.Start()
	for k, s := range e.slots {
		ws.val[s.idx] = s.physical(start[k])
	}
	if ws.Analyze(context.Background()) != nil || ws.Unstable() != nil {
		return
	}
	for _, w := range e.spaces {
		_ = w.SetReference(ws.val)
	}
	// the groups that ask for it start every point from the reference
	// state: nearer the solution than the defaults for a design in the
	// study's box, and the same start whatever was analysed before
	for gi, g := range e.sys.groups {
		if !ws.settings[gi].FromReference {
			continue
		}
		for _, v := range g.tear {
			e.guess[v] = ws.val[v]
		}
	}
}

// score computes objectives and constraints; a non-empty reason is why
// the point cannot be scored. misnamed is an objective or constraint
// function's read of a variable the system does not have (Values.Get
// panics with it): an error of the study, not of the point.
func (e *Evaluator) score(vals Values, ws *Workspace, w int, ev *Evaluation) (reason string, misnamed error) {
	what := "scoring"
	defer func() {
		if r := recover(); r != nil {
			var unknown *UnknownVariableError
			if err, ok := r.(error); ok && errors.As(err, &unknown) {
				misnamed = fmt.Errorf("mdo: study %q: %s: %w", e.study.Name, what, err)
			}
			reason = fmt.Sprintf("%s panicked: %v", what, r)
		}
	}()
	for k, idx := range e.objIdx {
		o := e.study.Objectives[k]
		var f float64
		if idx >= 0 {
			f = vals.val[idx]
		} else {
			what = "objective " + o.Name
			f = o.Func(vals)
		}
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return fmt.Sprintf("objective %s = %g", o.Name, f), nil
		}
		ev.Objectives[k] = f
		ev.F[k] = o.sense() * f
	}
	if len(e.coupling) > 0 {
		ws.ConsistencyResiduals(e.resid[w])
	}
	viol := 0.0
	for k, c := range e.cons {
		var g float64
		switch idx := e.consIdx[k]; {
		case idx >= 0:
			g = vals.val[idx]
		case idx == -1:
			what = "constraint " + c.Name
			g = c.Func(vals)
		default:
			g = e.resid[w][k-e.nUserCons]
		}
		if math.IsNaN(g) {
			return fmt.Sprintf("constraint %s is NaN", c.Name), nil
		}
		m := c.Margin(g)
		ev.Constraints[k] = g
		ev.Margins[k] = m
		ev.G[k] = -m / c.scale()
		if ev.G[k] > 0 {
			viol += ev.G[k]
		}
	}
	ev.Violation = viol
	ev.Feasible = viol == 0
	return "", nil
}

// answerCached accounts for a point answered from the cache: the first
// ask of a picked-up point is an evaluation, any other a repeat.
func (e *Evaluator) answerCached(c *Evaluation) *Evaluation {
	if e.pickedUp[c] {
		delete(e.pickedUp, c)
		if c.ID >= e.nextID {
			e.nextID = c.ID + 1
		}
		e.cnt.Evaluations++
		e.cnt.PickedUp++
		if !c.Converged {
			e.cnt.Failed++
		}
		e.track(c)
		return c
	}
	e.cnt.Repeats++
	return c
}

// accept numbers, caches, records and tracks a freshly analysed point.
func (e *Evaluator) accept(ev *Evaluation) {
	ev.ID = e.nextID
	e.nextID++
	e.cnt.Evaluations++
	e.cnt.Analyses++
	if !ev.Converged {
		e.cnt.Failed++
	}
	e.cnt.DisciplineCalls += ev.DisciplineCalls
	e.cnt.CouplingIterations += ev.CouplingIterations
	if e.study.CacheLimit > 0 && e.cache.len() < e.study.CacheLimit {
		e.cache.put(ev.Design, ev)
	}
	if e.study.Recorder != nil && e.recErr == nil {
		if !e.began {
			e.beginRecording()
		}
		if e.recErr == nil {
			if err := e.study.Recorder.Record(ev); err != nil {
				e.recErr = fmt.Errorf("mdo: recording evaluation %d: %w", ev.ID, err)
			}
		}
	}
	e.track(ev)
}

// track updates the best point, the history and the Pareto archive.
func (e *Evaluator) track(ev *Evaluation) {
	if Better(ev, e.best) {
		e.best = ev
		e.history = append(e.history, HistoryPoint{Evaluations: e.cnt.Evaluations, Best: ev.F[0], Violation: ev.Violation, Feasible: ev.Feasible})
	}
	if len(e.objIdx) < 2 || !ev.Feasible {
		return
	}
	e.archive.add(ev)
}
