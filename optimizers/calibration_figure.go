package optimizers

import (
	"cmp"
	"context"
	"fmt"
	"image/color"
	"math"
	"slices"
	"strconv"
	"strings"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"couplet/mdo"
	"couplet/mdo/plot"
)

// Figure draws the measured against the predicted values of each fitted
// quantity (the polar coefficients of a wind-tunnel entry, say), one panel
// per quantity, against the data's first condition (the Mach number):
// the measurements as points with their ±1 standard-uncertainty error
// bars where the data give uncertainties, the model's predictions with
// the starting factors (before calibration, dashed) and with the fitted
// ones (after, solid) as lines through the measured conditions. Rows that
// differ in the other conditions (the altitude) are drawn as separate
// series, one colour each, named in the first panel's legend. File name "calibration"; SVG and PNG through
// plot.Figure.
func (r *CalibrationResult) Figure() *plot.Figure {
	if r == nil || len(r.Points) == 0 || len(r.Conditions) == 0 {
		return plot.LeftOut("calibration", "calibration: measured and predicted", fmt.Errorf("optimizers: calibration figure: no fitted points with conditions"))
	}
	title := fmt.Sprintf("calibration %q: measured and predicted (%s)", r.Name, r.Source)
	var quantities []string
	for _, p := range r.Points {
		if !slices.Contains(quantities, p.Quantity) {
			quantities = append(quantities, p.Quantity)
		}
	}
	var panels []*gplot.Plot
	for _, q := range quantities {
		p, err := r.panel(q, len(panels) == 0)
		if err != nil {
			return plot.LeftOut("calibration", title, err)
		}
		panels = append(panels, p)
	}
	w, h := 13*vg.Centimeter, 9*vg.Centimeter
	return plot.NewFigure("calibration", title, w, h*vg.Length(len(panels)), func(dc draw.Canvas) {
		rows := make([][]*gplot.Plot, len(panels))
		for i, p := range panels {
			rows[i] = []*gplot.Plot{p}
		}
		tiles := draw.Tiles{Rows: len(panels), Cols: 1, PadY: vg.Points(12), PadTop: vg.Points(4), PadBottom: vg.Points(4), PadLeft: vg.Points(4), PadRight: vg.Points(8)}
		cs := gplot.Align(rows, tiles, dc)
		for i, p := range panels {
			p.Draw(cs[i][0])
		}
	})
}

// panel is the plot of one quantity.
func (r *CalibrationResult) panel(q string, legend bool) (*gplot.Plot, error) {
	x := r.Conditions[0]
	p := plot.NewPlot(q+": measured, predicted before and after calibration", plot.AxisLabel(x, r.Units[x]), plot.AxisLabel(q, r.Units[q]))
	// series: the points of q grouped by the other conditions
	type series struct {
		key                      string
		meas, before, after, err plotter.XYs
	}
	var all []*series
	for _, pt := range r.Points {
		if pt.Quantity != q {
			continue
		}
		var parts []string
		for i := 1; i < len(pt.Conditions); i++ {
			parts = append(parts, fmt.Sprintf("%s %s %s", r.Conditions[i], strconv.FormatFloat(pt.Conditions[i], 'g', 6, 64), r.Units[r.Conditions[i]]))
		}
		key := strings.Join(parts, ", ")
		k := slices.IndexFunc(all, func(s *series) bool { return s.key == key })
		if k < 0 {
			all = append(all, &series{key: key})
			k = len(all) - 1
		}
		s := all[k]
		xv := pt.Conditions[0]
		s.meas = append(s.meas, plotter.XY{X: xv, Y: pt.Measured})
		s.before = append(s.before, plotter.XY{X: xv, Y: pt.Before})
		s.after = append(s.after, plotter.XY{X: xv, Y: pt.Predicted})
		s.err = append(s.err, plotter.XY{X: xv, Y: pt.Uncertainty})
	}
	line := func(xys plotter.XYs, c color.Color, width float64, dashed bool) (*plotter.Line, error) {
		slices.SortStableFunc(xys, func(a, b plotter.XY) int { return cmp.Compare(a.X, b.X) })
		l, err := plotter.NewLine(xys)
		if err != nil {
			return nil, fmt.Errorf("optimizers: calibration figure: %s: %w", q, err)
		}
		l.LineStyle.Color = c
		l.LineStyle.Width = vg.Points(width)
		if dashed {
			l.LineStyle.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
		}
		return l, nil
	}
	for i, s := range all {
		c := plot.LineColor(i)
		before, err := line(s.before, c, 1, true)
		if err != nil {
			return nil, err
		}
		after, err := line(s.after, c, 1.8, false)
		if err != nil {
			return nil, err
		}
		p.Add(before, after)
		pts, err := plotter.NewScatter(s.meas)
		if err != nil {
			return nil, fmt.Errorf("optimizers: calibration figure: %s: %w", q, err)
		}
		pts.GlyphStyle.Color, pts.GlyphStyle.Shape, pts.GlyphStyle.Radius = c, draw.CircleGlyph{}, vg.Points(2)
		p.Add(pts)
		if !math.IsNaN(s.err[0].Y) {
			bars := make(errorPoints, len(s.meas))
			for j := range s.meas {
				bars[j] = errorPoint{s.meas[j].X, s.meas[j].Y, s.err[j].Y}
			}
			eb, err := plotter.NewYErrorBars(bars)
			if err != nil {
				return nil, fmt.Errorf("optimizers: calibration figure: %s: %w", q, err)
			}
			eb.LineStyle.Color = c
			p.Add(eb)
		}
		if legend && s.key != "" {
			p.Legend.Add(s.key, after)
		}
	}
	if legend {
		// the styles, in grey
		grey := color.Gray{Y: 110}
		pt, _ := plotter.NewScatter(plotter.XYs{{}})
		pt.GlyphStyle.Color, pt.GlyphStyle.Shape, pt.GlyphStyle.Radius = grey, draw.CircleGlyph{}, vg.Points(2)
		before, _ := line(plotter.XYs{{}, {X: 1}}, grey, 1, true)
		after, _ := line(plotter.XYs{{}, {X: 1}}, grey, 1.8, false)
		p.Legend.Add("measured ± standard uncertainty", pt)
		p.Legend.Add("predicted before calibration", before)
		p.Legend.Add("predicted after calibration", after)
		p.Legend.Top, p.Legend.Left = false, true
		p.Legend.XOffs, p.Legend.YOffs = vg.Points(6), vg.Points(4)
	}
	return p, nil
}

// errorPoint is a measured value with its standard uncertainty.
type errorPoint struct{ x, y, u float64 }

// errorPoints are the points of a series with ±u error bars (gonum's
// plotter.XYer and YErrorer).
type errorPoints []errorPoint

// Len implements plotter.XYer.
func (e errorPoints) Len() int { return len(e) }

// XY implements plotter.XYer.
func (e errorPoints) XY(i int) (float64, float64) { return e[i].x, e[i].y }

// YError implements plotter.YErrorer.
func (e errorPoints) YError(i int) (float64, float64) { return e[i].u, e[i].u }

// Figures gives the calibration's figure to the run folder of a study
// that uses its factors (a report.FigureSource: in a study script,
// cell.AddFigures(result, calib.Figures)).
func (r *CalibrationResult) Figures(context.Context, *mdo.Result, *mdo.Study) ([]*plot.Figure, []string) {
	return []*plot.Figure{r.Figure()}, nil
}
