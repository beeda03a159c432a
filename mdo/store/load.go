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
// mdo.Evaluator.PickUp. A store in which no run has begun has none. A
// store that keeps its evaluations (Options.KeepEvaluations) answers
// from memory with the same evaluations on every call: do not modify
// them.
func (s *Store) Evaluations() ([]*mdo.Evaluation, error) {
	if s.db != nil && !s.readOnly && s.began {
		if err := s.flush(); err != nil {
			return nil, err
		}
	}
	if evs, ok := s.keptEvaluations(); ok {
		return evs, nil
	}
	var out []*mdo.Evaluation
	err := s.Scan(func(e *mdo.Evaluation) error {
		out = append(out, e)
		return nil
	})
	if err == nil && s.kept == nil {
		// the whole file, before the run is picked up
		s.keepReadBack(out)
	}
	return out, err
}

// Scan calls fn with each recorded evaluation in ID order, streaming from
// the file (for exports of large runs), or from memory when the store
// keeps its evaluations (see Evaluations). fn may keep the evaluation.
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
	if evs, ok := s.keptEvaluations(); ok {
		for _, e := range evs {
			if err := fn(e); err != nil {
				return err
			}
		}
		return nil
	}
	l := s.lay
	var h rowHead
	dst := h.targets()
	var numbers, outputs string
	var vals []sql.NullFloat64
	q := "SELECT id, feasible, converged, violation, error, iterations, discipline_calls, wall_seconds, vectors, " + s.failureCol() + ", numbers, outputs FROM evaluation_data ORDER BY id"
	if l.columns {
		q = l.columnsSelect(s.failureCol())
		vals = make([]sql.NullFloat64, len(l.named())+len(l.outCols))
		for k := range vals {
			dst = append(dst, &vals[k])
		}
	} else {
		dst = append(dst, &numbers, &outputs)
	}
	rows, err := s.conn.QueryContext(context.Background(), q)
	if err != nil {
		return fmt.Errorf("store: reading the evaluations of %s: %w", s.path, err)
	}
	defer rows.Close()
	for rows.Next() {
		if err := rows.Scan(dst...); err != nil {
			return fmt.Errorf("store: reading the evaluations of %s: %w", s.path, err)
		}
		e, err := h.evaluation(l)
		if err == nil {
			if l.columns {
				l.columnValues(e, vals)
			} else {
				err = l.jsonValues(e, numbers, outputs)
			}
		}
		if err != nil {
			return fmt.Errorf("store: %s: evaluation %d: %v: %w", s.path, h.id, err, ErrDamaged)
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

// rowHead holds the columns of evaluation_data that both layouts have.
type rowHead struct {
	id, iters, calls    int64
	feasible, converged bool
	viol                sql.NullFloat64
	errText, failure    string
	wall                float64
	vectors             []byte
}

// targets returns the Scan destinations of the head, in the order of
// the SELECTs of Scan.
func (h *rowHead) targets() []any {
	return []any{&h.id, &h.feasible, &h.converged, &h.viol, &h.errText, &h.iters, &h.calls, &h.wall, &h.vectors, &h.failure}
}

// evaluation builds the evaluation of the head, with its unit point,
// minimised objectives and scaled constraints from the vectors blob.
func (h *rowHead) evaluation(l *layout) (*mdo.Evaluation, error) {
	e := &mdo.Evaluation{
		ID: int(h.id), Feasible: h.feasible, Converged: h.converged, Violation: nullNaN(h.viol), Err: h.errText,
		CouplingIterations: int(h.iters), DisciplineCalls: int(h.calls), Wall: time.Duration(math.Round(h.wall * 1e9)),
	}
	var err error
	if e.Failure, err = mdo.ParseFailureClass(h.failure); err != nil {
		return nil, err
	}
	return e, readVectors(e, h.vectors, len(l.design), len(l.objectives), len(l.constraints))
}

// jsonValues reads the JSON text arrays numbers and outputs of the
// layout of schema versions 1 and 2 into e.
func (l *layout) jsonValues(e *mdo.Evaluation, numbers, outputs string) error {
	nd, no, nc := len(l.design), len(l.objectives), len(l.constraints)
	vals, err := parseNumbers("numbers", numbers, nd+no+2*nc)
	if err != nil {
		return err
	}
	e.Design, vals = vals[:nd:nd], vals[nd:]
	e.Objectives, vals = vals[:no:no], vals[no:]
	e.Constraints, vals = vals[:nc:nc], vals[nc:]
	e.Margins = vals[:nc:nc]
	e.Outputs, err = parseOutputs(outputs, len(l.outputs), e.Converged)
	return err
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

	units map[string]string // of objectives and constraints, as a CSV header says
}

// Columns returns the stored run's design variables, objectives,
// constraints and outputs (empty before Begin).
func (s *Store) Columns() Columns {
	if s.lay == nil {
		return Columns{}
	}
	return Columns{Design: s.lay.design, Objectives: s.lay.objectives, Constraints: s.lay.constraints, Outputs: s.lay.outputs, units: s.lay.units}
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
