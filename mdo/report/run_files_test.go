package report

import (
	"context"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/store"
)

func TestWriteRun(t *testing.T) {
	dir := t.TempDir()
	s, err := store.Create(filepath.Join(dir, "results.db"), store.Options{ToolVersion: "t"})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	st.Recorder, st.Script, st.Workers = s, script, 1
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 30; i++ {
		u := float64(i) / 30
		if _, err := ev.EvaluateOne(context.Background(), []float64{u, 1 - u, u / 3}); err != nil {
			t.Fatal(err)
		}
	}
	r, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		t.Fatal(err)
	}
	dsm, err := plot.DSM(st.System)
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	files, err := WriteRun(out, r, RunFiles{Store: s, Script: script, ToolVersion: "t", Figures: []*plot.Figure{dsm}, StandardPlots: true, CSV: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"summary.json", "report.html", "evaluations.csv", "dsm.svg", "dsm.png", "history.svg", "history.png", "parallel_coordinates.svg"} {
		p := filepath.Join(out, name)
		if !slices.Contains(files, p) {
			t.Errorf("%s not among the files written: %v", name, files)
		}
		if st, err := os.Stat(p); err != nil || st.Size() == 0 {
			t.Errorf("%s: %v", name, err)
		}
	}
	sum, err := store.ReadSummary(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if sum.Evaluations != s.Rows() || sum.Evaluations != 30 {
		t.Errorf("summary counts %d evaluations, the store holds %d rows, want 30", sum.Evaluations, s.Rows())
	}
}
