package store

import (
	"bytes"
	"database/sql"
	"encoding/csv"
	"path/filepath"
	"testing"

	"couplet/mdo"
)

// A failed evaluation records no outputs: the outputs view gives NULL, the
// CSV an empty cell, and reading it back gives no outputs; the converged
// point keeps its computed value. Before, the failed point held the
// variable's default (q = 1) as if it had been computed.
func TestFailedEvaluationRecordsNoOutputs(t *testing.T) {
	path := filepath.Join(t.TempDir(), "results.db")
	recordFailing(t, path) // point 0 converges (q = 4), point 1 fails

	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		id    int
		valid bool
		want  float64
	}{{0, true, 4}, {1, false, 0}} {
		var v sql.NullFloat64
		if err := db.QueryRow("SELECT value FROM outputs WHERE eval_id = ? AND name = 'q'", c.id).Scan(&v); err != nil {
			t.Fatal(err)
		}
		if v.Valid != c.valid || (c.valid && v.Float64 != c.want) {
			t.Errorf("evaluation %d: output q in results.db is %v, want valid=%v %g", c.id, v, c.valid, c.want)
		}
		var obj sql.NullString
		if err := db.QueryRow("SELECT json_extract(outputs, '$.q') FROM evaluations WHERE id = ?", c.id).Scan(&obj); err != nil {
			t.Fatal(err)
		}
		if obj.Valid != c.valid {
			t.Errorf("evaluation %d: the evaluations view's outputs.q is %v, want valid=%v", c.id, obj, c.valid)
		}
	}
	db.Close()

	s, evs := openEvaluations(t, path)
	if len(evs) != 2 || len(evs[0].Outputs) != 2 || evs[0].Outputs[0] != 4 || evs[1].Outputs != nil {
		t.Fatalf("read back: outputs %v and %v, want [4 2] and none", evs[0].Outputs, evs[1].Outputs)
	}

	var b bytes.Buffer
	if err := s.WriteCSV(&b, CSVOptions{AllOutputs: true}); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(bytes.NewReader(b.Bytes())).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := -1
	for i, h := range rows[0] {
		if h == "output:q [-]" {
			col = i
		}
	}
	if col < 0 || len(rows) != 3 {
		t.Fatalf("CSV header %q, %d rows: no column q", rows[0], len(rows))
	}
	if rows[1][col] != "4" || rows[2][col] != "" {
		t.Errorf("CSV column q holds %q and %q, want \"4\" and empty", rows[1][col], rows[2][col])
	}
	_, back, err := ReadCSV(bytes.NewReader(b.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	if len(back) != 2 || back[1].Outputs != nil || len(back[0].Outputs) != 2 {
		t.Errorf("the CSV read back gives outputs %v and %v, want [4 2] and none", back[0].Outputs, back[1].Outputs)
	}
}

// A store written before this rule kept the defaults as the failed point's
// outputs: it still reads, and those values are not shown as computed.
func TestOldStoreWithFailedOutputsReads(t *testing.T) {
	path := filepath.Join(t.TempDir(), "results.db")
	recordFailingWith(t, path, Options{ToolVersion: "test-1", jsonText: true})
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec("UPDATE evaluation_data SET outputs = '[1,8]' WHERE id = 1"); err != nil {
		t.Fatal(err)
	}
	db.Close()
	_, evs := openEvaluations(t, path)
	if len(evs) != 2 || evs[1].Converged || evs[1].Outputs != nil || evs[0].Outputs[0] != 4 {
		t.Errorf("an old store reads outputs %v and %v, want [4 2] and none", evs[0].Outputs, evs[1].Outputs)
	}
}

// openEvaluations opens the store at path (closed when the test ends) and
// reads its evaluations.
func openEvaluations(t *testing.T, path string) (*Store, []*mdo.Evaluation) {
	t.Helper()
	s, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	evs, err := s.Evaluations()
	if err != nil {
		t.Fatal(err)
	}
	return s, evs
}
