package store

import (
	"context"
	"database/sql/driver"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"time"

	"couplet/mdo"
)

// maxVariables bounds the parameters of one INSERT (SQLite's default
// SQLITE_MAX_VARIABLE_NUMBER is 32766).
const maxVariables = 32000

// maxBatchRows bounds the rows of one multi-row INSERT of bound
// parameters (the JSON text layout).
const maxBatchRows = 64

// Begin starts the run: on a new store it writes the provenance and the
// variables and creates the evaluations table; on a store opened to pick its run up it
// checks that the script, seed and variables are those of the stored run
// and opens a new session.
func (s *Store) Begin(info mdo.RunInfo) error {
	if err := s.usable(); err != nil {
		return err
	}
	if s.began {
		return fmt.Errorf("store: %s: Begin called twice; one store holds one run", s.path)
	}
	ctx := context.Background()
	lay := newLayout(info.Design, info.Objectives, info.Constraints, info.Outputs)
	lay.units = info.Units
	lay.columns = lay.columns && !s.opt.jsonText
	pickingUp := s.meta != nil
	if pickingUp {
		if err := s.Check(info.Script, info.Seed); err != nil {
			return err
		}
		if err := sameLayout(s.lay, lay); err != nil {
			return fmt.Errorf("store: %s: %w", s.path, err)
		}
		lay.columns = s.lay.columns
	}
	started := info.Started
	if started.IsZero() {
		started = time.Now()
	}
	now := time.Now().UTC().Format(time.RFC3339Nano)
	err := s.inTx(func() error {
		if !pickingUp {
			settings, err := json.Marshal(nonNil(info.Settings))
			if err != nil {
				return err
			}
			if _, err := s.conn.ExecContext(ctx, `INSERT INTO run (id, study, script, script_sha256, tool_version, go_version, seed, optimizer, formulation, settings, started)
				VALUES (1, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
				info.Study, info.Script, ScriptHash(info.Script), s.opt.ToolVersion, goVersion(), strconv.FormatUint(info.Seed, 10),
				info.Optimizer, info.Formulation.String(), string(settings), started.UTC().Format(time.RFC3339Nano)); err != nil {
				return err
			}
			if err := writeVariables(ctx, s, lay, info.Outputs, info.Units); err != nil {
				return err
			}
			if _, err := s.conn.ExecContext(ctx, lay.createEvaluations()); err != nil {
				return err
			}
		}
		if pickingUp {
			// the run goes on: its outcome (stop, stop detail, counters,
			// best point and its sensitivity) is the next End's (a session
			// killed before it leaves a run that did not end, whose
			// counters count its rows, not an earlier session's outcome)
			if _, err := s.conn.ExecContext(ctx, `UPDATE run SET ended = NULL, stop = NULL, elapsed_seconds = NULL, evaluations = NULL, analyses = NULL, `+
				s.names.repeats+` = NULL, `+s.names.pickedUp+` = NULL, failed = NULL, discipline_calls = NULL, coupling_iterations = NULL, best_id = NULL WHERE id = 1`); err != nil {
				return err
			}
			if !s.noRecord {
				if err := s.setRecordValue(ctx, keyStopDetail, ""); err != nil {
					return err
				}
				if err := s.writeSensitivity(ctx, nil); err != nil {
					return err
				}
			}
		}
		res, err := s.conn.ExecContext(ctx, `INSERT INTO sessions (started, tool_version, go_version, `+s.names.pickedUpRows+`) VALUES (?, ?, ?, ?)`,
			now, s.opt.ToolVersion, goVersion(), s.rows)
		if err != nil {
			return err
		}
		id, err := res.LastInsertId()
		s.session = int(id)
		return err
	})
	if err != nil {
		return fmt.Errorf("store: %s: beginning the run: %w", s.path, err)
	}
	if pickingUp {
		s.meta.Ended, s.meta.Stop = time.Time{}, mdo.NotStopped
	} else {
		s.meta = &RunMeta{Study: info.Study, Script: info.Script, ScriptSHA256: ScriptHash(info.Script), ToolVersion: s.opt.ToolVersion,
			GoVersion: goVersion(), Seed: info.Seed, Optimizer: info.Optimizer, Formulation: info.Formulation.String(),
			Settings: nonNil(info.Settings), Started: started}
	}
	s.lay = lay
	if !pickingUp && s.opt.KeepEvaluations && lay.columns {
		s.kept = &keptSet{}
	}
	if err := s.prepare(); err != nil {
		return err
	}
	s.began = true
	s.startWriter(s.rows)
	return nil
}

// usable refuses writes on a closed, read-only or failed store.
func (s *Store) usable() error {
	switch {
	case s.db == nil:
		return fmt.Errorf("store: %s is closed", s.path)
	case s.readOnly:
		return fmt.Errorf("store: %s was opened read-only (use PickUp to append)", s.path)
	}
	return s.err
}

// nonNil returns m or an empty map.
func nonNil(m map[string]string) map[string]string {
	if m == nil {
		return map[string]string{}
	}
	return m
}

// sameLayout refuses a picked-up run whose variables differ from the stored ones.
func sameLayout(stored, now *layout) error {
	if len(stored.design) != len(now.design) {
		return fmt.Errorf("the stored run has %d design variables, this run %d", len(stored.design), len(now.design))
	}
	for k := range stored.design {
		if stored.design[k].Name != now.design[k].Name || stored.design[k].Lower != now.design[k].Lower || stored.design[k].Upper != now.design[k].Upper {
			return fmt.Errorf("design variable %d is %s in [%g, %g] in the stored run but %s in [%g, %g] now", k,
				stored.design[k].Name, stored.design[k].Lower, stored.design[k].Upper, now.design[k].Name, now.design[k].Lower, now.design[k].Upper)
		}
	}
	eq := func(what string, a, b []string) error {
		if len(a) != len(b) {
			return fmt.Errorf("the stored run has %d %s, this run %d", len(a), what, len(b))
		}
		for k := range a {
			if a[k] != b[k] {
				return fmt.Errorf("%s %d is %q in the stored run but %q now", what, k, a[k], b[k])
			}
		}
		return nil
	}
	if err := eq("objectives", stored.objectives, now.objectives); err != nil {
		return err
	}
	if err := eq("constraints", stored.constraints, now.constraints); err != nil {
		return err
	}
	a := make([]string, len(stored.outputs))
	b := make([]string, len(now.outputs))
	for i, v := range stored.outputs {
		a[i] = v.Name
	}
	for i, v := range now.outputs {
		b[i] = v.Name
	}
	return eq("outputs", a, b)
}

// writeVariables fills the variables table.
func writeVariables(ctx context.Context, s *Store, lay *layout, outputs []mdo.Var, declared map[string]string) error {
	// one statement for every row (a study has hundreds of outputs)
	ins, err := s.conn.PrepareContext(ctx, `INSERT INTO variables (role, position, name, unit, description, lower, upper, is_integer, column_name) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`)
	if err != nil {
		return err
	}
	defer ins.Close()
	unitOf := map[string]string{}
	for _, v := range outputs {
		unitOf[v.Name] = v.Unit
	}
	for name, u := range declared {
		unitOf[name] = u
	}
	for k, d := range lay.design {
		if _, err := ins.ExecContext(ctx, "design", k, d.Name, d.Unit, "", d.Lower, d.Upper, d.Integer, lay.designCols[k]); err != nil {
			return err
		}
	}
	for k, o := range lay.objectives {
		if _, err := ins.ExecContext(ctx, "objective", k, o, unitOf[o], "", nil, nil, false, lay.objCols[k]); err != nil {
			return err
		}
	}
	for k, c := range lay.constraints {
		if _, err := ins.ExecContext(ctx, "constraint", k, c, unitOf[c], "", nil, nil, false, lay.consCols[k]); err != nil {
			return err
		}
	}
	for k, v := range outputs {
		var lo, hi, col any
		if !v.Unbounded() {
			lo, hi = v.Min, v.Max
		}
		if lay.columns {
			col = lay.outCols[k]
		}
		if _, err := ins.ExecContext(ctx, "output", k, v.Name, v.Unit, v.Description, lo, hi, false, col); err != nil {
			return err
		}
	}
	return nil
}

// prepare prepares the insert statements of the layout.
func (s *Store) prepare() error {
	ctx := context.Background()
	ncols := len(s.lay.stored())
	if s.lay.columns {
		// the batch table, in the connection's temp schema (not in the file)
		nvals := len(s.lay.named()) + len(s.lay.outputs)
		s.batch.lay = s.lay
		s.batch.last = lastBound{bits: make([]uint64, nvals), vals: make([]driver.Value, nvals)}
		if _, err := s.conn.ExecContext(ctx, "CREATE VIRTUAL TABLE temp."+batchTable+" USING "+batchModule); err != nil {
			return fmt.Errorf("store: %s: creating the batch table: %w", s.path, err)
		}
	}
	s.batchRows = min(maxBatchRows, s.opt.BatchSize, maxVariables/ncols)
	err := s.conn.Raw(func(dc any) error {
		pc, ok := dc.(driver.ConnPrepareContext)
		if !ok {
			return fmt.Errorf("the SQLite driver cannot prepare statements with a context")
		}
		prep := func(q string) (driver.StmtExecContext, error) {
			st, err := pc.PrepareContext(ctx, q)
			if err != nil {
				return nil, err
			}
			s.stmts = append(s.stmts, st)
			ex, ok := st.(driver.StmtExecContext)
			if !ok {
				return nil, fmt.Errorf("the SQLite driver cannot execute statements with a context")
			}
			return ex, nil
		}
		var err error
		if s.lay.columns {
			s.stmtBatch, err = prep(s.lay.insertFromBatchSQL())
			if err != nil {
				return err
			}
		} else if s.batchRows > 1 {
			if s.stmtBatch, err = prep(s.lay.insertSQL(s.batchRows)); err != nil {
				return err
			}
		}
		if !s.lay.columns {
			if s.stmtOne, err = prep(s.lay.insertSQL(1)); err != nil {
				return err
			}
		}
		s.stmtIt, err = prep(`INSERT INTO iterations (session, optimizer, iteration, evaluations, best, feasible, violation, at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)`)
		return err
	})
	if err != nil {
		return fmt.Errorf("store: %s: preparing the inserts: %w", s.path, err)
	}
	return nil
}

// Record queues one evaluation for the background writer and returns;
// the writer commits it with its batch (see Options). The evaluation is
// kept by reference until it is committed (mdo's evaluations are not
// modified after they are recorded). A failed commit is returned by the
// next Record, Iteration, Flush, End or Close.
func (s *Store) Record(e *mdo.Evaluation) error {
	if err := s.usable(); err != nil {
		return err
	}
	if s.w == nil {
		return s.notWriting("Record")
	}
	if e == nil {
		return fmt.Errorf("store: %s: Record(nil)", s.path)
	}
	if err := s.lay.fits(e); err != nil {
		return fmt.Errorf("store: %s: evaluation %d: %w", s.path, e.ID, err)
	}
	return s.w.push(e, s.opt.BatchSize)
}

// fits checks an evaluation's lengths against the layout.
func (l *layout) fits(e *mdo.Evaluation) error {
	nd, no, nc := len(l.design), len(l.objectives), len(l.constraints)
	switch {
	case len(e.Design) != nd || len(e.X) != nd:
		return fmt.Errorf("has %d design values and %d coordinates, the run has %d design variables", len(e.Design), len(e.X), nd)
	case len(e.Objectives) != no || len(e.F) != no:
		return fmt.Errorf("has %d objective values, the run has %d objectives", len(e.Objectives), no)
	case len(e.Constraints) != nc || len(e.Margins) != nc || len(e.G) != nc:
		return fmt.Errorf("has %d constraint values, the run has %d constraints", len(e.Constraints), nc)
	case len(e.Outputs) != 0 && len(e.Outputs) != len(l.outputs):
		return fmt.Errorf("has %d outputs, the run has %d", len(e.Outputs), len(l.outputs))
	}
	return nil
}

// Iteration queues one optimiser iteration; it is committed with the
// evaluations recorded before it.
func (s *Store) Iteration(p mdo.Progress) error {
	if err := s.usable(); err != nil {
		return err
	}
	if s.w == nil {
		return s.notWriting("Iteration")
	}
	return s.w.pushIteration(p)
}

// Flush commits the queued evaluations and iterations now and waits
// until they are committed.
func (s *Store) Flush() error {
	if err := s.usable(); err != nil {
		return err
	}
	return s.flush()
}

// notWriting is the error of a Record or Iteration outside Begin … End.
func (s *Store) notWriting(what string) error {
	if s.ended {
		return fmt.Errorf("store: %s: %s after End", s.path, what)
	}
	return fmt.Errorf("store: %s: %s before Begin", s.path, what)
}

// stopWriter commits what is queued and stops the writer, if it runs; a
// write error becomes the store's error.
func (s *Store) stopWriter() error {
	if s.w == nil {
		return nil
	}
	err := s.w.close()
	s.rows, s.rowsExact = s.w.committedRows()
	s.w = nil
	if err != nil {
		s.err = err
	}
	return err
}

// flush waits for the writer, if it runs, to commit what is queued.
func (s *Store) flush() error {
	if s.w == nil {
		return nil
	}
	return s.w.flush()
}

// nanNull maps NaN to SQL NULL.
func nanNull(x float64) any {
	if math.IsNaN(x) {
		return nil
	}
	return x
}

// add appends driver arguments with their ordinals.
func (s *Store) add(vs ...driver.Value) {
	for _, v := range vs {
		s.args = append(s.args, driver.NamedValue{Ordinal: len(s.args) + 1, Value: v})
	}
}

// bind fills the argument list of an insert of encoded rows in the JSON
// text layout (the REAL column layout reads them from the batch table).
func (s *Store) bind(rows []encRow) []driver.NamedValue {
	s.args = s.args[:0]
	for _, r := range rows {
		e := r.e
		s.add(int64(e.ID), e.Feasible, e.Converged, e.Violation, e.Err,
			int64(e.CouplingIterations), int64(e.DisciplineCalls), e.Wall.Seconds(), r.numbers, r.outputs, r.vectors, mdo.ClassOf(e).String())
	}
	return s.args
}

// End commits the last evaluations and writes the run's outcome: stop
// reason, counters, best point, the objectives' senses, the constraints'
// relations and the Pareto front. Then it copies the write-ahead log
// into the file, so that the file alone holds the whole run before
// Close (see LinkFile).
func (s *Store) End(r *mdo.Result) error {
	if err := s.usable(); err != nil {
		return err
	}
	if !s.began {
		return fmt.Errorf("store: %s: End before Begin", s.path)
	}
	if err := s.stopWriter(); err != nil {
		return err
	}
	ctx := context.Background()
	now := time.Now().UTC()
	err := s.inTx(func() error {
		var best any
		stop, elapsed := mdo.NotStopped, 0.0
		var cnt mdo.EvalCounters
		if r != nil {
			if r.Best != nil {
				best = int64(r.Best.ID)
			}
			stop, elapsed, cnt = r.Stop, r.Elapsed.Seconds(), r.EvalCounters
		}
		if _, err := s.conn.ExecContext(ctx, `UPDATE run SET ended = ?, stop = ?, elapsed_seconds = ?, evaluations = ?, analyses = ?, `+s.names.repeats+` = ?,
			`+s.names.pickedUp+` = ?, failed = ?, discipline_calls = ?, coupling_iterations = ?, best_id = ? WHERE id = 1`,
			now.Format(time.RFC3339Nano), stop.String(), elapsed, cnt.Evaluations, cnt.Analyses, cnt.Repeats, cnt.PickedUp, cnt.Failed,
			cnt.DisciplineCalls, cnt.CouplingIterations, best); err != nil {
			return err
		}
		if _, err := s.conn.ExecContext(ctx, `UPDATE sessions SET ended = ? WHERE n = ?`, now.Format(time.RFC3339Nano), s.session); err != nil {
			return err
		}
		// recount: a replaced row (an evaluation ID recorded twice) was
		// counted as new by flush; rows committed in ascending order of
		// ID into a store that held none replaced none (and the count
		// would read every page of the table)
		if !s.rowsExact {
			if err := s.conn.QueryRowContext(ctx, `SELECT count(*) FROM evaluation_data`).Scan(&s.rows); err != nil {
				return err
			}
		}
		if r == nil {
			return nil
		}
		if err := s.writeGoals(ctx, r.Objectives, r.Constraints, false); err != nil {
			return err
		}
		if err := s.writeOutcome(ctx, r); err != nil {
			return err
		}
		if _, err := s.conn.ExecContext(ctx, `DELETE FROM front`); err != nil {
			return err
		}
		for k, p := range r.Front {
			if _, err := s.conn.ExecContext(ctx, `INSERT OR REPLACE INTO front (eval_id, rank) VALUES (?, ?)`, p.ID, k); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		s.err = fmt.Errorf("store: %s: ending the run: %w", s.path, err)
		return s.err
	}
	if err := s.checkpoint(); err != nil {
		return err
	}
	s.ended = true
	s.meta.Ended = now
	if r != nil {
		s.meta.Stop = r.Stop
	}
	return nil
}

// checkpoint copies the write-ahead log into the file now, not at
// Close: the file alone (the hard link or copy a script's folder makes
// of it, see LinkFile) then holds the whole run even while the store
// stays open, and so does a file left by a process that dies before
// Close. It is PASSIVE: a reader of another connection is not waited
// for.
func (s *Store) checkpoint() error {
	var busy, logPages, done int
	if err := s.conn.QueryRowContext(context.Background(), "PRAGMA wal_checkpoint(PASSIVE)").Scan(&busy, &logPages, &done); err != nil {
		s.err = fmt.Errorf("store: %s: copying the log into the file: %w", s.path, err)
		return s.err
	}
	return nil
}

// SetOutcome writes again, from r, what End took from the result for
// the run record: the stop detail, the notes, the surrogates and the
// sensitivity. An optimiser may complete its result after End (the
// sensitivity of the best point is worked out once the run is over):
// the caller hands the store the result the optimiser returned, so that
// results.db records what summary.json and the report say. Call it
// after End.
func (s *Store) SetOutcome(r *mdo.Result) error {
	if err := s.usable(); err != nil {
		return err
	}
	if !s.ended {
		return fmt.Errorf("store: %s: SetOutcome before End", s.path)
	}
	if r == nil {
		return fmt.Errorf("store: %s: SetOutcome(nil)", s.path)
	}
	if err := s.inTx(func() error { return s.writeOutcome(context.Background(), r) }); err != nil {
		s.err = fmt.Errorf("store: %s: writing the run's outcome: %w", s.path, err)
		return s.err
	}
	return s.checkpoint()
}
