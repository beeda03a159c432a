package report_test

import (
	"bytes"
	"context"
	"fmt"
	"strings"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/report"
)

// A report of a small run with the standard plots and a top view.
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
	top, err := plot.TopView(plot.Aircraft{WingSpan: 16, WingRootChord: 4.5, WingTipChord: 1.2, WingSweepLE: 35, WingApex: 10,
		FuselageLength: 26, FuselageDiameter: 2.2})
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
