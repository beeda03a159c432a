package designmap

import (
	"context"
	"fmt"
	"image/color"
	"math"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"couplet/mdo"
	"couplet/mdo/plot"
)

// CarpetSpec chooses a carpet plot: the quantity drawn upward against two
// parameters, each line of the carpet holding one parameter at one of
// its values. Zero values take the defaults.
type CarpetSpec struct {
	// X and Y are the two design variables: the carpet has a line of
	// constant X for each value of X and one of constant Y for each value
	// of Y.
	X, Y string
	// Quantity is drawn upward; default the study's first objective.
	Quantity string
	// At fixes the other design variables, as Spec.At does.
	At map[string]float64
	// Lines is the number of values of each parameter, evenly spread over
	// its bounds; default 5, allowed 2 to 15.
	Lines int
}

// Carpet analyses the carpet's grid of study s: Lines × Lines analyses
// through the study's Evaluator (a map's Data on a coarse grid, which
// CarpetFigure draws).
func Carpet(ctx context.Context, s *mdo.Study, spec CarpetSpec) (*Data, error) {
	n := spec.Lines
	if n == 0 {
		n = 5
	}
	if n < 2 || n > 15 {
		return nil, fmt.Errorf("designmap: CarpetSpec.Lines = %d, allowed 2 to 15", spec.Lines)
	}
	return Sample(ctx, s, Spec{X: spec.X, Y: spec.Y, Quantity: spec.Quantity, At: spec.At, Points: n})
}

// carpetRefine is the number of sub-cells along each side of a grid cell
// in which the constraints' margins are interpolated to trace their
// boundaries.
const carpetRefine = 8

// CarpetFigure draws a sampled grid as the aircraft designer's carpet
// plot, file name "carpet_<quantity>": the quantity upward, each line
// holding X or Y at one value and labelled with it, the lines of
// constant X staggered sideways by the value of Y so that the grid
// opens into a carpet (the horizontal axis carries no scale). Over it
// every constraint whose margin changes sign is drawn as a line with
// ticks on its infeasible side, traced through each cell by bilinear
// interpolation of the grid's margins. A failed analysis leaves a gap
// in its lines and is counted in the legend; the best feasible grid
// point is marked.
func CarpetFigure(d *Data) (*plot.Figure, error) {
	if d == nil || len(d.Xs) < 2 || len(d.Ys) < 2 {
		return nil, fmt.Errorf("designmap: CarpetFigure: no sampled grid")
	}
	nx, ny := len(d.Xs), len(d.Ys)
	title := fmt.Sprintf("carpet of %s over %s and %s", d.Quantity, d.X, d.Y)
	if d.Interpolated != "" {
		title += ", interpolated"
	}
	p := plot.NewPlot(title, fmt.Sprintf("%s, staggered by %s (no scale)", d.X, d.Y), plot.AxisLabel(d.Quantity, d.QuantityUnit))
	p.X.Tick.Marker = gplot.ConstantTicks(nil)
	p.Legend.Top = true
	p.Legend.Left = false
	// carpet abscissa of grid point (i, j), in fractional indices; the
	// stagger's sign opens the carpet: it gives the two families of
	// lines slopes of opposite sign where the quantity rises (or falls)
	// with both parameters
	shift := carpetShift * staggerSign(d.Z)
	cx := func(i, j float64) float64 { return i/float64(nx-1) + shift*j/float64(ny-1) }
	var labels plotter.XYLabels
	xLine := color.NRGBA{R: 150, G: 40, B: 40, A: 255}
	yLine := color.NRGBA{R: 30, G: 60, B: 140, A: 255}
	addLine := func(xys plotter.XYs, c color.Color) {
		if len(xys) < 2 {
			return
		}
		l, err := plotter.NewLine(xys)
		if err != nil {
			return
		}
		l.LineStyle = draw.LineStyle{Color: c, Width: vg.Points(1.4)}
		p.Add(l)
	}
	// the lines of constant Y (j fixed) and of constant X (i fixed),
	// broken at failed points, each labelled at its last point
	family := func(lines, along int, at func(line, k int) (i, j int), c color.Color, label func(line int) string) {
		for line := 0; line < lines; line++ {
			var run plotter.XYs
			last := -1
			for k := 0; k < along; k++ {
				i, j := at(line, k)
				if z := d.Z[j][i]; !math.IsNaN(z) {
					run = append(run, plotter.XY{X: cx(float64(i), float64(j)), Y: z})
					last = k
					continue
				}
				addLine(run, c)
				run = nil
			}
			addLine(run, c)
			if last >= 0 {
				i, j := at(line, last)
				labels.XYs = append(labels.XYs, plotter.XY{X: cx(float64(i), float64(j)), Y: d.Z[j][i]})
				labels.Labels = append(labels.Labels, label(line))
			}
		}
	}
	family(ny, nx, func(j, i int) (int, int) { return i, j }, yLine, func(j int) string { return fmt.Sprintf(" %s %.4g", d.Y, d.Ys[j]) })
	family(nx, ny, func(i, j int) (int, int) { return i, j }, xLine, func(i int) string { return fmt.Sprintf(" %s %.4g", d.X, d.Xs[i]) })
	p.Legend.Add("lines of constant "+d.X, legendLine(xLine, 1.4))
	p.Legend.Add("lines of constant "+d.Y, legendLine(yLine, 1.4))
	p.Legend.Add("ticks on a boundary: its infeasible side", legendLine(color.NRGBA{A: 0}, 0))
	// constraint boundaries with ticks on their infeasible side
	for c, name := range d.Constraints {
		m := d.Margins[c]
		if !crosses(m) {
			continue
		}
		b := traceCarpet(d.Z, m, cx)
		if len(b.segs) == 0 {
			continue
		}
		b.style = boundaryStyle(c, 2.2)
		p.Add(b)
		p.Legend.Add(name+" boundary", legendStyle(b.style))
	}
	failed := map[mdo.FailureClass]int{}
	for _, r := range d.Failures {
		for _, f := range r {
			if f != mdo.NotFailed {
				failed[f]++
			}
		}
	}
	for _, f := range []mdo.FailureClass{mdo.DoesNotClose, mdo.SolverFailed, mdo.InvalidInput, mdo.DisciplineFailed} {
		if failed[f] > 0 {
			p.Legend.Add(fmt.Sprintf("gaps: %d failed analyses, %s", failed[f], f), legendLine(color.NRGBA{A: 0}, 0))
		}
	}
	if d.Best[0] >= 0 {
		i, j := d.Best[0], d.Best[1]
		markBest(p, cx(float64(i), float64(j)), d.Z[j][i], fmt.Sprintf("best feasible grid point (%s %.4g, %s %.4g)", d.X, d.Xs[i], d.Y, d.Ys[j]))
	}
	if d.Interpolated != "" {
		p.Legend.Add("values and boundaries interpolated (cubic RBF), not analysed", legendLine(color.NRGBA{A: 0}, 0))
	}
	if len(labels.XYs) > 0 {
		l, err := plotter.NewLabels(labels)
		if err != nil {
			return nil, fmt.Errorf("designmap: CarpetFigure: %w", err)
		}
		for k := range l.TextStyle {
			l.TextStyle[k].Font.Size = vg.Points(8)
		}
		p.Add(l)
	}
	p.Add(plotter.NewGrid())
	// room on the right for the labels at the lines' ends
	p.X.Max += 0.45
	p.X.Min -= 0.05
	return plot.NewFigure(fileName("carpet_"+d.Quantity), title, vg.Points(940), vg.Points(480), besideLegend(p, 600)), nil
}

// carpetShift is the stagger of the lines of constant X per whole range
// of Y, in whole ranges of X.
const carpetShift = 0.6

// staggerSign returns −1 when the quantity's mean change along both axes
// of the grid has the same sign, +1 otherwise.
func staggerSign(z [][]float64) float64 {
	var di, dj float64
	for j := range z {
		for i := range z[j] {
			if i+1 < len(z[j]) && !math.IsNaN(z[j][i]) && !math.IsNaN(z[j][i+1]) {
				di += z[j][i+1] - z[j][i]
			}
			if j+1 < len(z) && !math.IsNaN(z[j][i]) && !math.IsNaN(z[j+1][i]) {
				dj += z[j+1][i] - z[j][i]
			}
		}
	}
	if di*dj > 0 {
		return -1
	}
	return 1
}

// legendLine is a legend thumbnail of a line of the given colour and
// width (an invisible one for a legend line of text alone).
func legendLine(c color.Color, width float64) gplot.Thumbnailer {
	return legendStyle(draw.LineStyle{Color: c, Width: vg.Points(width)})
}

// legendStyle is a legend thumbnail of a line of the given style.
func legendStyle(s draw.LineStyle) gplot.Thumbnailer {
	f := plotter.NewFunction(func(float64) float64 { return math.NaN() })
	f.LineStyle = s
	return f
}

// boundaryStyle is the line style of constraint c's boundary: a colour
// of the plot package's cycle, dashed once the cycle has come round, so
// that no two boundaries look alike.
func boundaryStyle(c int, width float64) draw.LineStyle {
	s := draw.LineStyle{Color: plot.LineColor(c + 2), Width: vg.Points(width)}
	if c+2 >= boundaryColours {
		s.Dashes = []vg.Length{vg.Points(7), vg.Points(3)}
	}
	return s
}

// boundaryColours is the length of plot.LineColor's cycle.
const boundaryColours = 8

// carpetBoundary is a constraint's boundary on a carpet: line segments
// in the carpet's coordinates and, for some of them, a point just on the
// infeasible side of the segment's middle, toward which a tick is drawn.
type carpetBoundary struct {
	segs  [][2]plotter.XY
	ticks [][2]plotter.XY
	style draw.LineStyle
}

// Plot implements gonum's plot.Plotter.
func (b carpetBoundary) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	pt := func(xy plotter.XY) vg.Point { return vg.Point{X: trX(xy.X), Y: trY(xy.Y)} }
	for _, s := range b.segs {
		c.StrokeLines(b.style, c.ClipLinesXY([]vg.Point{pt(s[0]), pt(s[1])})...)
	}
	tick := b.style
	tick.Width = vg.Points(1)
	for _, t := range b.ticks {
		a, e := pt(t[0]), pt(t[1])
		dx, dy := float64(e.X-a.X), float64(e.Y-a.Y)
		l := math.Hypot(dx, dy)
		if !(l > 0) {
			continue
		}
		const length = 6 // points
		end := vg.Point{X: a.X + vg.Length(dx/l*length), Y: a.Y + vg.Length(dy/l*length)}
		c.StrokeLines(tick, c.ClipLinesXY([]vg.Point{a, end})...)
	}
}

// traceCarpet traces the zero level of margin m through the grid's cells
// (traceBoundary) onto the carpet: abscissa cx of the fractional
// indices, ordinate the bilinear interpolation of z. Cells with a failed
// corner are skipped.
func traceCarpet(z, m [][]float64, cx func(i, j float64) float64) carpetBoundary {
	return traceBoundary(m, z, func(ci, cj int, i, j float64) plotter.XY {
		return plotter.XY{X: cx(i, j), Y: bilinear(z, ci, cj, i, j)}
	})
}

// bilinear interpolates g inside cell (ci, cj) at the fractional indices
// (i, j), clamped to the cell so that a failed neighbour never enters.
func bilinear(g [][]float64, ci, cj int, i, j float64) float64 {
	u := math.Max(0, math.Min(1, i-float64(ci)))
	v := math.Max(0, math.Min(1, j-float64(cj)))
	return (1-u)*(1-v)*g[cj][ci] + u*(1-v)*g[cj][ci+1] + (1-u)*v*g[cj+1][ci] + u*v*g[cj+1][ci+1]
}

// traceBoundary traces the zero level of margin m through the grid's
// cells by bilinear interpolation on carpetRefine sub-cells per side
// (marching squares), mapping fractional grid indices inside cell
// (ci, cj) to the figure's coordinates with at; every third segment gets
// a tick toward the falling margin (the infeasible side). A cell with a
// NaN corner in m or z (a failed analysis) is skipped, so no boundary is
// drawn where the analysis did not answer.
func traceBoundary(m, z [][]float64, at func(ci, cj int, i, j float64) plotter.XY) carpetBoundary {
	var b carpetBoundary
	ny, nx := len(m), len(m[0])
	count := 0
	h := 1.0 / carpetRefine
	for cj := 0; cj+1 < ny; cj++ {
		for ci := 0; ci+1 < nx; ci++ {
			bad := false
			for _, g := range [][][]float64{z, m} {
				for _, v := range []float64{g[cj][ci], g[cj][ci+1], g[cj+1][ci], g[cj+1][ci+1]} {
					bad = bad || math.IsNaN(v)
				}
			}
			if bad {
				continue
			}
			for sj := 0; sj < carpetRefine; sj++ {
				for si := 0; si < carpetRefine; si++ {
					i0, j0 := float64(ci)+float64(si)*h, float64(cj)+float64(sj)*h
					corner := [4][2]float64{{i0, j0}, {i0 + h, j0}, {i0 + h, j0 + h}, {i0, j0 + h}}
					var val [4]float64
					for k, q := range corner {
						val[k] = bilinear(m, ci, cj, q[0], q[1])
					}
					var cross [][2]float64
					for k := 0; k < 4; k++ {
						a, e := val[k], val[(k+1)%4]
						if (a < 0) != (e < 0) {
							t := a / (a - e)
							p, q := corner[k], corner[(k+1)%4]
							cross = append(cross, [2]float64{p[0] + t*(q[0]-p[0]), p[1] + t*(q[1]-p[1])})
						}
					}
					for k := 0; k+1 < len(cross); k += 2 {
						s, e := cross[k], cross[k+1]
						b.segs = append(b.segs, [2]plotter.XY{at(ci, cj, s[0], s[1]), at(ci, cj, e[0], e[1])})
						count++
						if count%3 != 0 {
							continue
						}
						// a tick toward falling margin: minus the gradient
						// of the cell's bilinear margin
						mi, mj := (s[0]+e[0])/2, (s[1]+e[1])/2
						u, v := mi-float64(ci), mj-float64(cj)
						gi := (1-v)*(m[cj][ci+1]-m[cj][ci]) + v*(m[cj+1][ci+1]-m[cj+1][ci])
						gj := (1-u)*(m[cj+1][ci]-m[cj][ci]) + u*(m[cj+1][ci+1]-m[cj][ci+1])
						g := math.Hypot(gi, gj)
						if !(g > 0) {
							continue
						}
						b.ticks = append(b.ticks, [2]plotter.XY{at(ci, cj, mi, mj), at(ci, cj, mi-0.05*gi/g, mj-0.05*gj/g)})
					}
				}
			}
		}
	}
	return b
}
