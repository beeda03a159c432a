package plot

import (
	"fmt"
	"math"

	"couplet/mdo"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// maxMatrixVars caps the variables of a scatter matrix.
const maxMatrixVars = 7

// column is one variable of a multi-variable plot.
type column struct {
	name, unit string
	lo, hi     float64
	value      func(*mdo.Evaluation) float64
}

// studyColumns returns the design variables (bounds as range) followed by
// the first objective (range of its finite values).
func studyColumns(r *mdo.Result, evs []*mdo.Evaluation, maxDesign int) []column {
	var cols []column
	for k, d := range r.Design {
		if len(cols) == maxDesign {
			break
		}
		k := k
		cols = append(cols, column{name: d.Name, unit: d.Unit, lo: d.Lower, hi: d.Upper,
			value: func(e *mdo.Evaluation) float64 { return e.Design[k] }})
	}
	if len(r.Objectives) > 0 {
		o := r.Objectives[0]
		c := column{name: o.Name, unit: unitOf(r, o.Name), lo: math.Inf(1), hi: math.Inf(-1),
			value: func(e *mdo.Evaluation) float64 {
				if len(e.Objectives) == 0 {
					return math.NaN()
				}
				return e.Objectives[0]
			}}
		for _, e := range evs {
			if v := c.value(e); finite(v) {
				c.lo, c.hi = math.Min(c.lo, v), math.Max(c.hi, v)
			}
		}
		if !finite(c.lo) {
			c.lo, c.hi = 0, 1
		}
		if c.hi == c.lo {
			c.lo, c.hi = c.lo-0.5, c.hi+0.5
		}
		cols = append(cols, c)
	}
	return cols
}

// ScatterMatrix draws the design-of-experiments scatter matrix: every
// pair of design variables and the first objective against each other,
// feasible and infeasible points apart, with each variable's histogram on
// the diagonal. At most the first six design variables are shown, and at
// most 1000 points per panel (thinned evenly; the histograms count all).
func ScatterMatrix(r *mdo.Result, evs []*mdo.Evaluation) (*Figure, error) {
	if r == nil || len(r.Design) == 0 {
		return nil, fmt.Errorf("plot: ScatterMatrix needs a result with design variables")
	}
	if len(evs) == 0 {
		return nil, fmt.Errorf("plot: ScatterMatrix of study %q needs at least one evaluation, got none", r.Study)
	}
	cols := studyColumns(r, evs, maxMatrixVars-1)
	n := len(cols)
	plots := make([][]*plot.Plot, n)
	for i := range plots {
		plots[i] = make([]*plot.Plot, n)
		for j := range plots[i] {
			p := plot.New()
			p.X.Min, p.X.Max = cols[j].lo, cols[j].hi
			p.X.Tick.Label.Font.Size = vg.Points(7)
			p.Y.Tick.Label.Font.Size = vg.Points(7)
			if i == n-1 {
				p.X.Label.Text = AxisLabel(cols[j].name, cols[j].unit)
			} else {
				p.X.Tick.Marker = plot.ConstantTicks{}
			}
			if i == j {
				var vals plotter.Values
				for _, e := range evs {
					if v := cols[i].value(e); finite(v) {
						vals = append(vals, v)
					}
				}
				if len(vals) > 0 {
					h, err := plotter.NewHist(vals, 12)
					if err != nil {
						return nil, fmt.Errorf("plot: histogram of %s: %w", cols[i].name, err)
					}
					h.FillColor = mutedColor
					p.Add(h)
				}
				p.Title.Text = cols[i].name
				p.Title.TextStyle.Font.Size = vg.Points(8)
				if j == 0 {
					p.Y.Label.Text = "count"
				}
			} else {
				p.Y.Min, p.Y.Max = cols[i].lo, cols[i].hi
				var feas, infeas plotter.XYs
				step := thinStep(len(evs), maxScatterPoints/4)
				for k, e := range evs {
					if k%step != 0 {
						continue
					}
					x, y := cols[j].value(e), cols[i].value(e)
					if !finite(x) || !finite(y) {
						continue
					}
					if e.Feasible {
						feas = append(feas, plotter.XY{X: x, Y: y})
					} else {
						infeas = append(infeas, plotter.XY{X: x, Y: y})
					}
				}
				if err := AddScatter(p, infeas, infeasibleColor, draw.CrossGlyph{}, "infeasible"); err != nil {
					return nil, err
				}
				if err := AddScatter(p, feas, feasibleColor, draw.CircleGlyph{}, "feasible"); err != nil {
					return nil, err
				}
				p.Legend = plot.NewLegend()
				// the first row's scale is shown on its second tile, as
				// the first holds a histogram
				if j == 0 || i == 0 && j == 1 {
					p.Y.Label.Text = AxisLabel(cols[i].name, cols[i].unit)
				}
			}
			if j != 0 && !(i == 0 && j == 1) {
				p.Y.Tick.Marker = plot.ConstantTicks{}
			}
			p.X.Label.TextStyle.Font.Size = vg.Points(8)
			p.Y.Label.TextStyle.Font.Size = vg.Points(8)
			plots[i][j] = p
		}
	}
	title := fmt.Sprintf("scatter matrix: %s, %d evaluations (blue feasible, red infeasible)", r.Study, len(evs))
	side := max(14*vg.Centimeter, vg.Length(n)*4*vg.Centimeter)
	return NewFigure("scatter_matrix", title, side, side, func(dc draw.Canvas) {
		dc = drawTitle(dc, title)
		tiles := draw.Tiles{Rows: n, Cols: n, PadX: vg.Points(4), PadY: vg.Points(4), PadLeft: vg.Points(4), PadRight: vg.Points(6), PadBottom: vg.Points(4)}
		cs := plot.Align(plots, tiles, dc)
		for i := range plots {
			for j := range plots[i] {
				plots[i][j].Draw(cs[i][j])
			}
		}
	}), nil
}
