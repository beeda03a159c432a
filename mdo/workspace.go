package mdo

import (
	"context"
	"fmt"
	"math"
)

// Counters accumulate the work done by a Workspace.
type Counters struct {
	Analyses        int // calls of Analyze
	DisciplineCalls int // calls of a discipline's Compute
	Iterations      int // coupling iterations over all groups
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
	settings []SolverSettings
	reports  []Report
	cnt      Counters
	// scratch per group, sized to the largest group
	y, gy, r, rPrev, scale []float64
	onceMode               bool
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
	}
	maxTear := 0
	for gi, g := range s.groups {
		if len(g.tear) > maxTear {
			maxTear = len(g.tear)
		}
		if g.coupled {
			rep := Report{Disciplines: g.names, Tolerance: w.settings[gi].Tolerance, Method: w.settings[gi].Method}
			rep.History = make([]float64, 0, w.settings[gi].MaxIterations+1)
			rep.Worst = make([]VarResidual, 0, 3)
			w.reports = append(w.reports, rep)
		}
	}
	w.y = make([]float64, maxTear)
	w.gy = make([]float64, maxTear)
	w.r = make([]float64, maxTear)
	w.rPrev = make([]float64, maxTear)
	w.scale = make([]float64, maxTear)
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

// Get returns a variable's current value.
func (w *Workspace) Get(name string) (float64, error) {
	i := w.sys.Index(name)
	if i < 0 {
		return 0, w.sys.unknown(name)
	}
	return w.val[i], nil
}

// Value returns the current value of variable i.
func (w *Workspace) Value(i int) float64 { return w.val[i] }

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
func (w *Workspace) Reports() []Report { return w.reports }

// Counters returns the accumulated work counters.
func (w *Workspace) Counters() Counters { return w.cnt }

// Analyze runs the system: each group in execution order, each coupled
// group converged by its solver from the current guesses. Parameters keep
// the values set with Set. A failure is returned as an error: a
// *ConvergenceError carrying the report, a *RangeError, a
// *NonFiniteError or a *DisciplineError.
func (w *Workspace) Analyze(ctx context.Context) error {
	w.cnt.Analyses++
	k := 0
	for gi := range w.sys.groups {
		g := &w.sys.groups[gi]
		if !g.coupled {
			for _, d := range g.discs {
				if err := w.run(d); err != nil {
					return err
				}
			}
			continue
		}
		if err := w.solve(ctx, g, w.settings[gi], &w.reports[k]); err != nil {
			return err
		}
		k++
	}
	return nil
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

// gather copies discipline d's inputs into its buffer, checking ranges
// (one comparison pair per input: NaN and ±Inf fail it too).
func (w *Workspace) gather(d int) error {
	in := w.inBuf[d]
	lo, hi := w.sys.inLo[d], w.sys.inHi[d]
	for k, v := range w.sys.inIdx[d] {
		x := w.val[v]
		if !(x >= lo[k] && x <= hi[k]) {
			return w.inputError(d, k, x)
		}
		in[k] = x
	}
	return nil
}

// gatherLoop refreshes only the inputs of discipline d produced inside its
// coupled group; the others were gathered (and checked) by the group's
// first sweep and cannot change while the group is solved.
func (w *Workspace) gatherLoop(d int) error {
	in := w.inBuf[d]
	lo, hi, idx := w.sys.inLo[d], w.sys.inHi[d], w.sys.inIdx[d]
	for _, k := range w.sys.inLoop[d] {
		x := w.val[idx[k]]
		if !(x >= lo[k] && x <= hi[k]) {
			return w.inputError(d, k, x)
		}
		in[k] = x
	}
	return nil
}

// inputError builds the error for input k of discipline d.
func (w *Workspace) inputError(d, k int, x float64) error {
	spec := w.sys.inSpec[d][k]
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return &NonFiniteError{Discipline: w.sys.Producer(spec.Name), Var: spec.Name, Value: x}
	}
	return &RangeError{Discipline: w.sys.discs[d].Name(), Var: spec.Name, Value: x, Min: spec.Min, Max: spec.Max, Unit: spec.Unit}
}

// compute runs discipline d on its gathered inputs into its output buffer.
func (w *Workspace) compute(d int) error {
	w.cnt.DisciplineCalls++
	disc := w.sys.discs[d]
	out := w.outBuf[d]
	if err := disc.Compute(w.inBuf[d], out); err != nil {
		return &DisciplineError{Discipline: disc.Name(), Err: err}
	}
	for k, x := range out {
		if x-x != 0 { // NaN or ±Inf: x − x is 0 for every finite x
			return &NonFiniteError{Discipline: disc.Name(), Var: w.sys.vars.At(w.sys.outIdx[d][k]).Name, Value: x}
		}
	}
	return nil
}

// scatter writes discipline d's output buffer into the values.
func (w *Workspace) scatter(d int) {
	out := w.outBuf[d]
	for k, v := range w.sys.outIdx[d] {
		w.val[v] = out[k]
	}
}

// run gathers, computes and scatters one discipline.
func (w *Workspace) run(d int) error {
	if err := w.gather(d); err != nil {
		return err
	}
	if err := w.compute(d); err != nil {
		return err
	}
	w.scatter(d)
	return nil
}

// sweep runs every discipline of a group once: in turn with the latest
// values (Gauss–Seidel) or all on the values at the start (Jacobi). The
// first sweep of a solve gathers every input; later ones only those
// produced inside the group.
func (w *Workspace) sweep(g *group, jacobi, first bool) error {
	gather := w.gatherLoop
	if first {
		gather = w.gather
	}
	if !jacobi {
		for _, d := range g.discs {
			if err := gather(d); err != nil {
				return err
			}
			if err := w.compute(d); err != nil {
				return err
			}
			w.scatter(d)
		}
		return nil
	}
	for _, d := range g.discs {
		if err := gather(d); err != nil {
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

// divergeLimit is the scaled residual beyond which a group is declared
// divergent.
const divergeLimit = 1e12

// solve converges one coupled group.
func (w *Workspace) solve(ctx context.Context, g *group, set SolverSettings, rep *Report) error {
	nt := len(g.tear)
	y, gy, r, rPrev, scale := w.y[:nt], w.gy[:nt], w.r[:nt], w.rPrev[:nt], w.scale[:nt]
	copy(scale, g.scale)
	for _, v := range g.tear {
		w.val[v] = w.guess[v]
	}
	rep.Method = set.Method
	rep.Tolerance = set.Tolerance
	rep.Converged, rep.Diverged = false, false
	rep.Iterations = 0
	rep.History = rep.History[:0]
	rep.Worst = rep.Worst[:0]
	rep.Residual = math.Inf(1)

	if w.onceMode {
		err := w.sweep(g, true, true)
		rep.Iterations = 1
		w.cnt.Iterations++
		if err != nil {
			return err
		}
		rep.Converged = true
		return nil
	}
	if set.Method == Newton {
		return w.newton(ctx, g, set, rep)
	}
	jacobi := set.Method == Jacobi || set.Method == AitkenJacobi
	aitken := set.Method == AitkenGaussSeidel || set.Method == AitkenJacobi
	omega := set.Relaxation
	for it := 1; it <= set.MaxIterations; it++ {
		if err := ctx.Err(); err != nil {
			return fmt.Errorf("mdo: coupled group {%s} cancelled at iteration %d: %w", joinNames(g.names), it, err)
		}
		for k, v := range g.tear {
			y[k] = w.val[v]
		}
		if err := w.sweep(g, jacobi, it == 1); err != nil {
			return err
		}
		norm := 0.0
		for k, v := range g.tear {
			gy[k] = w.val[v]
			r[k] = (gy[k] - y[k]) / scale[k]
			if a := math.Abs(r[k]); a > norm || math.IsNaN(a) {
				norm = a
			}
		}
		rep.Iterations = it
		rep.Residual = norm
		rep.History = append(rep.History, norm)
		w.cnt.Iterations++
		if norm <= set.Tolerance {
			rep.Converged = true
			w.fillWorst(g, r, rep)
			return nil
		}
		if !(norm < divergeLimit) {
			rep.Diverged = true
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
			// keep the factor in a sane band so that one bad step cannot
			// throw the iteration away
			omega = math.Max(-2, math.Min(2, omega))
			if math.Abs(omega) < 1e-3 {
				omega = math.Copysign(1e-3, omega)
			}
		}
		if aitken || omega != 1 {
			for k, v := range g.tear {
				w.val[v] = y[k] + omega*(gy[k]-y[k])
			}
		}
		copy(rPrev, r)
	}
	w.fillWorst(g, r, rep)
	return &ConvergenceError{Report: rep.Clone()}
}

// fillWorst records the three coupling variables with the largest residual.
func (w *Workspace) fillWorst(g *group, r []float64, rep *Report) {
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
		rep.Worst = append(rep.Worst, VarResidual{Name: w.sys.vars.At(g.tear[best]).Name, Residual: math.Abs(r[best])})
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
