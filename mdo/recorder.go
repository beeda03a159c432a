package mdo

import "time"

// RunInfo describes a run for its record: provenance and the names and
// units of everything an Evaluation holds.
type RunInfo struct {
	Study       string
	Script      string
	Optimizer   string
	Seed        uint64
	Formulation Formulation
	Settings    map[string]string
	Started     time.Time
	Design      []DesignSpec
	Objectives  []string
	Constraints []string
	Outputs     []Var
	// Units are the units declared for objectives and constraints
	// (Objective.Unit, Constraint.Unit), by name.
	Units map[string]string
}

// DesignSpec describes one design variable of a run.
type DesignSpec struct {
	Name         string
	Unit         string
	Lower, Upper float64
	Integer      bool
}

// Recorder receives a run's evaluations. Implementations (the SQLite
// store, say) live in subpackages of mdo. Record is called from one
// goroutine, in evaluation order; the Evaluation must not be modified.
type Recorder interface {
	Begin(info RunInfo) error
	Record(e *Evaluation) error
	End(r *Result) error
}

// IterationRecorder is implemented by recorders that also keep the
// optimiser's iterations.
type IterationRecorder interface {
	Iteration(p Progress) error
}

// PickUpRecorder is implemented by recorders that can pick up an earlier,
// interrupted run of the same script and seed (a case store opened with
// store.PickUp). NewEvaluator asks it for that run's evaluations and puts
// them in its cache (Evaluator.PickUp), so the optimiser retraces its path
// without analysing them again and reaches the same result. A store of
// another script or seed must return an error, not mix runs.
type PickUpRecorder interface {
	// PickedUp returns the evaluations of the run to pick up.
	PickedUp(script string, seed uint64) ([]*Evaluation, error)
}
