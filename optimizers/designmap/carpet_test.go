package designmap

import (
	"context"
	"math"
	"slices"
	"strings"
	"testing"

	"couplet/mdo/plot"
	"couplet/mdo/report"
)

// TestCarpet draws the toy problem's carpet: five lines of each
// parameter labelled with their values, the constraints' boundaries with
// their infeasible side ticked, the gap of the failed corner counted.
func TestCarpet(t *testing.T) {
	s := toyStudy(t)
	d, err := Carpet(context.Background(), s, CarpetSpec{X: "x1", Y: "x2", At: map[string]float64{"x3": 0.2}})
	if err != nil {
		t.Fatal(err)
	}
	if d.Analyses != 25 || len(d.Xs) != 5 {
		t.Fatalf("%d analyses on %d values, want 25 on 5", d.Analyses, len(d.Xs))
	}
	f, err := CarpetFigure(d)
	if err != nil {
		t.Fatal(err)
	}
	svgShows(t, f, []string{"carpet of f over x1 and x2", "x1 0.25", "x2 0.75", "lines of constant x1", "lines of constant x2",
		"c2 boundary", "ticks on a boundary: its infeasible side", "c1 boundary", "gaps: 1 failed analyses, discipline-failed", "best feasible grid point", "(no scale)"})
	if f.Name != "carpet_f" {
		t.Errorf("figure name %q", f.Name)
	}
	files, err := plot.SaveAll(t.TempDir(), f)
	if err != nil || len(files) != 2 {
		t.Errorf("saved %v: %v", files, err)
	}
}

// TestCarpetBoundary checks the traced boundary of the disc constraint
// c2: x1² + x2² ≤ 1.5 on the carpet. With x = i/4 − 0.15 j and f = x1 +
// x2 = (i + j)/4 linear, the carpet point of each segment end gives back
// its grid place, where the true margin must be near zero (bilinear
// interpolation of a quadratic over cells of 0.25: error below
// 0.25²/8·4 ≈ 0.03).
func TestCarpetBoundary(t *testing.T) {
	s := toyStudy(t)
	d, err := Carpet(context.Background(), s, CarpetSpec{X: "x1", Y: "x2", At: map[string]float64{"x3": 0.2}})
	if err != nil {
		t.Fatal(err)
	}
	cx := func(i, j float64) float64 { return i/4 - 0.6*j/4 }
	b := traceCarpet(d.Z, d.Margins[slices.Index(d.Constraints, "c2")], cx)
	if len(b.segs) < 4 || len(b.ticks) == 0 {
		t.Fatalf("%d segments, %d ticks", len(b.segs), len(b.ticks))
	}
	for _, sg := range b.segs {
		for _, p := range sg {
			j := (p.Y - p.X) / 0.4
			x2 := j / 4
			x1 := p.Y - x2
			if m := 1.5 - x1*x1 - x2*x2; math.Abs(m) > 0.035 {
				t.Errorf("boundary point (%.3f, %.3f): true margin %.4f", x1, x2, m)
			}
		}
	}
	// every tick points to the infeasible side: a larger x1² + x2²
	for _, tk := range b.ticks {
		r := func(p [2]float64) float64 { return p[0]*p[0] + p[1]*p[1] }
		back := func(X, Y float64) [2]float64 { j := (Y - X) / 0.4; return [2]float64{Y - j/4, j / 4} }
		if r(back(tk[1].X, tk[1].Y)) <= r(back(tk[0].X, tk[0].Y)) {
			t.Errorf("tick %v points to the feasible side", tk)
		}
	}
}

func TestCarpetInTheReport(t *testing.T) {
	s := toyStudy(t)
	res, _ := analyse(t, s, [][]float64{{0.2, 0.4, 0.5}})
	reportHolds(t, t.TempDir(), report.Run{Result: res, Study: s, Figures: []report.FigureSource{CarpetFigures(CarpetSpec{X: "x1", Y: "x2", Lines: 4})}},
		[]string{"carpet of f over x1 and x2", "16 further analyses (4 values of each)"}, []string{"carpet_f.svg", "carpet_f.png"})
	if _, err := Carpet(context.Background(), s, CarpetSpec{X: "x1", Y: "x2", Lines: 16}); err == nil || !strings.Contains(err.Error(), "Lines = 16") {
		t.Errorf("16 lines: %v", err)
	}
}
