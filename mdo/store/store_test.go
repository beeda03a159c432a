package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"couplet/mdo"
)

// sellarScript stands for a study script; only its hash matters here.
const sellarScript = "// Sellar study\nstudy := mdo.SellarStudy(mdo.MDF)\n"

// sellarEvaluator returns an evaluator of the Sellar study recording to rec.
func sellarEvaluator(t testing.TB, rec mdo.Recorder, seed uint64, script string) *mdo.Evaluator {
	t.Helper()
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	st.Seed, st.Script, st.Recorder, st.Workers = seed, script, rec, 2
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	return ev
}

// sameFloat compares two floats bit for bit, treating every NaN as equal.
func sameFloat(a, b float64) bool {
	return a == b && math.Signbit(a) == math.Signbit(b) || math.IsNaN(a) && math.IsNaN(b)
}

// sameFloats compares two slices with sameFloat.
func sameFloats(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if !sameFloat(a[i], b[i]) {
			return false
		}
	}
	return true
}

// recordAndEnd records evs in a begun store, ends its run and returns
// the evaluations it holds.
func recordAndEnd(t *testing.T, s *Store, evs ...*mdo.Evaluation) []*mdo.Evaluation {
	t.Helper()
	for _, e := range evs {
		if err := s.Record(e); err != nil {
			t.Fatal(err)
		}
	}
	if err := s.End(nil); err != nil {
		t.Fatal(err)
	}
	got, err := s.Evaluations()
	if err != nil {
		t.Fatal(err)
	}
	return got
}

// sameEvaluation reports the first field in which a and b differ.
func sameEvaluation(a, b *mdo.Evaluation) string {
	switch {
	case a.ID != b.ID:
		return "ID"
	case !sameFloats(a.X, b.X):
		return "X"
	case !sameFloats(a.Design, b.Design):
		return "Design"
	case !sameFloats(a.Objectives, b.Objectives):
		return "Objectives"
	case !sameFloats(a.F, b.F):
		return "F"
	case !sameFloats(a.Constraints, b.Constraints):
		return "Constraints"
	case !sameFloats(a.Margins, b.Margins):
		return "Margins"
	case !sameFloats(a.G, b.G):
		return "G"
	case !sameFloat(a.Violation, b.Violation):
		return "Violation"
	case a.Feasible != b.Feasible:
		return "Feasible"
	case a.Converged != b.Converged:
		return "Converged"
	case a.Err != b.Err:
		return "Err"
	case a.Failure != b.Failure:
		return "Failure"
	case a.CouplingIterations != b.CouplingIterations:
		return "Iterations"
	case a.DisciplineCalls != b.DisciplineCalls:
		return "DisciplineCalls"
	case a.Wall != b.Wall:
		return "Wall"
	case !sameFloats(a.Outputs, b.Outputs):
		return "Outputs"
	}
	return ""
}

// grid returns n points spread over the unit cube (deterministic).
func grid(n, dim int) [][]float64 {
	out := make([][]float64, n)
	for i := range out {
		out[i] = make([]float64, dim)
		for k := range out[i] {
			out[i][k] = math.Mod(float64(i+1)*[]float64{0.618034, 0.414214, 0.732051}[k%3], 1)
		}
	}
	return out
}

func TestRecordAndReload(t *testing.T) {
	path := filepath.Join(t.TempDir(), "results.db")
	s, err := Create(path, Options{ToolVersion: "test-1", BatchSize: 7})
	if err != nil {
		t.Fatal(err)
	}
	ev := sellarEvaluator(t, s, 42, sellarScript)
	if err := ev.Begin("grid", map[string]string{"points": "40"}); err != nil {
		t.Fatal(err)
	}
	got, err := ev.Evaluate(context.Background(), grid(40, 3))
	if err != nil {
		t.Fatal(err)
	}
	ev.Iteration(1)
	res, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}

	r, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	meta, ok := r.Run()
	if !ok {
		t.Fatal("no run in the reopened store")
	}
	tests := []struct {
		what      string
		got, want any
	}{
		{"study", meta.Study, "sellar"},
		{"seed", meta.Seed, uint64(42)},
		{"script hash", meta.ScriptSHA256, ScriptHash(sellarScript)},
		{"tool version", meta.ToolVersion, "test-1"},
		{"optimizer", meta.Optimizer, "grid"},
		{"stop", meta.Stop, mdo.StopBudget},
		{"settings", meta.Settings["points"], "40"},
		{"rows", meta.Rows, 40},
		{"formulation", meta.Formulation, "MDF"},
	}
	for _, tc := range tests {
		if tc.got != tc.want {
			t.Errorf("%s = %v, want %v", tc.what, tc.got, tc.want)
		}
	}
	if meta.Ended.IsZero() {
		t.Error("run has no end time")
	}
	evs, err := r.Evaluations()
	if err != nil {
		t.Fatal(err)
	}
	if len(evs) != len(got) {
		t.Fatalf("reloaded %d evaluations, recorded %d", len(evs), len(got))
	}
	for i := range evs {
		if f := sameEvaluation(evs[i], got[i]); f != "" {
			t.Fatalf("evaluation %d differs in %s after reload", i, f)
		}
	}
	its, err := r.Iterations()
	if err != nil || len(its) != 1 || its[0].Optimizer != "grid" {
		t.Errorf("iterations = %v, %v; want one of optimizer grid", its, err)
	}
	if res.Best == nil {
		t.Fatal("no best")
	}
	// the store must be readable with plain SQL: best row by column name
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var bestID int
	var f float64
	if err := db.QueryRow(`SELECT best_id FROM run`).Scan(&bestID); err != nil {
		t.Fatal(err)
	}
	if err := db.QueryRow(`SELECT "objective:f" FROM evaluations WHERE id = ?`, bestID).Scan(&f); err != nil {
		t.Fatal(err)
	}
	if bestID != res.Best.ID || f != res.Best.Objectives[0] {
		t.Errorf("SQL best = #%d f=%g, result best #%d f=%g", bestID, f, res.Best.ID, res.Best.Objectives[0])
	}
	var y1 float64
	if err := db.QueryRow(`SELECT json_extract(outputs, '$."y1"') FROM evaluations WHERE id = ?`, bestID).Scan(&y1); err != nil {
		t.Fatal(err)
	}
	if want, _ := res.Lookup("y1"); y1 != want {
		t.Errorf("json_extract y1 = %g, want %g", y1, want)
	}
	// the long view of the outputs
	var y2 float64
	var n int
	if err := db.QueryRow(`SELECT value FROM outputs WHERE eval_id = (SELECT best_id FROM run) AND name = 'y2'`).Scan(&y2); err != nil {
		t.Fatal(err)
	}
	if want, _ := res.Lookup("y2"); y2 != want {
		t.Errorf("outputs view y2 = %g, want %g", y2, want)
	}
	if err := db.QueryRow(`SELECT count(*) FROM outputs`).Scan(&n); err != nil || n != 40*len(res.Outputs) {
		t.Errorf("outputs view has %d rows (%v), want %d", n, err, 40*len(res.Outputs))
	}
	var unit, rel string
	if err := db.QueryRow(`SELECT unit, relation FROM variables WHERE role = 'constraint' AND name = 'g1'`).Scan(&unit, &rel); err != nil {
		t.Fatal(err)
	}
	if rel != "g1 >= 3.16" {
		t.Errorf("relation of g1 = %q, want %q", rel, "g1 >= 3.16")
	}
}

func TestNonFiniteValuesSurvive(t *testing.T) {
	path := filepath.Join(t.TempDir(), "nf.db")
	s, err := Create(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	info := syntheticRun()
	if err := s.Begin(info); err != nil {
		t.Fatal(err)
	}
	var e mdo.Evaluation
	syntheticEval(&e, 0)
	// a failed analysis as mdo fills it in
	e.Converged, e.Feasible, e.Err, e.Violation = false, false, "group {a, b}: NOT CONVERGED", math.Inf(1)
	e.Objectives[0], e.F[0] = math.NaN(), math.Inf(1)
	for k := range e.G {
		e.G[k], e.Constraints[k], e.Margins[k] = math.Inf(1), math.NaN(), math.Inf(-1)
	}
	e.Outputs = nil // a failed analysis records no outputs
	// and a converged one whose outputs are not finite
	var c mdo.Evaluation
	syntheticEval(&c, 1)
	c.Outputs[3], c.Outputs[4], c.Outputs[5] = math.NaN(), math.Inf(1), math.Inf(-1)
	evs := recordAndEnd(t, s, &e, &c)
	s.Close()
	if len(evs) != 2 {
		t.Fatalf("%d evaluations, want 2", len(evs))
	}
	if f := sameEvaluation(evs[0], &e); f != "" {
		t.Errorf("failed evaluation differs in %s after reload", f)
	}
	if f := sameEvaluation(evs[1], &c); f != "" {
		t.Errorf("evaluation with non-finite outputs differs in %s after reload", f)
	}
	// in SQL, NaN is NULL and the infinities are ±Inf
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var objNull, marginNegInf, violPosInf, designOK bool
	var outNaN, outInf bool
	err = db.QueryRow(`SELECT "objective:mass.takeoff" IS NULL, "margin:perf.c0" = -9e999, violation = 9e999, "design:wing.x2" = ?,
		(SELECT value IS NULL FROM outputs WHERE eval_id = 1 AND name = 'out.v3'), (SELECT value = 9e999 FROM outputs WHERE eval_id = 1 AND name = 'out.v4') FROM evaluations WHERE id = 0`, e.Design[2]).
		Scan(&objNull, &marginNegInf, &violPosInf, &designOK, &outNaN, &outInf)
	if err != nil {
		t.Fatal(err)
	}
	if !objNull || !marginNegInf || !violPosInf || !designOK || !outNaN || !outInf {
		t.Errorf("SQL view of a failed evaluation: objective NULL %v, margin -Inf %v, violation +Inf %v, design exact %v, output NaN as NULL %v, output +Inf %v",
			objNull, marginNegInf, violPosInf, designOK, outNaN, outInf)
	}
}

func TestCreateRefusesExistingFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "x.db")
	if err := os.WriteFile(path, []byte("keep me"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Create(path, Options{}); err == nil || !strings.Contains(err.Error(), "already exists") {
		t.Fatalf("Create over an existing file: err = %v, want 'already exists'", err)
	}
	s, err := Create(path, Options{Overwrite: true})
	if err != nil {
		t.Fatalf("Create with Overwrite: %v", err)
	}
	s.Close()
}

func TestOptionsValidation(t *testing.T) {
	tests := []struct {
		name string
		opt  Options
		want string
	}{
		{"negative batch", Options{BatchSize: -1}, "BatchSize = -1"},
		{"huge batch", Options{BatchSize: 1 << 21}, "BatchSize = 2097152"},
		{"negative interval", Options{FlushInterval: -1}, "FlushInterval = -1ns"},
	}
	for _, tc := range tests {
		_, err := Create(filepath.Join(t.TempDir(), "o.db"), tc.opt)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v, want it to contain %q", tc.name, err, tc.want)
		}
	}
}

// endedRun writes a closed store at path holding a Sellar run of n
// evaluations that ended with stop.
func endedRun(t *testing.T, path string, n int, stop mdo.StopReason) {
	t.Helper()
	s, err := Create(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	ev := sellarEvaluator(t, s, 1, sellarScript)
	if _, err := ev.Evaluate(context.Background(), grid(n, 3)); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Finish(stop); err != nil {
		t.Fatal(err)
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
}

func TestBadFiles(t *testing.T) {
	dir := t.TempDir()
	// a real store, closed, to truncate
	good := filepath.Join(dir, "good.db")
	endedRun(t, good, 300, mdo.StopBudget)
	data, err := os.ReadFile(good)
	if err != nil {
		t.Fatal(err)
	}
	write := func(name string, b []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	// another program's SQLite database
	foreign := filepath.Join(dir, "foreign.db")
	db, err := sql.Open("sqlite", foreign)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec(`CREATE TABLE accounts (id INTEGER PRIMARY KEY, owner TEXT)`); err != nil {
		t.Fatal(err)
	}
	db.Close()
	// a store with a newer schema version
	newer := write("newer.db", data)
	db, _ = sql.Open("sqlite", newer)
	if _, err := db.Exec(`UPDATE store_info SET value = '99' WHERE key = 'schema_version'`); err != nil {
		t.Fatal(err)
	}
	db.Close()

	tests := []struct {
		name string
		path string
		is   error
		want string
	}{
		{"missing", filepath.Join(dir, "nope.db"), os.ErrNotExist, "opening"},
		{"empty", write("empty.db", nil), ErrNotStore, "is empty"},
		{"text", write("notes.db", []byte(strings.Repeat("lift and drag\n", 40))), ErrNotStore, "is not a SQLite database"},
		{"short header", write("short.db", data[:60]), ErrDamaged, "shorter than the 100-byte SQLite header"},
		{"half", write("half.db", data[:len(data)/2]), ErrDamaged, "is truncated"},
		{"odd size", write("odd.db", data[:len(data)-100]), ErrDamaged, "is truncated"},
		{"foreign sqlite", foreign, ErrNotStore, "without a store_info table"},
		{"newer schema", newer, ErrNotStore, "schema version \"99\""},
	}
	for _, tc := range tests {
		for _, open := range []struct {
			how string
			fn  func(string) (*Store, error)
		}{{"Open", Open}, {"PickUp", func(p string) (*Store, error) { return PickUp(p, Options{}) }}} {
			st, err := open.fn(tc.path)
			if err == nil {
				st.Close()
				t.Errorf("%s %s: no error", open.how, tc.name)
				continue
			}
			if !errors.Is(err, tc.is) || !strings.Contains(err.Error(), tc.want) || !strings.Contains(err.Error(), tc.path) {
				t.Errorf("%s %s: err = %v; want one wrapping %v, naming the file and saying %q", open.how, tc.name, err, tc.is, tc.want)
			}
		}
	}
	// the intact file still opens
	st, err := Open(good)
	if err != nil {
		t.Fatalf("intact store: %v", err)
	}
	if st.Rows() != 300 {
		t.Errorf("intact store has %d rows, want 300", st.Rows())
	}
	st.Close()
}

func TestPickUpRefusesOtherScriptOrSeed(t *testing.T) {
	path := filepath.Join(t.TempDir(), "r.db")
	s, err := Create(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	ev := sellarEvaluator(t, s, 7, sellarScript)
	if _, err := ev.Evaluate(context.Background(), grid(5, 3)); err != nil {
		t.Fatal(err)
	}
	s.Close() // killed before End: evaluations were committed by Close
	tests := []struct {
		name   string
		script string
		seed   uint64
		want   []string
	}{
		{"other script", sellarScript + "// changed\n", 7, []string{ScriptHash(sellarScript), ScriptHash(sellarScript + "// changed\n")}},
		{"other seed", sellarScript, 8, []string{"seed 7", "seed 8"}},
	}
	for _, tc := range tests {
		r, err := PickUp(path, Options{})
		if err != nil {
			t.Fatal(err)
		}
		err = r.Check(tc.script, tc.seed)
		for _, w := range tc.want {
			if err == nil || !strings.Contains(err.Error(), w) {
				t.Errorf("%s: Check err = %v, want it to name %q", tc.name, err, w)
			}
		}
		if evs, err := r.PickedUp(tc.script, tc.seed); err == nil || evs != nil {
			t.Errorf("%s: PickedUp gave %d evaluations, err %v; want a refusal", tc.name, len(evs), err)
		}
		// and a study recording into it is refused when its evaluator is
		// made (the store is an mdo.PickUpRecorder), so a recorder cannot mix runs
		st, err := mdo.SellarStudy(mdo.MDF)
		if err != nil {
			t.Fatal(err)
		}
		st.Seed, st.Script, st.Recorder = tc.seed, tc.script, r
		if _, err := st.NewEvaluator(); err == nil || !strings.Contains(err.Error(), "refusing to mix") {
			t.Errorf("%s: evaluator on a mismatched store: err = %v, want a refusal", tc.name, err)
		}
		r.Close()
	}
	r, err := PickUp(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	if err := r.Check(sellarScript, 7); err != nil {
		t.Errorf("same script and seed refused: %v", err)
	}
	if r.Rows() != 5 {
		t.Errorf("rows after mismatched attempts = %d, want 5 (nothing mixed in)", r.Rows())
	}
}

func TestDamagedRows(t *testing.T) {
	tests := []struct {
		name, update, want string
		columns            bool
	}{
		{"numbers not an array", `UPDATE evaluation_data SET numbers = 'oops' WHERE id = 2`, "numbers is not a JSON array", false},
		{"numbers too short", `UPDATE evaluation_data SET numbers = '[1,2]' WHERE id = 2`, "numbers holds 2 values, the run has 8", false},
		{"numbers not a number", `UPDATE evaluation_data SET numbers = '[1,2,3,4,x,6,7,8]' WHERE id = 2`, `"x" is not a number`, false},
		{"short blob", `UPDATE evaluation_data SET vectors = x'0001' WHERE id = 2`, "vectors blob holds 2 bytes", false},
		{"outputs not an array", `UPDATE evaluation_data SET outputs = '{"y1": 1}' WHERE id = 2`, "outputs is not a JSON array", false},
		{"outputs too short", `UPDATE evaluation_data SET outputs = '[1]' WHERE id = 2`, "outputs holds 1 values, the run has 8", false},
		{"short blob in REAL columns", `UPDATE evaluation_data SET vectors = x'0001' WHERE id = 2`, "vectors blob holds 2 bytes", true},
	}
	for _, tc := range tests {
		path := filepath.Join(t.TempDir(), "d.db")
		// the JSON text layout of older stores, and the REAL columns
		// (whose only encoded part is the vectors blob)
		s, err := Create(path, Options{jsonText: !tc.columns})
		if err != nil {
			t.Fatal(err)
		}
		ev := sellarEvaluator(t, s, 1, sellarScript)
		if _, err := ev.Evaluate(context.Background(), grid(4, 3)); err != nil {
			t.Fatal(err)
		}
		s.Close()
		db, err := sql.Open("sqlite", path)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := db.Exec(tc.update); err != nil {
			t.Fatal(err)
		}
		db.Close()
		r, err := Open(path)
		if err != nil {
			t.Fatal(err)
		}
		_, err = r.Evaluations()
		r.Close()
		if !errors.Is(err, ErrDamaged) || !strings.Contains(err.Error(), tc.want) || !strings.Contains(err.Error(), "evaluation 2") {
			t.Errorf("%s: err = %v; want ErrDamaged naming evaluation 2 and saying %q", tc.name, err, tc.want)
		}
	}
}

// A run row whose stop text is none of mdo's stop reasons is a damaged
// store, named as such, not a silently unknown reason.
func TestDamagedStop(t *testing.T) {
	path := filepath.Join(t.TempDir(), "d.db")
	endedRun(t, path, 2, mdo.StopComplete)
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec(`UPDATE run SET stop = 'finished' WHERE id = 1`); err != nil {
		t.Fatal(err)
	}
	db.Close()
	_, err = Open(path)
	if !errors.Is(err, ErrDamaged) || !strings.Contains(err.Error(), `"finished"`) || !strings.Contains(err.Error(), "run.stop") {
		t.Errorf("Open with run.stop = 'finished': err = %v; want ErrDamaged naming run.stop and the text", err)
	}
}

func TestCommitCadence(t *testing.T) {
	tests := []struct {
		name     string
		batch    int
		interval time.Duration
		records  int
		commits  []int // rows after each commit, End's included
	}{
		{"by count", 3, time.Hour, 7, []int{3, 6, 7}},
		{"one at a time", 1, time.Hour, 3, []int{1, 2, 3}},
		// the writer commits a lone evaluation once the interval has
		// passed, without waiting for another one or for End: each record
		// waits for its commit before the next is made
		{"by time", 1000, time.Nanosecond, 3, []int{1, 2, 3}},
		{"only at End", 1000, time.Hour, 5, []int{5}},
	}
	for _, tc := range tests {
		var mu sync.Mutex
		var got []int
		commits := func() []int {
			mu.Lock()
			defer mu.Unlock()
			return append([]int(nil), got...)
		}
		s, err := Create(filepath.Join(t.TempDir(), "c.db"), Options{BatchSize: tc.batch, FlushInterval: tc.interval,
			OnCommit: func(rows int) {
				mu.Lock()
				got = append(got, rows)
				mu.Unlock()
			}})
		if err != nil {
			t.Fatal(err)
		}
		if err := s.Begin(syntheticRun()); err != nil {
			t.Fatal(err)
		}
		for i := 0; i < tc.records; i++ {
			var e mdo.Evaluation
			syntheticEval(&e, i)
			if err := s.Record(&e); err != nil {
				t.Fatal(err)
			}
			if tc.interval == time.Nanosecond {
				for deadline := time.Now().Add(10 * time.Second); len(commits()) < i+1 && time.Now().Before(deadline); {
					time.Sleep(time.Millisecond)
				}
			}
		}
		if err := s.End(nil); err != nil {
			t.Fatal(err)
		}
		s.Close()
		if fmt.Sprint(commits()) != fmt.Sprint(tc.commits) {
			t.Errorf("%s: commits after %v rows, want %v", tc.name, commits(), tc.commits)
		}
	}
}

func TestCreateIgnoresStaleLog(t *testing.T) {
	dir := t.TempDir()
	old := filepath.Join(dir, "old.db")
	s, err := Create(old, Options{})
	if err != nil {
		t.Fatal(err)
	}
	ev := sellarEvaluator(t, s, 1, sellarScript)
	if _, err := ev.Evaluate(context.Background(), grid(20, 3)); err != nil {
		t.Fatal(err)
	}
	if err := s.Flush(); err != nil {
		t.Fatal(err)
	}
	// copy the live write-ahead log beside a new name, as if its database
	// had been deleted, then create a store there
	wal, err := os.ReadFile(old + "-wal")
	if err != nil {
		t.Skipf("no write-ahead log to copy: %v", err)
	}
	s.Close()
	path := filepath.Join(dir, "new.db")
	if err := os.WriteFile(path+"-wal", wal, 0o644); err != nil {
		t.Fatal(err)
	}
	n, err := Create(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer n.Close()
	if _, ok := n.Run(); ok || n.Rows() != 0 {
		t.Errorf("a new store picked up %d rows of a stale log", n.Rows())
	}
}

// TestSameIDRecordedTwice records an ID again (a picked-up run that
// diverged re-uses the number): the later record replaces the earlier,
// and the store counts each ID once, whether the two are committed in
// one batch or in two, and however far apart; IDs in ascending order,
// with gaps, are counted without a recount.
func TestSameIDRecordedTwice(t *testing.T) {
	for _, tc := range []struct {
		name  string
		batch int
		ids   []int
		rows  int
	}{
		{"two batches", 1, []int{4, 4}, 1},
		{"one batch", 0, []int{4, 4}, 1},
		{"earlier ID later", 1, []int{4, 7, 4}, 2},
		{"earlier ID later, one batch", 0, []int{4, 7, 4}, 2},
		{"ascending with gaps", 1, []int{1, 3, 10}, 3},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s, err := Create(filepath.Join(t.TempDir(), "twice.db"), Options{BatchSize: tc.batch})
			if err != nil {
				t.Fatal(err)
			}
			defer s.Close()
			if err := s.Begin(syntheticRun()); err != nil {
				t.Fatal(err)
			}
			var evs []*mdo.Evaluation
			last := map[int]*mdo.Evaluation{}
			for i, id := range tc.ids {
				e := new(mdo.Evaluation)
				syntheticEval(e, i+1)
				e.ID = id
				last[id] = e
				evs = append(evs, e)
			}
			got := recordAndEnd(t, s, evs...)
			if s.Rows() != tc.rows || len(got) != tc.rows {
				t.Fatalf("rows %d, %d evaluations; want %d", s.Rows(), len(got), tc.rows)
			}
			for _, e := range got {
				if d := sameEvaluation(e, last[e.ID]); d != "" {
					t.Errorf("ID %d is not its last record: %s", e.ID, d)
				}
			}
			// the file agrees: a store opened on it counts its rows
			r, err := Open(s.Path())
			if err != nil {
				t.Fatal(err)
			}
			defer r.Close()
			if r.Rows() != tc.rows {
				t.Errorf("the file holds %d rows, want %d", r.Rows(), tc.rows)
			}
		})
	}
}

// TestPragmas checks the journal mode, synchronous level and page size of
// a new store, and of the file opened again after a run was recorded.
func TestPragmas(t *testing.T) {
	tests := []struct {
		name    string
		durable bool
		sync    int // PRAGMA synchronous: 1 NORMAL, 2 FULL
	}{{"default", false, 1}, {"durable", true, 2}}
	pragmas := func(s *Store) (mode string, sync, page int) {
		t.Helper()
		ctx := context.Background()
		if err := s.conn.QueryRowContext(ctx, "PRAGMA journal_mode").Scan(&mode); err != nil {
			t.Fatal(err)
		}
		if err := s.conn.QueryRowContext(ctx, "PRAGMA synchronous").Scan(&sync); err != nil {
			t.Fatal(err)
		}
		if err := s.conn.QueryRowContext(ctx, "PRAGMA page_size").Scan(&page); err != nil {
			t.Fatal(err)
		}
		return mode, sync, page
	}
	for _, tc := range tests {
		path := filepath.Join(t.TempDir(), "p.db")
		s, err := Create(path, Options{Durable: tc.durable})
		if err != nil {
			t.Fatal(err)
		}
		mode, sync, page := pragmas(s)
		if mode != "wal" || sync != tc.sync || page != pageSize {
			t.Errorf("%s: journal_mode %q, synchronous %d, page_size %d; want wal, %d, %d", tc.name, mode, sync, page, tc.sync, pageSize)
		}
		if err := s.Begin(syntheticRun()); err != nil {
			t.Fatal(err)
		}
		var e mdo.Evaluation
		syntheticEval(&e, 1)
		recordAndEnd(t, s, &e)
		s.Close()
		r, err := PickUp(path, Options{Durable: tc.durable})
		if err != nil {
			t.Fatal(err)
		}
		mode, sync, page = pragmas(r)
		r.Close()
		if mode != "wal" || sync != tc.sync || page != pageSize {
			t.Errorf("%s, opened again: journal_mode %q, synchronous %d, page_size %d; want wal, %d, %d", tc.name, mode, sync, page, tc.sync, pageSize)
		}
	}
}

func TestAwkwardNames(t *testing.T) {
	path := filepath.Join(t.TempDir(), "names.db")
	s, err := Create(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	info := syntheticRunOf(shape{2, 2, 2})
	// labels of function objectives and constraints are free text
	info.Objectives = []string{`cost "total"; DROP TABLE run`}
	info.Constraints = []string{"Range", "range"}
	if err := s.Begin(info); err != nil {
		t.Fatal(err)
	}
	var e mdo.Evaluation
	syntheticEvalOf(&e, 0, shape{2, 2, 2})
	e.Constraints = []float64{1, 2}
	if err := s.Record(&e); err != nil {
		t.Fatal(err)
	}
	if err := s.End(nil); err != nil {
		t.Fatal(err)
	}
	s.Close()
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var obj, c1, c2 float64
	if err := db.QueryRow(`SELECT "objective:cost ""total""; DROP TABLE run", "constraint:Range", "constraint:range#2" FROM evaluations`).Scan(&obj, &c1, &c2); err != nil {
		t.Fatal(err)
	}
	if obj != e.Objectives[0] || c1 != 1 || c2 != 2 {
		t.Errorf("read %g, %g, %g; want %g, 1, 2", obj, c1, c2, e.Objectives[0])
	}
	var n int
	if err := db.QueryRow(`SELECT count(*) FROM run`).Scan(&n); err != nil || n != 1 {
		t.Errorf("run table: %d rows, %v", n, err)
	}
}

// TestWriteErrorSurfaces checks that a commit the background writer
// cannot make comes back from the caller's next call, whichever it is,
// and from every call after it.
func TestWriteErrorSurfaces(t *testing.T) {
	tests := []struct {
		name string
		last func(s *Store) error // the call that must report the failure
	}{
		{"End", func(s *Store) error { return s.End(nil) }},
		{"Flush", (*Store).Flush},
		{"Close", (*Store).Close},
		{"Evaluations", func(s *Store) error { _, err := s.Evaluations(); return err }},
	}
	for _, tc := range tests {
		s, err := Create(filepath.Join(t.TempDir(), "fail.db"), Options{BatchSize: 1000, FlushInterval: time.Hour})
		if err != nil {
			t.Fatal(err)
		}
		if err := s.Begin(syntheticRun()); err != nil {
			t.Fatal(err)
		}
		// every insert into the evaluations fails from now on
		if _, err := s.conn.ExecContext(context.Background(),
			`CREATE TRIGGER fail BEFORE INSERT ON evaluation_data BEGIN SELECT RAISE(ABORT, 'disk on fire'); END`); err != nil {
			t.Fatal(err)
		}
		for i := 0; i < 3; i++ {
			var e mdo.Evaluation
			syntheticEval(&e, i)
			if err := s.Record(&e); err != nil {
				t.Fatalf("%s: Record %d before the commit: %v", tc.name, i, err)
			}
		}
		err = tc.last(s)
		if err == nil || !strings.Contains(err.Error(), "disk on fire") || !strings.Contains(err.Error(), "committing 3 evaluations") {
			t.Errorf("%s: err = %v; want the failed commit of 3 evaluations", tc.name, err)
		}
		if tc.name != "Close" {
			var e mdo.Evaluation
			syntheticEval(&e, 9)
			if err := s.Record(&e); err == nil || !strings.Contains(err.Error(), "disk on fire") {
				t.Errorf("%s: Record after the failure: err = %v; want the failed commit", tc.name, err)
			}
		}
		s.Close()
	}
}

// TestQueueBounds checks that Record returns without waiting for
// commits, and that the queue is bounded: while the writer is held in its
// first commit (OnCommit blocks), exactly inFlight()+1 records return (the
// committed one, two encoded batches and a full queue of 256) and the next
// waits until the writer moves on.
func TestQueueBounds(t *testing.T) {
	release := make(chan struct{})
	var once sync.Once
	s, err := Create(filepath.Join(t.TempDir(), "q.db"), Options{BatchSize: 1, FlushInterval: time.Hour,
		OnCommit: func(int) { once.Do(func() { <-release }) }})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := s.Begin(syntheticRun()); err != nil {
		t.Fatal(err)
	}
	free := s.inFlight() + 1
	if free != 259 {
		t.Fatalf("inFlight()+1 = %d, want 259 (256 queued, two batches of 1 encoded, one committed)", free)
	}
	evs := make([]mdo.Evaluation, free+1)
	for i := range evs {
		syntheticEval(&evs[i], i)
	}
	done := make(chan int, len(evs))
	go func() {
		for i := range evs {
			if err := s.Record(&evs[i]); err != nil {
				t.Error(err)
			}
			done <- i
		}
	}()
	for i := 0; i < free; i++ {
		select {
		case <-done:
		case <-time.After(10 * time.Second):
			t.Fatalf("Record %d waited for a commit", i)
		}
	}
	select {
	case i := <-done:
		t.Errorf("Record %d returned while the queue was full", i)
	case <-time.After(50 * time.Millisecond):
	}
	close(release)
	select {
	case <-done:
	case <-time.After(10 * time.Second):
		t.Fatal("the last Record still waits after the writer moved on")
	}
	if err := s.End(nil); err != nil {
		t.Fatal(err)
	}
	if s.Rows() != len(evs) {
		t.Errorf("rows = %d, want %d", s.Rows(), len(evs))
	}
}

// A store of schema version 1, whose counters were named cache_hits and
// restored (and sessions.resumed_rows), still reads and can be picked
// up; it stays a version 1 store.
func TestSchemaVersion1ReadsAndPicksUp(t *testing.T) {
	path := filepath.Join(t.TempDir(), "v1.db")
	s, err := Create(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	ev := sellarEvaluator(t, s, 1, sellarScript)
	for _, xs := range [][][]float64{grid(4, 3), grid(2, 3)} { // the second batch is two repeats
		if _, err := ev.Evaluate(context.Background(), xs); err != nil {
			t.Fatal(err)
		}
	}
	if _, err := ev.Finish(mdo.StopBudget); err != nil {
		t.Fatal(err)
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range []string{
		`ALTER TABLE run RENAME COLUMN repeats TO cache_hits`,
		`ALTER TABLE run RENAME COLUMN picked_up TO restored`,
		`ALTER TABLE sessions RENAME COLUMN picked_up_rows TO resumed_rows`,
		`UPDATE store_info SET value = '1' WHERE key = 'schema_version'`,
	} {
		if _, err := db.Exec(q); err != nil {
			t.Fatal(err)
		}
	}
	db.Close()
	counters := func() mdo.EvalCounters {
		t.Helper()
		r, err := Open(path)
		if err != nil {
			t.Fatal(err)
		}
		defer r.Close()
		res, err := r.Result()
		if err != nil {
			t.Fatal(err)
		}
		return res.EvalCounters
	}
	if c := counters(); c.Evaluations != 4 || c.Analyses != 4 || c.Repeats != 2 || c.PickedUp != 0 {
		t.Errorf("version 1 store read back as %v, want 4 evaluations (4 analysed), 2 repeats", c)
	}
	p, err := PickUp(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	ev = sellarEvaluator(t, p, 1, sellarScript)
	if _, err := ev.Evaluate(context.Background(), grid(6, 3)); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Finish(mdo.StopBudget); err != nil {
		t.Fatal(err)
	}
	if err := p.Close(); err != nil {
		t.Fatal(err)
	}
	if c := counters(); c.Evaluations != 6 || c.Analyses != 2 || c.PickedUp != 4 || c.Repeats != 0 {
		t.Errorf("picked-up version 1 store read back as %v, want 6 evaluations (2 analysed, 4 picked up)", c)
	}
	db, err = sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var version string
	var rows int
	if err := db.QueryRow(`SELECT value FROM store_info WHERE key = 'schema_version'`).Scan(&version); err != nil || version != "1" {
		t.Errorf("schema version after the pick-up = %q, %v; want 1", version, err)
	}
	if err := db.QueryRow(`SELECT resumed_rows FROM sessions WHERE n = 2`).Scan(&rows); err != nil || rows != 4 {
		t.Errorf("second session's resumed_rows = %d, %v; want 4", rows, err)
	}
}

// TestLogCheckpointedDuringRun records a run of 12 MB in commits of 100
// evaluations and checks that the write-ahead log never held more than
// the automatic checkpoint's pages and a commit, so that Close has little
// to copy: before the checkpoint was made small, the log held the whole
// run until Close.
func TestLogCheckpointedDuringRun(t *testing.T) {
	path := filepath.Join(t.TempDir(), "log.db")
	s, err := Create(path, Options{BatchSize: 100, FlushInterval: time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := s.Begin(syntheticRunOf(jetShape)); err != nil {
		t.Fatal(err)
	}
	const n = 5000
	for i := 0; i < n; i++ {
		e := new(mdo.Evaluation)
		syntheticEvalOf(e, i, jetShape)
		if err := s.Record(e); err != nil {
			t.Fatal(err)
		}
	}
	if err := s.End(nil); err != nil {
		t.Fatal(err)
	}
	const page = 32 << 10
	var pages int64
	if err := s.conn.QueryRowContext(context.Background(), "SELECT page_count FROM pragma_page_count()").Scan(&pages); err != nil {
		t.Fatal(err)
	}
	st, err := os.Stat(path + "-wal")
	if err != nil {
		t.Fatal(err)
	}
	// 64 pages of checkpoint and a commit of 100 rows of 2.4 KB (8
	// pages and the interior pages), with the frames' headers
	limit := int64(80) * (page + 24)
	if pages*page < 4*limit {
		t.Fatalf("the run took %d pages; too few to test the log", pages)
	}
	if st.Size() > limit {
		t.Errorf("the write-ahead log holds %d bytes after the run (at most %d wanted) beside a file of %d pages", st.Size(), limit, pages)
	}
}
