package drawings

import (
	"fmt"
	"image/color"
	"math"

	"couplet/mdo/plot"
	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Planform draws the wing planform of a design: both halves, the
// quarter-chord line and the mean aerodynamic chord, with area and aspect
// ratio in the title. The nose is up.
func Planform(a Aircraft) (*plot.Figure, error) {
	if err := a.Validate(); err != nil {
		return nil, err
	}
	if a.WingSpan == 0 {
		return nil, fmt.Errorf("drawings: Planform needs a wing; WingSpan = 0")
	}
	wing, _, _ := a.surfaces()
	title := fmt.Sprintf("wing planform%s: S = %.4g m2, AR = %.3g, taper %.3g, LE sweep %.3g deg",
		nameSuffix(a.Name), a.WingArea(), a.AspectRatio(), a.WingTipChord/a.WingRootChord, a.WingSweepLE)
	p := plot.NewPlot(title, "spanwise position y [m]", "position aft of the nose x [m]")
	p.Title.TextStyle.Font.Size = vg.Points(10)
	if err := addSurface(p, wing, false, plot.LineColor(0)); err != nil {
		return nil, err
	}
	// quarter-chord line
	half := a.WingSpan / 2
	tan := math.Tan(a.WingSweepLE * math.Pi / 180)
	qr := a.WingApex + a.WingRootChord/4
	qt := a.WingApex + half*tan + a.WingTipChord/4
	qc, err := plotter.NewLine(plotter.XYs{{X: -half, Y: qt}, {X: 0, Y: qr}, {X: half, Y: qt}})
	if err != nil {
		return nil, err
	}
	qc.LineStyle.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
	p.Add(qc)
	p.Legend.Add("quarter-chord line", qc)
	c, y, x := a.MAC()
	for _, side := range []float64{-1, 1} {
		m, err := plotter.NewLine(plotter.XYs{{X: side * y, Y: x}, {X: side * y, Y: x + c}})
		if err != nil {
			return nil, err
		}
		m.LineStyle.Color, m.LineStyle.Width = plot.BestColor(), vg.Points(2.5)
		p.Add(m)
		if side > 0 {
			p.Legend.Add(fmt.Sprintf("mean aerodynamic chord %.3g m", c), m)
		}
	}
	ys, xs := wing.outline(false)
	fig := equalAspect(p, ys, xs, 16*vg.Centimeter, 12*vg.Centimeter)
	return plot.NewFigure("planform", title, 16*vg.Centimeter, 12*vg.Centimeter, fig), nil
}

// TopView draws the top view of a design: fuselage, wing, horizontal and
// vertical tail, and the centre of gravity if given. The nose is up.
func TopView(a Aircraft) (*plot.Figure, error) {
	if err := a.Validate(); err != nil {
		return nil, err
	}
	if a.WingSpan == 0 && a.FuselageLength == 0 {
		return nil, fmt.Errorf("drawings: TopView needs a wing or a fuselage; both are zero")
	}
	title := "top view" + nameSuffix(a.Name)
	p := plot.NewPlot(title, "spanwise position y [m]", "position aft of the nose x [m]")
	var allY, allX []float64
	if a.FuselageLength > 0 {
		ys, xs := a.fuselageOutline()
		if err := addPolygon(p, ys, xs, color.RGBA{R: 200, G: 200, B: 210, A: 255}, "fuselage"); err != nil {
			return nil, err
		}
		allY, allX = append(allY, ys...), append(allX, xs...)
	}
	wing, htail, vtail := a.surfaces()
	for _, s := range []struct {
		s surface
		c color.Color
	}{{wing, plot.LineColor(0)}, {htail, plot.LineColor(2)}} {
		if s.s.span == 0 {
			continue
		}
		if err := addSurface(p, s.s, false, s.c); err != nil {
			return nil, err
		}
		ys, xs := s.s.outline(false)
		allY, allX = append(allY, ys...), append(allX, xs...)
	}
	if vtail.span > 0 {
		// seen from above the fin is a thin strip on the centreline from
		// its root leading edge to its tip trailing edge
		xt := vtail.x0 + vtail.span*math.Tan(vtail.sweep*math.Pi/180)
		x1, x2 := vtail.x0, math.Max(vtail.x0+vtail.root, xt+vtail.tip)
		t := 0.06 * vtail.root
		if err := addPolygon(p, []float64{-t, t, t, -t}, []float64{x1, x1, x2, x2}, plot.LineColor(3), "vertical tail"); err != nil {
			return nil, err
		}
		allX = append(allX, x1, x2)
	}
	if a.CG != 0 {
		s, err := plotter.NewScatter(plotter.XYs{{X: 0, Y: a.CG}})
		if err != nil {
			return nil, err
		}
		s.GlyphStyle.Shape, s.GlyphStyle.Radius, s.GlyphStyle.Color = draw.CircleGlyph{}, vg.Points(4), color.Black
		p.Add(s)
		p.Legend.Add(fmt.Sprintf("centre of gravity x = %.4g m", a.CG), s)
		allX = append(allX, a.CG)
	}
	return plot.NewFigure("top_view", title, 16*vg.Centimeter, 16*vg.Centimeter, equalAspect(p, allY, allX, 16*vg.Centimeter, 16*vg.Centimeter)), nil
}

// nameSuffix formats an optional design name.
func nameSuffix(n string) string {
	if n == "" {
		return ""
	}
	return " of " + n
}

// addSurface adds a surface's outline as a filled polygon.
func addSurface(p *gplot.Plot, s surface, oneSide bool, c color.Color) error {
	ys, xs := s.outline(oneSide)
	return addPolygon(p, ys, xs, c, s.name)
}

// addPolygon adds a translucent filled polygon with an outline.
func addPolygon(p *gplot.Plot, ys, xs []float64, c color.Color, name string) error {
	pts := make(plotter.XYs, len(xs))
	for i := range xs {
		pts[i] = plotter.XY{X: ys[i], Y: xs[i]}
	}
	poly, err := plotter.NewPolygon(pts)
	if err != nil {
		return fmt.Errorf("drawings: outline of %s: %w", name, err)
	}
	r, g, b, _ := c.RGBA()
	poly.Color = color.NRGBA{R: uint8(r >> 8), G: uint8(g >> 8), B: uint8(b >> 8), A: 90}
	poly.LineStyle.Color = c
	poly.LineStyle.Width = vg.Points(1.2)
	p.Add(poly)
	p.Legend.Add(name, poly)
	return nil
}

// equalAspect sets the axis ranges so that a metre is as long on both
// axes (for a figure of about w × h), with x aft drawn downwards, and
// returns the drawing function.
func equalAspect(p *gplot.Plot, ys, xs []float64, w, h vg.Length) func(draw.Canvas) {
	ylo, yhi, xlo, xhi := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for i := range ys {
		ylo, yhi = math.Min(ylo, ys[i]), math.Max(yhi, ys[i])
	}
	for i := range xs {
		xlo, xhi = math.Min(xlo, xs[i]), math.Max(xhi, xs[i])
	}
	// the data area: the figure less room for the title, labels and ticks
	dw, dh := float64(w-vg.Points(60)), float64(h-vg.Points(70))
	spanH, spanV := (yhi-ylo)*1.1, (xhi-xlo)*1.1
	if spanH/dw < spanV/dh {
		spanH = spanV / dh * dw
	} else {
		spanV = spanH / dw * dh
	}
	cy, cx := (ylo+yhi)/2, (xlo+xhi)/2
	p.X.Min, p.X.Max = cy-spanH/2, cy+spanH/2
	p.Y.Min, p.Y.Max = cx-spanV/2, cx+spanV/2
	p.Y.Scale = gplot.InvertedScale{Normalizer: gplot.LinearScale{}}
	p.Legend.Top, p.Legend.Left = false, false
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	return func(dc draw.Canvas) { p.Draw(dc) }
}
