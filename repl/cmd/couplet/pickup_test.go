package main

import (
	"bytes"
	"database/sql"
	"encoding/json"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"

	_ "modernc.org/sqlite"
)

// summaryOf reads the parts of summary.json the pick-up test compares.
type pickSummary struct {
	Evaluations int
	PickedUp    int `json:"picked_up"`
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

// holdAt is the analysis at which the killed run of resumable.study stops
// for good (COUPLET_TEST_HOLD): the differential evolution analyses 20
// points a generation, so the 300 before it are recorded first.
const holdAt = 301

// waitRows waits until the case store at path holds at least n rows, as
// long as the command runs.
func waitRows(t *testing.T, cmd *exec.Cmd, exited <-chan struct{}, path string, n int) {
	t.Helper()
	deadline := time.Now().Add(2 * time.Minute)
	for {
		// while the running process creates the file and its schema,
		// reading it may fail: try again
		if got, err := countRows(path); err == nil && got >= n {
			return
		}
		select {
		case <-exited:
			t.Fatalf("the run ended before its store held %d rows", n)
		case <-time.After(20 * time.Millisecond):
		}
		if time.Now().After(deadline) {
			cmd.Process.Kill()
			t.Fatalf("the store did not reach %d rows", n)
		}
	}
}

// A replay killed with SIGKILL part-way and picked up with --pick-up ends
// with the same best design as an uninterrupted replay, having analysed
// only the points the killed run had not recorded.
func TestRunKilledAndPickedUp(t *testing.T) {
	study := filepath.Join("..", "..", "testdata", "resumable.study")
	whole := t.TempDir()
	if out, err := exec.Command(binary, "run", study, "--out", whole, "--trust-script").CombinedOutput(); err != nil {
		t.Fatalf("uninterrupted run: %v\n%s", err, out)
	}
	ref := readPickSummary(t, whole)
	if ref.Evaluations < holdAt {
		t.Fatalf("the uninterrupted run made %d evaluations, fewer than the hold at %d", ref.Evaluations, holdAt)
	}

	// The killed run holds at its 301st analysis: it cannot end before
	// the kill, which comes once the store holds 200 rows.
	dir := t.TempDir()
	cmd := exec.Command(binary, "run", study, "--out", dir, "--trust-script")
	cmd.Env = append(os.Environ(), "COUPLET_TEST_HOLD="+strconv.Itoa(holdAt))
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	exited := make(chan struct{})
	go func() { _ = cmd.Wait(); close(exited) }()
	db := filepath.Join(dir, "slow_bowl", "results.db") // the result folder of study slow_bowl
	waitRows(t, cmd, exited, db, 200)
	if err := cmd.Process.Kill(); err != nil {
		t.Fatal(err)
	}
	<-exited
	kept := rowsIn(t, db)
	if kept < 200 || kept >= holdAt {
		t.Fatalf("the killed run kept %d rows, want from 200 to %d", kept, holdAt-1)
	}

	var stderr bytes.Buffer
	pick := exec.Command(binary, "run", study, "--out", dir, "--pick-up", "--trust-script")
	pick.Stderr = &stderr
	if err := pick.Run(); err != nil {
		t.Fatalf("pick-up run: %v\n%s", err, stderr.String())
	}
	got := readPickSummary(t, dir)
	t.Logf("uninterrupted: %d evaluations; killed run kept %d rows; picked up: %d evaluations, %d of them picked up", ref.Evaluations, kept, got.Evaluations, got.PickedUp)
	if !reflect.DeepEqual(got.Best, ref.Best) {
		t.Errorf("best after pick-up %+v, uninterrupted %+v", got.Best, ref.Best)
	}
	if got.Evaluations > ref.Evaluations || got.PickedUp != kept {
		t.Errorf("pick-up: %d evaluations (%d picked up, %d kept by the killed run); uninterrupted %d",
			got.Evaluations, got.PickedUp, kept, ref.Evaluations)
	}
	if n := rowsIn(t, db); n != got.Evaluations {
		t.Errorf("results.db holds %d rows, summary counts %d", n, got.Evaluations)
	}

	// another seed is refused with a clear message, not mixed in
	var errOut bytes.Buffer
	other := exec.Command(binary, "run", study, "--out", dir, "--pick-up", "--trust-script", "--seed", "12")
	other.Stderr = &errOut
	err := other.Run()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != 2 {
		t.Fatalf("pick-up with another seed: %v, want exit status 2", err)
	}
	if !bytes.Contains(errOut.Bytes(), []byte("seed")) {
		t.Errorf("refusal does not name the seed: %s", errOut.String())
	}

	// A run made with --seed picked up without it (the script's own
	// seed, 11) is refused too, from the cell that meets the store.
	seeded := t.TempDir()
	if code, _, errs := runCmd("run", study, "--out", seeded, "--trust-script", "--seed", "12"); code != 0 {
		t.Fatalf("run with --seed 12: exit %d\n%s", code, errs)
	}
	summary, err := os.ReadFile(filepath.Join(seeded, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	code, _, errs := runCmd("run", study, "--out", seeded, "--trust-script", "--pick-up")
	if code != 2 || !strings.Contains(errs, "seed 12") || !strings.Contains(errs, "seed 11") {
		t.Errorf("pick-up of a --seed 12 run without --seed: exit %d, stderr %q; want exit 2 naming both seeds", code, errs)
	}
	if after, err := os.ReadFile(filepath.Join(seeded, "summary.json")); err != nil || !bytes.Equal(after, summary) {
		t.Errorf("the refused pick-up rewrote summary.json (%v)", err)
	}
}

// A pick-up compares the whole study file with the script the killed run
// recorded: a study whose take-off field limit was tightened from 1600 m
// to 1200 m after the run is refused, naming the cell that differs, and
// the folder is left as it was (picking up would report the old run's
// points, with field lengths near 1 580 m, as feasible).
func TestPickUpRefusesAChangedScript(t *testing.T) {
	orig, err := os.ReadFile(filepath.Join("..", "..", "..", "studies", "regional_jet.study"))
	if err != nil {
		t.Fatal(err)
	}
	const limit = `mdo.AtMost("perf.takeoff_field_length", 1600)`
	if bytes.Count(orig, []byte(limit)) != 1 {
		t.Fatalf("regional_jet.study has no single %s", limit)
	}
	src := t.TempDir()
	study := filepath.Join(src, "regional_jet.study")
	if err := os.WriteFile(study, orig, 0o644); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if code, _, errs := runCmd("run", study, "--out", dir); code != 0 {
		t.Fatalf("first run: exit %d\n%s", code, errs)
	}
	before, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	rows := rowsIn(t, filepath.Join(dir, "regional_jet_min_fuel", "results.db"))

	changed := bytes.Replace(orig, []byte(limit), []byte(`mdo.AtMost("perf.takeoff_field_length", 1200)`), 1)
	if err := os.WriteFile(study, changed, 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errs := runCmd("run", study, "--out", dir, "--pick-up")
	if code != 2 || !strings.Contains(errs, "cell 1") || !strings.Contains(errs, "--pick-up") {
		t.Errorf("pick-up of a changed study: exit %d, stderr %q; want exit 2 naming cell 1", code, errs)
	}
	after, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(before, after) || rowsIn(t, filepath.Join(dir, "regional_jet_min_fuel", "results.db")) != rows {
		t.Errorf("the refused pick-up changed the folder")
	}
}
