package plot

import (
	"image/color"
	"math"
	"strings"

	"couplet/mdo"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Colours used throughout.
var (
	feasibleColor   = color.RGBA{R: 31, G: 119, B: 180, A: 255}  // blue
	infeasibleColor = color.RGBA{R: 214, G: 39, B: 40, A: 255}   // red
	bestColor       = color.RGBA{R: 255, G: 127, B: 14, A: 255}  // orange
	mutedColor      = color.RGBA{R: 150, G: 150, B: 150, A: 255} // grey
	regionColor     = color.NRGBA{R: 44, G: 160, B: 44, A: 60}   // translucent green
)

// palette gives distinct line colours (see LineColor).
var palette = []color.Color{
	color.RGBA{R: 31, G: 119, B: 180, A: 255},
	color.RGBA{R: 214, G: 39, B: 40, A: 255},
	color.RGBA{R: 44, G: 160, B: 44, A: 255},
	color.RGBA{R: 148, G: 103, B: 189, A: 255},
	color.RGBA{R: 140, G: 86, B: 75, A: 255},
	color.RGBA{R: 227, G: 119, B: 194, A: 255},
	color.RGBA{R: 23, G: 190, B: 207, A: 255},
	color.RGBA{R: 188, G: 189, B: 34, A: 255},
}

// AxisLabel formats an axis label "name [unit]" ("-" for no unit).
func AxisLabel(name, unit string) string {
	if unit == "" {
		unit = "-"
	}
	return name + " [" + unit + "]"
}

// NewPlot returns a gonum plot in this package's style, with a title,
// axis labels and the legend at the top: the start of a figure drawn
// with NewFigure.
func NewPlot(title, x, y string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = x
	p.Y.Label.Text = y
	p.Legend.Top = true
	return p
}

// LineColor returns the i-th of a cycle of distinct line colours, the
// one every figure of the package draws its series with.
func LineColor(i int) color.Color {
	if i < 0 {
		i = -i
	}
	return palette[i%len(palette)]
}

// BestColor is the colour that marks the best design on a figure.
func BestColor() color.Color { return bestColor }

// RegionColor is the translucent fill of a feasible region.
func RegionColor() color.Color { return regionColor }

// unitOf finds the unit of a name of a result (mdo.Result.Unit).
func unitOf(r *mdo.Result, name string) string { return r.Unit(name) }

// finite reports whether x is a finite number.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// drawTitle writes a figure title at the top of dc and returns the
// canvas below it.
func drawTitle(dc draw.Canvas, title string) draw.Canvas {
	p := plot.New()
	sty := p.Title.TextStyle
	sty.Font.Size = vg.Points(13)
	sty.XAlign = draw.XCenter
	sty.YAlign = draw.YTop
	h := sty.Height(title) + vg.Points(8)
	top := vg.Point{X: (dc.Min.X + dc.Max.X) / 2, Y: dc.Max.Y - vg.Points(4)}
	for i, line := range strings.Split(title, "\n") {
		dc.FillText(sty, vg.Point{X: top.X, Y: top.Y - vg.Length(i)*sty.Height(line)}, line)
	}
	dc.Max.Y -= h
	return dc
}
