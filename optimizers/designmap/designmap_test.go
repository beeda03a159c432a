package designmap

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/report"
	"couplet/mdo/store"
)

// toyStudy is the constrained toy problem of Gramacy et al. (2016,
// Technometrics 58(1), §4.1) on [0, 1]², with a third variable that does
// nothing and a corner where the analysis fails on purpose.
func toyStudy(t *testing.T) *mdo.Study {
	t.Helper()
	in := []mdo.Var{
		{Name: "x1", Description: "first", Unit: "m", Min: 0, Max: 1, Default: 0.5},
		{Name: "x2", Description: "second", Unit: "s", Min: 0, Max: 1, Default: 0.5},
		{Name: "x3", Description: "idle", Min: 0, Max: 1, Default: 0.5},
	}
	out := []mdo.Var{{Name: "f", Description: "objective"}, {Name: "c1", Description: "wave"}, {Name: "c2", Description: "disc"}}
	sys, err := mdo.NewSystem(mdo.FuncVars("toy", in, out, func(x, y []float64) error {
		if x[0] > 0.9 && x[1] > 0.9 {
			return errors.New("corner refused")
		}
		y[0] = x[0] + x[1]
		y[1] = 1.5 - x[0] - 2*x[1] - 0.5*math.Sin(2*math.Pi*(x[0]*x[0]-2*x[1]))
		y[2] = x[0]*x[0] + x[1]*x[1] - 1.5
		return nil
	}))
	if err != nil {
		t.Fatal(err)
	}
	return &mdo.Study{Name: "toy", System: sys,
		Design:      []mdo.DesignVar{mdo.Continuous("x1", 0, 1), mdo.Continuous("x2", 0, 1), mdo.Continuous("x3", 0, 1)},
		Objectives:  []mdo.Objective{mdo.Minimize("f")},
		Constraints: []mdo.Constraint{mdo.AtMost("c1", 0), mdo.AtMost("c2", 0)},
	}
}

// TestMap samples and draws the toy problem's map: the values on the grid
// are the function's, every constraint that changes sign is drawn and
// named, failed points are marked by their class, and the best feasible
// grid point lies near the published optimum f ≈ 0.5998 at (0.1954,
// 0.4044) (Gramacy et al. 2016; from memory).
func TestMap(t *testing.T) {
	s := toyStudy(t)
	d, err := Sample(context.Background(), s, Spec{X: "x1", Y: "x2", At: map[string]float64{"x3": 0.2}, Points: 41})
	if err != nil {
		t.Fatal(err)
	}
	if d.Analyses != 41*41 {
		t.Errorf("%d analyses, want 1681", d.Analyses)
	}
	failed := 0
	for j, y := range d.Ys {
		for i, x := range d.Xs {
			if x > 0.9 && y > 0.9 {
				failed++
				if d.Failures[j][i] != mdo.DisciplineFailed || !math.IsNaN(d.Z[j][i]) {
					t.Fatalf("(%g, %g): class %v value %g, want discipline-failed and NaN", x, y, d.Failures[j][i], d.Z[j][i])
				}
				continue
			}
			if math.Abs(d.Z[j][i]-(x+y)) > 1e-12 {
				t.Fatalf("f(%g, %g) = %g, want %g", x, y, d.Z[j][i], x+y)
			}
		}
	}
	if failed == 0 {
		t.Fatal("no failed corner on the grid")
	}
	bx, by := d.Xs[d.Best[0]], d.Ys[d.Best[1]]
	if math.Abs(bx+by-0.5998) > 0.05 {
		t.Errorf("best grid point (%g, %g), f = %g, published optimum 0.5998", bx, by, bx+by)
	}
	f, err := Figure(d)
	if err != nil {
		t.Fatal(err)
	}
	svgShows(t, f, []string{"c1 boundary", "c2 boundary", "failed: discipline-failed", "best feasible grid point", "x1 [m]", "x2 [s]"})
	files, err := plot.SaveAll(t.TempDir(), f)
	if err != nil || len(files) != 2 {
		t.Errorf("saved %v: %v", files, err)
	}
}

func TestMapBadSpec(t *testing.T) {
	s := toyStudy(t)
	for _, spec := range []Spec{
		{X: "x1", Y: "x1"},
		{X: "x1", Y: "nope"},
		{X: "x1", Y: "x2", Quantity: "g"},
		{X: "x1", Y: "x2", At: map[string]float64{"x3": 2}},
		{X: "x1", Y: "x2", Points: 1},
	} {
		if _, err := Sample(context.Background(), s, spec); err == nil {
			t.Errorf("%+v accepted", spec)
		}
	}
}

// TestMapInTheReport writes a run folder whose report holds the map.
func TestMapInTheReport(t *testing.T) {
	s := toyStudy(t)
	res, _ := analyse(t, s, [][]float64{{0.2, 0.4, 0.5}, {0.6, 0.6, 0.5}})
	reportHolds(t, t.TempDir(), report.Run{Result: res, Study: s, Figures: []report.FigureSource{Figures(Spec{X: "x1", Y: "x2", Points: 11})}},
		[]string{"f over x1 and x2", "c1 boundary", "121 further analyses"}, []string{"map_f.png"})
}

// analyse runs the points xs of study s as one run and returns its
// result and evaluations.
func analyse(t *testing.T, s *mdo.Study, xs [][]float64) (*mdo.Result, []*mdo.Evaluation) {
	t.Helper()
	ev, err := s.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("chosen points", nil); err != nil {
		t.Fatal(err)
	}
	evs, err := ev.Evaluate(context.Background(), xs)
	if err != nil {
		t.Fatal(err)
	}
	res, err := ev.Finish(mdo.StopComplete)
	if err != nil {
		t.Fatal(err)
	}
	return res, evs
}

// reportHolds writes the run folder of res with the figure source src
// into dir and checks that report.html holds each of want and that the
// files are written.
func reportHolds(t *testing.T, dir string, run report.Run, want, files []string) {
	t.Helper()
	written, err := report.WriteRun(context.Background(), dir, run)
	if err != nil {
		t.Fatal(err)
	}
	html, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range want {
		if !strings.Contains(string(html), w) {
			t.Errorf("report.html does not hold %q", w)
		}
	}
	for _, f := range files {
		if !slices.Contains(written, filepath.Join(dir, f)) {
			t.Errorf("files written %v, want %s among them", written, f)
		}
	}
}

// recordedRun analyses n seeded random points of the toy study and two in
// its failing corner, as a design of experiments would, and returns the
// result and the evaluations.
func recordedRun(t *testing.T, n int) (*mdo.Result, []*mdo.Evaluation) {
	t.Helper()
	rng := rand.New(rand.NewPCG(3, 4))
	var xs [][]float64
	for i := 0; i < n; i++ {
		xs = append(xs, []float64{rng.Float64(), rng.Float64(), rng.Float64()})
	}
	xs = append(xs, []float64{0.97, 0.96, 0.5}, []float64{0.93, 0.99, 0.1})
	return analyse(t, toyStudy(t), xs)
}

// TestMapFromEvaluations interpolates the toy problem's map from recorded
// analyses. The cubic interpolant with a linear tail reproduces a linear
// function exactly (Powell 1992), so f = x1 + x2 must come out to
// rounding; the disc constraint c2 = x1² + x2² − 1.5 is smooth and must
// be close; the grid corner nearest the failed analyses is blank.
func TestMapFromEvaluations(t *testing.T) {
	res, evs := recordedRun(t, 60)
	d, err := FromEvaluations(res, evs, Spec{X: "x1", Y: "x2", Points: 21})
	if err != nil {
		t.Fatal(err)
	}
	converged := 0
	for _, e := range evs {
		if e.Converged {
			converged++
		}
	}
	if d.Analyses != 0 || len(d.Samples) != 62 || !strings.Contains(d.Interpolated, fmt.Sprintf("%d converged of 62 recorded", converged)) {
		t.Errorf("analyses %d, %d samples, note %q", d.Analyses, len(d.Samples), d.Interpolated)
	}
	c2 := slices.Index(d.Constraints, "c2")
	var ss float64
	cells := 0
	for j, y := range d.Ys {
		for i, x := range d.Xs {
			if math.IsNaN(d.Z[j][i]) {
				continue
			}
			if math.Abs(d.Z[j][i]-(x+y)) > 1e-8 {
				t.Fatalf("f(%g, %g) interpolated %g, want %g", x, y, d.Z[j][i], x+y)
			}
			e := d.Margins[c2][j][i] - (1.5 - x*x - y*y)
			ss += e * e
			cells++
		}
	}
	// common practice (no source): a smooth quadratic from 60 points in
	// three variables is interpolated to a few hundredths
	if rms := math.Sqrt(ss / float64(cells)); rms > 0.03 {
		t.Errorf("c2 margin interpolated with RMS error %.4f, want below 0.03", rms)
	}
	if n := len(d.Xs) - 1; !math.IsNaN(d.Z[n][n]) || !strings.Contains(d.Interpolated, "left blank") {
		t.Errorf("corner value %g, note %q: want the corner next to the failed analyses blank", d.Z[n][n], d.Interpolated)
	}
	if math.IsNaN(d.BestAt[0]) || d.BestValue != res.Best.Objectives[0] {
		t.Errorf("best marked at %v with %g, the run's best is %v", d.BestAt, d.BestValue, res.Best.Objectives)
	}
	f, err := Figure(d)
	if err != nil {
		t.Fatal(err)
	}
	svgShows(t, f, []string{"interpolated from 62 recorded analyses", "not analysed", "c2 boundary", "recorded analysis failed: discipline-failed (projected)", "recorded analysis, feasible (projected)", "best analysed design"})
	if f.Name != "recorded_map_f" {
		t.Errorf("figure name %q", f.Name)
	}
}

func TestMapFromEvaluationsBadInput(t *testing.T) {
	res, evs := recordedRun(t, 20)
	tests := []struct {
		spec Spec
		evs  []*mdo.Evaluation
		want string
	}{
		{Spec{X: "x1", Y: "x1"}, evs, `X = "x1" and Y = "x1"`},
		{Spec{X: "x1", Y: "x2", Quantity: "g"}, evs, `quantity "g"`},
		{Spec{X: "x1", Y: "x2", At: map[string]float64{"x3": -1}}, evs, `Spec.At["x3"] = -1`},
		{Spec{X: "x1", Y: "x2"}, evs[:3], "3 converged analyses of 3"},
	}
	for _, tc := range tests {
		_, err := FromEvaluations(res, tc.evs, tc.spec)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%+v: error %v, want one naming %s", tc.spec, err, tc.want)
		}
	}
}

// TestRecordedMapInTheReport writes a run folder whose report holds the
// map interpolated from the run's store, with no further analysis.
func TestRecordedMapInTheReport(t *testing.T) {
	dir := t.TempDir()
	s := toyStudy(t)
	st, err := store.Create(filepath.Join(dir, "results.db"), store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	s.Recorder = st
	rng := rand.New(rand.NewPCG(5, 6))
	var xs [][]float64
	for i := 0; i < 30; i++ {
		xs = append(xs, []float64{rng.Float64(), rng.Float64(), rng.Float64()})
	}
	res, _ := analyse(t, s, xs)
	reportHolds(t, dir, report.Run{Result: res, Study: s, Store: st, Figures: []report.FigureSource{RecordedFigures(Spec{X: "x1", Y: "x2", Quantity: "f"})}},
		[]string{"f over x1 and x2, interpolated from 30 recorded analyses", "interpolated by a cubic radial-basis function through 30 converged of 30 recorded analyses"},
		[]string{"recorded_map_f.svg"})
	// without a store the map is left out with the reason
	figs, _ := RecordedFigures(Spec{X: "x1", Y: "x2"})(context.Background(), res, s)
	if len(figs) != 1 || figs[0].Reason == nil || !strings.Contains(figs[0].Reason.Error(), "no recorded analyses") {
		t.Errorf("without recorded analyses: %v", figs)
	}
}

// svgShows checks that the figure's SVG text holds each of want.
func svgShows(t *testing.T, f *plot.Figure, want []string) {
	t.Helper()
	doc, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	texts, err := plot.SVGText(doc)
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Join(texts, "\n")
	for _, w := range want {
		if !strings.Contains(text, w) {
			t.Errorf("figure %s does not show %q; it shows %q", f.Name, w, texts)
		}
	}
}
