package repl

import (
	"context"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"couplet/mdo"
)

// @save refuses a session whose cell was interrupted part-way: its replay
// would run the optimiser to its end and give another result. The
// message names the cell and the remedies, and no file is written; once
// the cell has run again to its end, @save keeps the cells, and their
// replay gives that run's result. The interrupt comes with the 4th
// recorded evaluation (the recorder is called from the optimiser's
// goroutine, one point at a time), so the study needs no slow analysis:
// the test waits on no clock.
func TestSaveRefusesAnInterruptedCell(t *testing.T) {
	f, err := ReadStudy(filepath.Join("testdata", "quick_optimisation.study"))
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
	interrupted := s.Env().Published()[0]
	if interrupted.Evaluations != 4 || interrupted.Stop != mdo.StopCancelled {
		t.Fatalf("the interrupted run: %d evaluations, stop %v; want 4, cancelled", interrupted.Evaluations, interrupted.Stop)
	}
	rec.at = -1
	s.Command(context.Background(), "@again 2")
	if c := s.Cells()[2]; c.Err != nil || c.Interrupted {
		t.Fatalf("@again 2: err %v interrupted %v", c.Err, c.Interrupted)
	}
	whole := s.Env().Published()[1]
	if whole.Stop == mdo.StopCancelled || whole.Evaluations <= 4 {
		t.Fatalf("the run to its end: %d evaluations, stop %v", whole.Evaluations, whole.Stop)
	}
	s.Command(context.Background(), "@save "+path)
	saved, err := ReadStudy(path)
	if err != nil {
		t.Fatalf("%v (stderr %s)", err, errb)
	}
	if len(saved.Cells) != 2 || saved.Cells[1].Source != f.Cells[1].Source {
		t.Fatalf("saved %d cells, want cell 1 and the cell run to its end", len(saved.Cells))
	}
	// the saved file replays to the result of the run to its end
	r, _, _ := newTest(t, Options{Recorder: func(*mdo.Study) (mdo.Recorder, error) { return &interruptingRecorder{at: -1}, nil }})
	defer r.Close()
	if err := r.Replay(context.Background(), saved, false); err != nil {
		t.Fatal(err)
	}
	replayed := r.Env().Published()[0]
	if replayed.Evaluations != whole.Evaluations || !slices.Equal(replayed.Best.Design, whole.Best.Design) || !slices.Equal(replayed.Best.Objectives, whole.Best.Objectives) {
		t.Errorf("replay: %d evaluations, best %v %v; the run to its end: %d, %v %v",
			replayed.Evaluations, replayed.Best.Design, replayed.Best.Objectives, whole.Evaluations, whole.Best.Design, whole.Best.Objectives)
	}
}
