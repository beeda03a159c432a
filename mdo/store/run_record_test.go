package store

import (
	"bytes"
	"compress/gzip"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"couplet/mdo"
	"couplet/mdo/runfolder"
)

// oldStoreFile is a case store written before the run record's tables
// (the golden store of that code, gzipped): the golden run without its
// record.
const oldStoreFile = "testdata/store_before_run_record.db.gz"

// gunzipTo writes the gzipped file src, uncompressed, to a new file in
// a fresh folder and returns its path.
func gunzipTo(t *testing.T, src string) string {
	t.Helper()
	f, err := os.Open(src)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	zr, err := gzip.NewReader(f)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if _, err := b.ReadFrom(zr); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), "results.db")
	if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// sameRecord compares two run records, NaN equal to NaN.
func sameRecord(a, b RunRecord) bool {
	norm := func(r RunRecord) RunRecord {
		r.CouplingSolvers = append([]CouplingSolver(nil), r.CouplingSolvers...)
		for i := range r.CouplingSolvers {
			c := &r.CouplingSolvers[i]
			if math.IsNaN(float64(c.Tolerance)) {
				c.Tolerance = -1
			}
			if math.IsNaN(float64(c.Relaxation)) {
				c.Relaxation = -1
			}
		}
		if r.Sensitivity != nil {
			sens := *r.Sensitivity
			sens.Limits = append([]mdo.LimitCost(nil), sens.Limits...)
			for i := range sens.Limits {
				if math.IsNaN(sens.Limits[i].PerUnit) {
					sens.Limits[i].PerUnit = -1
				}
			}
			r.Sensitivity = &sens
		}
		r.Constraints = append([]mdo.Constraint(nil), r.Constraints...)
		for i := range r.Constraints {
			c := &r.Constraints[i]
			for _, x := range []*float64{&c.Lower, &c.Upper} {
				if math.IsNaN(*x) || math.IsInf(*x, 0) {
					*x = -1
				}
			}
		}
		return r
	}
	return reflect.DeepEqual(norm(a), norm(b))
}

// The golden store's run record reads back as written: the caution,
// the goals, the coupling solvers (a NaN tolerance as NaN), and End's
// stop detail and notes, in StoredRecord and in the rebuilt Result.
func TestRunRecordReadsBack(t *testing.T) {
	path := filepath.Join(t.TempDir(), "results.db")
	writeGoldenRun(t, path)
	s, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	got, err := s.StoredRecord()
	if err != nil {
		t.Fatal(err)
	}
	want := goldenRecord(goldenRun())
	want.StopDetail = "the budget of 75 evaluations was spent before the simplex converged"
	want.Notes = []string{"fixed parameters from the calibration of 2 January", "a note with \"quotes\", a tab\tand ünïcode"}
	want.Sensitivity = goldenSensitivity()
	want.Surrogates = []mdo.SurrogateUse{{Discipline: "aero-fit", Model: "quadratic response surface of 40 samples", Outputs: []string{"out.v3", "out.v4"}, Affects: []string{"mass.takeoff", "perf.c2"}}}
	// the constraints read back carry their units (none here), as End wrote them
	if !sameRecord(got, want) {
		t.Errorf("read back\n%+v\nwant\n%+v", got, want)
	}
	r, err := s.Result()
	if err != nil {
		t.Fatal(err)
	}
	if r.StopDetail != want.StopDetail || !reflect.DeepEqual(r.Notes, want.Notes) || !reflect.DeepEqual(r.Surrogates, want.Surrogates) ||
		!sameRecord(RunRecord{Sensitivity: r.Sensitivity}, RunRecord{Sensitivity: want.Sensitivity}) {
		t.Errorf("the rebuilt result: stop detail %q, notes %q, surrogates %+v; want %q, %q, %+v", r.StopDetail, r.Notes, r.Surrogates, want.StopDetail, want.Notes, want.Surrogates)
	}
}

// SetRunRecord refuses a goal the run does not have, naming it, and a
// call before Begin.
func TestSetRunRecordRefusals(t *testing.T) {
	s, err := Create(filepath.Join(t.TempDir(), "results.db"), Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := s.SetRunRecord(RunRecord{}); err == nil || !strings.Contains(err.Error(), "before Begin") {
		t.Errorf("before Begin: %v", err)
	}
	info := syntheticRun()
	if err := s.Begin(info); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		rec  RunRecord
		want string
	}{
		{RunRecord{Objectives: []mdo.Objective{mdo.Minimize("mass.landing")}}, `objective "mass.landing"`},
		{RunRecord{Constraints: []mdo.Constraint{mdo.AtMost("perf.c9", 1)}}, `constraint "perf.c9"`},
	} {
		if err := s.SetRunRecord(tc.rec); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("SetRunRecord(%+v) = %v, want an error naming %s", tc.rec, err, tc.want)
		}
	}
	if err := s.SetRunRecord(RunRecord{Caution: "c"}); err != nil {
		t.Errorf("a valid record after the refusals: %v", err)
	}
}

// A store written before the run record reads: its record is empty but
// for the goals the variables table holds, and its Result is the one
// it gave before. Picked up, it gets the record's tables and views, and
// the record written then reads back.
func TestStoreWithoutRunRecord(t *testing.T) {
	path := gunzipTo(t, oldStoreFile)
	s, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	rec, err := s.StoredRecord()
	if err != nil {
		t.Fatal(err)
	}
	if rec.Caution != "" || rec.StopDetail != "" || rec.CouplingSolvers != nil || len(rec.Constraints) != jetShape.cons || rec.Constraints[1].String() != "perf.c1 >= -1" {
		t.Errorf("the old store's record: %+v; want its goals alone", rec)
	}
	r, err := s.Result()
	if err != nil {
		t.Fatal(err)
	}
	if r.Evaluations != goldenRows || r.Best == nil || r.Best.ID != 2 || r.Stop != mdo.StopBudget {
		t.Errorf("the old store's result: %d evaluations, best %v, stop %v", r.Evaluations, r.Best, r.Stop)
	}
	s.Close()
	if _, rows := queryAll(t, path, "SELECT count(*) FROM sqlite_schema WHERE name IN ('run_record', 'run_summary')"); rows[0][0].(float64) != 0 {
		t.Fatal("opening the old store for reading changed its schema")
	}

	p, err := PickUp(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer p.Close()
	info := goldenRun()
	info.Script = "// bench"
	if err := p.Begin(info); err != nil {
		t.Fatal(err)
	}
	want := goldenRecord(info)
	if err := p.SetRunRecord(want); err != nil {
		t.Fatal(err)
	}
	if err := p.End(&mdo.Result{Stop: mdo.StopConverged, StopDetail: "picked up and converged"}); err != nil {
		t.Fatal(err)
	}
	got, err := p.StoredRecord()
	if err != nil {
		t.Fatal(err)
	}
	want.StopDetail = "picked up and converged"
	if !sameRecord(got, want) {
		t.Errorf("picked up, the record reads back\n%+v\nwant\n%+v", got, want)
	}
	if _, rows := queryAll(t, path, "SELECT stop, stop_detail, evaluations FROM run_summary"); rows[0][0] != "converged" || rows[0][1] != "picked up and converged" {
		t.Errorf("run_summary of the picked-up old store: %v", rows)
	}
}

// A run picked up keeps its record (the caution, the goals, the
// coupling solvers) when the session that picks it up sets none, and
// until that session ends it is a run that has not ended: a session
// killed before End leaves no outcome of an earlier session (its stop,
// stop detail, counters and best point) beside rows that outcome does
// not count (nor its best point's sensitivity). Before, the first
// session's outcome stayed: the rebuilt result said 40 evaluations,
// stopped "cancelled", of a store holding 70.
func TestPickedUpRunKeepsItsRecord(t *testing.T) {
	path := filepath.Join(t.TempDir(), "results.db")
	info := syntheticRunOf(sellarShape)
	s, err := Create(path, Options{FlushInterval: time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Begin(info); err != nil {
		t.Fatal(err)
	}
	want := RunRecord{Caution: "conceptual estimates", Objectives: []mdo.Objective{mdo.Maximize("mass.takeoff")},
		Constraints:     []mdo.Constraint{mdo.AtMost("perf.c0", 0), mdo.Between("perf.c1", -1, 2)},
		CouplingSolvers: []CouplingSolver{{Disciplines: []string{"a", "b"}, Method: "gauss-seidel", Tolerance: 1e-6, MaxIterations: 30, Relaxation: 1, Fallback: true}}}
	if err := s.SetRunRecord(want); err != nil {
		t.Fatal(err)
	}
	var evs []*mdo.Evaluation
	record := func(s *Store, from, to int) {
		for i := from; i < to; i++ {
			e := new(mdo.Evaluation)
			syntheticEvalOf(e, i+1, sellarShape)
			evs = append(evs, e)
			if err := s.Record(e); err != nil {
				t.Fatal(err)
			}
		}
	}
	record(s, 0, 40)
	first := &mdo.Result{Stop: mdo.StopCancelled, StopDetail: "the run was cancelled", Best: evs[3],
		EvalCounters: mdo.EvalCounters{Evaluations: 40, Analyses: 40},
		Sensitivity:  &mdo.Sensitivity{Objective: "mass.takeoff", Unit: "kg", Limits: []mdo.LimitCost{{Constraint: "perf.c0", Bound: "upper", Active: true, PerUnit: -3}}}}
	if err := s.End(first); err != nil {
		t.Fatal(err)
	}
	s.Close()

	p, err := PickUp(path, Options{FlushInterval: time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	if err := p.Begin(info); err != nil {
		t.Fatal(err)
	}
	record(p, 40, 70)
	p.Close() // killed before End: what it recorded is committed

	back, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer back.Close()
	got, err := back.StoredRecord()
	if err != nil {
		t.Fatal(err)
	}
	if !sameRecord(got, want) {
		t.Errorf("the picked-up run's record\n%+v\nwant\n%+v", got, want)
	}
	r, err := back.Result()
	if err != nil {
		t.Fatal(err)
	}
	if r.Stop != mdo.NotStopped || r.StopDetail != "" || r.Evaluations != 70 || !r.Objectives[0].Maximize || r.Sensitivity != nil {
		t.Errorf("the rebuilt result: stop %q (%q), %d evaluations, objective %+v, sensitivity %v; want a run not ended, of 70 evaluations, maximised, without the first session's sensitivity",
			r.Stop, r.StopDetail, r.Evaluations, r.Objectives[0], r.Sensitivity)
	}
	if _, rows := queryAll(t, path, "SELECT stop, stop_detail, evaluations, best_id FROM run_summary"); rows[0][0] != nil || rows[0][1] != nil || rows[0][2] != nil || rows[0][3] != nil {
		t.Errorf("run_summary of the killed session: %v, want no outcome", rows[0])
	}
}

// SetOutcome records what an optimiser adds to its result after End
// (the best point's sensitivity) in the file itself, before Close, and
// is refused before End.
func TestSetOutcome(t *testing.T) {
	path := filepath.Join(t.TempDir(), "results.db")
	s, err := Create(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := s.Begin(syntheticRunOf(sellarShape)); err != nil {
		t.Fatal(err)
	}
	r := &mdo.Result{Stop: mdo.StopConverged, StopDetail: "converged"}
	if err := s.SetOutcome(r); err == nil || !strings.Contains(err.Error(), "before End") {
		t.Errorf("SetOutcome before End: %v", err)
	}
	if err := s.End(r); err != nil {
		t.Fatal(err)
	}
	r.Sensitivity = &mdo.Sensitivity{Objective: "mass.takeoff", Unit: "kg", Limits: []mdo.LimitCost{{Constraint: "perf.c1", Bound: "lower", Limit: 2, Active: true, PerUnit: 0.5}}}
	if err := s.SetOutcome(r); err != nil {
		t.Fatal(err)
	}
	// the file alone, before Close
	alone := filepath.Join(t.TempDir(), "alone.db")
	if err := runfolder.LinkFileWith(path, alone, runfolder.LinkOptions{NoHardLink: true}); err != nil {
		t.Fatal(err)
	}
	rec := storedRecord(t, alone)
	if !reflect.DeepEqual(rec.Sensitivity, r.Sensitivity) || rec.StopDetail != "converged" {
		t.Errorf("read back: sensitivity %+v, stop detail %q; want %+v, %q", rec.Sensitivity, rec.StopDetail, r.Sensitivity, "converged")
	}
}
