package mdo

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// Counters accumulate the work done by a Workspace.
type Counters struct {
	Analyses           int // calls of Analyze
	DisciplineCalls    int // calls of a discipline's Compute
	CouplingIterations int // coupling iterations over all groups
}

// Workspace holds the values and scratch space of one analysis of a
// System. Workspaces of one System are independent: give each goroutine
// its own. After NewWorkspace, Analyze allocates nothing on its success
// path for the fixed-point solvers.
type Workspace struct {
	sys      *System
	val      []float64
	guess    []float64
	inBuf    [][]float64
	outBuf   [][]float64
	plan     []discPlan  // per discipline, what its run reads
	runs     [][]discRun // per group, its disciplines' runs (sweepRuns)
	settings []SolverSettings
	reports  []CouplingReport
	cnt      Counters
	// scratch per group, sized to the largest group
	y, gy, rPrev, scale []float64
	// res holds, per report, the scaled residuals of the last iteration;
	// worstDue marks a report whose Worst is still to be filled from
	// them (fillWorst runs when the reports are read: CouplingReports).
	res      [][]float64
	worstDue []bool
	// tv holds, per report, its group's coupling variables as
	// solvePlain's residual reads them
	tv       [][]tearVar
	onceMode bool
	// solving is true while a coupled group is solved: loop inputs are
	// then projected onto their ranges.
	solving bool
	// loopFailed is true when the last analyzeWith failed in a coupled
	// group (the failures a fallback may cure).
	loopFailed bool
	cur        int // discipline being computed, for a panic
	// buffered is true while a Jacobi sweep's discipline computes into
	// its buffer (compute) rather than into the values
	buffered bool
	path     solvePath // the path that converged the last analysis
	ref      []float64 // reference state for continuation, nil if none
	saved    []float64 // the values, while the branch is checked
	unstable bool      // the last analysis ended on an unstable branch
	nw       *newtonScratch
	fb       *fallbackScratch
	// stall, when positive, ends a solve that has gone that many
	// iterations without a new smallest residual (fallback.go)
	stall int
	and   *andersonScratch
	br    *branchScratch // the stability check's (branch.go)
}

// NewWorkspace returns a fresh workspace with every variable and guess at
// its default and the system's current solver settings.
func (s *System) NewWorkspace() *Workspace {
	n := s.vars.Len()
	w := &Workspace{
		sys:      s,
		val:      make([]float64, n),
		guess:    make([]float64, n),
		settings: append([]SolverSettings(nil), s.settings...),
	}
	for d := range s.discs {
		w.inBuf = append(w.inBuf, make([]float64, len(s.inIdx[d])))
		w.outBuf = append(w.outBuf, make([]float64, len(s.outIdx[d])))
		// NewSystem numbers each discipline's outputs consecutively
		// (System.outStart): the values themselves are its output buffer
		dst := w.val[s.outStart[d] : s.outStart[d]+len(s.outIdx[d])]
		ops := make([]loopInput, len(s.inLoop[d]))
		for i, k := range s.inLoop[d] {
			ops[i] = loopInput{x: &w.val[s.inIdx[d][k]], to: &w.inBuf[d][k], src: s.inIdx[d][k], k: k, lo: s.inLo[d][k], hi: s.inHi[d][k]}
		}
		w.plan = append(w.plan, discPlan{in: w.inBuf[d], out: w.outBuf[d], dst: dst, ops: ops, inIdx: s.inIdx[d], outIdx: s.outIdx[d],
			lo: s.inLo[d], hi: s.inHi[d], loop: s.inLoop[d], loopIn: s.loopIn[d], fn: s.fns[d]})
	}
	maxTear := 0
	for gi, g := range s.groups {
		if len(g.tear) > maxTear {
			maxTear = len(g.tear)
		}
		runs := make([]discRun, len(g.discs))
		for i, d := range g.discs {
			p := &w.plan[d]
			var fixed []loopInput
			for k, v := range p.inIdx {
				if !p.loopIn[k] {
					fixed = append(fixed, loopInput{x: &w.val[v], to: &p.in[k], src: v, k: k, lo: p.lo[k], hi: p.hi[k]})
				}
			}
			runs[i] = discRun{fn: p.fn, in: p.in, dst: p.dst, old: p.out[:len(p.dst)], fixed: fixed, ops: p.ops, d: d}
		}
		w.runs = append(w.runs, runs)
		if g.coupled {
			rep := CouplingReport{Disciplines: g.names, Tolerance: w.settings[gi].Tolerance, Method: w.settings[gi].Method}
			rep.History = make([]float64, 0, w.settings[gi].MaxIterations+1)
			rep.Worst = make([]VarResidual, 0, 3)
			w.reports = append(w.reports, rep)
			w.res = append(w.res, make([]float64, len(g.tear)))
			w.worstDue = append(w.worstDue, false)
			tv := make([]tearVar, len(g.tear))
			for k, v := range g.tear {
				tv[k] = tearVar{x: &w.val[v], v: v, lo: g.lo[k], hi: g.hi[k], inv: g.inv[k], scale: g.scale[k]}
			}
			w.tv = append(w.tv, tv)
		}
	}
	w.saved = make([]float64, n)
	w.y = make([]float64, maxTear)
	w.gy = make([]float64, maxTear)
	w.rPrev = make([]float64, maxTear)
	w.scale = make([]float64, maxTear)
	w.and = newAndersonScratch(maxTear)
	w.br = newBranchScratch(maxTear)
	w.Reset()
	return w
}

// System returns the workspace's system.
func (w *Workspace) System() *System { return w.sys }

// Reset sets every value and guess back to its default.
func (w *Workspace) Reset() {
	for i := range w.val {
		d := w.sys.vars.At(i).Default
		w.val[i] = d
		w.guess[i] = d
	}
}

// Set sets a parameter's value. Setting a produced variable is an error
// (give it an initial guess with SetGuess instead); so is a value outside
// the variable's validity range.
func (w *Workspace) Set(name string, v float64) error {
	i := w.sys.Index(name)
	if i < 0 {
		return w.sys.unknown(name)
	}
	if p := w.sys.producer[i]; p >= 0 {
		return fmt.Errorf("mdo: %s is produced by discipline %s and cannot be set; use SetGuess for an initial guess", name, w.sys.discs[p].Name())
	}
	if err := w.sys.vars.At(i).Check(v); err != nil {
		return err
	}
	w.val[i] = v
	return nil
}

// SetIndex sets the value of variable i without checks (hot path).
func (w *Workspace) SetIndex(i int, v float64) { w.val[i] = v }

// SetGuess sets the initial guess of a coupling variable; the next Analyze
// starts its coupled group from it.
func (w *Workspace) SetGuess(name string, v float64) error {
	i := w.sys.Index(name)
	if i < 0 {
		return w.sys.unknown(name)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("mdo: initial guess of %s = %g is not finite", name, v)
	}
	w.guess[i] = v
	return nil
}

// SetGuessIndex sets the initial guess of variable i without checks.
func (w *Workspace) SetGuessIndex(i int, v float64) { w.guess[i] = v }

// Get returns a variable's current value. It panics with Lookup's error
// (an *UnknownVariableError) when the system has no variable of that name
// (see Values for the convention).
func (w *Workspace) Get(name string) float64 { return mustValue(w.Lookup(name)) }

// Lookup returns a variable's current value, or an error naming it when
// the system has no variable of that name.
func (w *Workspace) Lookup(name string) (float64, error) {
	i := w.sys.Index(name)
	if i < 0 {
		return 0, w.sys.unknown(name)
	}
	return w.val[i], nil
}

// At returns the current value of variable i (see System.Index).
func (w *Workspace) At(i int) float64 { return w.val[i] }

// Values returns the workspace's value slice, indexed like System.Vars.
// It is a view: do not modify it, copy it to keep it.
func (w *Workspace) Values() []float64 { return w.val }

// SetSolver overrides the solver of every coupled group of this workspace.
func (w *Workspace) SetSolver(set SolverSettings) error {
	set, err := set.normalized()
	if err != nil {
		return err
	}
	k := 0
	for gi, g := range w.sys.groups {
		w.settings[gi] = set
		if g.coupled {
			w.reports[k].Tolerance = set.Tolerance
			w.reports[k].Method = set.Method
			if cap(w.reports[k].History) < set.MaxIterations+1 {
				w.reports[k].History = make([]float64, 0, set.MaxIterations+1)
			}
			k++
		}
	}
	return nil
}

// Reports returns the reports of the coupled groups from the last
// Analyze, in execution order. They belong to the workspace: Clone one to
// keep it.
func (w *Workspace) CouplingReports() []CouplingReport {
	k := 0
	for gi := range w.sys.groups {
		g := &w.sys.groups[gi]
		if !g.coupled {
			continue
		}
		if w.worstDue[k] {
			w.fillWorst(g, w.res[k], &w.reports[k])
			w.worstDue[k] = false
		}
		k++
	}
	return w.reports
}

// Counters returns the accumulated work counters.
func (w *Workspace) Counters() Counters { return w.cnt }

// Analyze runs the system: each group in execution order, each coupled
// group converged by its solver from the current guesses. Parameters keep
// the values set with Set. While a group is solved its iterates are kept
// inside the validity ranges (see solve); when the configured solver fails
// the deterministic fallback chain of fallback.go runs. A failure is
// returned as an error: a *NotClosingError (no solution inside the
// ranges), a *ConvergenceError carrying the report, a *RangeError, a
// *NonFiniteError or a *DisciplineError; Classify names its class. A
// panic in a discipline is recovered here, once per analysis, and
// returned as a *DisciplineError.
func (w *Workspace) Analyze(ctx context.Context) (err error) {
	w.cnt.Analyses++
	w.cur = -1
	// returned is set where Analyze returns: the deferred function calls
	// recover only while a panic unwinds (a call of recover costs, when
	// nothing panics, a good part of a small discipline's analysis)
	returned := false
	defer func() {
		if !returned {
			if r := recover(); r != nil {
				err = w.panicked(r)
			}
		}
	}()
	w.path, w.unstable = pathConfigured, false
	err = w.analyzeWith(ctx, pathConfigured)
	if err == nil || w.onceMode || !w.loopFailed || ctx.Err() != nil {
		returned = true
		return err
	}
	err = w.fallback(ctx, err)
	returned = true
	return err
}

// analyzeWith runs every group once, the coupled ones with the solver of
// path p.
func (w *Workspace) analyzeWith(ctx context.Context, p solvePath) error {
	return w.analyzeFrom(ctx, p, 0)
}

// analyzeFrom runs the groups from index first on, as analyzeWith.
func (w *Workspace) analyzeFrom(ctx context.Context, p solvePath, first int) error {
	w.loopFailed = false
	k := 0
	for gi := range w.sys.groups {
		g := &w.sys.groups[gi]
		if gi < first {
			if g.coupled {
				k++
			}
			continue
		}
		if !g.coupled {
			if err := w.sweepRuns(w.runs[gi], true); err != nil {
				return err
			}
			continue
		}
		// the settings by reference: a copy of them per call costs more
		// than a small group's analysis can spare
		set := &w.settings[gi]
		if p != pathConfigured {
			ps := p.settings(*set)
			set = &ps
		}
		err := w.solve(ctx, g, set, p, k)
		if err == nil && !w.onceMode && (!set.plain() || checkedPlain(w.reports[k].CouplingIterations)) {
			err = w.stableBranch(g, *set, p)
		}
		if err != nil {
			if ctx.Err() == nil {
				w.loopFailed = true
			}
			return err
		}
		k++
	}
	return nil
}

// panicked turns a recovered panic into the error of the discipline that
// was running.
func (w *Workspace) panicked(r any) error {
	w.solving = false
	name := "(none)"
	if w.cur >= 0 {
		name = w.sys.discs[w.cur].Name()
		if !w.buffered {
			// the discipline was writing into the values: put back the
			// outputs it had (see discPlan)
			p := &w.plan[w.cur]
			copy(p.dst, p.out[:len(p.dst)])
		}
	}
	w.buffered = false
	return &DisciplineError{Discipline: name, Err: fmt.Errorf("panic: %v", r)}
}

// AnalyzeOnce evaluates every coupled group once, Jacobi-style, with its
// coupling variables held at their guesses, instead of converging it. Use
// it for the individual-discipline-feasible (IDF) formulation: afterwards
// ConsistencyResiduals gives (output − guess)/scale for each coupling
// variable.
func (w *Workspace) AnalyzeOnce(ctx context.Context) error {
	w.onceMode = true
	defer func() { w.onceMode = false }()
	return w.Analyze(ctx)
}

// ConsistencyResiduals writes, for each coupling variable in the order of
// System.CouplingVars, the scaled difference between the value computed
// by the last analysis and its guess. dst must have that length.
func (w *Workspace) ConsistencyResiduals(dst []float64) {
	k := 0
	for _, g := range w.sys.groups {
		for _, v := range g.tear {
			dst[k] = (w.val[v] - w.guess[v]) / w.sys.vars.At(v).scale()
			k++
		}
	}
}

// discPlan gathers in one place what a run of one discipline reads: its
// input buffer, its outputs (dst, a window of the values, and out, a
// buffer of the same length), the indices of its inputs and outputs in the
// values, its inputs' ranges, its inputs produced inside its own coupled
// group (ops) and its computation (System.fns).
//
// A Gauss–Seidel run writes the outputs straight into the values (dst)
// and keeps their previous values in out meanwhile, to put them back when
// the discipline fails: the values are then what they were before the
// run, as if the outputs had been computed in a buffer and copied. A
// Jacobi sweep computes into out and copies afterwards (the other
// disciplines of the sweep read the values of the previous iteration).
type discPlan struct {
	in, out, dst  []float64
	ops           []loopInput
	inIdx, outIdx []int
	loop          []int // positions of the inputs produced inside the group
	lo, hi        []float64
	loopIn        []bool
	fn            ComputeFunc
}

// tearVar is a coupling variable of a group as solvePlain's residual
// reads it: its value (x, at index v of the values), the bounds of its
// consumers' ranges (group.lo, group.hi), its residual scale and the
// reciprocal, and y, its value at the start of the sweep.
type tearVar struct {
	x                     *float64
	lo, hi, inv, scale, y float64
	v                     int
}

// loopInput is an input of a discipline (in discPlan.ops, one produced
// inside its own coupled group): the value it is read from (its index src
// and the value itself, x), its position k among the discipline's inputs
// and its slot in the input buffer (to), and its validity range. The
// pointers spare loadOps the indexing of both slices.
type loopInput struct {
	x, to  *float64
	lo, hi float64
	src    int
	k      int
}

// discRun is one discipline as sweepRuns runs it: its computation, input
// buffer, outputs (dst) and their previous values (old), as in its
// discPlan, its inputs produced inside its own coupled group (ops, as in
// discPlan), the others (fixed) and its index. Workspace.runs lists them
// per group in the group's order.
type discRun struct {
	fn           ComputeFunc
	in, dst, old []float64
	fixed, ops   []loopInput
	d            int
}

// gather copies discipline d's inputs into its buffer, checking ranges
// (one comparison pair per input: NaN and ±Inf fail it too).
func (w *Workspace) gather(d int) error {
	p := &w.plan[d]
	in := p.in
	lo, hi := p.lo[:len(in)], p.hi[:len(in)]
	for k, v := range p.inIdx[:len(in)] {
		x := w.val[v]
		if !(x >= lo[k] && x <= hi[k]) {
			if !w.solving || !p.loopIn[k] || x != x {
				return w.inputError(d, k, x)
			}
			x = math.Max(lo[k], math.Min(hi[k], x))
		}
		in[k] = x
	}
	return nil
}

// gatherLoop refreshes only the inputs of discipline d produced inside its
// coupled group; the others were gathered (and checked) by the group's
// first sweep and cannot change while the group is solved.
func (w *Workspace) gatherLoop(d int) error {
	p := &w.plan[d]
	in, val := p.in, w.val
	for i := range p.ops {
		op := &p.ops[i]
		x := val[op.src]
		if !(x >= op.lo && x <= op.hi) {
			if !w.solving || x != x {
				return w.inputError(d, op.k, x)
			}
			// project the iterate onto the discipline's range
			x = math.Max(op.lo, math.Min(op.hi, x))
		}
		in[op.k] = x
	}
	return nil
}

// inputError builds the error for input k of discipline d.
func (w *Workspace) inputError(d, k int, x float64) error {
	spec := w.sys.inSpec[d][k]
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return &NonFiniteError{Discipline: w.sys.Producer(spec.Name), Var: spec.Name, Value: x}
	}
	return &RangeError{Discipline: w.sys.discs[d].Name(), Var: spec.Name, Value: x, Min: spec.Min, Max: spec.Max, Unit: spec.Unit, Produced: w.sys.producer[w.sys.inIdx[d][k]] >= 0,
		Producer: w.sys.Producer(spec.Name)}
}

// outputError builds the error for output k of discipline d, which is
// not finite (x).
func (w *Workspace) outputError(d, k int, x float64) error {
	return &NonFiniteError{Discipline: w.sys.discs[d].Name(), Var: w.sys.vars.At(w.sys.outIdx[d][k]).Name, Value: x}
}

// compute runs discipline d on its gathered inputs into its output buffer
// (a Jacobi sweep; scatter copies the buffer into the values).
func (w *Workspace) compute(d int) error {
	p := &w.plan[d]
	w.cnt.DisciplineCalls++
	w.cur = d
	out := p.out
	w.buffered = true
	err := p.fn(p.in, out)
	w.buffered = false
	if err != nil {
		return w.disciplineError(d, err)
	}
	for k, x := range out {
		if notFinite(x) {
			return w.outputError(d, k, x)
		}
	}
	return nil
}

// scatter writes discipline d's output buffer into the values.
func (w *Workspace) scatter(d int) {
	p := &w.plan[d]
	out := p.out
	for k, v := range p.outIdx[:len(out)] {
		w.val[v] = out[k]
	}
}

// sweep runs every discipline of a group once: in turn with the latest
// values (Gauss–Seidel) or all on the values at the start (Jacobi). The
// first sweep of a solve gathers every input; later ones only those
// produced inside the group.
func (w *Workspace) sweep(g *group, jacobi, first bool) error {
	if !jacobi {
		return w.sweepRuns(w.runs[g.at], first)
	}
	for _, d := range g.discs {
		var err error
		if first {
			err = w.gather(d)
		} else {
			err = w.gatherLoop(d)
		}
		if err != nil {
			return err
		}
	}
	for _, d := range g.discs {
		if err := w.compute(d); err != nil {
			return err
		}
	}
	for _, d := range g.discs {
		w.scatter(d)
	}
	return nil
}

// clip returns math.Max(lo, math.Min(hi, x)) bit for bit (NaN, infinities
// and signed zeros included) with comparisons only, so that it inlines; a
// value strictly inside the range, the usual case, costs two of them.
func clip(x, lo, hi float64) float64 {
	if x > lo && x < hi {
		return x // strictly inside (the usual case): two comparisons
	}
	if x > hi || (x == hi && math.Signbit(hi)) {
		x = hi
	}
	if x < lo || (x == lo && !math.Signbit(lo)) {
		x = lo
	}
	return x
}

// clipOut is clip for a value not strictly inside its range, out of the
// hot loops that inline clip's first test only.
//
//go:noinline
func clipOut(x, lo, hi float64) float64 { return clip(x, lo, hi) }

// sweepRuns runs, in turn, each discipline of runs (the runs of one
// group, Workspace.runs) with its outputs straight into the values: a
// Gauss–Seidel sweep of a coupled group, or the run of an uncoupled one.
// A first sweep (or an uncoupled run) gathers every input, checking its
// range; later ones only those produced inside the group (the others were
// gathered and checked by the first and cannot change while the group is
// solved), an iterate outside the range being projected onto it. When a
// run fails (an error, or an output that is not finite) the values are
// put back as they were before it (see discPlan).
//
// This is the hot path of every analysis: every input is loaded by
// loadOps, which stops at the first one outside its range; the slower
// gather (or projectOps) then takes over, so that the inputs, the
// projections and the first error are those of an input-by-input check
// in the discipline's order.
func (w *Workspace) sweepRuns(runs []discRun, first bool) error {
	if first {
		// the inputs from outside the group cannot change while it is
		// solved: loaded once for every run, before the first computes
		for i := range runs {
			if !loadOps(runs[i].fixed) {
				return w.firstRuns(runs)
			}
		}
	}
	for i := range runs {
		p := &runs[i]
		if !loadOps(p.ops) {
			if err := w.projectOps(p); err != nil {
				return err
			}
		}
		w.cnt.DisciplineCalls++
		w.cur = p.d
		dst := p.dst
		old := p.old[:len(dst)]
		//lint:ignore S1001 copy calls memmove: the loop is cheaper for the few outputs of a small discipline
		for k, x := range dst {
			old[k] = x
		}
		if err := p.fn(p.in, dst); err != nil {
			return w.runFailed(p, err, 0, 0)
		}
		for k, x := range p.dst {
			if notFinite(x) {
				return w.runFailed(p, nil, k, x)
			}
		}
	}
	return nil
}

// firstRuns is sweepRuns's first sweep when an input from outside the
// group lies outside its range: each run gathers its inputs one by one in
// its order (gather), then computes as a later sweep does (its inputs
// from the group loaded again, to the same values), so that the runs
// before it compute and the error is that of the first input refused.
func (w *Workspace) firstRuns(runs []discRun) error {
	for i := range runs {
		if err := w.gather(runs[i].d); err != nil {
			return err
		}
		if err := w.sweepRuns(runs[i:i+1], false); err != nil {
			return err
		}
	}
	return nil
}

// loadOps copies the inputs ops of a run from the values into its input
// buffer and reports whether every one is inside its range; it stops
// at the first that is not.
func loadOps(ops []loopInput) bool {
	for i := range ops {
		op := &ops[i]
		x := *op.x
		if !(x >= op.lo && x <= op.hi) {
			return false
		}
		*op.to = x
	}
	return true
}

// projectOps copies the inputs ops of run p as gatherLoop does: an input
// outside its range is projected onto it while a group is solved (an
// error otherwise, or when it is NaN).
func (w *Workspace) projectOps(p *discRun) error {
	for _, op := range p.ops {
		x := w.val[op.src]
		if !(x >= op.lo && x <= op.hi) {
			if !w.solving || x != x {
				return w.inputError(p.d, op.k, x)
			}
			// project the iterate onto the discipline's range
			x = clip(x, op.lo, op.hi)
		}
		p.in[op.k] = x
	}
	return nil
}

// runFailed puts back the outputs of the run p that failed, with err or
// with output k not finite (x), and returns its error.
func (w *Workspace) runFailed(p *discRun, err error, k int, x float64) error {
	copy(p.dst, p.old)
	if err != nil {
		return w.disciplineError(p.d, err)
	}
	return w.outputError(p.d, k, x)
}

// notFinite reports whether x is NaN or ±Inf: all its exponent bits are
// set. An integer test on the bits, cheaper on the hot path than the
// floating-point x − x != 0 (the same answer for every x).
func notFinite(x float64) bool {
	const exp = 0x7ff << 52
	return math.Float64bits(x)&exp == exp
}

// stallWatch follows a solve's smallest residual for the stall limit.
type stallWatch struct {
	best   float64 // smallest residual norm so far
	bestIt int     // the iteration that reached it
	// shrink, when positive, is the factor a residual must fall below
	// best by to count as a new smallest one (newtonShrink); 0 counts
	// any smaller residual
	shrink float64
}

// logIteration records iteration it's residual norm in the group's
// report and the counters, and says whether the solve ends there:
// converged (rep.Converged), diverged (rep.Diverged, the norm beyond
// divergeLimit or not a number) or stalled (the workspace's stall limit
// passed without a new smallest residual, or, with watch.shrink, without
// one below shrink times the last).
func (w *Workspace) logIteration(rep *CouplingReport, it int, norm, tol float64, watch *stallWatch) (done bool) {
	rep.CouplingIterations = it
	rep.Residual = norm
	rep.History = append(rep.History, norm)
	w.cnt.CouplingIterations++
	if norm <= tol {
		rep.Converged = true
		return true
	}
	if !(norm < divergeLimit) {
		rep.Diverged = true
		return true
	}
	if w.stall > 0 {
		best := watch.best
		if watch.shrink > 0 {
			best *= watch.shrink
		}
		if norm < best {
			watch.best, watch.bestIt = norm, it
		} else if it-watch.bestIt >= w.stall {
			return true
		}
	}
	return false
}

// divergeLimit is the scaled residual beyond which a group is declared
// divergent.
const divergeLimit = 1e12

// solve converges one coupled group by the method of set.
//
// Iterates stay where the disciplines are defined: an input produced
// inside the group that leaves the consuming discipline's validity range
// is projected onto the range (clipped to the nearer limit) when it is
// gathered, and a relaxed iterate is clipped to the intersection of its
// consumers' ranges. The solver thus converges a fixed point of G∘P, with
// P the projection, and measures the residual on P∘G: (P(G(y)) − y)/scale.
// When the fixed point's outputs G(y) lie inside every range it is a
// solution of the group; when a coupling variable's output sits beyond a
// limit the disciplines never saw that value, so no state inside the
// ranges closes the balance: solve returns a *NotClosingError naming the
// variable and how far beyond the limit it runs.
//
// The group's report is w.reports[rk]; the three worst residuals of a
// converged solve are filled in when the report is read (CouplingReports).
func (w *Workspace) solve(ctx context.Context, g *group, set *SolverSettings, p solvePath, rk int) error {
	rep := &w.reports[rk]
	w.worstDue[rk] = false
	rep.Method = set.Method
	rep.Tolerance = set.Tolerance
	rep.Converged, rep.Diverged = false, false
	rep.CouplingIterations = 0
	rep.History = rep.History[:0]
	rep.Worst = rep.Worst[:0]
	rep.Residual = math.Inf(1)
	rep.Path = p.String()
	if set.plain() && !w.onceMode {
		// plain Gauss–Seidel starts from the guesses itself; a panic in a
		// discipline clears solving too (panicked)
		w.solving = true
		err := w.solvePlain(ctx, g, set, p, rk)
		w.solving = false
		return err
	}
	for k, v := range g.tear {
		w.val[v] = clip(w.guess[v], g.lo[k], g.hi[k])
	}
	if w.onceMode {
		err := w.sweep(g, true, true)
		rep.CouplingIterations = 1
		w.cnt.CouplingIterations++
		if err != nil {
			return err
		}
		rep.Converged = true
		return nil
	}
	nt := len(g.tear)
	y, gy, r, rPrev, scale := w.y[:nt], w.gy[:nt], w.res[rk][:nt], w.rPrev[:nt], g.scale[:nt]
	w.solving = true
	defer func() { w.solving = false }()
	if set.Method == Newton {
		copy(w.scale, scale) // newton reads the scales there
		return w.newton(ctx, g, *set, p, rep)
	}
	jacobi := set.Method == Jacobi || set.Method == AitkenJacobi
	aitken := set.Method == AitkenGaussSeidel || set.Method == AitkenJacobi
	anderson := set.Method == AndersonGaussSeidel
	damped := p.damped()
	omega := set.Relaxation
	w.and.reset()
	// a context whose Done is nil can never be cancelled
	cancellable := ctx.Done() != nil
	tear, lo, hi := g.tear[:nt], g.lo[:nt], g.hi[:nt]
	watch := stallWatch{best: math.Inf(1)}
	for it := 1; it <= set.MaxIterations; it++ {
		if cancellable {
			if err := ctx.Err(); err != nil {
				return fmt.Errorf("mdo: coupled group {%s} cancelled at iteration %d: %w", joinNames(g.names), it, err)
			}
		}
		for k, v := range tear {
			y[k] = w.val[v]
		}
		if err := w.sweep(g, jacobi, it == 1); err != nil {
			return w.loopError(g, err, p)
		}
		norm := 0.0
		for k, v := range tear {
			gy[k] = clip(w.val[v], lo[k], hi[k])
			r[k] = g.scaled(k, gy[k]-y[k])
			if a := math.Abs(r[k]); a > norm || math.IsNaN(a) {
				norm = a
			}
		}
		if done := w.logIteration(rep, it, norm, set.Tolerance, &watch); done {
			if rep.Converged {
				w.worstDue[rk] = true
				return w.closure(g, p)
			}
			break
		}
		if aitken && it > 1 {
			num, den := 0.0, 0.0
			for k := range r {
				d := r[k] - rPrev[k]
				num += rPrev[k] * d
				den += d * d
			}
			if den > 0 {
				omega = -omega * num / den
			}
			if damped {
				// the fallback keeps the factor an under-relaxation
				omega = math.Max(0.05, math.Min(1, omega))
			} else {
				// keep the factor in a sane band so that one bad step
				// cannot throw the iteration away
				omega = math.Max(-2, math.Min(2, omega))
				if math.Abs(omega) < 1e-3 {
					omega = math.Copysign(1e-3, omega)
				}
			}
		}
		if anderson {
			// in scaled units: gy/scale, then the next iterate
			for k := range gy {
				gy[k] /= scale[k]
			}
			w.and.step(it, r, gy, y)
			for k, v := range g.tear {
				w.val[v] = clip(y[k]*scale[k], g.lo[k], g.hi[k])
			}
		} else if aitken || omega != 1 {
			for k, v := range g.tear {
				w.val[v] = clip(y[k]+omega*(gy[k]-y[k]), g.lo[k], g.hi[k])
			}
		}
		if aitken {
			copy(rPrev, r)
		}
	}
	w.fillWorst(g, r, rep)
	if err := w.closure(g, p); err != nil {
		return err
	}
	return &ConvergenceError{CouplingReport: rep.Clone()}
}

// solvePlain is solve's loop for plain Gauss–Seidel (no relaxation), the
// iteration every other method and the fallback chain fall back to: the
// same steps as solve's loop without the relaxation.
func (w *Workspace) solvePlain(ctx context.Context, g *group, set *SolverSettings, p solvePath, rk int) error {
	rep := &w.reports[rk]
	tv, pow2, runs := w.tv[rk], g.pow2, w.runs[g.at]
	r := w.res[rk][:len(tv)]
	// a context whose Done is nil can never be cancelled
	cancellable := ctx.Done() != nil
	// the group starts from its guesses, clipped to the ranges; t.y is
	// the state a sweep starts from: the values of the coupling
	// variables, which only the sweep changes (the residual loop below
	// takes them for the next sweep)
	for k := range tv {
		t := &tv[k]
		x := clip(w.guess[t.v], t.lo, t.hi)
		*t.x, t.y = x, x
	}
	watch := stallWatch{best: math.Inf(1)}
	for it := 1; it <= set.MaxIterations; it++ {
		if cancellable {
			if err := ctx.Err(); err != nil {
				return fmt.Errorf("mdo: coupled group {%s} cancelled at iteration %d: %w", joinNames(g.names), it, err)
			}
		}
		if err := w.sweepRuns(runs, it == 1); err != nil {
			return w.loopError(g, err, p)
		}
		norm := 0.0
		for k := range tv {
			t := &tv[k]
			x := *t.x
			c := x
			if !(x > t.lo && x < t.hi) {
				c = clipOut(x, t.lo, t.hi)
			}
			d := c - t.y
			if pow2 {
				d *= t.inv // d/scale bit for bit (see group.inv)
			} else {
				d /= t.scale
			}
			r[k], t.y = d, x
			if a := math.Abs(d); a > norm || a != a {
				norm = a
			}
		}
		if done := w.logIteration(rep, it, norm, set.Tolerance, &watch); done {
			if rep.Converged {
				w.worstDue[rk] = true
				// closure's test, on tv: it has work only beyond a limit
				for k := range tv {
					if x := *tv[k].x; x < tv[k].lo || x > tv[k].hi {
						return w.closure(g, p)
					}
				}
				return nil
			}
			break
		}
	}
	w.fillWorst(g, r, rep)
	if err := w.closure(g, p); err != nil {
		return err
	}
	return &ConvergenceError{CouplingReport: rep.Clone()}
}

// closure checks the coupling variables of group g against the ranges of
// their consumers: the first one beyond a limit (the largest excess in
// units of its scale) is returned as a *NotClosingError.
func (w *Workspace) closure(g *group, p solvePath) error {
	inside := true
	for k, v := range g.tear {
		if x := w.val[v]; x < g.lo[k] || x > g.hi[k] {
			inside = false
		}
	}
	if inside {
		return nil
	}
	worst, excess, limit, disc := -1, 0.0, 0.0, -1
	for k, v := range g.tear {
		x := w.val[v]
		var e float64
		var l float64
		var d int
		switch {
		case x < g.lo[k]:
			e, l, d = (g.lo[k]-x)/g.scale[k], g.lo[k], g.loDisc[k]
		case x > g.hi[k]:
			e, l, d = (x-g.hi[k])/g.scale[k], g.hi[k], g.hiDisc[k]
		default:
			continue
		}
		if e > excess {
			worst, excess, limit, disc = k, e, l, d
		}
	}
	if worst < 0 {
		return nil
	}
	spec := w.sys.vars.At(g.tear[worst])
	return &NotClosingError{Group: g.names, Var: spec.Name, Desc: spec.Description, Unit: spec.Unit,
		Value: w.val[g.tear[worst]], Limit: limit, Discipline: w.sys.discs[disc].Name(), Path: p.String()}
}

// loopError completes an error raised while a coupled group was solved: a
// discipline that refuses a coupling variable of its group (its error has
// a Variable method naming one) marks a balance that leaves the region
// where the discipline is defined, which Classify reports as not closing.
func (w *Workspace) loopError(g *group, err error, p solvePath) error {
	var de *DisciplineError
	if errors.As(err, &de) && de.Var == "" {
		var named interface{ Variable() string }
		if errors.As(de.Err, &named) {
			v := w.sys.Index(named.Variable())
			for _, t := range g.tear {
				if t == v {
					de.Var = named.Variable()
					de.Group = g.names
				}
			}
		}
	}
	return err
}

// fillWorst records the three coupling variables with the largest residual.
func (w *Workspace) fillWorst(g *group, r []float64, rep *CouplingReport) {
	rep.Worst = rep.Worst[:0]
	used := [3]int{-1, -1, -1}
	for n := 0; n < 3 && n < len(r); n++ {
		best := -1
		for k := range r {
			if k == used[0] || k == used[1] || k == used[2] {
				continue
			}
			if best < 0 || math.Abs(r[k]) > math.Abs(r[best]) || math.IsNaN(r[k]) {
				best = k
			}
		}
		used[n] = best
		rep.Worst = append(rep.Worst, VarResidual{Name: g.tearNames[best], Residual: math.Abs(r[best])})
	}
}

// joinNames joins discipline names for messages.
func joinNames(names []string) string {
	s := ""
	for i, n := range names {
		if i > 0 {
			s += ", "
		}
		s += n
	}
	return s
}

// disciplineError wraps the error of discipline d; an error naming a
// parameter of the system (by a Variable method) marks the user's input.
func (w *Workspace) disciplineError(d int, err error) error {
	de := &DisciplineError{Discipline: w.sys.discs[d].Name(), Err: err}
	var named interface{ Variable() string }
	if errors.As(err, &named) {
		if i := w.sys.Index(named.Variable()); i >= 0 && w.sys.producer[i] < 0 {
			de.Input = named.Variable()
		}
	}
	return de
}
