package mdo

import "time"

// Progress is what an optimiser reports at each of its iterations.
type Progress struct {
	// Optimizer names the method, Iteration counts its iterations from 1
	// and Evaluations the evaluations so far (see EvalCounters).
	Optimizer   string
	Iteration   int
	Evaluations int
	// Best is the best (minimised-sense) first objective so far, Feasible
	// whether that point satisfies every constraint, and Violation its
	// scaled constraint violation.
	Best      float64
	Feasible  bool
	Violation float64
	// Started is when the run (its Evaluator) began: a callback that
	// sees a new value is seeing a new run of the study.
	Started time.Time
}
