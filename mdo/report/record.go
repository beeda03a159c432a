package report

import (
	"encoding/json"
	"fmt"
	"maps"

	"couplet/mdo"
	"couplet/mdo/runfolder"
	"couplet/mdo/store"
)

// Record is what a result's summary.json holds: the summary of the result
// (store.Summary: study, seed, optimiser, formulation, the evaluations
// analysed, picked up, failed and repeated, the best point with its
// feasibility, constraint values and margins, or the front) and what
// makes it a record of the engineering work: the caution, the
// optimiser's settings, the coupling solvers and the constraints'
// definitions. Two runs of the same script and seed give identical
// records apart from the timestamps.
type Record struct {
	store.Summary
	// Caution is the statement every result carries (Caution).
	Caution string `json:"caution"`
	// OptimizerSettings are the optimiser's settings as the run recorded
	// them (every exported field of its settings; where the method's
	// documentation says so, a zero value stands for its default);
	// absent when the run had no case store.
	OptimizerSettings map[string]string `json:"optimizer_settings,omitempty"`
	// CouplingSolvers are the solvers of the system's coupled groups
	// when the run began; SolverNote says why there are none (no coupled
	// group, the IDF formulation, or the system was not at hand).
	CouplingSolvers []CouplingSolver `json:"coupling_solvers,omitempty"`
	SolverNote      string           `json:"coupling_solver_note,omitempty"`
	// ConstraintDefinitions are the study's constraints as declared.
	ConstraintDefinitions []ConstraintDefinition `json:"constraint_definitions,omitempty"`
}

// CouplingSolver is the solver of one coupled group of a study's system
// (mdo.SolverSettings), as results.db keeps it too.
type CouplingSolver = store.CouplingSolver

// ConstraintDefinition is a constraint as the study declared it.
type ConstraintDefinition struct {
	Name string `json:"name"`
	// Relation is the constraint with its bound ("g1 >= 3.16"; an
	// equality gives its tolerance).
	Relation string `json:"relation"`
	Unit     string `json:"unit,omitempty"`
}

// CouplingSolvers returns the solvers of a study's coupled groups, with
// a note when there are none to give (no coupled group, the IDF
// formulation, no system).
func CouplingSolvers(st *mdo.Study) ([]CouplingSolver, string) {
	if st == nil || st.System == nil {
		return nil, "not recorded: the study's system was not at hand when this folder was written"
	}
	if st.Formulation == mdo.IDF {
		return nil, "none: under IDF each discipline runs once per point and the coupling is held by consistency constraints"
	}
	var out []CouplingSolver
	for _, g := range st.System.CoupledGroups() {
		set, err := st.System.Solver(g[0])
		if err != nil {
			continue
		}
		out = append(out, CouplingSolver{Disciplines: g, Method: set.Method.String(), Tolerance: store.Number(set.Tolerance),
			MaxIterations: set.MaxIterations, Relaxation: store.Number(set.Relaxation), Fallback: !set.NoFallback,
			FromReference: set.FromReference, Exhaustive: set.Exhaustive})
	}
	if len(out) == 0 {
		return nil, "none: the system has no coupled group (each discipline runs once per analysis)"
	}
	return out, ""
}

// NewRecord builds the record of a run's result (run.Result not nil).
func NewRecord(run Run) Record {
	r := run.Result
	rec := Record{Summary: store.NewSummary(r, store.SummaryOptions{Script: run.Script, ToolVersion: run.ToolVersion}), Caution: Caution}
	if run.Store != nil {
		if meta, ok := run.Store.Run(); ok && len(meta.Settings) > 0 {
			rec.OptimizerSettings = maps.Clone(meta.Settings)
		}
	}
	if run.Solvers != nil || run.SolverNote != "" {
		rec.CouplingSolvers, rec.SolverNote = run.Solvers, run.SolverNote
	} else {
		rec.CouplingSolvers, rec.SolverNote = CouplingSolvers(run.Study)
	}
	for _, c := range r.Constraints {
		rec.ConstraintDefinitions = append(rec.ConstraintDefinitions, ConstraintDefinition{Name: c.Name, Relation: c.String(), Unit: r.Unit(c.Name)})
	}
	return rec
}

// WriteRecord writes a record to path (a result's summary.json),
// atomically and never through a symbolic link.
func WriteRecord(path string, rec Record) error {
	b, err := json.MarshalIndent(rec, "", "  ")
	if err != nil {
		return fmt.Errorf("report: encoding the summary: %w", err)
	}
	if err := runfolder.WriteFile(path, append(b, '\n')); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	return nil
}

// ReadRecord reads a result's summary.json, never through a symbolic
// link.
func ReadRecord(path string) (Record, error) {
	var rec Record
	b, err := runfolder.ReadFile(path)
	if err != nil {
		return rec, fmt.Errorf("report: %w", err)
	}
	if err := json.Unmarshal(b, &rec); err != nil {
		return rec, fmt.Errorf("report: %s is not a summary: %w", path, err)
	}
	return rec, nil
}
