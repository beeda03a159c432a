package store

import (
	"context"
	"database/sql"
	"fmt"
	"math"
	"time"

	"couplet/mdo"
)

// Result rebuilds the run's mdo.Result from the store, for a report or a
// summary made after the run (or of a run that was killed). The best
// point is the stored one if the run ended, else the best recorded by
// Deb's rules; the history is replayed from the evaluations in ID order;
// the counters are the stored ones if the run ended, else they count the
// rows. The goals, stop detail, notes, surrogates and sensitivity are
// the run record's (StoredRecord): the constraints of a run that neither
// had its record set (SetRunRecord) nor ended have unknown bounds (NaN).
func (s *Store) Result() (*mdo.Result, error) {
	meta, ok := s.Run()
	if !ok {
		return nil, fmt.Errorf("store: %s holds no run", s.path)
	}
	evs, err := s.Evaluations()
	if err != nil {
		return nil, err
	}
	r := &mdo.Result{Study: meta.Study, Optimizer: meta.Optimizer, Seed: meta.Seed, Design: s.lay.design, Outputs: s.lay.outputs,
		Stop: meta.Stop, Started: meta.Started}
	if meta.Formulation == mdo.IDF.String() {
		r.Formulation = mdo.IDF
	}
	ctx := context.Background()
	rec, err := s.StoredRecord()
	if err != nil {
		return nil, err
	}
	r.Objectives, r.Constraints, r.StopDetail, r.Notes, r.Surrogates, r.Sensitivity = rec.Objectives, rec.Constraints, rec.StopDetail, rec.Notes, rec.Surrogates, rec.Sensitivity
	byID := map[int]*mdo.Evaluation{}
	var best *mdo.Evaluation
	for i, e := range evs {
		byID[e.ID] = e
		if mdo.Better(e, best) {
			best = e
			r.History = append(r.History, mdo.HistoryPoint{Evaluations: i + 1, Best: e.F[0], Violation: e.Violation, Feasible: e.Feasible})
		}
		r.DisciplineCalls += e.DisciplineCalls
		r.CouplingIterations += e.CouplingIterations
		if !e.Converged {
			r.Failed++
		}
	}
	r.Best = best
	r.Evaluations, r.Analyses = len(evs), len(evs)
	var (
		bestID                                      sql.NullInt64
		elapsed                                     sql.NullFloat64
		nAn, nRepeat, nPicked, nFail, nCalls, nIter sql.NullInt64
	)
	// run.evaluations is not read: version 1 stores, written when
	// repeats still counted as evaluations, hold the requests there
	err = s.conn.QueryRowContext(ctx, `SELECT best_id, elapsed_seconds, analyses, `+s.names.repeats+`, `+s.names.pickedUp+`, failed, discipline_calls, coupling_iterations FROM run WHERE id = 1`).
		Scan(&bestID, &elapsed, &nAn, &nRepeat, &nPicked, &nFail, &nCalls, &nIter)
	if err != nil {
		return nil, fmt.Errorf("store: reading the run of %s: %w", s.path, err)
	}
	if !meta.Ended.IsZero() {
		if e, ok := byID[int(bestID.Int64)]; ok && bestID.Valid {
			r.Best = e
		}
		r.Elapsed = time.Duration(elapsed.Float64 * 1e9)
		r.EvalCounters = mdo.EvalCounters{Evaluations: int(nAn.Int64 + nPicked.Int64), Analyses: int(nAn.Int64), Repeats: int(nRepeat.Int64), PickedUp: int(nPicked.Int64),
			Failed: int(nFail.Int64), DisciplineCalls: int(nCalls.Int64), CouplingIterations: int(nIter.Int64)}
	}
	rows, err := s.conn.QueryContext(ctx, `SELECT eval_id FROM front ORDER BY rank`)
	if err != nil {
		return nil, fmt.Errorf("store: reading the front of %s: %w", s.path, err)
	}
	defer rows.Close()
	for rows.Next() {
		var id int
		if err := rows.Scan(&id); err != nil {
			return nil, fmt.Errorf("store: reading the front of %s: %w", s.path, err)
		}
		if e, ok := byID[id]; ok {
			r.Front = append(r.Front, e)
		}
	}
	return r, rows.Err()
}

// loadGoals reads the objectives' senses and the constraints' relations.
func (s *Store) loadGoals(ctx context.Context, r *mdo.Result) error {
	rows, err := s.conn.QueryContext(ctx, `SELECT role, name, unit, relation, kind, lower, upper, tolerance, scale FROM variables WHERE role IN ('objective', 'constraint') ORDER BY role DESC, position`)
	if err != nil {
		return fmt.Errorf("store: reading the variables of %s: %w", s.path, err)
	}
	defer rows.Close()
	for rows.Next() {
		var role, name, unit string
		var rel, kind sql.NullString
		var lo, hi, tol, scale sql.NullFloat64
		if err := rows.Scan(&role, &name, &unit, &rel, &kind, &lo, &hi, &tol, &scale); err != nil {
			return fmt.Errorf("store: reading the variables of %s: %w", s.path, err)
		}
		if role == "objective" {
			r.Objectives = append(r.Objectives, mdo.Objective{Name: name, Maximize: rel.String == "maximise", Unit: unit})
			continue
		}
		c := mdo.Constraint{Name: name, Lower: math.NaN(), Upper: math.NaN(), Tolerance: tol.Float64, Scale: scale.Float64, Unit: unit}
		for _, k := range []mdo.ConstraintKind{mdo.LessEqual, mdo.GreaterEqual, mdo.Equal, mdo.InBand} {
			if kind.Valid && kind.String == k.String() {
				c.Kind = k
				c.Lower, c.Upper = lo.Float64, hi.Float64
			}
		}
		r.Constraints = append(r.Constraints, c)
	}
	return rows.Err()
}
