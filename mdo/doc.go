// Package mdo is the core of Couplet, a multidisciplinary design
// optimisation framework: variables with units and validity ranges, the
// Discipline contract, the coupled System built from disciplines, its
// coupling solvers, and the Study that an optimiser searches.
//
// # Building a system
//
// A Var has a dotted lower-snake name ("mass.takeoff"), an SI unit, a
// description, a default (the initial guess of a coupling variable) and a
// validity range. A Discipline declares its inputs and outputs as Vars and
// computes the outputs from the inputs (Func and FuncVars make one from a
// plain function). NewSystem links disciplines by the names they declare —
// one producer per variable; inputs nobody produces are parameters — and
// derives the coupling graph: its strongly connected components are the
// coupled groups, solved in a condensed topological order. DSM prints the
// design structure matrix. Names resolve to indices once, in NewSystem, so
// an analysis reads and writes slices and allocates nothing.
//
// # Analysing a design
//
// System.Analyze runs one analysis and returns a Solution snapshot; loops
// reuse a Workspace, one per goroutine. Each coupled group is converged by
// its solver (Gauss–Seidel, Jacobi, their Aitken-accelerated forms or
// Newton, see SolverSettings), with a deterministic fallback chain when
// it fails; the Report of each group gives its iterations and residual
// history. A failed analysis is an error value that says what kind of
// failure it is (FailureClass, Classify): the design does not close, the
// solver failed, an input was invalid, or a discipline failed.
//
// Values, Solution, Workspace and Result read variables by name in one
// way: Get(name) returns the value and panics with an
// *UnknownVariableError on a name the system lacks, Lookup(name) returns
// that error, At(i) reads by index. A misspelt name is never a silent NaN
// or 0.
//
// # Studies, evaluations and results
//
// A Study names the design variables (bounds, integers), objectives,
// constraints, fixed parameters, the formulation (MDF or IDF), the seed
// and the recorder. Its Evaluator maps points of the unit box to physical
// designs, analyses them on a pool of workers, caches repeated points and
// keeps the best point (Deb's feasibility rules) and, for several
// objectives, the Pareto front; the answers do not depend on the number of
// workers. An evaluation is a design point answered by an analysis — run
// by this Evaluator, or picked up from the store of an earlier,
// interrupted session of the same run; a point asked for again is a
// repeat, answered from the cache, and is not an evaluation (see
// EvalCounters). Optimisers (package couplet/optimizers) drive the
// Evaluator and end with a Result, whose Stop says why they stopped
// (StopReason).
//
// The types that describe a run (Evaluation, Result, HistoryPoint,
// Progress, RunInfo) live here, so that recorders, plots and reports
// depend on mdo alone: mdo defines the Recorder, IterationRecorder and
// PickUpRecorder interfaces and its subpackages implement them — store
// (the SQLite case store), plot (figures) and report (the HTML report and
// the run folder) — the way database/sql stands apart from its drivers.
// mdo imports none of Couplet's other packages.
//
// Sellar and SellarStudy give the Sellar test problem used throughout the
// tests and examples.
package mdo
