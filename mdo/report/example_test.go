package report_test

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/report"
	"couplet/mdo/store"
)

// A report of a small run with the standard plots and the design
// structure matrix.
func ExampleWrite() {
	st, _ := mdo.SellarStudy(mdo.MDF)
	st.Workers = 1
	ev, _ := st.NewEvaluator()
	_ = ev.Begin("grid", nil)
	var evs []*mdo.Evaluation
	for i := 0; i < 20; i++ {
		e, _ := ev.EvaluateOne(context.Background(), []float64{float64(i) / 20, 0.6, 0.1})
		evs = append(evs, e)
	}
	r, _ := ev.Finish(mdo.StopBudget)
	top, err := plot.DSM(st.System)
	if err != nil {
		fmt.Println(err)
		return
	}
	var page bytes.Buffer
	if err := report.Write(&page, r, report.Options{Script: "// study script", Evaluations: evs, Figures: []*plot.Figure{top}}); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(strings.Count(page.String(), "<svg"), "figures")
	fmt.Println(strings.Contains(page.String(), "airworthiness"))
	// Output:
	// 3 figures
	// true
}

// A native Go program writes a run's folder: summary.json,
// evaluations.csv, the plots and report.html, without the interpreter.
func ExampleWriteRun() {
	dir, err := os.MkdirTemp("", "run-")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	st, _ := mdo.SellarStudy(mdo.MDF)
	db, err := store.Create(filepath.Join(dir, "results.db"), store.Options{ToolVersion: "my program"})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer db.Close()
	st.Recorder, st.Workers = db, 1
	ev, _ := st.NewEvaluator()
	_ = ev.Begin("grid", nil)
	for i := 0; i < 10; i++ {
		_, _ = ev.EvaluateOne(context.Background(), []float64{float64(i) / 10, 0.6, 0.1})
	}
	r, _ := ev.Finish(mdo.StopBudget)
	files, err := report.WriteRun(context.Background(), dir, report.Run{Result: r, Study: st, Store: db, ToolVersion: "my program"})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range files {
		fmt.Println(filepath.Base(f))
	}
	// Output:
	// summary.json
	// evaluations.csv
	// history.svg
	// history.png
	// dsm.svg
	// dsm.png
	// report.html
}
