package drawings

import (
	"image/png"
	"math"
	"os"
	"strings"
	"testing"

	"couplet/disciplines"
	"couplet/mdo/plot"
)

// checkFigure saves a figure into dir as SVG and PNG and checks the
// files: the SVG holds the title and every wanted text, the PNG decodes
// to a picture of some size.
func checkFigure(t *testing.T, dir string, f *plot.Figure, err error, wants ...string) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
	files, err := plot.SaveAll(dir, f)
	if err != nil || len(files) != 2 {
		t.Fatalf("SaveAll: %v, %v", files, err)
	}
	svg, err := os.ReadFile(files[0])
	if err != nil {
		t.Fatal(err)
	}
	texts, err := plot.SVGText(svg)
	if err != nil {
		t.Fatalf("%s: %v", files[0], err)
	}
	shown := strings.Join(texts, "\n")
	for _, w := range append([]string{f.Title}, wants...) {
		if !strings.Contains(shown, w) {
			t.Errorf("%s lacks the text %q; it has:\n%s", files[0], w, shown)
		}
	}
	pic, err := os.Open(files[1])
	if err != nil {
		t.Fatal(err)
	}
	defer pic.Close()
	if cfg, err := png.DecodeConfig(pic); err != nil || cfg.Width < 100 || cfg.Height < 100 {
		t.Errorf("%s: %d × %d pixels, %v", files[1], cfg.Width, cfg.Height, err)
	}
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

// demoSizing is an invented sizing diagram.
var demoSizing = disciplines.SizingDiagram{
	Boundaries: []disciplines.SizingBoundary{
		{Name: "take-off field length", ThrustToWeight: func(ws float64) float64 { return ws / 12000 }},
		{Name: "second-segment climb", ThrustToWeight: func(float64) float64 { return 0.24 }},
		{Name: "cruise", ThrustToWeight: func(ws float64) float64 { return 0.1 + 300/ws }},
	},
	Limits:      []disciplines.WingLoadingLimit{{Name: "landing field length", WingLoading: 5200}},
	WingLoading: 4300, ThrustToWeight: 0.38,
}

func TestDrawingsAreValidSVG(t *testing.T) {
	tests := []struct {
		name  string
		make  func() (*plot.Figure, error)
		wants []string
	}{
		{"planform", func() (*plot.Figure, error) { return Planform(demoAircraft) }, []string{"spanwise position y [m]", "position aft of the nose x [m]", "quarter-chord line", "mean aerodynamic chord"}},
		{"top view", func() (*plot.Figure, error) { return TopView(demoAircraft) }, []string{"spanwise position y [m]", "position aft of the nose x [m]", "fuselage", "horizontal tail", "vertical tail", "centre of gravity"}},
		{"sizing diagram", func() (*plot.Figure, error) {
			return SizingDiagram(demoSizing, SizingView{Title: "sizing diagram of the demo jet", Design: "chosen design", MinWingLoading: 1000, MaxWingLoading: 7000})
		}, []string{"wing loading W/S [N/m2]", "thrust-to-weight ratio T/W [-]", "take-off field length", "landing field length (W/S <= 5200)", "feasible region", "chosen design"}},
		{"sizing diagram, default view", func() (*plot.Figure, error) { return SizingDiagram(demoSizing, SizingView{}) }, []string{"sizing diagram", "design (4300 N/m2, 0.38)"}},
	}
	dir := t.TempDir()
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f, err := tc.make()
			checkFigure(t, dir, f, err, tc.wants...)
		})
	}
}

func TestDrawingErrors(t *testing.T) {
	bad := demoAircraft
	bad.WingRootChord = -1
	fwd := demoAircraft
	fwd.WingSweepLE = 95
	nanBoundary := demoSizing
	nanBoundary.Boundaries = []disciplines.SizingBoundary{{Name: "climb", ThrustToWeight: func(float64) float64 { return math.NaN() }}}
	tests := []struct {
		name string
		err  func() error
		want string
	}{
		{"negative chord", func() error { _, err := Planform(bad); return err }, "wing root chord = -1 m"},
		{"sweep beyond 80", func() error { _, err := TopView(fwd); return err }, "leading-edge sweep = 95 deg"},
		{"no wing", func() error { _, err := Planform(Aircraft{FuselageLength: 20, FuselageDiameter: 2}); return err }, "WingSpan = 0"},
		{"diagram range", func() error {
			_, err := SizingDiagram(demoSizing, SizingView{MinWingLoading: 5, MaxWingLoading: 1})
			return err
		}, "range [5, 1]"},
		{"diagram NaN boundary", func() error { _, err := SizingDiagram(nanBoundary, SizingView{}); return err }, `boundary "climb" gives T/W = NaN`},
		{"diagram without requirements", func() error {
			_, err := SizingDiagram(disciplines.SizingDiagram{WingLoading: 1, ThrustToWeight: 1}, SizingView{})
			return err
		}, "no boundary and no wing-loading limit"},
		{"diagram design point", func() error {
			d := demoSizing
			d.WingLoading = math.Inf(1)
			_, err := SizingDiagram(d, SizingView{})
			return err
		}, "W/S = +Inf N/m2"},
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
