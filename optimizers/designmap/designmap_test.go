package designmap

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/report"
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
	doc, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	texts, err := plot.SVGText(doc)
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Join(texts, "\n")
	for _, want := range []string{"c1 boundary", "c2 boundary", "failed: discipline-failed", "best feasible grid point", "x1 [m]", "x2 [s]"} {
		if !strings.Contains(text, want) {
			t.Errorf("the map does not show %q; it shows %q", want, texts)
		}
	}
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
	ev, err := s.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("two points", nil); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Evaluate(context.Background(), [][]float64{{0.2, 0.4, 0.5}, {0.6, 0.6, 0.5}}); err != nil {
		t.Fatal(err)
	}
	res, err := ev.Finish(mdo.StopComplete)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	files, err := report.WriteRun(context.Background(), dir, report.Run{Result: res, Study: s,
		Figures: []report.FigureSource{Figures(Spec{X: "x1", Y: "x2", Points: 11})}})
	if err != nil {
		t.Fatal(err)
	}
	html, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"f over x1 and x2", "c1 boundary", "121 further analyses"} {
		if !strings.Contains(string(html), want) {
			t.Errorf("report.html does not hold %q", want)
		}
	}
	if !slices.Contains(files, filepath.Join(dir, "map_f.png")) {
		t.Errorf("files written %v, want map_f.png among them", files)
	}
}
