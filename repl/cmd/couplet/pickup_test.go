package main

import (
	"bytes"
	"database/sql"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"testing"
	"time"

	_ "modernc.org/sqlite"
)

// summaryOf reads the parts of summary.json the pick-up test compares.
type pickSummary struct {
	Evaluations int
	Restored    int
	Best        struct {
		ID        int
		Objective float64
		Design    map[string]float64
	}
}

func readPickSummary(t *testing.T, dir string) pickSummary {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var s pickSummary
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	return s
}

// countRows counts the evaluation rows of a case store.
func countRows(path string) (int, error) {
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		return 0, err
	}
	defer db.Close()
	var n int
	err = db.QueryRow("SELECT count(*) FROM evaluations").Scan(&n)
	return n, err
}

// rowsIn counts the evaluation rows of a case store no process writes.
func rowsIn(t *testing.T, path string) int {
	t.Helper()
	n, err := countRows(path)
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// A replay killed with SIGKILL part-way and picked up with --pick-up ends
// with the same best design as an uninterrupted replay, having analysed
// only the points the killed run had not recorded.
func TestRunKilledAndPickedUp(t *testing.T) {
	study := filepath.Join("..", "..", "testdata", "resumable.study")
	whole := t.TempDir()
	if out, err := exec.Command(binary, "run", study, "--out", whole).CombinedOutput(); err != nil {
		t.Fatalf("uninterrupted run: %v\n%s", err, out)
	}
	ref := readPickSummary(t, whole)

	dir := t.TempDir()
	cmd := exec.Command(binary, "run", study, "--out", dir)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	db := filepath.Join(dir, "results.db")
	deadline := time.Now().Add(20 * time.Second)
	for {
		// wait until at least one batch is committed, then kill (while
		// the running process creates the file and its schema, reading
		// it may fail: try again)
		if n, err := countRows(db); err == nil && n >= 40 {
			break
		}
		if time.Now().After(deadline) {
			cmd.Process.Kill()
			t.Fatal("no batch committed within 20 s")
		}
		time.Sleep(50 * time.Millisecond)
	}
	if err := cmd.Process.Kill(); err != nil {
		t.Fatal(err)
	}
	_ = cmd.Wait()
	kept := rowsIn(t, db)
	if kept >= ref.Evaluations {
		t.Skipf("the run finished (%d rows) before it was killed; nothing to pick up", kept)
	}

	var stderr bytes.Buffer
	pick := exec.Command(binary, "run", study, "--out", dir, "--pick-up")
	pick.Stderr = &stderr
	if err := pick.Run(); err != nil {
		t.Fatalf("pick-up run: %v\n%s", err, stderr.String())
	}
	got := readPickSummary(t, dir)
	t.Logf("uninterrupted: %d evaluations; killed run kept %d rows; picked up: %d evaluations, %d restored", ref.Evaluations, kept, got.Evaluations, got.Restored)
	if !reflect.DeepEqual(got.Best, ref.Best) {
		t.Errorf("best after pick-up %+v, uninterrupted %+v", got.Best, ref.Best)
	}
	if got.Evaluations > ref.Evaluations || got.Restored != kept {
		t.Errorf("pick-up: %d evaluations (%d restored, %d kept by the killed run); uninterrupted %d",
			got.Evaluations, got.Restored, kept, ref.Evaluations)
	}
	if n := rowsIn(t, db); n != got.Evaluations {
		t.Errorf("results.db holds %d rows, summary counts %d", n, got.Evaluations)
	}

	// another seed is refused with a clear message, not mixed in
	var errOut bytes.Buffer
	other := exec.Command(binary, "run", study, "--out", dir, "--pick-up", "--seed", "12")
	other.Stderr = &errOut
	if err := other.Run(); err == nil {
		t.Fatal("pick-up with another seed accepted")
	}
	if !bytes.Contains(errOut.Bytes(), []byte("seed")) {
		t.Errorf("refusal does not name the seed: %s", errOut.String())
	}
}
