package drawings

import (
	"fmt"
	"math"

	"couplet/disciplines"
	"couplet/mdo/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// SizingView says how a sizing diagram is drawn. A zero field takes its
// default.
type SizingView struct {
	// Title heads the figure; default "sizing diagram".
	Title string
	// Design labels the design's point; default "design".
	Design string
	// MinWingLoading and MaxWingLoading [N/m2] are the horizontal range;
	// default a quarter of the design's wing loading to the larger of
	// 1.7 times it and 1.2 times the largest wing-loading limit.
	MinWingLoading, MaxWingLoading float64
	// MaxThrustToWeight tops the vertical axis; default 2.4 times the
	// largest of the design's T/W and every boundary at its wing loading
	// (a cruise boundary grows without bound towards small wing loadings
	// and would flatten the rest).
	MaxThrustToWeight float64
}

// sizingSamples is the number of wing loadings at which boundaries are
// evaluated.
const sizingSamples = 200

// SizingDiagram draws a sizing diagram (disciplines.NewSizingDiagram):
// each thrust requirement's least T/W against the take-off wing loading,
// each wing-loading limit as a dashed vertical line, the feasible region
// (above every boundary, left of every limit) shaded and the design
// marked. The figure's name is "sizing_diagram".
func SizingDiagram(d disciplines.SizingDiagram, v SizingView) (*plot.Figure, error) {
	if !finite(d.WingLoading) || !(d.WingLoading > 0) || !finite(d.ThrustToWeight) || !(d.ThrustToWeight >= 0) {
		return nil, fmt.Errorf("drawings: sizing diagram design point W/S = %g N/m2, T/W = %g: want W/S > 0 and T/W >= 0, both finite", d.WingLoading, d.ThrustToWeight)
	}
	if len(d.Boundaries) == 0 && len(d.Limits) == 0 {
		return nil, fmt.Errorf("drawings: sizing diagram has no boundary and no wing-loading limit")
	}
	for _, l := range d.Limits {
		if !finite(l.WingLoading) {
			return nil, fmt.Errorf("drawings: sizing diagram wing-loading limit %q = %g N/m2 must be finite", l.Name, l.WingLoading)
		}
	}
	lo, hi := v.MinWingLoading, v.MaxWingLoading
	if lo == 0 && hi == 0 {
		lo, hi = 0.25*d.WingLoading, 1.7*d.WingLoading
		for _, l := range d.Limits {
			hi = math.Max(hi, 1.2*l.WingLoading)
		}
	}
	if !finite(lo) || !finite(hi) || !(lo >= 0) || !(hi > lo) {
		return nil, fmt.Errorf("drawings: sizing diagram wing-loading range [%g, %g] N/m2 must be finite with 0 <= min < max", lo, hi)
	}
	title := v.Title
	if title == "" {
		title = "sizing diagram"
	}
	design := v.Design
	if design == "" {
		design = "design"
	}
	ymax := v.MaxThrustToWeight
	if ymax <= 0 {
		top := d.ThrustToWeight
		for _, b := range d.Boundaries {
			if b.ThrustToWeight == nil {
				continue
			}
			if tw := b.ThrustToWeight(d.WingLoading); finite(tw) {
				top = math.Max(top, tw)
			}
		}
		ymax = 2.4 * top
		if ymax == 0 {
			ymax = 1
		}
	}
	p := plot.NewPlot(title, plot.AxisLabel("wing loading W/S", "N/m2"), plot.AxisLabel("thrust-to-weight ratio T/W", "-"))
	ws := make([]float64, sizingSamples+1)
	for i := range ws {
		ws[i] = lo + (hi-lo)*float64(i)/sizingSamples
	}
	envelope := make([]float64, len(ws))
	curves := make([]plotter.XYs, len(d.Boundaries))
	for k, b := range d.Boundaries {
		if b.ThrustToWeight == nil {
			return nil, fmt.Errorf("drawings: sizing diagram boundary %d (%q) has no function", k, b.Name)
		}
		for i, w := range ws {
			tw := b.ThrustToWeight(w)
			if math.IsNaN(tw) && w == 0 {
				continue // a boundary undefined at zero wing loading
			}
			if math.IsNaN(tw) || math.IsInf(tw, -1) {
				return nil, fmt.Errorf("drawings: sizing diagram boundary %q gives T/W = %g at W/S = %g N/m2", b.Name, tw, w)
			}
			envelope[i] = math.Max(envelope[i], tw)
			if finite(tw) {
				curves[k] = append(curves[k], plotter.XY{X: w, Y: tw})
			}
		}
	}
	wsMax := hi
	for _, l := range d.Limits {
		wsMax = math.Min(wsMax, l.WingLoading)
	}
	// the feasible region: above the envelope, left of the tightest limit
	var region plotter.XYs
	for i, w := range ws {
		if w > wsMax {
			break
		}
		region = append(region, plotter.XY{X: w, Y: math.Min(envelope[i], ymax)})
	}
	if len(region) > 0 && wsMax > lo {
		last := region[len(region)-1]
		if last.X < wsMax {
			region = append(region, plotter.XY{X: wsMax, Y: last.Y})
		}
		region = append(region, plotter.XY{X: region[len(region)-1].X, Y: ymax}, plotter.XY{X: lo, Y: ymax})
		poly, err := plotter.NewPolygon(region)
		if err != nil {
			return nil, fmt.Errorf("drawings: sizing diagram feasible region: %w", err)
		}
		poly.Color = plot.RegionColor()
		poly.LineStyle.Width = 0
		p.Add(poly)
		p.Legend.Add("feasible region", poly)
	}
	for k, c := range curves {
		if err := plot.AddLine(p, c, plot.LineColor(k), 1.8, d.Boundaries[k].Name); err != nil {
			return nil, err
		}
	}
	for k, l := range d.Limits {
		line, err := plotter.NewLine(plotter.XYs{{X: l.WingLoading, Y: 0}, {X: l.WingLoading, Y: ymax}})
		if err != nil {
			return nil, err
		}
		line.LineStyle.Color = plot.LineColor(len(curves) + k)
		line.LineStyle.Width = vg.Points(1.8)
		line.LineStyle.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
		p.Add(line)
		p.Legend.Add(fmt.Sprintf("%s (W/S <= %.4g)", l.Name, l.WingLoading), line)
	}
	s, err := plotter.NewScatter(plotter.XYs{{X: d.WingLoading, Y: d.ThrustToWeight}})
	if err != nil {
		return nil, err
	}
	s.GlyphStyle.Shape, s.GlyphStyle.Radius, s.GlyphStyle.Color = draw.PyramidGlyph{}, vg.Points(5), plot.BestColor()
	p.Add(s)
	p.Legend.Add(fmt.Sprintf("%s (%.4g N/m2, %.3g)", design, d.WingLoading, d.ThrustToWeight), s)
	p.X.Min, p.X.Max = lo, hi
	p.Y.Min, p.Y.Max = 0, ymax
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	return plot.NewFigure("sizing_diagram", title, 16*vg.Centimeter, 12*vg.Centimeter, func(dc draw.Canvas) { p.Draw(dc) }), nil
}
