package report

import (
	"context"
	"database/sql"
	"os"
	"path/filepath"
	"testing"

	"couplet/mdo"
	"couplet/mdo/store"
)

// openGridRun is gridRun on the Sellar problem with the store left
// open after End (as a session keeps it until it closes its stores):
// it returns the entry and the number of evaluations.
func openGridRun(t *testing.T, dir, folder string, n int) (IndexEntry, int) {
	t.Helper()
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	st.Name, st.Seed, st.Workers = folder, 3, 1
	sub := filepath.Join(dir, folder)
	if err := os.MkdirAll(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	db, err := store.Create(filepath.Join(sub, StoreFile), store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	st.Recorder = db
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
	}
	var points [][]float64
	for i := 0; i < n; i++ {
		points = append(points, []float64{float64(i%10) / 10, float64(i/10%10) / 10, float64(i/100) / 10})
	}
	if _, err := ev.Evaluate(context.Background(), points); err != nil {
		t.Fatal(err)
	}
	r, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := WriteRun(context.Background(), sub, Run{Result: r, Study: st, Store: db}); err != nil {
		t.Fatal(err)
	}
	rec, err := ReadRecord(filepath.Join(sub, SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	return IndexEntry{Folder: folder, Summary: rec}, r.Evaluations
}

// rowsAlone counts the evaluations of the store file path read on its
// own, copied into a folder without its write-ahead log.
func rowsAlone(t *testing.T, path string) int {
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
	var n int
	if err := db.QueryRow("SELECT count(*) FROM evaluation_data").Scan(&n); err != nil {
		t.Fatalf("%s read alone: %v", path, err)
	}
	return n
}

// The script's folder's results.db, linked or (where the file system
// has no hard links) copied from the principal result's while its store
// is still open after End, is a complete database on its own, with as
// many evaluations as the summary says. Before, the copy was of the
// file's bytes and the rows were in the store's write-ahead log until
// Close: the copy, and the file the hard link names read without that
// log, had no evaluations table at all.
func TestWriteIndexLinksACompleteStore(t *testing.T) {
	for _, tc := range []struct {
		name string
		link func(src, dst string) error
	}{{"hard link", store.LinkFile}, {"copy", store.CopyFile}} {
		t.Run(tc.name, func(t *testing.T) {
			defer func(was func(src, dst string) error) { linkStore = was }(linkStore)
			linkStore = tc.link
			dir := t.TempDir()
			e, n := openGridRun(t, dir, "wing", 300)
			if _, err := WriteIndex(dir, []IndexEntry{e}); err != nil {
				t.Fatal(err)
			}
			a, _ := os.Stat(filepath.Join(dir, "wing", StoreFile))
			b, _ := os.Stat(filepath.Join(dir, StoreFile))
			if linked := os.SameFile(a, b); linked != (tc.name == "hard link") {
				t.Errorf("results.db is the result's file: %v", linked)
			}
			got := rowsAlone(t, filepath.Join(dir, StoreFile))
			idx, err := ReadIndex(dir)
			if err != nil {
				t.Fatal(err)
			}
			if got != n || idx.Evaluations != n {
				t.Errorf("results.db holds %d evaluations, summary.json says %d; the run made %d", got, idx.Evaluations, n)
			}
		})
	}
}
