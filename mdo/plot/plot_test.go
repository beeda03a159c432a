package plot

import (
	"bytes"
	"context"
	"encoding/xml"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"couplet/mdo"
)

// svgTexts parses an SVG document and returns the content of its text
// elements; it fails the test if the document is not well-formed XML or
// its root is not an svg element.
func svgTexts(t *testing.T, name string, doc []byte) []string {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(doc))
	var texts []string
	inText, root := false, ""
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("%s: SVG is not well-formed XML: %v", name, err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = el.Name.Local
			}
			inText = el.Name.Local == "text"
		case xml.EndElement:
			inText = false
		case xml.CharData:
			if inText {
				texts = append(texts, string(el))
			}
		}
	}
	if root != "svg" {
		t.Fatalf("%s: root element is %q, want svg", name, root)
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

// demoAircraft is an invented business-jet-like geometry.
var demoAircraft = Aircraft{
	Name:     "demo jet",
	WingSpan: 17, WingRootChord: 5.2, WingTipChord: 1.3, WingSweepLE: 40, WingApex: 11,
	FuselageLength: 30, FuselageDiameter: 2.3,
	HTailSpan: 6.4, HTailRootChord: 2.4, HTailTipChord: 1, HTailSweepLE: 35, HTailApex: 25,
	VTailHeight: 3.8, VTailRootChord: 3.6, VTailTipChord: 1.6, VTailSweepLE: 45, VTailApex: 23.5,
	CG: 15.4,
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
	var reports []mdo.Report
	for _, rep := range ws.Reports() {
		reports = append(reports, rep.Clone())
	}
	diagram := Diagram{
		Title:          "constraint diagram of the demo jet",
		MinWingLoading: 1000, MaxWingLoading: 7000,
		Boundaries: []Boundary{
			{Label: "take-off field length", MinThrustToWeight: func(ws float64) float64 { return ws / 12000 }},
			{Label: "second-segment climb", MinThrustToWeight: func(float64) float64 { return 0.24 }},
			{Label: "cruise", MinThrustToWeight: func(ws float64) float64 { return 0.1 + 300/ws }},
		},
		Limits:  []WingLoadingLimit{{Label: "landing field length", Max: 5200}},
		Designs: []DesignPoint{{Label: "chosen design", WingLoading: 4300, ThrustToWeight: 0.38}},
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
		{"planform", func() (*Figure, error) { return Planform(demoAircraft) }, []string{"spanwise position y [m]", "position aft of the nose x [m]", "quarter-chord line", "mean aerodynamic chord"}},
		{"top view", func() (*Figure, error) { return TopView(demoAircraft) }, []string{"spanwise position y [m]", "position aft of the nose x [m]", "fuselage", "horizontal tail", "vertical tail", "centre of gravity"}},
		{"constraint diagram", func() (*Figure, error) { return ConstraintDiagram(diagram) }, []string{"wing loading W/S [N/m2]", "thrust-to-weight ratio T/W [-]", "take-off field length", "landing field length (W/S <= 5200)", "feasible region", "chosen design"}},
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
	r, _ := sellarRun(t, 3)
	bad := demoAircraft
	bad.WingRootChord = -1
	fwd := demoAircraft
	fwd.WingSweepLE = 95
	tests := []struct {
		name string
		err  func() error
		want string
	}{
		{"history without evaluations", func() error { _, err := History(r, nil); return err }, "at least one evaluation"},
		{"pareto of one objective", func() error { _, err := Pareto(r, nil); return err }, "at least two objectives, this one has 1"},
		{"residuals without reports", func() error { _, err := Residuals(nil); return err }, "at least one solver report"},
		{"negative chord", func() error { _, err := Planform(bad); return err }, "wing root chord = -1 m"},
		{"sweep beyond 80", func() error { _, err := TopView(fwd); return err }, "leading-edge sweep = 95 deg"},
		{"diagram range", func() error {
			_, err := ConstraintDiagram(Diagram{MinWingLoading: 5, MaxWingLoading: 1, Limits: []WingLoadingLimit{{Max: 3}}})
			return err
		}, "range [5, 1]"},
		{"diagram NaN boundary", func() error {
			_, err := ConstraintDiagram(Diagram{MinWingLoading: 0, MaxWingLoading: 1, Boundaries: []Boundary{{Label: "climb", MinThrustToWeight: func(float64) float64 { return math.NaN() }}}})
			return err
		}, `boundary "climb" gives T/W = NaN`},
		{"save extension", func() error {
			f, _ := Planform(demoAircraft)
			return f.Save(filepath.Join(t.TempDir(), "x.pdf"))
		}, `extension ".pdf"`},
	}
	for _, tc := range tests {
		if err := tc.err(); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v, want it to contain %q", tc.name, err, tc.want)
		}
	}
}

func TestWingGeometry(t *testing.T) {
	// The mean aerodynamic chord c̄ = (2/S)∫c² dy and its station follow
	// in closed form for straight taper; the rectangular and the pointed
	// (λ = 0) wing are the textbook limiting cases: c̄ = c and ȳ = b/4;
	// c̄ = (2/3)c_r and ȳ = b/6 (Raymer, Aircraft Design: A Conceptual
	// Approach, fig. 7.3 — from memory; both follow from the integral).
	tests := []struct {
		name                   string
		a                      Aircraft
		area, ar, mac, y, xMAC float64
	}{
		{"rectangular", Aircraft{WingSpan: 10, WingRootChord: 2, WingTipChord: 2}, 20, 5, 2, 2.5, 0},
		{"pointed delta", Aircraft{WingSpan: 6, WingRootChord: 9, WingTipChord: 0, WingSweepLE: 45, WingApex: 1}, 27, 36.0 / 27, 6, 1, 2},
		// λ = 0.5: c̄ = (2/3)·4·1.75/1.5 = 28/9, ȳ = (12/6)·2/1.5 = 8/3
		{"taper one half", Aircraft{WingSpan: 12, WingRootChord: 4, WingTipChord: 2}, 36, 4, 28.0 / 9, 8.0 / 3, 0},
	}
	for _, tc := range tests {
		c, y, x := tc.a.MAC()
		got := []float64{tc.a.WingArea(), tc.a.AspectRatio(), c, y, x}
		want := []float64{tc.area, tc.ar, tc.mac, tc.y, tc.xMAC}
		names := []string{"area", "aspect ratio", "MAC", "MAC station", "MAC leading edge"}
		for k := range got {
			if math.Abs(got[k]-want[k]) > 1e-12*math.Max(1, math.Abs(want[k])) {
				t.Errorf("%s: %s = %.15g, want %.15g", tc.name, names[k], got[k], want[k])
			}
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
