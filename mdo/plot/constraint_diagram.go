package plot

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Boundary is one constraint of a constraint diagram: the least
// thrust-to-weight ratio that meets it at a given wing loading (take-off
// field length, climb gradient, cruise speed, ...).
type Boundary struct {
	Label             string
	MinThrustToWeight func(wingLoading float64) float64
}

// WingLoadingLimit is a constraint that caps the wing loading whatever
// the thrust (landing field length, approach or stall speed).
type WingLoadingLimit struct {
	Label string
	Max   float64
}

// DesignPoint is a design marked on a constraint diagram.
type DesignPoint struct {
	Label          string
	WingLoading    float64
	ThrustToWeight float64
}

// Diagram describes a constraint diagram (thrust-to-weight ratio against
// wing loading). The feasible region — above every boundary and left of
// every wing-loading limit — is shaded.
type Diagram struct {
	Title string
	// WingLoadingUnit labels the horizontal axis; default "N/m2".
	WingLoadingUnit string
	// MinWingLoading and MaxWingLoading are the horizontal range.
	MinWingLoading, MaxWingLoading float64
	// MaxThrustToWeight tops the vertical axis; 0 picks it from the curves.
	MaxThrustToWeight float64
	Boundaries        []Boundary
	Limits            []WingLoadingLimit
	Designs           []DesignPoint
}

// diagramSamples is the number of wing loadings at which boundaries are
// evaluated.
const diagramSamples = 200

// ConstraintDiagram draws a constraint diagram.
func ConstraintDiagram(d Diagram) (*Figure, error) {
	lo, hi := d.MinWingLoading, d.MaxWingLoading
	if !finite(lo) || !finite(hi) || !(lo >= 0) || !(hi > lo) {
		return nil, fmt.Errorf("plot: constraint diagram wing-loading range [%g, %g] must be finite with 0 <= min < max", lo, hi)
	}
	if len(d.Boundaries) == 0 && len(d.Limits) == 0 {
		return nil, fmt.Errorf("plot: constraint diagram has no boundary and no wing-loading limit")
	}
	unit := d.WingLoadingUnit
	if unit == "" {
		unit = "N/m2"
	}
	title := d.Title
	if title == "" {
		title = "constraint diagram"
	}
	p := newPlot(title, label("wing loading W/S", unit), label("thrust-to-weight ratio T/W", "-"))
	ws := make([]float64, diagramSamples+1)
	for i := range ws {
		ws[i] = lo + (hi-lo)*float64(i)/diagramSamples
	}
	envelope := make([]float64, len(ws))
	top := 0.0
	curves := make([]plotter.XYs, len(d.Boundaries))
	for k, b := range d.Boundaries {
		if b.MinThrustToWeight == nil {
			return nil, fmt.Errorf("plot: constraint diagram boundary %d (%q) has no function", k, b.Label)
		}
		for i, w := range ws {
			tw := b.MinThrustToWeight(w)
			if math.IsNaN(tw) || math.IsInf(tw, -1) {
				return nil, fmt.Errorf("plot: constraint diagram boundary %q gives T/W = %g at W/S = %g %s", b.Label, tw, w, unit)
			}
			envelope[i] = math.Max(envelope[i], tw)
			if finite(tw) {
				curves[k] = append(curves[k], plotter.XY{X: w, Y: tw})
				top = math.Max(top, tw)
			}
		}
	}
	wsMax := hi
	for _, l := range d.Limits {
		if !finite(l.Max) {
			return nil, fmt.Errorf("plot: wing-loading limit %q = %g must be finite", l.Label, l.Max)
		}
		wsMax = math.Min(wsMax, l.Max)
	}
	for _, dp := range d.Designs {
		if !finite(dp.WingLoading) || !finite(dp.ThrustToWeight) {
			return nil, fmt.Errorf("plot: design point %q (W/S %g, T/W %g) must be finite", dp.Label, dp.WingLoading, dp.ThrustToWeight)
		}
		top = math.Max(top, dp.ThrustToWeight)
	}
	ymax := d.MaxThrustToWeight
	if ymax <= 0 {
		ymax = 1.15 * top
		if ymax == 0 {
			ymax = 1
		}
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
			return nil, fmt.Errorf("plot: feasible region: %w", err)
		}
		poly.Color = regionColor
		poly.LineStyle.Width = 0
		p.Add(poly)
		p.Legend.Add("feasible region", poly)
	}
	for k, c := range curves {
		if err := addLine(p, c, palette[k%len(palette)], 1.8, d.Boundaries[k].Label); err != nil {
			return nil, err
		}
	}
	for k, l := range d.Limits {
		line, err := plotter.NewLine(plotter.XYs{{X: l.Max, Y: 0}, {X: l.Max, Y: ymax}})
		if err != nil {
			return nil, err
		}
		line.LineStyle.Color = palette[(len(curves)+k)%len(palette)]
		line.LineStyle.Width = vg.Points(1.8)
		line.LineStyle.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
		p.Add(line)
		p.Legend.Add(fmt.Sprintf("%s (W/S <= %.4g)", l.Label, l.Max), line)
	}
	for _, dp := range d.Designs {
		s, err := plotter.NewScatter(plotter.XYs{{X: dp.WingLoading, Y: dp.ThrustToWeight}})
		if err != nil {
			return nil, err
		}
		s.GlyphStyle.Shape, s.GlyphStyle.Radius, s.GlyphStyle.Color = draw.PyramidGlyph{}, vg.Points(5), bestColor
		p.Add(s)
		name := dp.Label
		if name == "" {
			name = "design"
		}
		p.Legend.Add(fmt.Sprintf("%s (%.4g %s, %.3g)", name, dp.WingLoading, unit, dp.ThrustToWeight), s)
	}
	p.X.Min, p.X.Max = lo, hi
	p.Y.Min, p.Y.Max = 0, ymax
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	return newFigure("constraint_diagram", title, 16*vg.Centimeter, 12*vg.Centimeter, func(dc draw.Canvas) { p.Draw(dc) }), nil
}
