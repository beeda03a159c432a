package designmap

import (
	"fmt"
	"image/color"
	"math"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/palette/moreland"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"couplet/mdo"
	"couplet/mdo/plot"
)

// grid is one layer of the map as gonum's GridXYZ.
type grid struct {
	xs, ys []float64
	z      [][]float64
}

func (g grid) Dims() (c, r int)   { return len(g.xs), len(g.ys) }
func (g grid) Z(c, r int) float64 { return g.z[r][c] }
func (g grid) X(c int) float64    { return g.xs[c] }
func (g grid) Y(r int) float64    { return g.ys[r] }

// shade draws a translucent grey cell over every grid point where a
// constraint is violated.
type shade struct {
	d *Data
}

// Plot implements gonum's plot.Plotter.
func (s shade) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	d := s.d
	half := func(v []float64, i int) (float64, float64) {
		lo, hi := v[i], v[i]
		if i > 0 {
			lo = (v[i-1] + v[i]) / 2
		}
		if i+1 < len(v) {
			hi = (v[i] + v[i+1]) / 2
		}
		return lo, hi
	}
	grey := color.NRGBA{R: 60, G: 60, B: 60, A: 110}
	for j := range d.Ys {
		for i := range d.Xs {
			bad := false
			for c := range d.Margins {
				if m := d.Margins[c][j][i]; m < 0 {
					bad = true
				}
			}
			if !bad {
				continue
			}
			x0, x1 := half(d.Xs, i)
			y0, y1 := half(d.Ys, j)
			r := vg.Rectangle{Min: vg.Point{X: trX(x0), Y: trY(y0)}, Max: vg.Point{X: trX(x1), Y: trY(y1)}}
			c.SetColor(grey)
			c.Fill(r.Path())
		}
	}
}

// failureGlyphs are the marker shapes of the failure classes.
var failureGlyphs = map[mdo.FailureClass]draw.GlyphDrawer{
	mdo.DoesNotClose:     draw.CrossGlyph{},
	mdo.SolverFailed:     draw.PyramidGlyph{},
	mdo.InvalidInput:     draw.SquareGlyph{},
	mdo.DisciplineFailed: draw.RingGlyph{},
}

// Figure draws the map, file name "map_<quantity>" (dots and other
// characters become underscores).
func Figure(d *Data) (*plot.Figure, error) {
	if d == nil || len(d.Xs) < 2 || len(d.Ys) < 2 {
		return nil, fmt.Errorf("designmap: Figure: no sampled map")
	}
	title := fmt.Sprintf("%s over %s and %s", d.Quantity, d.X, d.Y)
	if d.Interpolated != "" {
		title += fmt.Sprintf(", interpolated from %d recorded analyses", len(d.Samples))
	}
	p := plot.NewPlot(title, plot.AxisLabel(d.X, d.XUnit), plot.AxisLabel(d.Y, d.YUnit))
	p.Legend.Top = false
	p.Legend.Left = false
	pal := moreland.SmoothBlueRed()
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, r := range d.Z {
		for _, v := range r {
			if !math.IsNaN(v) {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
	}
	if lo < hi {
		pal.SetMin(lo)
		pal.SetMax(hi)
		levels := make([]float64, 12)
		for k := range levels {
			levels[k] = lo + (hi-lo)*(float64(k)+0.5)/float64(len(levels))
		}
		// Filled bands: a heat map of the quantity quantised to the levels.
		bands := make([][]float64, len(d.Z))
		for j, r := range d.Z {
			bands[j] = make([]float64, len(r))
			for i, v := range r {
				bands[j][i] = math.NaN()
				if !math.IsNaN(v) {
					k := math.Floor((v - lo) / (hi - lo) * float64(len(levels)))
					bands[j][i] = lo + (hi-lo)*(math.Min(k, float64(len(levels)-1))+0.5)/float64(len(levels))
				}
			}
		}
		cols := pal.Palette(len(levels)).Colors()
		for k := len(levels) - 1; k >= 0; k -= 3 {
			p.Legend.Add(fmt.Sprintf("%s %.4g %s", d.Quantity, levels[k], d.QuantityUnit), colourKey{cols[k]})
		}
		hm := plotter.NewHeatMap(grid{d.Xs, d.Ys, bands}, pal.Palette(len(levels)))
		hm.Min, hm.Max = lo, hi
		hm.NaN = color.White
		p.Add(hm)
		// iso-lines of the quantity, traced as the boundaries are (none
		// through failed points)
		toXY := func(_, _ int, i, j float64) plotter.XY { return plotter.XY{X: along(d.Xs, i), Y: along(d.Ys, j)} }
		for _, level := range levels {
			shifted := make([][]float64, len(d.Z))
			for j, r := range d.Z {
				shifted[j] = make([]float64, len(r))
				for i, v := range r {
					shifted[j][i] = v - level
				}
			}
			iso := traceBoundary(shifted, shifted, toXY)
			iso.ticks = nil
			iso.style = draw.LineStyle{Color: color.NRGBA{A: 90}, Width: vg.Points(0.5)}
			p.Add(iso)
		}
	}
	p.Add(shade{d})
	p.Legend.Add("grey, and ticks on the boundaries: infeasible side", colourKey{color.NRGBA{R: 60, G: 60, B: 60, A: 110}})
	var labels plotter.XYLabels
	for c, name := range d.Constraints {
		m := d.Margins[c]
		if !crosses(m) {
			continue
		}
		style := boundaryStyle(c, 2)
		bound := traceBoundary(m, m, func(_, _ int, i, j float64) plotter.XY { return plotter.XY{X: along(d.Xs, i), Y: along(d.Ys, j)} })
		bound.style = style
		p.Add(bound)
		p.Legend.Add(name+" boundary", legendStyle(style))
		if x, y, ok := labelAt(d, m, c); ok {
			labels.XYs = append(labels.XYs, plotter.XY{X: x, Y: y})
			labels.Labels = append(labels.Labels, name)
		}
	}
	if len(labels.XYs) > 0 {
		l, err := plotter.NewLabels(labels)
		if err == nil {
			p.Add(l)
		}
	}
	byClass := map[mdo.FailureClass]plotter.XYs{}
	for j, r := range d.Failures {
		for i, f := range r {
			if f != mdo.NotFailed {
				byClass[f] = append(byClass[f], plotter.XY{X: d.Xs[i], Y: d.Ys[j]})
			}
		}
	}
	for _, f := range []mdo.FailureClass{mdo.DoesNotClose, mdo.SolverFailed, mdo.InvalidInput, mdo.DisciplineFailed} {
		if len(byClass[f]) == 0 {
			continue
		}
		sc, err := plotter.NewScatter(byClass[f])
		if err != nil {
			return nil, fmt.Errorf("designmap: Figure: %w", err)
		}
		sc.Shape = failureGlyphs[f]
		sc.Color = color.Black
		sc.Radius = vg.Points(3)
		p.Add(sc)
		p.Legend.Add("failed: "+f.String(), sc)
	}
	if err := addSamples(p, d); err != nil {
		return nil, err
	}
	if d.Best[0] >= 0 {
		markBest(p, d.Xs[d.Best[0]], d.Ys[d.Best[1]], fmt.Sprintf("best feasible grid point (%s %.4g)", d.Quantity, d.Z[d.Best[1]][d.Best[0]]))
	}
	if !math.IsNaN(d.BestAt[0]) {
		state := "feasible"
		if !d.BestFeasible {
			state = "infeasible"
		}
		markBest(p, d.BestAt[0], d.BestAt[1], fmt.Sprintf("best analysed design (%s %.4g, %s)", d.Quantity, d.BestValue, state))
	}
	name := "map_" + d.Quantity
	if d.Interpolated != "" {
		note := plotter.NewFunction(func(float64) float64 { return math.NaN() })
		note.LineStyle.Width = 0
		p.Legend.Add("values and boundaries interpolated (cubic RBF), not analysed", note)
		name = "recorded_map_" + d.Quantity
	}
	p.Add(plotter.NewGrid())
	return plot.NewFigure(fileName(name), title, vg.Points(900), vg.Points(480), besideLegend(p, 560)), nil
}

// besideLegend returns the drawing of plot p with its legend beside it,
// on the right, instead of over the data; the plot takes width points.
func besideLegend(p *gplot.Plot, width float64) func(draw.Canvas) {
	leg := p.Legend
	p.Legend = gplot.NewLegend()
	leg.Top, leg.Left = true, true
	return func(c draw.Canvas) {
		left, right := c, c
		left.Max.X = c.Min.X + vg.Points(width)
		right.Min.X = left.Max.X + vg.Points(8)
		right.Max.Y -= vg.Points(24)
		p.Draw(left)
		leg.Draw(right)
	}
}

// along returns the value at the fractional index f of the evenly
// spaced values v.
func along(v []float64, f float64) float64 {
	i := int(math.Max(0, math.Min(math.Floor(f), float64(len(v)-2))))
	return v[i] + (f-float64(i))*(v[i+1]-v[i])
}

// crosses reports whether the margins change sign on the grid.
func crosses(m [][]float64) bool {
	neg, pos := false, false
	for _, r := range m {
		for _, v := range r {
			neg = neg || v < 0
			pos = pos || v >= 0
		}
	}
	return neg && pos
}

// labelAt returns a point on the boundary of margin m where a label goes:
// the middle of the grid edges where the margin changes sign, staggered by
// the constraint's index so that labels of close boundaries part.
func labelAt(d *Data, m [][]float64, c int) (x, y float64, ok bool) {
	var pts []plotter.XY
	for j := range m {
		for i := 0; i+1 < len(m[j]); i++ {
			a, b := m[j][i], m[j][i+1]
			if !math.IsNaN(a) && !math.IsNaN(b) && (a < 0) != (b < 0) {
				t := a / (a - b)
				pts = append(pts, plotter.XY{X: d.Xs[i] + t*(d.Xs[i+1]-d.Xs[i]), Y: d.Ys[j]})
			}
		}
	}
	if len(pts) == 0 {
		return 0, 0, false
	}
	k := (len(pts) * (1 + 2*(c%3))) / 6
	return pts[k].X, pts[k].Y, true
}

// fileName turns a quantity name into a figure file-name stem.
func fileName(s string) string {
	b := []byte(s)
	for i, ch := range b {
		if !(ch >= 'a' && ch <= 'z' || ch >= '0' && ch <= '9' || ch == '_') {
			b[i] = '_'
		}
	}
	return string(b)
}

// addSamples marks the recorded analyses of an interpolated map,
// projected onto its axes: feasible ones filled, infeasible ones hollow,
// failed ones by their class.
func addSamples(p *gplot.Plot, d *Data) error {
	var feasible, infeasible plotter.XYs
	failed := map[mdo.FailureClass]plotter.XYs{}
	for _, s := range d.Samples {
		xy := plotter.XY{X: s.X, Y: s.Y}
		switch {
		case s.Failure != mdo.NotFailed:
			failed[s.Failure] = append(failed[s.Failure], xy)
		case s.Feasible:
			feasible = append(feasible, xy)
		default:
			infeasible = append(infeasible, xy)
		}
	}
	for _, set := range []struct {
		xys   plotter.XYs
		shape draw.GlyphDrawer
		label string
	}{
		{feasible, draw.CircleGlyph{}, "recorded analysis, feasible"},
		{infeasible, draw.PlusGlyph{}, "recorded analysis, infeasible"},
		{failed[mdo.DoesNotClose], draw.CrossGlyph{}, "recorded analysis failed: " + mdo.DoesNotClose.String()},
		{failed[mdo.SolverFailed], draw.PyramidGlyph{}, "recorded analysis failed: " + mdo.SolverFailed.String()},
		{failed[mdo.InvalidInput], draw.SquareGlyph{}, "recorded analysis failed: " + mdo.InvalidInput.String()},
		{failed[mdo.DisciplineFailed], draw.RingGlyph{}, "recorded analysis failed: " + mdo.DisciplineFailed.String()},
	} {
		if len(set.xys) == 0 {
			continue
		}
		sc, err := plotter.NewScatter(set.xys)
		if err != nil {
			return fmt.Errorf("designmap: Figure: %w", err)
		}
		sc.Shape = set.shape
		sc.Color = color.NRGBA{R: 40, G: 40, B: 40, A: 255}
		sc.Radius = vg.Points(2.2)
		p.Add(sc)
		p.Legend.Add(set.label+" (projected)", sc)
	}
	return nil
}

// markBest marks a best point at (x, y) with its legend entry.
func markBest(p *gplot.Plot, x, y float64, label string) {
	sc, err := plotter.NewScatter(plotter.XYs{{X: x, Y: y}})
	if err != nil {
		return // a non-finite point is not drawn
	}
	sc.Shape = draw.CircleGlyph{}
	sc.Color = plot.BestColor()
	sc.Radius = vg.Points(5)
	p.Add(sc)
	p.Legend.Add(label, sc)
}

// colourKey is a legend thumbnail filled with one colour.
type colourKey struct{ c color.Color }

// Thumbnail implements gonum's plot.Thumbnailer.
func (k colourKey) Thumbnail(c *draw.Canvas) {
	c.SetColor(k.c)
	c.Fill(c.Rectangle.Path())
}
