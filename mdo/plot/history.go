package plot

import (
	"fmt"
	"image/color"
	"math"

	"couplet/mdo"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// History draws the optimisation history of a run: above, each
// evaluation's first objective (feasible and infeasible points apart) and
// the best feasible objective so far; below, the constraint violation of
// the best point so far and the best and worst violation in each block
// of evaluations. evs are the run's evaluations in any order (they are
// taken by ID). Beyond 4000 evaluations the markers are thinned evenly;
// the lines are exact.
func History(r *mdo.Result, evs []*mdo.Evaluation) (*Figure, error) {
	if r == nil || len(r.Objectives) == 0 {
		return nil, fmt.Errorf("plot: History needs a result with an objective")
	}
	if len(evs) == 0 {
		return nil, fmt.Errorf("plot: History of study %q needs at least one evaluation, got none", r.Study)
	}
	ordered := byID(evs)
	obj := r.Objectives[0]
	ylab := AxisLabel(obj.Name, unitOf(r, obj.Name))

	var feas, infeas, bestLine, bestViol plotter.XYs
	var best *mdo.Evaluation
	step := thinStep(len(ordered), maxScatterPoints)
	for i, e := range ordered {
		n := float64(i + 1)
		if i%step == 0 && len(e.Objectives) > 0 && finite(e.Objectives[0]) {
			if e.Feasible {
				feas = append(feas, plotter.XY{X: n, Y: e.Objectives[0]})
			} else {
				infeas = append(infeas, plotter.XY{X: n, Y: e.Objectives[0]})
			}
		}
		changed := mdo.Better(e, best)
		if changed {
			// the best-so-far lines are steps: a point where they change
			// and one before it keep them exact with few vertices
			if best != nil && i > 0 {
				if best.Feasible {
					bestLine = append(bestLine, plotter.XY{X: n - 1, Y: best.Objectives[0]})
				}
				if finite(best.Violation) {
					bestViol = append(bestViol, plotter.XY{X: n - 1, Y: best.Violation})
				}
			}
			best = e
		}
		if changed || i == len(ordered)-1 {
			if best.Feasible {
				bestLine = append(bestLine, plotter.XY{X: n, Y: best.Objectives[0]})
			}
			if finite(best.Violation) {
				bestViol = append(bestViol, plotter.XY{X: n, Y: best.Violation})
			}
		}
	}
	top := NewPlot("", "evaluations", ylab)
	top.Title.Text = "objective"
	if err := AddScatter(top, infeas, infeasibleColor, draw.CrossGlyph{}, "infeasible"); err != nil {
		return nil, err
	}
	if err := AddScatter(top, feas, feasibleColor, draw.CircleGlyph{}, "feasible"); err != nil {
		return nil, err
	}
	if err := AddLine(top, bestLine, bestColor, 2, "best feasible so far"); err != nil {
		return nil, err
	}

	// violation: best so far and the best / worst of each block
	block := max(1, len(ordered)/60)
	var worst, least plotter.XYs
	for i := 0; i < len(ordered); i += block {
		hi, lo := math.Inf(-1), math.Inf(1)
		for _, e := range ordered[i:min(i+block, len(ordered))] {
			if finite(e.Violation) {
				hi, lo = math.Max(hi, e.Violation), math.Min(lo, e.Violation)
			}
		}
		n := float64(min(i+block, len(ordered)))
		if finite(hi) {
			worst = append(worst, plotter.XY{X: n, Y: hi})
			least = append(least, plotter.XY{X: n, Y: lo})
		}
	}
	bottom := NewPlot("", "evaluations", "constraint violation [-]")
	bottom.Title.Text = "violation"
	blockName := "evaluation"
	if block > 1 {
		blockName = fmt.Sprintf("block of %d evaluations", block)
	}
	if err := AddLine(bottom, worst, infeasibleColor, 1, "worst of each "+blockName); err != nil {
		return nil, err
	}
	if err := AddLine(bottom, least, feasibleColor, 1, "best of each "+blockName); err != nil {
		return nil, err
	}
	if err := AddLine(bottom, bestViol, bestColor, 2, "best point so far"); err != nil {
		return nil, err
	}
	bottom.Y.Min = 0
	title := fmt.Sprintf("optimisation history: %s (%s, %d evaluations)", r.Study, r.Optimizer, len(ordered))
	return NewFigure("history", title, 16*vg.Centimeter, 16*vg.Centimeter, func(dc draw.Canvas) {
		dc = drawTitle(dc, title)
		plots := [][]*plot.Plot{{top}, {bottom}}
		tiles := draw.Tiles{Rows: 2, Cols: 1, PadY: vg.Points(10), PadTop: vg.Points(2), PadBottom: vg.Points(4), PadLeft: vg.Points(4), PadRight: vg.Points(8)}
		cs := plot.Align(plots, tiles, dc)
		top.Draw(cs[0][0])
		bottom.Draw(cs[1][0])
	}), nil
}

// maxScatterPoints caps the points drawn as markers in one plot; larger
// runs are thinned evenly so that the SVG stays small.
const maxScatterPoints = 4000

// thinStep returns the stride that keeps at most max of n points.
func thinStep(n, max int) int {
	if n <= max {
		return 1
	}
	return (n + max - 1) / max
}

// byID returns the evaluations sorted by ID (nil entries dropped).
func byID(evs []*mdo.Evaluation) []*mdo.Evaluation {
	out := make([]*mdo.Evaluation, 0, len(evs))
	for _, e := range evs {
		if e != nil {
			out = append(out, e)
		}
	}
	sortByID(out)
	return out
}

// AddScatter adds points with a legend entry to p if there are any.
func AddScatter(p *plot.Plot, xys plotter.XYs, c color.Color, shape draw.GlyphDrawer, name string) error {
	if len(xys) == 0 {
		return nil
	}
	s, err := plotter.NewScatter(xys)
	if err != nil {
		return fmt.Errorf("plot: %s: %w", name, err)
	}
	s.GlyphStyle.Color = c
	s.GlyphStyle.Shape = shape
	s.GlyphStyle.Radius = vg.Points(2)
	p.Add(s)
	p.Legend.Add(name, s)
	return nil
}

// AddLine adds a line of the given colour and width [pt] to p if there
// are points, with a legend entry unless name is empty.
func AddLine(p *plot.Plot, xys plotter.XYs, c color.Color, width float64, name string) error {
	if len(xys) == 0 {
		return nil
	}
	l, err := plotter.NewLine(xys)
	if err != nil {
		return fmt.Errorf("plot: %s: %w", name, err)
	}
	l.LineStyle.Color = c
	l.LineStyle.Width = vg.Points(width)
	p.Add(l)
	if name != "" {
		p.Legend.Add(name, l)
	}
	return nil
}
