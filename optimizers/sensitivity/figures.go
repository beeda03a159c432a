package sensitivity

import (
	"fmt"
	"image/color"
	"math"

	gplot "gonum.org/v1/plot"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"couplet/mdo/plot"
)

// intervalBars draws confidence intervals as capped vertical lines at the
// nominal positions 0, 1, …, shifted by off like the bars they belong to.
type intervalBars struct {
	lo, hi []float64
	off    vg.Length
}

// Plot implements gonum's plot.Plotter.
func (b intervalBars) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	style := draw.LineStyle{Color: color.Black, Width: vg.Points(1)}
	cw := vg.Points(4)
	for i := range b.lo {
		x := trX(float64(i)) + b.off
		y0, y1 := trY(b.lo[i]), trY(b.hi[i])
		c.StrokeLine2(style, x, y0, x, y1)
		c.StrokeLine2(style, x-cw, y0, x+cw, y0)
		c.StrokeLine2(style, x-cw, y1, x+cw, y1)
	}
}

// DataRange implements gonum's plot.DataRanger.
func (b intervalBars) DataRange() (xmin, xmax, ymin, ymax float64) {
	ymin, ymax = math.Inf(1), math.Inf(-1)
	for i := range b.lo {
		ymin, ymax = math.Min(ymin, b.lo[i]), math.Max(ymax, b.hi[i])
	}
	return 0, float64(len(b.lo) - 1), ymin, ymax
}

// SobolFigure draws the first-order and total indices as bars with their
// confidence intervals, file name "sobol_indices".
func SobolFigure(r *SobolResult) (*plot.Figure, error) {
	if r == nil || len(r.Names) == 0 {
		return nil, fmt.Errorf("sensitivity: SobolFigure: no indices")
	}
	title := fmt.Sprintf("Sobol' indices of %s (%g%% bootstrap intervals)", orName(r.Quantity), 100*r.Confidence)
	p := plot.NewPlot(title, "variable", "index [-]")
	w := vg.Points(14)
	for k, s := range []struct {
		label     string
		v, lo, hi []float64
		off       vg.Length
	}{{"first order S1", r.S1, r.S1Low, r.S1High, -w / 2}, {"total ST", r.ST, r.STLow, r.STHigh, w / 2}} {
		if err := addBars(p, s.label, s.v, k, w, s.off); err != nil {
			return nil, fmt.Errorf("sensitivity: SobolFigure: %w", err)
		}
		p.Add(intervalBars{s.lo, s.hi, s.off})
	}
	p.NominalX(r.Names...)
	return plot.NewFigure("sobol_indices", title, vg.Points(90+60*float64(len(r.Names))), vg.Points(320), p.Draw), nil
}

// MorrisFigure draws μ* and σ of the elementary effects as bars, the
// variables in their order of importance, file name "morris_screening".
func MorrisFigure(r *MorrisResult) (*plot.Figure, error) {
	if r == nil || len(r.Names) == 0 {
		return nil, fmt.Errorf("sensitivity: MorrisFigure: no effects")
	}
	rank := r.Ranking()
	names := make([]string, len(rank))
	mu, sigma := make(plotter.Values, len(rank)), make(plotter.Values, len(rank))
	for j, i := range rank {
		names[j] = r.Names[i]
		mu[j], sigma[j] = zeroNaN(r.MuStar[i]), zeroNaN(r.Sigma[i])
	}
	title := fmt.Sprintf("Morris screening of %s (%d runs)", orName(r.Quantity), r.Runs)
	p := plot.NewPlot(title, "variable, most important first", "elementary effect per whole range")
	w := vg.Points(14)
	for k, s := range []struct {
		label string
		v     plotter.Values
		off   vg.Length
	}{{"mu* (mean |effect|)", mu, -w / 2}, {"sigma (spread)", sigma, w / 2}} {
		if err := addBars(p, s.label, s.v, k, w, s.off); err != nil {
			return nil, fmt.Errorf("sensitivity: MorrisFigure: %w", err)
		}
	}
	p.NominalX(names...)
	p.X.Tick.Label.Rotation = -math.Pi / 6
	p.X.Tick.Label.XAlign = draw.XLeft
	return plot.NewFigure("morris_screening", title, vg.Points(120+70*float64(len(names))), vg.Points(360), p.Draw), nil
}

// zeroNaN draws a missing statistic as zero.
func zeroNaN(v float64) float64 {
	if math.IsNaN(v) {
		return 0
	}
	return v
}

// addBars adds one series of bars of width w, shifted by off, in the k-th
// line colour, with its legend entry.
func addBars(p *gplot.Plot, label string, v []float64, k int, w, off vg.Length) error {
	bars, err := plotter.NewBarChart(plotter.Values(v), w)
	if err != nil {
		return err
	}
	bars.Color = plot.LineColor(k)
	bars.Offset = off
	p.Add(bars)
	p.Legend.Add(label, bars)
	return nil
}
