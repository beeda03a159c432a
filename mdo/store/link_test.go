package store

import (
	"os"
	"path/filepath"
	"testing"
	"time"

	"couplet/mdo"
	"couplet/mdo/runfolder"
)

// countAlone counts the evaluation rows of the store file path read on
// its own: a copy of it in a fresh folder, without the write-ahead log
// or shared memory of the store it was made from (as a file mailed or
// copied out of the run folder is read).
func countAlone(t *testing.T, path string) int {
	t.Helper()
	alone := filepath.Join(t.TempDir(), "alone.db")
	if err := runfolder.LinkFileWith(path, alone, runfolder.LinkOptions{NoHardLink: true}); err != nil {
		t.Fatal(err)
	}
	_, rows := queryAll(t, alone, "SELECT count(*) FROM evaluation_data")
	return int(rows[0][0].(float64)) // queryAll reads an INTEGER as float64
}

// A store linked or copied into a second name (a script's folder shows
// its principal result's results.db so) is a complete database: a copy
// made while the run still writes holds every committed row, those
// still in the write-ahead log included, and after End the file a hard
// link names holds them all before the store is closed. Before, the
// copy was of the file's bytes and End left the log to Close: a store of
// 300 evaluations linked after End and before Close read 0 rows ("no
// such table: evaluation_data"), its rows all in the log; copied, the
// same.
func TestLinkedStoreIsComplete(t *testing.T) {
	const n = 300 // 720 kB of rows: all in the log (it is copied at 2 MiB)
	tests := []struct {
		name  string
		link  func(src, dst string) error
		ended bool // linked after End (else after a Flush, mid-run)
	}{
		{"copied mid-run", CopyFile, false},
		{"copied after End", CopyFile, true},
		{"linked after End", LinkFile, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			src := filepath.Join(dir, "study", "results.db")
			if err := os.MkdirAll(filepath.Dir(src), 0o755); err != nil {
				t.Fatal(err)
			}
			s, err := Create(src, Options{BatchSize: 100, FlushInterval: time.Hour})
			if err != nil {
				t.Fatal(err)
			}
			defer s.Close()
			if err := s.Begin(syntheticRunOf(jetShape)); err != nil {
				t.Fatal(err)
			}
			var evs []*mdo.Evaluation
			for i := 1; i <= n; i++ {
				e := new(mdo.Evaluation)
				syntheticEvalOf(e, i, jetShape)
				evs = append(evs, e)
				if err := s.Record(e); err != nil {
					t.Fatal(err)
				}
			}
			if err := s.Flush(); err != nil {
				t.Fatal(err)
			}
			if tc.ended {
				if err := s.End(&mdo.Result{Stop: mdo.StopBudget, Best: evs[7]}); err != nil {
					t.Fatal(err)
				}
			}
			// a stale log beside the old name is not read with the new file
			dst := filepath.Join(dir, "results.db")
			for _, p := range []string{dst, dst + "-wal", dst + "-shm"} {
				if err := os.WriteFile(p, []byte("an earlier run's"), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			if err := tc.link(src, dst); err != nil {
				t.Fatal(err)
			}
			for _, p := range []string{dst + "-wal", dst + "-shm"} {
				if _, err := os.Lstat(p); err == nil {
					t.Errorf("%s is left beside the new file", filepath.Base(p))
				}
			}
			if got := countAlone(t, dst); got != n {
				t.Errorf("%s read alone holds %d evaluations, want %d", filepath.Base(dst), got, n)
			}
			back, err := Open(dst)
			if err != nil {
				t.Fatal(err)
			}
			defer back.Close()
			got, err := back.Evaluations()
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != n {
				t.Fatalf("read back %d evaluations, want %d", len(got), n)
			}
			for i := range got {
				if f := sameEvaluation(got[i], evs[i]); f != "" {
					t.Fatalf("evaluation %d read back differs in %s", evs[i].ID, f)
				}
			}
			if meta, _ := back.Run(); tc.ended && meta.Stop != mdo.StopBudget {
				t.Errorf("the linked store's run stopped %v, want %v", meta.Stop, mdo.StopBudget)
			}
		})
	}
}
