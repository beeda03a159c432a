package report

import (
	"bytes"
	"context"
	"errors"
	"math"
	"regexp"
	"strings"
	"testing"
	"time"

	"couplet/mdo"
	"couplet/mdo/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// script is an invented study script shown in the report.
const script = `// cell 1
study, _ := mdo.SellarStudy(mdo.MDF)
study.Seed = 5 // a <comment> & "quotes"
`

// sellarResult evaluates a grid of the Sellar study.
func sellarResult(t testing.TB, n int, objs ...mdo.Objective) (*mdo.Result, []*mdo.Evaluation) {
	t.Helper()
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	if len(objs) > 0 {
		st.Objectives = objs
	}
	st.Seed, st.Workers = 5, 1
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
	}
	xs := make([][]float64, n)
	for i := range xs {
		xs[i] = []float64{math.Mod(float64(i)*0.618034, 1), math.Mod(float64(i)*0.414214, 1), math.Mod(float64(i)*0.732051, 1)}
	}
	evs, err := ev.Evaluate(context.Background(), xs)
	if err != nil {
		t.Fatal(err)
	}
	r, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		t.Fatal(err)
	}
	return r, evs
}

// demoReport renders a report with every kind of content.
func demoReport(t testing.TB) string {
	t.Helper()
	r, evs := sellarResult(t, 60)
	sys, err := mdo.NewSystem(mdo.Sellar()...)
	if err != nil {
		t.Fatal(err)
	}
	dsm, err := plot.DSM(sys)
	if err != nil {
		t.Fatal(err)
	}
	top := ownFigure(t)
	solvers, note := CouplingSolvers(&mdo.Study{System: sys})
	rec := &Record{OptimizerSettings: map[string]string{"Samples": "60"}, CouplingSolvers: solvers, SolverNote: note}
	var b bytes.Buffer
	err = Write(&b, r, Options{Script: script, ToolVersion: "couplet test", Evaluations: evs, ScatterMatrix: true,
		Figures: []*plot.Figure{dsm, top}, Generated: time.Date(2026, 12, 1, 12, 0, 0, 0, time.UTC), Record: rec})
	if err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// ownFigure is a figure an application draws on the package plot's
// builder.
func ownFigure(t testing.TB) *plot.Figure {
	t.Helper()
	p := plot.NewPlot("a figure of our own", plot.AxisLabel("angle", "deg"), plot.AxisLabel("value", ""))
	if err := plot.AddLine(p, plotter.XYs{{X: 0, Y: 0}, {X: 10, Y: 1}}, plot.LineColor(0), 1.5, "line"); err != nil {
		t.Fatal(err)
	}
	return plot.NewFigure("own", "a figure of our own", 10*vg.Centimeter, 8*vg.Centimeter, func(c draw.Canvas) { p.Draw(c) })
}

// A figure that cannot be drawn, because its maker said so or because
// its drawing fails, is left out with the reason written in its place;
// the rest of the report is written.
func TestReportFigureLeftOut(t *testing.T) {
	r, evs := sellarResult(t, 20)
	broken := plot.NewFigure("broken", "a broken figure", vg.Centimeter, vg.Centimeter, func(draw.Canvas) { panic("no axes to draw on") })
	missing := plot.LeftOut("front", "front of a failed study", errors.New("plot: no feasible evaluation to draw"))
	var b bytes.Buffer
	if err := Write(&b, r, Options{Evaluations: evs, Figures: []*plot.Figure{missing, ownFigure(t), broken}}); err != nil {
		t.Fatalf("report not written: %v", err)
	}
	html := b.String()
	for _, w := range []string{
		"Figure 3 (front) could not be drawn: plot: no feasible evaluation to draw",
		"Figure 5 (broken) could not be drawn: plot: rendering broken: no axes to draw on",
		"Figure 4. a figure of our own", "Best design",
	} {
		if !strings.Contains(html, w) {
			t.Errorf("report lacks %q", w)
		}
	}
	if n := strings.Count(html, "<svg"); n != 3 {
		t.Errorf("report embeds %d SVG figures, want 3 (history, parallel coordinates, our own)", n)
	}
}

func TestReportContent(t *testing.T) {
	html := demoReport(t)
	wants := []string{
		"<title>Study report: sellar</title>",
		"Provenance", "optimiser", "grid", "seed", "script SHA-256", "couplet test", "Go version",
		"Best design", "design variable", "<td>z1</td>", "lower bound",
		"Constraints at the best design", "g1 &gt;= 3.16", "g2 &lt;= 24", "margin",
		"not fit for certification, flight or airworthiness decisions",
		"applicable regulations and licensed engineering practice",
		"// a &lt;comment&gt; &amp; &#34;quotes&#34;", // the script, escaped
		"optimisation history", "parallel coordinates", "scatter matrix", "design structure matrix", "a figure of our own",
	}
	for _, w := range wants {
		if !strings.Contains(html, w) {
			t.Errorf("report lacks %q", w)
		}
	}
	if n := strings.Count(html, "<svg"); n != 5 {
		t.Errorf("report embeds %d SVG figures, want 5", n)
	}
	if strings.Contains(html, "<?xml") {
		t.Error("report keeps an XML prolog inside the HTML")
	}
	// self-contained: nothing is fetched from elsewhere
	external := regexp.MustCompile(`(?i)<(link|script|img|iframe)\b|\bsrc\s*=|url\(|@import|xlink:href="http`)
	if m := external.FindString(html); m != "" {
		t.Errorf("report refers to an external resource: %q", m)
	}
}

func TestReportTwoObjectives(t *testing.T) {
	r, evs := sellarResult(t, 60, mdo.Minimize("f"), mdo.Maximize("y2"))
	var b bytes.Buffer
	if err := Write(&b, r, Options{Evaluations: evs}); err != nil {
		t.Fatal(err)
	}
	html := b.String()
	for _, w := range []string{"Pareto front (", "maximise y2 [-]", "No script was recorded"} {
		if !strings.Contains(html, w) {
			t.Errorf("two-objective report lacks %q", w)
		}
	}
	if r.Front == nil || !strings.Contains(html, "non-dominated feasible designs") {
		t.Errorf("front of %d points not tabulated", len(r.Front))
	}
}

func TestReportErrors(t *testing.T) {
	var b bytes.Buffer
	if err := Write(&b, nil, Options{}); err == nil || !strings.Contains(err.Error(), "result is nil") {
		t.Errorf("nil result: err = %v", err)
	}
	// a run with no evaluation still renders, noting what is missing
	r := &mdo.Result{Study: "empty", Objectives: []mdo.Objective{mdo.Minimize("f")}}
	if err := Write(&b, r, Options{}); err != nil {
		t.Fatalf("empty result: %v", err)
	}
	if !strings.Contains(b.String(), "Study report: empty") {
		t.Error("empty result: no title")
	}
}
