package report

import (
	"fmt"
	"math"

	"couplet/mdo"
	"couplet/mdo/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// historyObjective is the objective the history overlay is drawn on: the
// first objective of the first result that is known, nil if none.
func historyObjective(results []Compared) *mdo.Objective {
	for _, c := range results {
		if c.Result != nil && len(c.Result.Objectives) > 0 {
			o := c.Result.Objectives[0]
			return &o
		}
	}
	return nil
}

// historyLeftOut names the known results left out of the history
// overlay because their first objective is another.
func historyLeftOut(results []Compared) []string {
	obj := historyObjective(results)
	if obj == nil {
		return nil
	}
	var notes []string
	for _, c := range results {
		if c.Result == nil || len(c.Result.Objectives) == 0 {
			continue
		}
		if o := c.Result.Objectives[0]; o.Name != obj.Name || o.Maximize != obj.Maximize {
			notes = append(notes, fmt.Sprintf("%s: left out of the history overlay, drawn on %s %s: its first objective is %s %s.",
				c.Label, sense(obj.Maximize), obj.Name, sense(o.Maximize), o.Name))
		}
	}
	return notes
}

// sense names an objective's sense.
func sense(maximize bool) string {
	if maximize {
		return "maximise"
	}
	return "minimise"
}

// overlayHistory draws the best feasible objective so far of each result
// against its evaluations, one line per result, on the first objective
// of the first result; a result with another first objective, or no
// known Result, is left out (its legend entry says so).
func overlayHistory(results []Compared) (*plot.Figure, error) {
	obj := historyObjective(results)
	if obj == nil {
		return nil, fmt.Errorf("report: no compared result has an objective and a case store to draw its history from")
	}
	unit := ""
	for _, c := range results {
		if c.Result != nil && unit == "" {
			unit = c.Result.Unit(obj.Name)
		}
	}
	p := plot.NewPlot("", "evaluations", plot.AxisLabel(obj.Name, unit))
	drawnAny := false
	for i, c := range results {
		if c.Result == nil || len(c.Result.Objectives) == 0 || c.Result.Objectives[0].Name != obj.Name || c.Result.Objectives[0].Maximize != obj.Maximize {
			continue
		}
		var line plotter.XYs
		for _, h := range c.Result.History {
			if !h.Feasible || math.IsNaN(h.Best) || math.IsInf(h.Best, 0) {
				continue
			}
			y := h.Best
			if obj.Maximize {
				y = -y // the history keeps the minimised sense
			}
			if n := len(line); n > 0 {
				line = append(line, plotter.XY{X: float64(h.Evaluations), Y: line[n-1].Y})
			}
			line = append(line, plotter.XY{X: float64(h.Evaluations), Y: y})
		}
		if len(line) == 0 {
			continue
		}
		if last := float64(c.Result.Evaluations); last > line[len(line)-1].X {
			line = append(line, plotter.XY{X: last, Y: line[len(line)-1].Y})
		}
		if err := plot.AddLine(p, line, plot.LineColor(i), 2, c.Label); err != nil {
			return nil, err
		}
		drawnAny = true
	}
	if !drawnAny {
		return nil, fmt.Errorf("report: no compared result reached a feasible point on %s", obj.Name)
	}
	title := "best feasible " + obj.Name + " so far, by evaluations"
	p.Title.Text = title
	return plot.NewFigure("overlay_history", title, 16*vg.Centimeter, 11*vg.Centimeter, func(dc draw.Canvas) { p.Draw(dc) }), nil
}

// overlayPareto draws the front of each result with two or more
// objectives, on the first two objectives of the first such result (a
// front lacking either is left out).
func overlayPareto(results []Compared) (*plot.Figure, error) {
	var ox, oy string
	var ux, uy string
	for _, c := range results {
		if c.Result != nil && len(c.Result.Objectives) >= 2 && len(c.Result.Front) > 0 {
			ox, oy = c.Result.Objectives[0].Name, c.Result.Objectives[1].Name
			ux, uy = c.Result.Unit(ox), c.Result.Unit(oy)
			break
		}
	}
	if ox == "" {
		return nil, fmt.Errorf("report: no compared result with a front has a case store to draw it from")
	}
	p := plot.NewPlot("", plot.AxisLabel(ox, ux), plot.AxisLabel(oy, uy))
	shapes := []draw.GlyphDrawer{draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.CrossGlyph{}, draw.PlusGlyph{}, draw.RingGlyph{}}
	for i, c := range results {
		if c.Result == nil || len(c.Result.Front) == 0 {
			continue
		}
		ix, iy := -1, -1
		for k, o := range c.Result.Objectives {
			switch o.Name {
			case ox:
				ix = k
			case oy:
				iy = k
			}
		}
		if ix < 0 || iy < 0 {
			continue
		}
		var pts plotter.XYs
		for _, e := range c.Result.Front {
			if max(ix, iy) < len(e.Objectives) {
				pts = append(pts, plotter.XY{X: e.Objectives[ix], Y: e.Objectives[iy]})
			}
		}
		if err := plot.AddLine(p, pts, plot.LineColor(i), 1, ""); err != nil {
			return nil, err
		}
		if err := plot.AddScatter(p, pts, plot.LineColor(i), shapes[i%len(shapes)], fmt.Sprintf("%s (%d points)", c.Label, len(pts))); err != nil {
			return nil, err
		}
	}
	title := "Pareto fronts: " + oy + " against " + ox
	p.Title.Text = title
	return plot.NewFigure("overlay_pareto", title, 16*vg.Centimeter, 12*vg.Centimeter, func(dc draw.Canvas) { p.Draw(dc) }), nil
}
