package mdo

import (
	"fmt"
	"math"
	"strings"
	"text/tabwriter"
	"time"
)

// Result is the outcome of an optimisation or a design of experiments.
type Result struct {
	Study       string
	Optimizer   string
	Seed        uint64
	Formulation Formulation
	Design      []DesignSpec
	Objectives  []Objective
	Constraints []Constraint
	Outputs     []Var
	// Best is the best point by Deb's rules on the first objective.
	Best *Evaluation
	// Front holds the non-dominated feasible points of a study with two
	// or more objectives, sorted by the first objective.
	Front []*Evaluation
	// History is the best-so-far history.
	History []HistoryPoint
	EvalCounters
	// Notes are the study's provenance notes (Study.Notes).
	Notes []string
	// Surrogates are the surrogate models of the study's system
	// (SurrogateDiscipline) and the numbers that come from them; empty
	// when every number is the true analysis's.
	Surrogates []SurrogateUse
	// Sensitivity is the post-optimality sensitivity of the best point,
	// from a gradient-based optimiser that converged (nil otherwise).
	Sensitivity *Sensitivity
	// Stop says why the optimiser stopped.
	Stop StopReason
	// StopDetail says in words what Stop does not: the cause when the
	// optimiser did not meet its convergence test, or when it met it at an
	// infeasible point (a start that does not analyse, no feasible point
	// found, a stalled search, the budget spent before convergence); empty
	// when the optimiser has nothing to add (see Evaluator.SetStopDetail).
	StopDetail string
	Started    time.Time
	Elapsed    time.Duration
}

// beginRecording starts the recorder with the run's description.
func (e *Evaluator) beginRecording() {
	e.began = true
	if e.study.Recorder == nil {
		return
	}
	info := RunInfo{
		Study: e.study.Name, Script: e.study.Script, Optimizer: e.optName, Seed: e.study.Seed,
		Formulation: e.study.Formulation, Settings: e.settings, Started: e.started,
		Design: e.DesignSpecs(), Objectives: e.ObjectiveNames(), Outputs: e.OutputVars(),
		Units: e.study.declaredUnits(),
	}
	for _, c := range e.cons {
		info.Constraints = append(info.Constraints, c.Name)
	}
	if err := e.study.Recorder.Begin(info); err != nil {
		e.recErr = fmt.Errorf("mdo: starting the recorder: %w", err)
	}
}

// Begin names the optimiser and its settings for the record and starts
// the recorder. Optimisers call it before their first evaluation.
func (e *Evaluator) Begin(optimizer string, settings map[string]string) error {
	e.optName = optimizer
	e.settings = settings
	e.progress.Optimizer = optimizer
	if !e.began {
		e.beginRecording()
	}
	return e.recErr
}

// Iteration reports the end of an optimiser iteration: it calls the
// study's progress callback and the recorder's iteration hook.
func (e *Evaluator) Iteration(it int) {
	p := Progress{Optimizer: e.optName, Iteration: it, Evaluations: e.cnt.Evaluations, Best: math.NaN(), Violation: math.Inf(1), Started: e.started}
	if e.best != nil {
		p.Best = e.best.F[0]
		p.Feasible = e.best.Feasible
		p.Violation = e.best.Violation
	}
	e.progress = p
	if e.study.Progress != nil {
		e.study.Progress(p)
	}
	if ir, ok := e.study.Recorder.(IterationRecorder); ok && e.recErr == nil {
		if !e.began {
			e.beginRecording()
		}
		if err := ir.Iteration(p); err != nil && e.recErr == nil {
			e.recErr = fmt.Errorf("mdo: recording iteration %d: %w", it, err)
		}
	}
}

// SetStopDetail gives the words the Result (Result.StopDetail), its text
// and its summary show beside the stop reason; an optimiser calls it
// before Finish.
func (e *Evaluator) SetStopDetail(detail string) { e.stopDetail = detail }

// SetSensitivity gives the post-optimality sensitivity of the best point
// that the Result carries (Result.Sensitivity); an optimiser that
// computes one calls it before Finish, so that the recorder's End
// records it with the rest of the outcome.
func (e *Evaluator) SetSensitivity(s *Sensitivity) { e.sensitivity = s }

// Finish builds the Result and closes the recorder. stop says why the
// optimiser stopped.
func (e *Evaluator) Finish(stop StopReason) (*Result, error) {
	r := &Result{
		Study: e.study.Name, Optimizer: e.optName, Seed: e.study.Seed, Formulation: e.study.Formulation,
		Design: e.DesignSpecs(), Objectives: append([]Objective(nil), e.study.Objectives...),
		Constraints: e.Constraints(), Outputs: e.OutputVars(),
		Best: e.best, Front: e.Front(), History: append([]HistoryPoint(nil), e.history...),
		EvalCounters: e.cnt, Notes: append([]string(nil), e.study.Notes...), Stop: stop, StopDetail: e.stopDetail, Sensitivity: e.sensitivity, Started: e.started, Elapsed: time.Since(e.started),
		Surrogates: e.study.surrogateUses(),
	}
	if e.study.Recorder != nil && e.recErr == nil {
		if !e.began {
			e.beginRecording()
		}
		if err := e.study.Recorder.End(r); err != nil && e.recErr == nil {
			e.recErr = fmt.Errorf("mdo: closing the recorder: %w", err)
		}
	}
	if e.recErr != nil {
		return r, e.recErr
	}
	return r, nil
}

// DesignValues returns the best design as name → physical value. A
// misspelt name reads 0 from the map; Lookup (or Get) names it and the
// nearest names.
func (r *Result) DesignValues() map[string]float64 {
	out := map[string]float64{}
	if r.Best == nil {
		return out
	}
	for k, d := range r.Design {
		out[d.Name] = r.Best.Design[k]
	}
	return out
}

// Objective returns the best point's first objective as declared (NaN if
// there is no best point).
func (r *Result) Objective() float64 {
	if r.Best == nil || len(r.Best.Objectives) == 0 {
		return math.NaN()
	}
	return r.Best.Objectives[0]
}

// Feasible reports whether the best point satisfies every constraint.
func (r *Result) Feasible() bool { return r.Best != nil && r.Best.Feasible }

// Get returns the best point's value of a system variable (design
// variables included). It panics with Lookup's error when the result has
// no best point or no variable of that name (see Values for the
// convention).
func (r *Result) Get(name string) float64 { return mustValue(r.Lookup(name)) }

// Lookup returns the best point's value of a system variable, or an error
// when the result has no best point or no variable of that name.
func (r *Result) Lookup(name string) (float64, error) {
	if r.Best == nil {
		return 0, fmt.Errorf("mdo: study %q has no best point", r.Study)
	}
	for i, v := range r.Outputs {
		if v.Name == name {
			return r.Best.Outputs[i], nil
		}
	}
	return 0, unknownIn(fmt.Sprintf("the result of study %q", r.Study), name, r.Outputs)
}

// Active returns the names of the constraints whose scaled margin at the
// best point is at most tol (satisfied but on the bound, or violated).
func (r *Result) Active(tol float64) []string {
	var out []string
	if r.Best == nil {
		return out
	}
	for k, c := range r.Constraints {
		if r.Best.Margins[k]/c.scale() <= tol {
			out = append(out, c.Name)
		}
	}
	return out
}

// String formats the result as tables: the best design, its objectives and
// its constraints with margins, and the front of a multi-objective study.
func (r *Result) String() string {
	if r == nil {
		return "no result (nil *mdo.Result)"
	}
	var b strings.Builder
	fmt.Fprintf(&b, "study %q by %s (%s, seed %d): %s after %s\n",
		r.Study, r.Optimizer, r.Formulation, r.Seed, r.Stop, r.EvalCounters)
	if r.StopDetail != "" {
		fmt.Fprintf(&b, "stopped: %s\n", r.StopDetail)
	}
	b.WriteString(r.surrogateText())
	if r.Best == nil {
		b.WriteString("no point was evaluated\n")
		return b.String()
	}
	state := "feasible"
	if !r.Best.Feasible {
		state = fmt.Sprintf("INFEASIBLE (violation %.4g)", r.Best.Violation)
		if r.Best.Err != "" {
			state += ": " + r.Best.Err
		}
	}
	fmt.Fprintf(&b, "best point #%d, %s\n", r.Best.ID, state)
	w := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(w, "design\tvalue\tunit\tbounds")
	for k, d := range r.Design {
		fmt.Fprintf(w, "%s\t%.6g\t%s\t[%g, %g]\n", d.Name, r.Best.Design[k], unitOr(d.Unit), d.Lower, d.Upper)
	}
	w.Flush()
	w = tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(w, "objective\tvalue")
	for k, o := range r.Objectives {
		fmt.Fprintf(w, "%s\t%.8g\n", o, r.Best.Objectives[k])
	}
	w.Flush()
	if len(r.Constraints) > 0 {
		w = tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
		fmt.Fprintln(w, "constraint\tvalue\tmargin\tstate")
		for k, c := range r.Constraints {
			st := "ok"
			switch m := r.Best.Margins[k] / c.scale(); {
			case m < 0:
				st = "VIOLATED"
			case m <= 1e-3:
				st = "active"
			}
			fmt.Fprintf(w, "%s\t%.6g\t%.4g\t%s\n", c, r.Best.Constraints[k], r.Best.Margins[k], st)
		}
		w.Flush()
	}
	if len(r.Front) > 0 {
		fmt.Fprintf(&b, "Pareto front: %d non-dominated feasible points\n", len(r.Front))
		w = tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
		head := []string{"#"}
		for _, o := range r.Objectives {
			head = append(head, o.Name)
		}
		fmt.Fprintln(w, strings.Join(head, "\t"))
		for _, p := range r.Front {
			row := []string{fmt.Sprint(p.ID)}
			for _, f := range p.Objectives {
				row = append(row, fmt.Sprintf("%.6g", f))
			}
			fmt.Fprintln(w, strings.Join(row, "\t"))
		}
		w.Flush()
	}
	if r.Sensitivity != nil {
		b.WriteString(r.Sensitivity.String())
	}
	return b.String()
}

// unitOr returns the unit or "-".
func unitOr(u string) string {
	if u == "" {
		return "-"
	}
	return u
}
