package plot

import (
	"bytes"
	"context"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"couplet/mdo"
)

// svgTexts returns the texts of an SVG document, failing the test if it
// is not one.
func svgTexts(t *testing.T, name string, doc []byte) []string {
	t.Helper()
	texts, err := SVGText(doc)
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	return texts
}

// checkFigure renders a figure as SVG and PNG and checks that the SVG
// holds every wanted text.
func checkFigure(t *testing.T, f *Figure, err error, wants ...string) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
	doc, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	texts := svgTexts(t, f.Name, doc)
	all := strings.Join(texts, "\n")
	for _, w := range append([]string{f.Title}, wants...) {
		if !strings.Contains(all, w) {
			t.Errorf("%s: SVG lacks the text %q; it has:\n%s", f.Name, w, all)
		}
	}
	var pngBuf bytes.Buffer
	if err := f.WritePNG(&pngBuf); err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(&pngBuf)
	if err != nil {
		t.Fatalf("%s: PNG does not decode: %v", f.Name, err)
	}
	if b := img.Bounds(); b.Dx() < 100 || b.Dy() < 100 {
		t.Errorf("%s: PNG is only %v", f.Name, b)
	}
}

// sellarRun evaluates a fixed grid of the Sellar study (with objectives
// objs, if given) and returns the result and the evaluations.
func sellarRun(t *testing.T, n int, objs ...mdo.Objective) (*mdo.Result, []*mdo.Evaluation) {
	t.Helper()
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	if len(objs) > 0 {
		st.Objectives = objs
	}
	st.Workers = 1
	xs := make([][]float64, n)
	for i := range xs {
		xs[i] = []float64{math.Mod(float64(i)*0.618034, 1), math.Mod(float64(i)*0.414214, 1), math.Mod(float64(i)*0.732051, 1)}
	}
	return gridRun(t, st, xs)
}

// gridRun evaluates the unit-box points xs of a study as one grid run and
// returns the result and the evaluations.
func gridRun(t *testing.T, st *mdo.Study, xs [][]float64) (*mdo.Result, []*mdo.Evaluation) {
	t.Helper()
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
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

func TestPlotsAreValidSVG(t *testing.T) {
	r, evs := sellarRun(t, 80)
	r2, evs2 := sellarRun(t, 80, mdo.Minimize("f"), mdo.Maximize("y2"))
	sys, err := mdo.NewSystem(mdo.Sellar()...)
	if err != nil {
		t.Fatal(err)
	}
	ws := sys.NewWorkspace()
	if err := ws.Analyze(context.Background()); err != nil {
		t.Fatal(err)
	}
	var reports []mdo.CouplingReport
	for _, rep := range ws.CouplingReports() {
		reports = append(reports, rep.Clone())
	}
	tests := []struct {
		name  string
		make  func() (*Figure, error)
		wants []string
	}{
		{"history", func() (*Figure, error) { return History(r, evs) }, []string{"evaluations", "f [-]", "constraint violation [-]", "best feasible so far"}},
		{"residuals", func() (*Figure, error) { return Residuals(reports) }, []string{"iteration", "scaled residual [-] (log scale)", "tolerance"}},
		{"scatter matrix", func() (*Figure, error) { return ScatterMatrix(r, evs) }, []string{"x [-]", "z1 [-]", "z2 [-]", "f [-]", "count"}},
		{"parallel", func() (*Figure, error) { return ParallelCoordinates(r, evs) }, []string{"variable [bounds]", "normalised value [-] (lower bound 0, upper bound 1)", "z1", "feasible"}},
		{"pareto", func() (*Figure, error) { return Pareto(r2, evs2) }, []string{"minimise f [-]", "maximise y2 [-]", "Pareto front ("}},
		{"dsm", func() (*Figure, error) { return DSM(sys) }, []string{"consumer (inputs from the row)", "producer (outputs to the column)", "sellar1", "sellar2", "y1", "y2"}},
	}
	dir := t.TempDir()
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f, err := tc.make()
			checkFigure(t, f, err, tc.wants...)
			if err == nil {
				files, err := SaveAll(dir, f)
				if err != nil || len(files) != 2 {
					t.Fatalf("SaveAll: %v, %v", files, err)
				}
				for _, p := range files {
					if st, err := os.Stat(p); err != nil || st.Size() == 0 {
						t.Errorf("%s not written: %v", p, err)
					}
				}
			}
		})
	}
	if os.Getenv("COUPLET_KEEP_PLOTS") != "" {
		for _, tc := range tests {
			if f, err := tc.make(); err == nil {
				SaveAll(os.Getenv("COUPLET_KEEP_PLOTS"), f)
			}
		}
	}
}

func TestPlotErrors(t *testing.T) {
	r, evs := sellarRun(t, 3)
	tests := []struct {
		name string
		err  func() error
		want string
	}{
		{"history without evaluations", func() error { _, err := History(r, nil); return err }, "at least one evaluation"},
		{"pareto of one objective", func() error { _, err := Pareto(r, nil); return err }, "at least two objectives, this one has 1"},
		{"residuals without reports", func() error { _, err := Residuals(nil); return err }, "at least one solver report"},
		{"save extension", func() error {
			f, _ := History(r, evs)
			return f.Save(filepath.Join(t.TempDir(), "x.pdf"))
		}, `extension ".pdf"`},
	}
	for _, tc := range tests {
		if err := tc.err(); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v, want it to contain %q", tc.name, err, tc.want)
		}
	}
}

func TestDSMData(t *testing.T) {
	sys, err := mdo.NewSystem(mdo.Sellar()...)
	if err != nil {
		t.Fatal(err)
	}
	d, err := NewDSMData(sys)
	if err != nil {
		t.Fatal(err)
	}
	// Sellar: sellar1 and sellar2 form one coupled group (y1 forward, y2
	// back), followed by sellar_functions, which reads y1 and y2.
	want := []string{"sellar1", "sellar2", "sellar_functions"}
	if strings.Join(d.Names, ",") != strings.Join(want, ",") {
		t.Fatalf("order = %v, want %v", d.Names, want)
	}
	links := []struct {
		i, j int
		vars string
	}{{0, 1, "y1"}, {1, 0, "y2"}, {0, 2, "y1"}, {1, 2, "y2"}, {2, 0, ""}, {2, 1, ""}}
	for _, l := range links {
		if got := strings.Join(d.Links[l.i][l.j], ","); got != l.vars {
			t.Errorf("link %s → %s = %q, want %q", d.Names[l.i], d.Names[l.j], got, l.vars)
		}
	}
	if len(d.Groups) != 1 || d.Groups[0] != [2]int{0, 1} {
		t.Errorf("groups = %v, want [[0 1]]", d.Groups)
	}
}

func TestLargeRunsAreThinned(t *testing.T) {
	// 20 000 synthetic evaluations: the markers are thinned, the best
	// line stays exact (it ends at the true best)
	r, evs := sellarRun(t, 3)
	var many []*mdo.Evaluation
	for i := 0; i < 20000; i++ {
		e := *evs[i%len(evs)]
		e.ID = i
		e.Objectives = []float64{1000 - float64(i)/100}
		e.F = e.Objectives
		e.Feasible, e.Violation = true, 0
		many = append(many, &e)
	}
	f, err := History(r, many)
	if err != nil {
		t.Fatal(err)
	}
	doc, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	svgTexts(t, f.Name, doc)
	if len(doc) > 3<<20 {
		t.Errorf("history of 20 000 evaluations is %d bytes of SVG, want under 3 MB", len(doc))
	}
	if thinStep(20000, maxScatterPoints) != 5 || thinStep(4000, maxScatterPoints) != 1 {
		t.Errorf("thinStep(20000) = %d, thinStep(4000) = %d; want 5 and 1", thinStep(20000, maxScatterPoints), thinStep(4000, maxScatterPoints))
	}
}
