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
// taken by ID). The markers are thinned to those that can be told apart
// (see mergeClose): of the markers that fall in one cell of 2 pt × 2 pt
// of the plot (a marker's radius) only the first is drawn,
// so a run of thousands of evaluations stays a light SVG and looks the
// same; beyond 4000 markers after that they are thinned evenly. The
// lines are exact.
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
	for i, e := range ordered {
		n := float64(i + 1)
		if len(e.Objectives) > 0 && finite(e.Objectives[0]) {
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
	feas, infeas = distinct(feas, infeas)
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

// The drawing area of the history's upper plot, roughly [pt], and the
// cell within which markers are merged [pt].
const (
	historyWidth  = 400
	historyHeight = 150
	markerCell    = 2
)

// mergeClose keeps, of each set of points, the first in each cell of a
// grid of markerCell over the plot area (historyWidth × historyHeight
// spanning the range of both sets): the markers it drops lie within
// markerCell of one drawn in the same colour, under the marker's radius,
// and cannot be told apart.
func mergeClose(a, b plotter.XYs) (plotter.XYs, plotter.XYs) {
	sets := []plotter.XYs{a, b}
	x0, x1, y0, y1 := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, s := range sets {
		for _, p := range s {
			x0, x1 = math.Min(x0, p.X), math.Max(x1, p.X)
			y0, y1 = math.Min(y0, p.Y), math.Max(y1, p.Y)
		}
	}
	cols, rows := float64(historyWidth)/markerCell, float64(historyHeight)/markerCell
	dx, dy := math.Max(x1-x0, 1e-300)/cols, math.Max(y1-y0, 1e-300)/rows
	out := make([]plotter.XYs, len(sets))
	for k, s := range sets {
		seen := map[[2]int]bool{}
		var kept plotter.XYs
		for _, p := range s {
			c := [2]int{int((p.X - x0) / dx), int((p.Y - y0) / dy)}
			if !seen[c] {
				seen[c] = true
				kept = append(kept, p)
			}
		}
		out[k] = kept
	}
	return out[0], out[1]
}

// distinct is mergeClose, then each set thinned evenly if both together
// still hold more than maxScatterPoints.
func distinct(a, b plotter.XYs) (plotter.XYs, plotter.XYs) {
	a, b = mergeClose(a, b)
	out := []plotter.XYs{a, b}
	total := len(a) + len(b)
	for k, kept := range out {
		if step := thinStep(total, maxScatterPoints); step > 1 {
			thin := kept[:0]
			for i := 0; i < len(kept); i += step {
				thin = append(thin, kept[i])
			}
			kept = thin
		}
		out[k] = kept
	}
	return out[0], out[1]
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
	p.Add(markers{s})
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
	p.Add(lines{l})
	if name != "" {
		p.Legend.Add(name, l)
	}
	return nil
}
