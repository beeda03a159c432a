package repl

import (
	"bytes"
	"context"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"couplet/mdo/plot"
)

// validSVG returns the text of an SVG document, failing the test if it
// is not one.
func validSVG(t *testing.T, b []byte) string {
	t.Helper()
	texts, err := plot.SVGText(b)
	if err != nil {
		t.Fatal(err)
	}
	return strings.Join(texts, "\n")
}

// The aircraft figures of a run: each saved as SVG and PNG, valid SVG
// with its title and axis labels (with units), and embedded in the
// report; a design of experiments also has its scatter matrix in the
// report; a study without aircraft geometry (Sellar) gets none.
func TestRunWritesAircraftFigures(t *testing.T) {
	figures := []struct {
		name string
		text []string // title, axis labels, legend entries
	}{
		{"planform", []string{"wing planform of best design #", "spanwise position y [m]", "position aft of the nose x [m]", "mean aerodynamic chord"}},
		{"top_view", []string{"top view of best design #", "spanwise position y [m]", "position aft of the nose x [m]", "horizontal tail", "vertical tail"}},
		// the requirements of the study's constraints
		{"sizing_diagram", []string{"sizing diagram of the best design #", "wing loading W/S [N/m2]", "thrust-to-weight ratio T/W [-]",
			"take-off field length 2400 m", "second segment 2.4 % OEI (25.121(b))", "landing field length 1950 m (121.195(b))"}},
		{"residuals", []string{"coupling-solver residuals", "iteration", "scaled residual [-]", "converged"}},
	}
	tests := []struct {
		file     string
		aircraft bool
		report   []string // further figure titles in the report
	}{
		{filepath.Join("testdata", "tiny_jet.study"), true, []string{"parallel coordinates: tiny_jet",
			"Sizing diagram: requirements from the study&#39;s constraints on perf.takeoff_field_length, perf.landing_field_length, perf.climb_gradient_second_segment;"}},
		{filepath.Join("testdata", "tiny_jet_doe.study"), true, []string{"parallel coordinates: tiny_jet_doe", "scatter matrix: tiny_jet_doe"}},
		{filepath.Join("..", "studies", "sellar.study"), false, nil},
	}
	for _, tc := range tests {
		t.Run(filepath.Base(tc.file), func(t *testing.T) {
			out := t.TempDir()
			var stderr bytes.Buffer
			if _, err := Run(context.Background(), RunOptions{File: tc.file, OutDir: out, Stdout: io.Discard, Stderr: &stderr}); err != nil {
				t.Fatalf("%v\n%s", err, stderr.String())
			}
			checkOutputs(t, out)
			out = resultFolder(t, out)
			html, err := os.ReadFile(filepath.Join(out, "report.html"))
			if err != nil {
				t.Fatal(err)
			}
			page := string(html)
			for _, f := range figures {
				svgPath := filepath.Join(out, f.name+".svg")
				b, err := os.ReadFile(svgPath)
				if !tc.aircraft {
					if err == nil {
						t.Errorf("%s written for a study without aircraft geometry", svgPath)
					}
					if strings.Contains(page, f.text[0]) {
						t.Errorf("report of a non-aircraft study has %q", f.text[0])
					}
					continue
				}
				if err != nil {
					t.Fatalf("aircraft figure %s: %v", f.name, err)
				}
				text := validSVG(t, b)
				for _, want := range f.text {
					if !strings.Contains(text, want) {
						t.Errorf("%s.svg has no text %q", f.name, want)
					}
				}
				if fi, err := os.Stat(filepath.Join(out, f.name+".png")); err != nil || fi.Size() == 0 {
					t.Errorf("%s.png missing or empty: %v", f.name, err)
				}
				if !strings.Contains(page, f.text[0]) {
					t.Errorf("report does not embed %s (no %q)", f.name, f.text[0])
				}
			}
			for _, want := range tc.report {
				if !strings.Contains(page, want) {
					t.Errorf("report has no %q", want)
				}
			}
			if !tc.aircraft && strings.Contains(page, "Sizing diagram:") {
				t.Errorf("report of a non-aircraft study has the sizing diagram's note")
			}
			if strings.Contains(page, "could not be drawn") {
				t.Errorf("report notes a figure left out")
			}
		})
	}
}
