// Package store keeps the evaluations of a study in a SQLite file (the
// case store), through the pure-Go driver modernc.org/sqlite.
//
// A Store implements mdo.Recorder and mdo.IterationRecorder. Record only
// queues the evaluation (the queue is bounded) and returns; between Begin
// and End a writer of the store's own, on two goroutines, formats the
// queued rows and commits them in WAL mode in batches (every
// Options.BatchSize evaluations or Options.FlushInterval, and at Flush,
// End and Close, which wait for the commit). Every committed batch
// survives the process being killed; a failed commit is returned by the
// next call. A killed run is picked up with PickUp: the store checks that
// the script and seed are the same, and its evaluations are handed to
// mdo.Evaluator.PickUp so that they are answered without being analysed
// again.
//
// The schema is plain SQL, meant to be read with the sqlite3 shell or
// Python's sqlite3 module:
//
//	store_info(key, value)          format marker and schema version
//	run(...)                        one row: provenance (study, script and
//	                                its SHA-256, tool and Go versions, seed,
//	                                optimiser, settings, start, end) and the
//	                                final counters (evaluations, analyses,
//	                                repeats, picked_up, failed, …; see
//	                                mdo.EvalCounters) and best_id
//	sessions(n, started, ended, …)  one row per Begin (picking the run up
//	                                adds one; picked_up_rows: the rows then)
//	variables(role, position, name, unit, description, lower, upper,
//	          is_integer, relation, column_name)
//	evaluation_data(id, feasible, converged, violation, error, iterations,
//	          discipline_calls, wall_seconds, vectors, failure,
//	          "design:NAME"…, "objective:NAME"…, "constraint:NAME"…,
//	          "margin:NAME"…, "output:NAME"…)
//	                                one REAL column per value (schema
//	                                version 3; see below for older stores)
//	                                failure: the mdo.FailureClass of a
//	                                failed analysis ('' otherwise; stores
//	                                written before it read as '')
//	                                (iterations: the coupling iterations)
//	evaluations                     a view of evaluation_data with one column
//	                                per value: "design:NAME"…,
//	                                "objective:NAME"…, "constraint:NAME"…,
//	                                "margin:NAME"…, and outputs as a JSON
//	                                object name → value (older SQLite
//	                                versions print it with 15 digits)
//	outputs(eval_id, name, unit, value)  a view: one row per evaluation and
//	                                output, values exact
//	iterations(n, session, optimizer, iteration, evaluations, best,
//	          feasible, violation, at)
//	front(eval_id, rank)            the Pareto front of a multi-objective run
//	run_record(key, value)          the run's record beside the run table,
//	                                as summary.json and report.html give it:
//	                                caution, stop_detail
//	                                (mdo.Result.StopDetail, written at End),
//	                                coupling_solver_note (why there is no
//	                                coupled group's solver), notes (the
//	                                study's provenance notes, a JSON array),
//	                                surrogates (the surrogate models the
//	                                numbers come from, a JSON array of
//	                                objects discipline, model, outputs,
//	                                affects), sensitivity_objective and
//	                                sensitivity_unit (present when the best
//	                                point has a sensitivity),
//	                                sensitivity_not_defined (why an active
//	                                limit has no sensitivity, a JSON array
//	                                of objects constraint, bound,
//	                                not_defined); an empty entry is absent
//	coupling_solvers(n, disciplines, method, tolerance, max_iterations,
//	          relaxation, fallback, from_reference, exhaustive)
//	                                one row per coupled group of the system
//	                                as the run began (disciplines: a JSON
//	                                array in execution order)
//	sensitivity(n, kind, name, bound, value, unit, active, per_unit,
//	          per_unit_unit)
//	                                the best point's post-optimality
//	                                sensitivity (mdo.Result.Sensitivity):
//	                                one row per constraint limit (kind
//	                                'limit', bound upper/lower/target) and
//	                                fixed parameter (kind 'parameter');
//	                                per_unit: d(optimal objective)/d(value)
//	run_summary                     a view, one row: study, seed, optimizer,
//	                                formulation, stop, stop_detail,
//	                                evaluations, analyses, picked_up,
//	                                repeats, failed, best_id, caution,
//	                                coupling_solver_note, script_sha256,
//	                                tool_version, started, ended,
//	                                elapsed_seconds
//	optimizer_settings(name, value) a view of run.settings, one row each
//	constraint_definitions(position, name, relation, kind, lower, upper,
//	          tolerance, scale, unit)
//	                                a view of the constraints as declared
//	                                (relation: "g1 >= 3.16")
//
// The run's caution, goals (objectives' senses, constraints' relations)
// and coupling solvers are written as it begins (Store.SetRunRecord),
// its outcome (run.stop and the counters, best_id, stop_detail, notes,
// surrogates, the sensitivity, the front) at End, and again from the
// result the optimiser returned (Store.SetOutcome: the sensitivity is
// worked out after End); Store.StoredRecord and Store.Result read them
// back. A run picked up keeps its record, and has no outcome again until
// its next End: a session killed before it leaves a run that did not
// end.
// Stores written before the run record's tables read (their record is
// the goals of the variables table alone); picked up, they get the
// tables. End also copies the write-ahead log into the file, so that
// the file alone holds the whole run before Close: a script's folder
// shows its principal result's store under a second name with
// LinkFile, a hard link or a copy SQLite makes (CopyFile).
//
// So SELECT stop, stop_detail, evaluations FROM run_summary says how
// the run ended, SELECT "design:z1", "objective:f" FROM evaluations
// WHERE feasible works as it reads, and so does SELECT name, value, unit
// FROM outputs WHERE eval_id = (SELECT best_id FROM run). A row of
// evaluation_data keeps each value in a REAL column of its own, which
// SQLite stores in at most 8 bytes exactly (an integral value in fewer);
// NaN is NULL, and −0 reads back as 0. The views read these columns, so
// an integral value reads as a REAL (12.0). vectors packs the unit-box
// point, the minimised objectives and the scaled constraints as
// little-endian float64, so that a picked-up run continues exactly. A
// failed analysis records no outputs: its output columns are NULL, and so
// are its values in the views and its CSV cells (stores written before
// this kept the variables' defaults there; they still read, without those
// values). The file has pages of 32 KiB, so that rows of hundreds of
// outputs share pages; its write-ahead log is copied into it whenever it
// passes 2 MiB. In the REAL column layout the writer hands SQLite the
// rows of a batch through a virtual table of the connection's temp schema
// (one INSERT … SELECT per batch), which the file does not hold.
//
// Stores of schema versions 1 and 2, and a study with more values per
// evaluation than a table has columns (1 900 here), keep the design,
// objective, constraint and margin values once as the JSON text array
// numbers and the outputs as the JSON text array outputs, in the order of
// the variables table (NaN as null, ±Inf as ±9e999, numbers in their
// shortest exact form), with the same views. They read, and are picked up
// in their own layout.
//
// The package also exports evaluations to CSV (Store.WriteCSV, ReadCSV) and
// writes the run's summary.json (WriteSummary).
package store
