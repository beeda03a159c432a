package report

import (
	"context"
	"database/sql"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"testing"

	"couplet/mdo"
	"couplet/mdo/runfolder"
	"couplet/mdo/store"
)

// rowsAlone counts the evaluations of the store file path read on its
// own, copied into a folder without its write-ahead log.
func rowsAlone(t *testing.T, path string) int {
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
			var points [][]float64
			for i := 0; i < 300; i++ {
				points = append(points, []float64{float64(i%10) / 10, float64(i/10%10) / 10, float64(i/100) / 10})
			}
			e, _ := gridRunOpen(t, dir, "wing", "wing",
				[]mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10), mdo.Continuous("z2", 0, 10)}, nil, nil, points)
			n := e.Summary.Evaluations
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
			if got != len(points) || idx.Evaluations != n || n != len(points) {
				t.Errorf("results.db holds %d evaluations, summary.json says %d; the run made %d", got, idx.Evaluations, len(points))
			}
		})
	}
}

// A principal result without a case store (no store recorded its run)
// leaves the script's folder without results.db: before, the earlier
// principal's stayed, beside a summary.json of another result.
func TestWriteIndexDropsAnEarlierPrincipalsStore(t *testing.T) {
	dir := t.TempDir()
	a := sellarGrid(t, dir, "wing", "wing", [][]float64{{0.1, 0.7, 0.2}, {0.05, 0.6, 0.05}})
	if _, err := WriteIndex(dir, []IndexEntry{a}); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, StoreFile)); err != nil {
		t.Fatalf("the first principal's results.db: %v", err)
	}
	// a result no store recorded
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	st.Name, st.Workers = "tail", 1
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Evaluate(context.Background(), [][]float64{{0.2, 0.65, 0.1}}); err != nil {
		t.Fatal(err)
	}
	r, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		t.Fatal(err)
	}
	sub := filepath.Join(dir, "tail")
	if _, err := WriteRun(context.Background(), sub, Run{Result: r, Study: st}); err != nil {
		t.Fatal(err)
	}
	rec, err := ReadRecord(filepath.Join(sub, SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := WriteIndex(dir, []IndexEntry{{Folder: "tail", Summary: rec}}); err != nil {
		t.Fatal(err)
	}
	if idx, _ := ReadIndex(dir); idx.Principal != "tail" {
		t.Fatalf("principal %q, want tail", idx.Principal)
	}
	if _, err := os.Lstat(filepath.Join(dir, StoreFile)); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("results.db of the earlier principal is left beside the summary of one without a store (%v)", err)
	}
	if _, err := os.Stat(filepath.Join(dir, ReportFile)); err != nil {
		t.Errorf("the principal's report.html: %v", err)
	}
}
