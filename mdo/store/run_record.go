package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"math"

	"couplet/mdo"
)

// CouplingSolver is the solver of one coupled group of a study's system
// (mdo.SolverSettings), as a run's record keeps it: in the
// coupling_solvers table of results.db and in summary.json.
type CouplingSolver struct {
	// Disciplines are the group's disciplines in execution order.
	Disciplines   []string `json:"disciplines"`
	Method        string   `json:"method"`
	Tolerance     Number   `json:"tolerance"`
	MaxIterations int      `json:"max_iterations"`
	Relaxation    Number   `json:"relaxation"`
	// Fallback says whether a failed solve runs the fallback chain.
	Fallback      bool `json:"fallback"`
	FromReference bool `json:"from_reference,omitempty"`
	Exhaustive    bool `json:"exhaustive,omitempty"`
}

// RunRecord is the part of a run's engineering record that the
// optimiser does not hand the store through mdo.RunInfo, with what End
// adds from the result: results.db keeps it beside the run's provenance
// (the run table: script and its SHA-256, tool version, optimiser and
// its settings, stop reason and counters), so that the file holds what
// the run's summary.json and report.html record. SetRunRecord writes
// Caution, the goals and the coupling solvers; End writes StopDetail,
// Notes, Surrogates and Sensitivity from the result. StoredRecord reads
// it all back.
type RunRecord struct {
	// Caution is the statement every result carries (the report's).
	Caution string
	// Objectives and Constraints are the study's objectives and
	// constraints as declared (matched to the run's by name): with them
	// the store knows each objective's sense and each constraint's
	// relation from the run's start, not only from End, so that a run
	// killed before End keeps them too.
	Objectives  []mdo.Objective
	Constraints []mdo.Constraint
	// CouplingSolvers are the solvers of the system's coupled groups when
	// the run began; SolverNote says why there are none (no coupled group,
	// the IDF formulation).
	CouplingSolvers []CouplingSolver
	SolverNote      string
	// StopDetail is the result's mdo.Result.StopDetail, Notes its
	// provenance notes (mdo.Result.Notes) and Surrogates the surrogate
	// models its numbers come from (mdo.Result.Surrogates), written by
	// End.
	StopDetail string
	Notes      []string
	Surrogates []mdo.SurrogateUse
	// Sensitivity is the best point's post-optimality sensitivity
	// (mdo.Result.Sensitivity; nil when the result has none), written by
	// End.
	Sensitivity *mdo.Sensitivity
}

// surrogateJSON is a surrogate use as run_record.surrogates holds it.
type surrogateJSON struct {
	Discipline string   `json:"discipline"`
	Model      string   `json:"model"`
	Outputs    []string `json:"outputs"`
	Affects    []string `json:"affects"`
}

// The keys of the run_record table.
const (
	keyCaution    = "caution"
	keySolverNote = "coupling_solver_note"
	keyStopDetail = "stop_detail"
	keyNotes      = "notes"
	keySurrogates = "surrogates"
)

// recordSchema creates the tables of the run record (see the package
// documentation); recordViews its views.
const recordSchema = `
CREATE TABLE run_record (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE coupling_solvers (
	n INTEGER PRIMARY KEY,
	disciplines TEXT NOT NULL,
	method TEXT NOT NULL,
	tolerance REAL,
	max_iterations INTEGER NOT NULL,
	relaxation REAL,
	fallback INTEGER NOT NULL,
	from_reference INTEGER NOT NULL,
	exhaustive INTEGER NOT NULL
);
`

// recordViews is the DDL of the run record's views, with the run
// table's counter names of the store's schema version.
func recordViews(names counterNames) string {
	return `
CREATE VIEW run_summary AS SELECT r.study AS study, r.seed AS seed, r.optimizer AS optimizer, r.formulation AS formulation,
	r.stop AS stop, (SELECT value FROM run_record WHERE key = '` + keyStopDetail + `') AS stop_detail,
	r.analyses + r.` + names.pickedUp + ` AS evaluations, r.analyses AS analyses, r.` + names.pickedUp + ` AS picked_up,
	r.` + names.repeats + ` AS repeats, r.failed AS failed, r.best_id AS best_id,
	(SELECT value FROM run_record WHERE key = '` + keyCaution + `') AS caution,
	(SELECT value FROM run_record WHERE key = '` + keySolverNote + `') AS coupling_solver_note,
	r.script_sha256 AS script_sha256, r.tool_version AS tool_version, r.started AS started, r.ended AS ended,
	r.elapsed_seconds AS elapsed_seconds
FROM run r;
CREATE VIEW optimizer_settings AS SELECT j.key AS name, j.value AS value FROM run r, json_each(r.settings) j;
CREATE VIEW constraint_definitions AS SELECT position, name, relation, kind, lower, upper, tolerance, scale, unit
FROM variables WHERE role = 'constraint';
`
}

// recordTables gives a store written before the run record its tables
// and views when it is opened to continue its run; one opened for
// reading is read without them (its record is empty but for the goals
// the variables table holds).
func (s *Store) recordTables() error {
	ctx := context.Background()
	var n int
	if err := s.conn.QueryRowContext(ctx, "SELECT count(*) FROM sqlite_schema WHERE type = 'table' AND name = 'run_record'").Scan(&n); err != nil {
		return fmt.Errorf("store: reading the schema of %s: %w", s.path, err)
	}
	if n > 0 {
		return nil
	}
	if s.readOnly {
		s.noRecord = true
		return nil
	}
	err := s.inTx(func() error {
		_, err := s.conn.ExecContext(ctx, recordSchema+recordViews(s.names))
		return err
	})
	if err != nil {
		return fmt.Errorf("store: %s: adding the run record's tables: %w", s.path, err)
	}
	return nil
}

// SetRunRecord writes the caution, the goals and the coupling solvers
// of the run's record (see RunRecord; StopDetail, Notes, Surrogates and
// Sensitivity are End's and are not read here), replacing what the store held: call it after
// Begin, also on a run picked up. An objective or constraint the run
// does not have is an error naming it.
func (s *Store) SetRunRecord(rec RunRecord) error {
	if err := s.usable(); err != nil {
		return err
	}
	if !s.began {
		return fmt.Errorf("store: %s: SetRunRecord before Begin", s.path)
	}
	for _, o := range rec.Objectives {
		if s.position(s.lay.objectives, o.Name) < 0 {
			return fmt.Errorf("store: %s: the run record's objective %q is not one of the run's objectives %q", s.path, o.Name, s.lay.objectives)
		}
	}
	for _, c := range rec.Constraints {
		if s.position(s.lay.constraints, c.Name) < 0 {
			return fmt.Errorf("store: %s: the run record's constraint %q is not one of the run's constraints %q", s.path, c.Name, s.lay.constraints)
		}
	}
	ctx := context.Background()
	err := s.inTx(func() error {
		if err := s.writeGoals(ctx, rec.Objectives, rec.Constraints, true); err != nil {
			return err
		}
		if err := s.setRecordValue(ctx, keyCaution, rec.Caution); err != nil {
			return err
		}
		if err := s.setRecordValue(ctx, keySolverNote, rec.SolverNote); err != nil {
			return err
		}
		if _, err := s.conn.ExecContext(ctx, `DELETE FROM coupling_solvers`); err != nil {
			return err
		}
		for k, c := range rec.CouplingSolvers {
			ds, err := json.Marshal(nonNilStrings(c.Disciplines))
			if err != nil {
				return err
			}
			if _, err := s.conn.ExecContext(ctx, `INSERT INTO coupling_solvers (n, disciplines, method, tolerance, max_iterations, relaxation, fallback, from_reference, exhaustive)
				VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`, k+1, string(ds), c.Method, nanNull(float64(c.Tolerance)), c.MaxIterations,
				nanNull(float64(c.Relaxation)), c.Fallback, c.FromReference, c.Exhaustive); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		s.err = fmt.Errorf("store: %s: writing the run record: %w", s.path, err)
		return s.err
	}
	return nil
}

// position returns the position of name in names, or -1.
func (s *Store) position(names []string, name string) int {
	for k, n := range names {
		if n == name {
			return k
		}
	}
	return -1
}

// nonNilStrings returns v or an empty slice (a JSON array, not null).
func nonNilStrings(v []string) []string {
	if v == nil {
		return []string{}
	}
	return v
}

// setRecordValue writes one entry of run_record; an empty value removes
// it (an absent key reads as empty). The caller holds the transaction.
func (s *Store) setRecordValue(ctx context.Context, key, value string) error {
	if value == "" {
		_, err := s.conn.ExecContext(ctx, `DELETE FROM run_record WHERE key = ?`, key)
		return err
	}
	_, err := s.conn.ExecContext(ctx, `INSERT OR REPLACE INTO run_record (key, value) VALUES (?, ?)`, key, value)
	return err
}

// writeGoals writes the objectives' senses and the constraints'
// relations into the variables table, each on the row of its name
// (byName) or of its position. The caller holds the transaction.
func (s *Store) writeGoals(ctx context.Context, objectives []mdo.Objective, constraints []mdo.Constraint, byName bool) error {
	at := func(names []string, k int, name string) int {
		if byName {
			return s.position(names, name)
		}
		return k
	}
	for k, o := range objectives {
		rel := "minimise"
		if o.Maximize {
			rel = "maximise"
		}
		if _, err := s.conn.ExecContext(ctx, `UPDATE variables SET relation = ? WHERE role = 'objective' AND position = ?`, rel, at(s.lay.objectives, k, o.Name)); err != nil {
			return err
		}
	}
	for k, c := range constraints {
		var lo, hi any
		switch c.Kind {
		case mdo.LessEqual:
			hi = c.Upper
		case mdo.GreaterEqual, mdo.Equal:
			lo = c.Lower
		default:
			lo, hi = c.Lower, c.Upper
		}
		if _, err := s.conn.ExecContext(ctx, `UPDATE variables SET relation = ?, kind = ?, lower = ?, upper = ?, tolerance = ?, scale = ? WHERE role = 'constraint' AND position = ?`,
			c.String(), c.Kind.String(), lo, hi, c.Tolerance, c.Scale, at(s.lay.constraints, k, c.Name)); err != nil {
			return err
		}
	}
	return nil
}

// writeOutcome writes End's part of the run record: the stop detail,
// the notes, the surrogates and the sensitivity of the result. The caller holds the transaction.
func (s *Store) writeOutcome(ctx context.Context, r *mdo.Result) error {
	if s.noRecord {
		return nil
	}
	if err := s.setRecordValue(ctx, keyStopDetail, r.StopDetail); err != nil {
		return err
	}
	notes, surrogates := "", ""
	if len(r.Notes) > 0 {
		b, err := json.Marshal(r.Notes)
		if err != nil {
			return err
		}
		notes = string(b)
	}
	if len(r.Surrogates) > 0 {
		uses := make([]surrogateJSON, len(r.Surrogates))
		for i, u := range r.Surrogates {
			uses[i] = surrogateJSON{Discipline: u.Discipline, Model: u.Model, Outputs: nonNilStrings(u.Outputs), Affects: nonNilStrings(u.Affects)}
		}
		b, err := json.Marshal(uses)
		if err != nil {
			return err
		}
		surrogates = string(b)
	}
	if err := s.setRecordValue(ctx, keyNotes, notes); err != nil {
		return err
	}
	if err := s.setRecordValue(ctx, keySurrogates, surrogates); err != nil {
		return err
	}
	return s.writeSensitivity(ctx, r.Sensitivity)
}

// StoredRecord reads the run's record back (see RunRecord): the goals
// from the variables table (the constraints of a run that neither
// began with SetRunRecord nor ended have unknown bounds, NaN), the rest
// from the run record's tables. A store written before they existed
// gives the goals alone.
func (s *Store) StoredRecord() (RunRecord, error) {
	var rec RunRecord
	if s.meta == nil {
		return rec, fmt.Errorf("store: %s holds no run", s.path)
	}
	ctx := context.Background()
	var r mdo.Result
	if err := s.loadGoals(ctx, &r); err != nil {
		return rec, err
	}
	rec.Objectives, rec.Constraints = r.Objectives, r.Constraints
	if s.noRecord {
		return rec, nil
	}
	vals := map[string]string{}
	rows, err := s.conn.QueryContext(ctx, `SELECT key, value FROM run_record`)
	if err != nil {
		return rec, fmt.Errorf("store: reading the run record of %s: %w", s.path, err)
	}
	for rows.Next() {
		var k, v string
		if err := rows.Scan(&k, &v); err != nil {
			rows.Close()
			return rec, fmt.Errorf("store: reading the run record of %s: %w", s.path, err)
		}
		vals[k] = v
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return rec, fmt.Errorf("store: reading the run record of %s: %w", s.path, err)
	}
	rec.Caution, rec.SolverNote, rec.StopDetail = vals[keyCaution], vals[keySolverNote], vals[keyStopDetail]
	if n := vals[keyNotes]; n != "" {
		if err := json.Unmarshal([]byte(n), &rec.Notes); err != nil {
			return rec, fmt.Errorf("store: %s: run_record.notes is not a JSON array of text: %w", s.path, ErrDamaged)
		}
	}
	if u := vals[keySurrogates]; u != "" {
		var uses []surrogateJSON
		if err := json.Unmarshal([]byte(u), &uses); err != nil {
			return rec, fmt.Errorf("store: %s: run_record.surrogates is not a JSON array of surrogate uses: %w", s.path, ErrDamaged)
		}
		for _, x := range uses {
			rec.Surrogates = append(rec.Surrogates, mdo.SurrogateUse{Discipline: x.Discipline, Model: x.Model, Outputs: x.Outputs, Affects: x.Affects})
		}
	}
	if rec.Sensitivity, err = s.readSensitivity(ctx, vals); err != nil {
		return rec, err
	}
	rows, err = s.conn.QueryContext(ctx, `SELECT disciplines, method, tolerance, max_iterations, relaxation, fallback, from_reference, exhaustive FROM coupling_solvers ORDER BY n`)
	if err != nil {
		return rec, fmt.Errorf("store: reading the coupling solvers of %s: %w", s.path, err)
	}
	defer rows.Close()
	for rows.Next() {
		var c CouplingSolver
		var ds string
		var tol, relax sql.NullFloat64
		if err := rows.Scan(&ds, &c.Method, &tol, &c.MaxIterations, &relax, &c.Fallback, &c.FromReference, &c.Exhaustive); err != nil {
			return rec, fmt.Errorf("store: reading the coupling solvers of %s: %w", s.path, err)
		}
		if err := json.Unmarshal([]byte(ds), &c.Disciplines); err != nil {
			return rec, fmt.Errorf("store: %s: coupling_solvers.disciplines is not a JSON array of text: %w", s.path, ErrDamaged)
		}
		c.Tolerance, c.Relaxation = nullNumber(tol), nullNumber(relax)
		rec.CouplingSolvers = append(rec.CouplingSolvers, c)
	}
	if err := rows.Err(); err != nil {
		return rec, fmt.Errorf("store: reading the coupling solvers of %s: %w", s.path, err)
	}
	return rec, nil
}

// nullNumber reads a REAL column, NULL as NaN.
func nullNumber(x sql.NullFloat64) Number {
	if !x.Valid {
		return Number(math.NaN())
	}
	return Number(x.Float64)
}
