package repl

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"couplet/mdo"
)

// @save refuses a session whose cell was interrupted part-way: its replay
// would run the optimiser to its end and give another result. The
// message names the cell and the remedies, and no file is written; once
// the cell has run again to its end, @save keeps the cells.
func TestSaveRefusesAnInterruptedCell(t *testing.T) {
	f, err := ReadStudy(filepath.Join("testdata", "slow_optimisation.study"))
	if err != nil {
		t.Fatal(err)
	}
	rec := &interruptingRecorder{at: 4}
	s, out, errb := newTest(t, Options{Recorder: func(*mdo.Study) (mdo.Recorder, error) { return rec, nil }})
	defer s.Close()
	rec.s = s
	for _, c := range f.Cells[:2] {
		if cl := s.Exec(context.Background(), c.Source); cl.Err != nil {
			t.Fatal(cl.Err)
		}
	}
	if !s.Cells()[1].Interrupted {
		t.Fatal("cell 2 was not interrupted")
	}
	path := filepath.Join(t.TempDir(), "kept.study")
	s.Command(context.Background(), "@save "+path)
	for _, w := range []string{"cell 2 was interrupted", "not saved", "@again 2", "MaxEvaluations"} {
		if !strings.Contains(errb.String(), w) {
			t.Errorf("@save's refusal %q does not say %q", errb.String(), w)
		}
	}
	if _, err := os.Stat(path); err == nil {
		t.Error("@save wrote the study file of an interrupted session")
	}
	if strings.Contains(out.String(), "saved") {
		t.Errorf("output %q says it saved", out)
	}
	// run again to its end (no interrupt now), the cell replaces the
	// interrupted one in the file
	rec.at = -1
	s.Command(context.Background(), "@again 2")
	if c := s.Cells()[2]; c.Err != nil || c.Interrupted {
		t.Fatalf("@again 2: err %v interrupted %v", c.Err, c.Interrupted)
	}
	s.Command(context.Background(), "@save "+path)
	saved, err := ReadStudy(path)
	if err != nil {
		t.Fatalf("%v (stderr %s)", err, errb)
	}
	if len(saved.Cells) != 2 || saved.Cells[1].Source != f.Cells[1].Source {
		t.Errorf("saved %d cells, want cell 1 and the cell run to its end", len(saved.Cells))
	}
}
