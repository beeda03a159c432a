package store

import (
	"context"
	"database/sql"
	"errors"
	"path/filepath"
	"testing"

	"couplet/mdo"
)

// failingEvaluator evaluates q = 2p, whose discipline refuses p > 5.
func failingEvaluator(t *testing.T, rec mdo.Recorder) *mdo.Evaluator {
	t.Helper()
	p := mdo.Var{Name: "p", Default: 1, Min: 0, Max: 10}
	q := mdo.Var{Name: "q", Default: 1, Min: -100, Max: 100}
	sys, err := mdo.NewSystem(mdo.FuncVars("doubler", []mdo.Var{p}, []mdo.Var{q}, func(in, out []float64) error {
		if in[0] > 5 {
			return errors.New("p above 5 refused")
		}
		out[0] = 2 * in[0]
		return nil
	}))
	if err != nil {
		t.Fatal(err)
	}
	st := &mdo.Study{Name: "failing", System: sys, Design: []mdo.DesignVar{mdo.Continuous("p", 0, 10)},
		Objectives: []mdo.Objective{mdo.Minimize("q")}, Workers: 1, Recorder: rec, Script: sellarScript}
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	return ev
}

// recordFailing records a converged and a failed point into a new store.
func recordFailing(t *testing.T, path string) {
	recordFailingWith(t, path, Options{ToolVersion: "test-1"})
}

// recordFailingWith is recordFailing with the store's options.
func recordFailingWith(t *testing.T, path string, opt Options) {
	t.Helper()
	s, err := Create(path, opt)
	if err != nil {
		t.Fatal(err)
	}
	ev := failingEvaluator(t, s)
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Evaluate(context.Background(), [][]float64{{0.2}, {0.8}}); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Finish(mdo.StopBudget); err != nil {
		t.Fatal(err)
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
}

// failures reads the failure classes of a store's evaluations.
func failures(t *testing.T, s *Store) []mdo.FailureClass {
	t.Helper()
	evs, err := s.Evaluations()
	if err != nil {
		t.Fatal(err)
	}
	var out []mdo.FailureClass
	for _, e := range evs {
		out = append(out, e.Failure)
	}
	return out
}

func TestFailureClassRecorded(t *testing.T) {
	path := filepath.Join(t.TempDir(), "results.db")
	recordFailing(t, path)
	r, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	if got := failures(t, r); len(got) != 2 || got[0] != mdo.NotFailed || got[1] != mdo.DisciplineFailed {
		t.Errorf("failure classes %v, want [none discipline-failed]", got)
	}
	r.Close()
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var f string
	if err := db.QueryRow("SELECT failure FROM evaluations WHERE id = 1").Scan(&f); err != nil || f != "discipline-failed" {
		t.Errorf("the view's failure column reads %q (%v), want discipline-failed", f, err)
	}
}

func TestStoreWithoutFailureColumn(t *testing.T) {
	// A store written before the failure column existed: drop it (and the
	// views that name it) from a fresh store.
	path := filepath.Join(t.TempDir(), "results.db")
	recordFailing(t, path)
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range []string{"DROP VIEW evaluations", "DROP VIEW outputs", "ALTER TABLE evaluation_data DROP COLUMN failure"} {
		if _, err := db.Exec(q); err != nil {
			t.Fatal(q, err)
		}
	}
	db.Close()

	r, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	if got := failures(t, r); len(got) != 2 || got[1] != mdo.NotFailed {
		t.Errorf("an old store reads failure classes %v, want none", got)
	}
	r.Close()

	// picking up its run adds the column; new rows carry their class
	s, err := PickUp(path, Options{ToolVersion: "test-1"})
	if err != nil {
		t.Fatal(err)
	}
	ev := failingEvaluator(t, s)
	prev, err := s.Evaluations()
	if err != nil {
		t.Fatal(err)
	}
	ev.PickUp(prev)
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Evaluate(context.Background(), [][]float64{{0.2}, {0.8}, {0.9}}); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Finish(mdo.StopBudget); err != nil {
		t.Fatal(err)
	}
	if got := failures(t, s); len(got) != 3 || got[2] != mdo.DisciplineFailed {
		t.Errorf("after a pick-up, failure classes %v, want [none none discipline-failed]", got)
	}
	s.Close()
}
