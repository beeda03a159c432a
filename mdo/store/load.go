package store

import (
	"context"
	"database/sql"
	"fmt"
	"math"
	"strings"
	"time"

	"couplet/mdo"
)

// Evaluations returns every recorded evaluation in ID order, ready for
// mdo.Evaluator.PickUp. A store in which no run has begun has none.
func (s *Store) Evaluations() ([]*mdo.Evaluation, error) {
	var out []*mdo.Evaluation
	err := s.Scan(func(e *mdo.Evaluation) error {
		out = append(out, e)
		return nil
	})
	return out, err
}

// Scan calls fn with each recorded evaluation in ID order, streaming from
// the file (for exports of large runs). fn may keep the evaluation.
func (s *Store) Scan(fn func(*mdo.Evaluation) error) error {
	if s.db == nil {
		return fmt.Errorf("store: %s is closed", s.path)
	}
	if s.lay == nil {
		return nil
	}
	if !s.readOnly && s.began {
		if err := s.flush(); err != nil {
			return err
		}
	}
	l := s.lay
	if l.columns {
		return s.scanColumns(fn)
	}
	rows, err := s.conn.QueryContext(context.Background(),
		"SELECT id, feasible, converged, violation, error, iterations, discipline_calls, wall_seconds, numbers, outputs, vectors, "+s.failureCol()+" FROM evaluation_data ORDER BY id")
	if err != nil {
		return fmt.Errorf("store: reading the evaluations of %s: %w", s.path, err)
	}
	defer rows.Close()
	nd, no, nc := len(l.design), len(l.objectives), len(l.constraints)
	var (
		id, iters, calls    int64
		feasible, converged bool
		viol                sql.NullFloat64
		errText, failure    string
		wall                float64
		numbers, outputs    string
		vectors             []byte
	)
	for rows.Next() {
		if err := rows.Scan(&id, &feasible, &converged, &viol, &errText, &iters, &calls, &wall, &numbers, &outputs, &vectors, &failure); err != nil {
			return fmt.Errorf("store: reading the evaluations of %s: %w", s.path, err)
		}
		e := &mdo.Evaluation{
			ID: int(id), Feasible: feasible, Converged: converged, Violation: nullNaN(viol), Err: errText,
			CouplingIterations: int(iters), DisciplineCalls: int(calls), Wall: time.Duration(math.Round(wall * 1e9)),
		}
		if e.Failure, err = mdo.ParseFailureClass(failure); err != nil {
			return fmt.Errorf("store: %s: evaluation %d: %v: %w", s.path, id, err, ErrDamaged)
		}
		if err := readVectors(e, vectors, nd, no, nc); err != nil {
			return fmt.Errorf("store: %s: evaluation %d: %v: %w", s.path, id, err, ErrDamaged)
		}
		vals, err := parseNumbers("numbers", numbers, nd+no+2*nc)
		if err != nil {
			return fmt.Errorf("store: %s: evaluation %d: %v: %w", s.path, id, err, ErrDamaged)
		}
		e.Design, vals = vals[:nd:nd], vals[nd:]
		e.Objectives, vals = vals[:no:no], vals[no:]
		e.Constraints, vals = vals[:nc:nc], vals[nc:]
		e.Margins = vals[:nc:nc]
		if e.Outputs, err = parseOutputs(outputs, len(l.outputs), converged); err != nil {
			return fmt.Errorf("store: %s: evaluation %d: %v: %w", s.path, id, err, ErrDamaged)
		}
		if err := fn(e); err != nil {
			return err
		}
	}
	if err := rows.Err(); err != nil {
		return fmt.Errorf("store: reading the evaluations of %s: %w", s.path, err)
	}
	return nil
}

// scanColumns is Scan in the REAL column layout.
func (s *Store) scanColumns(fn func(*mdo.Evaluation) error) error {
	l := s.lay
	rows, err := s.conn.QueryContext(context.Background(), l.columnsSelect(s.failureCol()))
	if err != nil {
		return fmt.Errorf("store: reading the evaluations of %s: %w", s.path, err)
	}
	defer rows.Close()
	nd, no, nc := len(l.design), len(l.objectives), len(l.constraints)
	var (
		id, iters, calls    int64
		feasible, converged bool
		viol                sql.NullFloat64
		errText, failure    string
		wall                float64
		vectors             []byte
	)
	vals := make([]sql.NullFloat64, len(l.named())+len(l.outCols))
	dst := []any{&id, &feasible, &converged, &viol, &errText, &iters, &calls, &wall, &vectors, &failure}
	for k := range vals {
		dst = append(dst, &vals[k])
	}
	for rows.Next() {
		if err := rows.Scan(dst...); err != nil {
			return fmt.Errorf("store: reading the evaluations of %s: %w", s.path, err)
		}
		e := &mdo.Evaluation{
			ID: int(id), Feasible: feasible, Converged: converged, Violation: nullNaN(viol), Err: errText,
			CouplingIterations: int(iters), DisciplineCalls: int(calls), Wall: time.Duration(math.Round(wall * 1e9)),
		}
		if e.Failure, err = mdo.ParseFailureClass(failure); err != nil {
			return fmt.Errorf("store: %s: evaluation %d: %v: %w", s.path, id, err, ErrDamaged)
		}
		if err := readVectors(e, vectors, nd, no, nc); err != nil {
			return fmt.Errorf("store: %s: evaluation %d: %v: %w", s.path, id, err, ErrDamaged)
		}
		l.columnValues(e, vals)
		if err := fn(e); err != nil {
			return err
		}
	}
	if err := rows.Err(); err != nil {
		return fmt.Errorf("store: reading the evaluations of %s: %w", s.path, err)
	}
	return nil
}

// readVectors decodes the vectors blob into e.X, e.F and e.G.
func readVectors(e *mdo.Evaluation, vectors []byte, nd, no, nc int) error {
	off := 0
	var err error
	for _, dst := range []struct {
		p *[]float64
		n int
	}{{&e.X, nd}, {&e.F, no}, {&e.G, nc}} {
		if *dst.p, off, err = readFloats(vectors, off, dst.n); err != nil {
			return err
		}
	}
	return nil
}

// parseOutputs reads the outputs column of n values. A failed analysis
// records none (the empty array, which the views show as NULL); a store
// written before that rule kept the failed point's defaults, which are
// dropped here so that they never read as computed.
func parseOutputs(s string, n int, converged bool) ([]float64, error) {
	if strings.TrimSpace(s) == "[]" && !converged {
		return nil, nil
	}
	out, err := parseNumbers("outputs", s, n)
	if err != nil || !converged {
		return nil, err
	}
	return out, nil
}

// nullNaN maps SQL NULL to NaN.
func nullNaN(f sql.NullFloat64) float64 {
	if !f.Valid {
		return math.NaN()
	}
	return f.Float64
}

// Columns describes what each evaluation of the stored run holds.
type Columns struct {
	Design      []mdo.DesignSpec
	Objectives  []string
	Constraints []string
	Outputs     []mdo.Var
}

// Columns returns the stored run's design variables, objectives,
// constraints and outputs (empty before Begin).
func (s *Store) Columns() Columns {
	if s.lay == nil {
		return Columns{}
	}
	return Columns{Design: s.lay.design, Objectives: s.lay.objectives, Constraints: s.lay.constraints, Outputs: s.lay.outputs}
}

// Iterations returns the recorded optimiser iterations in order.
func (s *Store) Iterations() ([]mdo.Progress, error) {
	if s.db == nil {
		return nil, fmt.Errorf("store: %s is closed", s.path)
	}
	if !s.readOnly && s.began {
		if err := s.flush(); err != nil {
			return nil, err
		}
	}
	rows, err := s.conn.QueryContext(context.Background(), `SELECT optimizer, iteration, evaluations, best, feasible, violation FROM iterations ORDER BY n`)
	if err != nil {
		return nil, fmt.Errorf("store: reading the iterations of %s: %w", s.path, err)
	}
	defer rows.Close()
	var out []mdo.Progress
	for rows.Next() {
		var p mdo.Progress
		var best, viol sql.NullFloat64
		if err := rows.Scan(&p.Optimizer, &p.Iteration, &p.Evaluations, &best, &p.Feasible, &viol); err != nil {
			return nil, fmt.Errorf("store: reading the iterations of %s: %w", s.path, err)
		}
		p.Best, p.Violation = nullNaN(best), nullNaN(viol)
		out = append(out, p)
	}
	return out, rows.Err()
}
