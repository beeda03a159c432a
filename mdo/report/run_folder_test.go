package report

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/store"
)

// recordedRun evaluates n points of a study into a store in dir and
// returns the result and the store.
func recordedRun(t testing.TB, dir string, st *mdo.Study, n int) (*mdo.Result, *store.Store) {
	return recordedRunWith(t, dir, st, n, store.Options{ToolVersion: "t"})
}

// recordedRunWith is recordedRun with the store's options.
func recordedRunWith(t testing.TB, dir string, st *mdo.Study, n int, opt store.Options) (*mdo.Result, *store.Store) {
	t.Helper()
	s, err := store.Create(filepath.Join(dir, "results.db"), opt)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	st.Recorder, st.Script, st.Workers = s, script, 1
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
	}
	for i := 0; i < n; i++ {
		u := float64(i) / float64(n)
		if _, err := ev.EvaluateOne(context.Background(), []float64{u, 1 - u, u / 3}); err != nil {
			t.Fatal(err)
		}
	}
	r, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		t.Fatal(err)
	}
	return r, s
}

func TestWriteRun(t *testing.T) {
	dir := t.TempDir()
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	r, s := recordedRun(t, dir, st, 30)
	own := func(context.Context, *mdo.Result, *mdo.Study) ([]*plot.Figure, []string) {
		return []*plot.Figure{ownFigure(t)}, []string{"a note of our own"}
	}
	out := filepath.Join(dir, "out")
	files, err := WriteRun(context.Background(), out, Run{Result: r, Study: st, Store: s, Script: script, ToolVersion: "t", Figures: []FigureSource{own}})
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"summary.json", "report.html", "evaluations.csv", "dsm.svg", "dsm.png", "history.svg", "history.png", "own.svg", "own.png"} {
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
	if sum.Evaluations != s.Rows() || sum.Evaluations != 30 || sum.Best == nil {
		t.Errorf("summary counts %d evaluations (best %v), the store holds %d rows, want 30", sum.Evaluations, sum.Best, s.Rows())
	}
	page, err := os.ReadFile(filepath.Join(out, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"a figure of our own", "a note of our own", "design structure matrix"} {
		if !strings.Contains(string(page), w) {
			t.Errorf("report lacks %q", w)
		}
	}
}

// A two-objective study whose every evaluation fails has no Pareto front
// to draw: the figure is left out with the reason in its place and the
// summary, CSV, history and report are still written.
func TestWriteRunEveryEvaluationFailed(t *testing.T) {
	dir := t.TempDir()
	failing := mdo.Func("failing", []string{"x", "z1", "z2"}, []string{"f", "g"}, func(in, out []float64) error {
		return errors.New("no solution for this design")
	})
	sys, err := mdo.NewSystem(failing)
	if err != nil {
		t.Fatal(err)
	}
	st := &mdo.Study{Name: "doomed", System: sys,
		Design:     []mdo.DesignVar{mdo.Continuous("x", 0, 1), mdo.Continuous("z1", 0, 1), mdo.Continuous("z2", 0, 1)},
		Objectives: []mdo.Objective{mdo.Minimize("f"), mdo.Minimize("g")}}
	r, s := recordedRun(t, dir, st, 6)
	if r.Failed != 6 {
		t.Fatalf("%d of 6 evaluations failed, want all", r.Failed)
	}
	out := filepath.Join(dir, "out")
	if _, err := WriteRun(context.Background(), out, Run{Result: r, Study: st, Store: s, Script: script}); err != nil {
		t.Fatalf("run folder not written: %v", err)
	}
	for _, name := range []string{"summary.json", "evaluations.csv", "report.html", "history.svg"} {
		if _, err := os.Stat(filepath.Join(out, name)); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	if _, err := os.Stat(filepath.Join(out, "pareto.svg")); err == nil {
		t.Error("pareto.svg written for a study without a feasible evaluation")
	}
	page, err := os.ReadFile(filepath.Join(out, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(page), "(pareto) could not be drawn: plot:") {
		t.Errorf("report does not say why the Pareto front is left out:\n%s", page)
	}
}

// A run whose script handed over no result gets summary.json alone,
// saying so.
func TestWriteRunWithoutResult(t *testing.T) {
	out := t.TempDir()
	files, err := WriteRun(context.Background(), out, Run{Name: "sketch", Seed: 7, Cells: 3, Script: script})
	if err != nil || len(files) != 1 {
		t.Fatalf("files %v, err %v; want summary.json alone", files, err)
	}
	sum, err := store.ReadSummary(files[0])
	if err != nil {
		t.Fatal(err)
	}
	if sum.Study != "sketch" || sum.Seed != 7 || sum.Cells != 3 || sum.Best != nil || !strings.Contains(sum.Note, "cell.Publish") {
		t.Errorf("summary %+v", sum)
	}
}

// A file of the run folder that cannot be written (a folder in its place)
// does not stop the others: WriteRun writes every other file, the report
// included, and its error names the one it could not write, each of two
// written at the same time included.
func TestWriteRunWritesTheRestPastAFailure(t *testing.T) {
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	r, s := recordedRun(t, t.TempDir(), st, 30)
	every := []string{"summary.json", "evaluations.csv", "history.svg", "history.png", "dsm.svg", "dsm.png", "report.html"}
	for _, blocked := range [][]string{
		{"summary.json"},
		{"evaluations.csv"},
		{"history.png"},
		{"dsm.svg"},
		{"report.html"},
		{"evaluations.csv", "dsm.png", "history.svg"},
	} {
		t.Run(strings.Join(blocked, "+"), func(t *testing.T) {
			out := t.TempDir()
			for _, name := range blocked {
				if err := os.MkdirAll(filepath.Join(out, name, "in the way"), 0o755); err != nil {
					t.Fatal(err)
				}
			}
			files, err := WriteRun(context.Background(), out, Run{Result: r, Study: st, Store: s, Script: script})
			if err == nil {
				t.Fatalf("WriteRun wrote over the folders %v without an error", blocked)
			}
			for _, name := range every {
				p := filepath.Join(out, name)
				if slices.Contains(blocked, name) {
					if !strings.Contains(err.Error(), name) {
						t.Errorf("the error does not name %s: %v", name, err)
					}
					if slices.Contains(files, p) {
						t.Errorf("%s is among the files written", name)
					}
					continue
				}
				if fi, err := os.Stat(p); err != nil || !fi.Mode().IsRegular() || fi.Size() == 0 {
					t.Errorf("%s not written past the failure: %v", name, err)
				}
				if !slices.Contains(files, p) {
					t.Errorf("%s not among the files written: %v", name, files)
				}
			}
		})
	}
}
