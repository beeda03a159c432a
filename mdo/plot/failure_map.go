package plot

import (
	"fmt"

	"couplet/mdo"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// FailureMap draws where each failure class falls in the design space:
// the evaluations over the first two design variables, converged points
// in grey and each failure class (mdo.FailureClass) in a colour of its
// own, with its count in the legend. A study with one design variable is
// drawn against the evaluation number. It is an error when no analysis
// failed.
func FailureMap(r *mdo.Result, evs []*mdo.Evaluation) (*Figure, error) {
	if r == nil || len(r.Design) == 0 {
		return nil, fmt.Errorf("plot: FailureMap needs a result with design variables")
	}
	failed := 0
	for _, e := range evs {
		if !e.Converged {
			failed++
		}
	}
	if failed == 0 {
		return nil, fmt.Errorf("plot: FailureMap of study %q: no analysis failed", r.Study)
	}
	dx, dy := 0, 1
	yName, yUnit := "evaluation", "-"
	if len(r.Design) > 1 {
		yName, yUnit = r.Design[dy].Name, r.Design[dy].Unit
	}
	p := NewPlot(fmt.Sprintf("failed analyses by class: %s", r.Study), AxisLabel(r.Design[dx].Name, r.Design[dx].Unit), AxisLabel(yName, yUnit))
	p.X.Min, p.X.Max = r.Design[dx].Lower, r.Design[dx].Upper
	if len(r.Design) > 1 {
		p.Y.Min, p.Y.Max = r.Design[dy].Lower, r.Design[dy].Upper
	}
	classes := []mdo.FailureClass{mdo.NotFailed, mdo.DoesNotClose, mdo.SolverFailed, mdo.InvalidInput, mdo.DisciplineFailed}
	pts := make(map[mdo.FailureClass]plotter.XYs)
	step := thinStep(len(evs), maxScatterPoints)
	for k, e := range evs {
		if k%step != 0 || len(e.Design) <= dx {
			continue
		}
		y := float64(e.ID)
		if len(r.Design) > 1 {
			y = e.Design[dy]
		}
		c := mdo.ClassOf(e)
		if !e.Converged && c == mdo.NotFailed {
			c = mdo.SolverFailed // a record written before classes existed
		}
		pts[c] = append(pts[c], plotter.XY{X: e.Design[dx], Y: y})
	}
	for i, c := range classes {
		name, col, glyph := c.String(), LineColor(i), draw.GlyphDrawer(draw.CrossGlyph{})
		if c == mdo.NotFailed {
			name, col, glyph = "converged", mutedColor, draw.CircleGlyph{}
		}
		if err := AddScatter(p, pts[c], col, glyph, fmt.Sprintf("%s (%d)", name, len(pts[c]))); err != nil {
			return nil, err
		}
	}
	return NewFigure("failures", p.Title.Text, 16*vg.Centimeter, 12*vg.Centimeter, func(dc draw.Canvas) { p.Draw(dc) }), nil
}
