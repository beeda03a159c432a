package repl

import (
	"bytes"
	"context"
	"database/sql"
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/mdo/report"
	"couplet/mdo/runfolder"
	"couplet/mdo/store"
)

// interruptedCells are sellarCells with a budget of 400 evaluations,
// saying "interrupt" at the optimiser's fifth iteration (the test
// cancels the run then).
var interruptedCells = strings.NewReplacer("import (\n", "import (\n\t\"fmt\"\n",
	"study.Workers = 1\n", "study.Workers = 1\nstudy.Progress = func(p mdo.Progress) {\n\tif p.Iteration == 5 {\n\t\tfmt.Println(\"interrupt\")\n\t}\n}\n",
	"MaxEvaluations: 30", "MaxEvaluations: 400").Replace(sellarCells)

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
	alone := filepath.Join(t.TempDir(), "alone.db")
	if err := runfolder.LinkFileWith(path, alone, runfolder.LinkOptions{NoHardLink: true}); err != nil {
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
	sum, err := report.ReadRecord(filepath.Join(dir, idx.Principal, report.SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	wantSameRecord(t, filepath.Join(dir, StoreFile), sum)
}

// wantSameRecord checks that the store at path holds the run record a
// result's summary.json gives: the caution, the optimiser's settings,
// the coupling solvers, the constraints as declared, the stop and its
// detail, the tool version and the script's hash.
func wantSameRecord(t *testing.T, path string, sum report.Record) {
	t.Helper()
	st, err := store.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	meta, _ := st.Run()
	rec, err := st.StoredRecord()
	if err != nil {
		t.Fatal(err)
	}
	var defs []report.ConstraintDefinition
	for _, c := range rec.Constraints {
		defs = append(defs, report.ConstraintDefinition{Name: c.Name, Relation: c.String(), Unit: c.Unit})
	}
	for _, d := range []struct {
		what      string
		got, want any
	}{
		{"caution", rec.Caution, sum.Caution},
		{"optimiser settings", meta.Settings, sum.OptimizerSettings},
		{"coupling solvers", rec.CouplingSolvers, sum.CouplingSolvers},
		{"coupling solver note", rec.SolverNote, sum.SolverNote},
		{"constraints as declared", defs, sum.ConstraintDefinitions},
		{"stop", meta.Stop.String(), sum.Stop},
		{"stop detail", rec.StopDetail, sum.StopDetail},
		{"tool version", meta.ToolVersion, sum.ToolVersion},
		{"script SHA-256", meta.ScriptSHA256, sum.ScriptSHA256},
	} {
		if !reflect.DeepEqual(d.got, d.want) {
			t.Errorf("%s: %s says %v, summary.json %v", d.what, filepath.Base(path), d.got, d.want)
		}
	}
	if rec.Caution == "" || len(rec.CouplingSolvers) == 0 || len(defs) == 0 {
		t.Errorf("%s holds no caution, coupling solver or constraint: %+v", path, rec)
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
	for _, tc := range []struct{ name, cells string }{
		{"simplex", sellarCells},
		{"gradient", strings.Replace(sellarCells, "optimizers.NelderMead{MaxEvaluations: 30}", "optimizers.Sextant{}", 1)},
	} {
		t.Run("written from the stores, "+tc.name, func(t *testing.T) {
			// the interpreter died before it wrote the folder: the folder
			// is written from the case stores alone, and its summary is
			// the one the run wrote but for the times (before, it said the
			// coupling solvers were "not recorded" and lacked the stop
			// detail and the sensitivity)
			dir := filepath.Join(t.TempDir(), "out")
			file := writeStudy(t, "finished", tc.cells)
			if stderr, err := runInto(t, context.Background(), file, dir, nil); err != nil {
				t.Fatalf("%v\n%s", err, stderr)
			}
			idx, err := report.ReadIndex(dir)
			if err != nil {
				t.Fatal(err)
			}
			sub := filepath.Join(dir, idx.Principal)
			ran, err := report.ReadRecord(filepath.Join(sub, report.SummaryFile))
			if err != nil {
				t.Fatal(err)
			}
			for _, p := range []string{filepath.Join(dir, report.SummaryFile), filepath.Join(sub, report.SummaryFile), filepath.Join(dir, StoreFile)} {
				if err := os.Remove(p); err != nil {
					t.Fatal(err)
				}
			}
			text, _ := os.ReadFile(file)
			if _, err := WriteStored(context.Background(), dir, string(text), []string{filepath.Join(sub, StoreFile)}, nil, false); err != nil {
				t.Fatal(err)
			}
			wantPrincipalAgrees(t, dir)
			stored, err := report.ReadRecord(filepath.Join(sub, report.SummaryFile))
			if err != nil {
				t.Fatal(err)
			}
			if tc.name == "gradient" && ran.Sensitivity == nil {
				t.Fatalf("the gradient run's summary has no sensitivity to compare")
			}
			ran.Timestamps, stored.Timestamps = store.Timestamps{}, store.Timestamps{}
			a, _ := json.MarshalIndent(ran, "", " ")
			b, _ := json.MarshalIndent(stored, "", " ")
			if !bytes.Equal(a, b) {
				t.Errorf("summary.json written from the store differs from the run's:\n%s\nthe run's:\n%s", b, a)
			}
		})
	}
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

// A session result whose kept evaluations were let go at its End
// (KeepWithin) has its store closed before the folder is written: the
// best point's sensitivity, which Sextant computes after its last
// evaluation, must reach results.db all the same, as it reaches
// summary.json. Before, SetOutcome could not write it to the closed
// store, and results.db lacked it.
func TestLetGoStoreKeepsTheSensitivity(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	outs := NewRunOutputs(dir)
	outs.KeepWithin = 1 // every run's evaluations are let go at its End
	s, out, errb := newTest(t, Options{OutDir: dir, Outputs: outs})
	defer s.Close()
	serve(t, s, strings.Replace(keptRun, "optimizers.NelderMead{MaxEvaluations: 120}", "optimizers.Sextant{}", 1)+"@report res\n")
	if errb.Len() > 0 {
		t.Fatalf("stderr: %s", errb)
	}
	if !strings.Contains(out.String(), "read back from") {
		t.Fatalf("the report was not read back from a let-go store: %s", out)
	}
	folder := filepath.Join(dir, "sellar")
	sum, err := store.ReadSummary(filepath.Join(folder, report.SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	if sum.Sensitivity == nil {
		t.Fatal("summary.json has no sensitivity to compare")
	}
	st, err := store.Open(filepath.Join(folder, StoreFile))
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	r, err := st.Result()
	if err != nil {
		t.Fatal(err)
	}
	a, _ := json.MarshalIndent(sum.Sensitivity, "", " ")
	b, _ := json.MarshalIndent(store.NewSummary(r, store.SummaryOptions{}).Sensitivity, "", " ")
	if !bytes.Equal(a, b) {
		t.Errorf("results.db's sensitivity:\n%s\nsummary.json's:\n%s", b, a)
	}
}
