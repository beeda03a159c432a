package repl

import (
	"context"
	"database/sql"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/mdo/report"
)

// interruptedCells are a Sellar optimisation that says "interrupt" at
// its fifth iteration (the test cancels the run then) and publishes the
// result it comes back with.
const interruptedCells = `
//~ cell 1
import (
	"fmt"

	"couplet/mdo"
	"couplet/optimizers"
	"couplet/repl/cell"
)

study, err := mdo.SellarStudy(mdo.MDF)
if err != nil {
	panic(err)
}
study.Seed = 2
study.Workers = 1
study.Progress = func(p mdo.Progress) {
	if p.Iteration == 5 {
		fmt.Println("interrupt")
	}
}
if err := cell.Attach(study); err != nil {
	panic(err)
}
result, err := optimizers.NelderMead{MaxEvaluations: 400}.Minimize(cell.Context(), study)
if err != nil {
	panic(err)
}
cell.Publish(result)
`

// principalRecord is what a folder's results.db, read alone, says of
// its run.
type principalRecord struct {
	rows, bestID int
	stop         string
}

// readAlone reads the store file path on its own (copied into a folder
// without its write-ahead log).
func readAlone(t *testing.T, path string) principalRecord {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	alone := filepath.Join(t.TempDir(), "alone.db")
	if err := os.WriteFile(alone, b, 0o644); err != nil {
		t.Fatal(err)
	}
	db, err := sql.Open("sqlite", "file:"+alone+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var r principalRecord
	var best sql.NullInt64
	if err := db.QueryRow("SELECT (SELECT count(*) FROM evaluation_data), best_id, stop FROM run").Scan(&r.rows, &best, &r.stop); err != nil {
		t.Fatalf("%s read alone: %v", path, err)
	}
	r.bestID = int(best.Int64)
	return r
}

// wantPrincipalAgrees checks that dir's results.db, read alone, is the
// principal result's, complete, and says what summary.json says: the
// evaluations, the stop and the best point.
func wantPrincipalAgrees(t *testing.T, dir string) {
	t.Helper()
	idx, err := report.ReadIndex(dir)
	if err != nil {
		t.Fatal(err)
	}
	top := readAlone(t, filepath.Join(dir, StoreFile))
	own := readAlone(t, filepath.Join(dir, idx.Principal, StoreFile))
	if top != own {
		t.Errorf("results.db says %+v, the principal result's %+v", top, own)
	}
	best := 0
	if idx.Best != nil {
		best = idx.Best.ID
	}
	if want := (principalRecord{rows: idx.Evaluations, bestID: best, stop: idx.Stop}); top != want {
		t.Errorf("results.db says %+v, summary.json %+v", top, want)
	}
}

// The folder's results.db is the principal result's, complete on its
// own and in agreement with summary.json, however the run ended: in
// full, with a later cell failing, interrupted, and picked up.
func TestPrincipalStoreAgreesWithSummary(t *testing.T) {
	t.Run("finished", func(t *testing.T) {
		dir := filepath.Join(t.TempDir(), "out")
		if stderr, err := runInto(t, context.Background(), writeStudy(t, "finished", sellarCells), dir, nil); err != nil {
			t.Fatalf("%v\n%s", err, stderr)
		}
		wantPrincipalAgrees(t, dir)
	})
	t.Run("a later cell fails", func(t *testing.T) {
		dir := filepath.Join(t.TempDir(), "out")
		file := writeStudy(t, "fails_later", sellarCells+"\n//~ cell 2\npanic(\"a later cell fails\")\n")
		if _, err := runInto(t, context.Background(), file, dir, nil); err == nil || !strings.Contains(err.Error(), "a later cell fails") {
			t.Fatalf("err = %v, want the later cell's failure", err)
		}
		wantPrincipalAgrees(t, dir)
	})
	t.Run("interrupted, then picked up", func(t *testing.T) {
		dir := filepath.Join(t.TempDir(), "out")
		file := writeStudy(t, "interrupted", interruptedCells)
		ctx, cancel := context.WithCancel(context.Background())
		defer cancel()
		if _, err := runInto(t, ctx, file, dir, func(o *RunOptions) { o.Stdout = &cancelOn{word: "interrupt", cancel: cancel} }); err != nil {
			t.Logf("the interrupted run: %v", err)
		}
		wantPrincipalAgrees(t, dir)
		first, err := report.ReadIndex(dir)
		if err != nil {
			t.Fatal(err)
		}
		if first.Stop != mdo.StopCancelled.String() {
			t.Fatalf("the first run stopped %q after %d evaluations, want it cancelled", first.Stop, first.Evaluations)
		}
		if stderr, err := runInto(t, context.Background(), file, dir, func(o *RunOptions) { o.PickUp = true }); err != nil {
			t.Fatalf("--pick-up: %v\n%s", err, stderr)
		}
		again, err := report.ReadIndex(dir)
		if err != nil {
			t.Fatal(err)
		}
		if again.PickedUp != first.Evaluations || again.Evaluations <= first.Evaluations {
			t.Errorf("picked up %d of the %d evaluations interrupted, now %d", again.PickedUp, first.Evaluations, again.Evaluations)
		}
		wantPrincipalAgrees(t, dir)
	})
}
