// Package store keeps the evaluations of a study in a SQLite file (the
// case store), through the pure-Go driver modernc.org/sqlite.
//
// A Store implements mdo.Recorder and mdo.IterationRecorder. It writes in
// WAL mode and commits in batches (every Options.BatchSize evaluations or
// Options.FlushInterval, and at End); every committed batch survives the
// process being killed. A killed run is continued with Resume: the store
// checks that the script and seed are the same, and its evaluations are
// handed to mdo.Evaluator.Restore so that they are answered without being
// analysed again.
//
// The schema is plain SQL, meant to be read with the sqlite3 shell or
// Python's sqlite3 module:
//
//	store_info(key, value)          format marker and schema version
//	run(...)                        one row: provenance and final counters
//	sessions(n, started, ended, …)  one row per Begin (a resume adds one)
//	variables(role, position, name, unit, …, column_name)
//	evaluations(id, feasible, converged, violation, error, iterations,
//	            discipline_calls, wall_seconds,
//	            "design:NAME"…, "objective:NAME"…, "constraint:NAME"…,
//	            "margin:NAME"…, outputs, vectors)
//	iterations(n, session, iteration, evaluations, best, feasible, violation, at)
//	front(eval_id, rank)            the Pareto front of a multi-objective run
//
// outputs is a JSON object name → value (non-finite values as the strings
// "NaN", "Infinity", "-Infinity"), so that json_extract(outputs,
// '$."wing.area"') works; vectors packs the unit-box point, the minimised
// objectives and the scaled constraints as little-endian float64 for an
// exact resume.
//
// The package also exports evaluations to CSV (WriteCSV, ReadCSV) and
// writes the run's summary.json (WriteSummary).
package store
