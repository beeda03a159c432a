package plot

import (
	"fmt"
	"image/color"

	"couplet/mdo"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// maxParallelLines caps the evaluations drawn in parallel coordinates.
const maxParallelLines = 1500

// ParallelCoordinates draws each evaluation as a line across one vertical
// axis per design variable and the first objective, each normalised from
// its lower bound (0) to its upper bound (1); feasible designs in blue,
// infeasible in red, the best design thick orange. Large runs are thinned
// evenly to at most 1500 lines (the best is always drawn).
func ParallelCoordinates(r *mdo.Result, evs []*mdo.Evaluation) (*Figure, error) {
	if r == nil || len(r.Design) == 0 {
		return nil, fmt.Errorf("plot: ParallelCoordinates needs a result with design variables")
	}
	if len(evs) == 0 {
		return nil, fmt.Errorf("plot: ParallelCoordinates of study %q needs at least one evaluation, got none", r.Study)
	}
	cols := studyColumns(r, evs, len(r.Design))
	p := NewPlot(fmt.Sprintf("parallel coordinates: %s", r.Study), "variable [bounds]", "normalised value [-] (lower bound 0, upper bound 1)")
	var ticks []plot.Tick
	for k, c := range cols {
		ticks = append(ticks, plot.Tick{Value: float64(k), Label: fmt.Sprintf("%s\n[%.4g, %.4g] %s", c.name, c.lo, c.hi, unitText(c.unit))})
	}
	p.X.Tick.Marker = plot.ConstantTicks(ticks)
	p.X.Tick.Label.Font.Size = vg.Points(7)
	p.X.Min, p.X.Max = -0.2, float64(len(cols)-1)+0.2
	p.Y.Min, p.Y.Max = -0.05, 1.05
	ordered := byID(evs)
	step := max(1, (len(ordered)+maxParallelLines-1)/maxParallelLines)
	line := func(e *mdo.Evaluation, c color.Color, w float64) (*plotter.Line, error) {
		var xys plotter.XYs
		for k, col := range cols {
			v := col.value(e)
			if !finite(v) {
				continue
			}
			xys = append(xys, plotter.XY{X: float64(k), Y: (v - col.lo) / (col.hi - col.lo)})
		}
		if len(xys) < 2 {
			return nil, nil
		}
		l, err := plotter.NewLine(xys)
		if err != nil {
			return nil, err
		}
		l.LineStyle.Color, l.LineStyle.Width = c, vg.Points(w)
		return l, nil
	}
	var feasLeg, infeasLeg *plotter.Line
	for i := 0; i < len(ordered); i += step {
		e := ordered[i]
		c := color.Color(color.NRGBA{R: 214, G: 39, B: 40, A: 70})
		if e.Feasible {
			c = color.NRGBA{R: 31, G: 119, B: 180, A: 110}
		}
		l, err := line(e, c, 0.6)
		if err != nil {
			return nil, fmt.Errorf("plot: parallel coordinates of evaluation %d: %w", e.ID, err)
		}
		if l == nil {
			continue
		}
		p.Add(lines{l})
		if e.Feasible && feasLeg == nil {
			feasLeg = l
		} else if !e.Feasible && infeasLeg == nil {
			infeasLeg = l
		}
	}
	if feasLeg != nil {
		p.Legend.Add("feasible", feasLeg)
	}
	if infeasLeg != nil {
		p.Legend.Add("infeasible", infeasLeg)
	}
	if r.Best != nil {
		l, err := line(r.Best, bestColor, 2.5)
		if err != nil {
			return nil, fmt.Errorf("plot: parallel coordinates of the best point: %w", err)
		}
		if l != nil {
			p.Add(lines{l})
			p.Legend.Add(fmt.Sprintf("best #%d", r.Best.ID), l)
		}
	}
	for k := range cols {
		l, err := plotter.NewLine(plotter.XYs{{X: float64(k), Y: 0}, {X: float64(k), Y: 1}})
		if err != nil {
			return nil, err
		}
		l.LineStyle.Color = color.Black
		p.Add(lines{l})
	}
	w := max(16*vg.Centimeter, vg.Length(len(cols))*2.6*vg.Centimeter)
	return NewFigure("parallel_coordinates", p.Title.Text, w, 11*vg.Centimeter, func(dc draw.Canvas) { p.Draw(dc) }), nil
}

// unitText formats a unit for tick labels.
func unitText(u string) string {
	if u == "" {
		return "-"
	}
	return u
}
