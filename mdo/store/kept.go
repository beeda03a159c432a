package store

import (
	"math"
	"slices"
	"time"

	"couplet/mdo"
)

// The evaluations a store keeps in memory (Options.KeepEvaluations). A
// store created for a run keeps a reference to every evaluation its
// writer has committed, and a store picked up keeps those it read back
// to pick the run up; Scan and Evaluations then answer from memory, in
// the form a read of the file gives (storedForm), instead of reading
// the file back. The file stays the record: a store opened afterwards,
// and a store in the JSON text layout, read it.

// keptSet is the evaluations a store holds in memory, in stored form,
// in the order they reached the file: read back (picked up), then
// committed.
type keptSet struct {
	evs []*mdo.Evaluation
}

// keepCommitted adds the evaluations of a committed batch, in stored
// form; the writer's goroutine calls it before it counts them committed.
func (s *Store) keepCommitted(evs []*mdo.Evaluation) {
	if s.kept == nil {
		return
	}
	stored := make([]*mdo.Evaluation, len(evs))
	for i, e := range evs {
		stored[i] = storedForm(e, s.lay)
	}
	s.keptMu.Lock()
	s.kept.evs = append(s.kept.evs, stored...)
	s.keptMu.Unlock()
}

// keepReadBack starts the memory of a store picked up with the
// evaluations read back from its file (in stored form already).
func (s *Store) keepReadBack(evs []*mdo.Evaluation) {
	if !s.opt.KeepEvaluations || s.began || s.lay == nil || !s.lay.columns {
		return
	}
	s.keptMu.Lock()
	s.kept = &keptSet{evs: slices.Clone(evs)}
	s.keptMu.Unlock()
}

// keptEvaluations returns the kept evaluations as the file holds them:
// in ID order, one per ID (the last recorded, as INSERT OR REPLACE
// leaves it). ok is false when the store does not keep them.
func (s *Store) keptEvaluations() (out []*mdo.Evaluation, ok bool) {
	if s.kept == nil || s.readOnly {
		return nil, false
	}
	s.keptMu.Lock()
	evs := slices.Clone(s.kept.evs)
	s.keptMu.Unlock()
	// stable: of two with one ID, the later recorded stays last
	slices.SortStableFunc(evs, func(a, b *mdo.Evaluation) int { return a.ID - b.ID })
	out = evs[:0]
	for k, e := range evs {
		if k+1 < len(evs) && evs[k+1].ID == e.ID {
			continue
		}
		out = append(out, e)
	}
	return out, true
}

// storedForm returns what reading e back from a file in the REAL column
// layout gives: a copy of the fields the file keeps (not Path nor
// PickedUp), −0 as 0 in the REAL columns, the wall time in whole
// nanoseconds from its seconds, the failure class only of a failed
// analysis, no outputs for a failed analysis and NaN for the outputs of
// one that recorded none. The value slices are shared with e unless a
// value changes.
func storedForm(e *mdo.Evaluation, l *layout) *mdo.Evaluation {
	c := &mdo.Evaluation{
		ID: e.ID, X: e.X, F: e.F, G: e.G,
		Design: realColumn(e.Design), Objectives: realColumn(e.Objectives),
		Constraints: realColumn(e.Constraints), Margins: realColumn(e.Margins),
		Violation: realValue(e.Violation), Feasible: e.Feasible, Converged: e.Converged, Err: e.Err,
		Failure:            mdo.ClassOf(e),
		CouplingIterations: e.CouplingIterations, DisciplineCalls: e.DisciplineCalls,
		Wall: time.Duration(math.Round(e.Wall.Seconds() * 1e9)),
	}
	if e.Converged && len(l.outputs) > 0 {
		if len(e.Outputs) == 0 {
			c.Outputs = make([]float64, len(l.outputs))
			for k := range c.Outputs {
				c.Outputs[k] = math.NaN()
			}
		} else {
			c.Outputs = realColumn(e.Outputs)
		}
	}
	return c
}

// realValue is x as a REAL column gives it back: NaN as NULL, read as
// NaN, and −0 as 0.
func realValue(x float64) float64 {
	switch {
	case math.IsNaN(x):
		return math.NaN()
	case x == 0:
		return 0
	}
	return x
}

// realColumn returns xs as REAL columns give them back (realValue): xs
// itself when nothing changes, else a copy.
func realColumn(xs []float64) []float64 {
	for k, x := range xs {
		if math.Float64bits(realValue(x)) != math.Float64bits(x) {
			out := slices.Clone(xs)
			for j := k; j < len(out); j++ {
				out[j] = realValue(out[j])
			}
			return out
		}
	}
	return xs
}
