package store

import (
	"bytes"
	"math"
	"path/filepath"
	"testing"
	"time"

	"couplet/mdo"
)

// awkwardEvaluations are evaluations of the aircraft-shaped run whose
// values a file changes as it keeps them: −0, NaN and ±Inf values, a
// failed analysis that still carries outputs and a failure class, a
// converged one without outputs, a converged one with a failure class,
// solver paths and picked-up flags (not kept), a wall time that is no
// whole number of seconds, and an ID recorded twice.
func awkwardEvaluations() []*mdo.Evaluation {
	var evs []*mdo.Evaluation
	for i := range 12 {
		e := &mdo.Evaluation{}
		syntheticEval(e, i)
		e.Path = "gauss-seidel"
		e.Wall = time.Duration(1234567+i*7919) * time.Nanosecond
		evs = append(evs, e)
	}
	negZero := math.Copysign(0, -1)
	evs[1].Design[2], evs[1].Margins[0], evs[1].Outputs[3], evs[1].X[1] = negZero, negZero, negZero, negZero
	evs[1].Violation = negZero
	evs[2].Outputs[0], evs[2].Outputs[1], evs[2].Constraints[1] = math.NaN(), math.Inf(1), math.Inf(-1)
	evs[2].Objectives[0] = math.Float64frombits(0x7ff8000000000123) // a NaN of another payload
	evs[3].Converged, evs[3].Feasible, evs[3].Err = false, false, "does not close"
	evs[3].Failure, evs[3].Violation = mdo.DoesNotClose, math.Inf(1)
	evs[4].Outputs = nil
	evs[5].Failure = mdo.SolverFailed // converged: the file keeps no class
	evs[6].PickedUp = true
	evs[7].Wall = 0
	// evaluation 9 again, as a diverged picked-up run re-uses a number
	again := &mdo.Evaluation{}
	syntheticEval(again, 30)
	again.ID = 9
	evs = append(evs, again)
	return evs
}

// sameAsFile checks that the evaluations a store answers from memory are
// those a fresh reader of its file gives, field for field, and that
// both export the same CSV.
func sameAsFile(t *testing.T, s *Store) {
	t.Helper()
	if s.kept == nil {
		t.Fatal("the store keeps no evaluations in memory")
	}
	mem, err := s.Evaluations()
	if err != nil {
		t.Fatal(err)
	}
	r, err := Open(s.Path())
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	file, err := r.Evaluations()
	if err != nil {
		t.Fatal(err)
	}
	if len(mem) != len(file) {
		t.Fatalf("memory gives %d evaluations, the file %d", len(mem), len(file))
	}
	for i := range mem {
		if f := sameEvaluation(mem[i], file[i]); f != "" {
			t.Errorf("evaluation %d (ID %d): memory and file differ in %s", i, file[i].ID, f)
		}
		if mem[i].Failure != file[i].Failure || mem[i].Path != file[i].Path || mem[i].PickedUp != file[i].PickedUp {
			t.Errorf("evaluation %d (ID %d): memory has failure %v, path %q, picked up %v; the file %v, %q, %v", i, file[i].ID,
				mem[i].Failure, mem[i].Path, mem[i].PickedUp, file[i].Failure, file[i].Path, file[i].PickedUp)
		}
	}
	for _, all := range []bool{false, true} {
		var a, b bytes.Buffer
		if err := s.WriteCSVOf(&a, mem, CSVOptions{AllOutputs: all}); err != nil {
			t.Fatal(err)
		}
		if err := r.WriteCSV(&b, CSVOptions{AllOutputs: all}); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(a.Bytes(), b.Bytes()) {
			t.Errorf("CSV (all outputs %v) from memory differs from the file's", all)
		}
	}
}

func TestKeptEvaluationsAreTheFiles(t *testing.T) {
	path := filepath.Join(t.TempDir(), "kept.db")
	s, err := Create(path, Options{KeepEvaluations: true, BatchSize: 5})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := s.Begin(syntheticRun()); err != nil {
		t.Fatal(err)
	}
	evs := awkwardEvaluations()
	for _, e := range evs[:7] {
		if err := s.Record(e); err != nil {
			t.Fatal(err)
		}
	}
	sameAsFile(t, s) // mid-run: what is queued is committed first
	for _, e := range evs[7:] {
		if err := s.Record(e); err != nil {
			t.Fatal(err)
		}
	}
	if err := s.End(nil); err != nil {
		t.Fatal(err)
	}
	sameAsFile(t, s)
	if n := len(s.kept.evs); n != len(evs) {
		t.Errorf("the store keeps %d evaluations, %d were recorded", n, len(evs))
	}
	// the recorded evaluations are left as they were
	if evs[1].Path != "gauss-seidel" || !math.Signbit(evs[1].Design[2]) || evs[3].Outputs == nil {
		t.Error("reading the kept evaluations changed the recorded ones")
	}
}

func TestKeptEvaluationsOfAPickedUpRun(t *testing.T) {
	path := filepath.Join(t.TempDir(), "kept.db")
	evs := awkwardEvaluations()
	first, err := Create(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := first.Begin(syntheticRun()); err != nil {
		t.Fatal(err)
	}
	for _, e := range evs[:8] {
		if err := first.Record(e); err != nil {
			t.Fatal(err)
		}
	}
	if err := first.Close(); err != nil { // killed before End
		t.Fatal(err)
	}
	info := syntheticRun()
	s, err := PickUp(path, Options{KeepEvaluations: true})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	prev, err := s.PickedUp(info.Script, info.Seed)
	if err != nil {
		t.Fatal(err)
	}
	if len(prev) != 8 {
		t.Fatalf("picked up %d evaluations, 8 were committed", len(prev))
	}
	if err := s.Begin(info); err != nil {
		t.Fatal(err)
	}
	for _, e := range evs[8:] {
		if err := s.Record(e); err != nil {
			t.Fatal(err)
		}
	}
	if err := s.End(nil); err != nil {
		t.Fatal(err)
	}
	sameAsFile(t, s)
}

// A store that does not keep its evaluations, or keeps them in the JSON
// text layout, reads its file.
func TestEvaluationsKeptOnlyWhenAsked(t *testing.T) {
	for _, opt := range []Options{{}, {KeepEvaluations: true, jsonText: true}} {
		s, err := Create(filepath.Join(t.TempDir(), "file.db"), opt)
		if err != nil {
			t.Fatal(err)
		}
		if err := s.Begin(syntheticRun()); err != nil {
			t.Fatal(err)
		}
		var e mdo.Evaluation
		syntheticEval(&e, 0)
		if err := s.Record(&e); err != nil {
			t.Fatal(err)
		}
		evs, err := s.Evaluations()
		if err != nil {
			t.Fatal(err)
		}
		if s.kept != nil || len(evs) != 1 {
			t.Errorf("options %+v: kept %v, %d evaluations; want none kept and the file's one", opt, s.kept != nil, len(evs))
		}
		s.Close()
	}
}
