package plot_test

import (
	"fmt"

	"couplet/mdo/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// A figure of an application's own, drawn on the package's builder: a
// styled plot with one line, wrapped as a Figure and written as SVG.
func ExampleNewFigure() {
	p := plot.NewPlot("lift curve of an invented section", plot.AxisLabel("angle of attack", "deg"), plot.AxisLabel("lift coefficient", ""))
	if err := plot.AddLine(p, plotter.XYs{{X: -4, Y: -0.2}, {X: 0, Y: 0.24}, {X: 10, Y: 1.3}}, plot.LineColor(0), 1.5, "measured"); err != nil {
		fmt.Println(err)
		return
	}
	fig := plot.NewFigure("lift_curve", "lift curve", 12*vg.Centimeter, 9*vg.Centimeter, func(c draw.Canvas) { p.Draw(c) })
	svg, err := fig.SVG()
	fmt.Println(fig.Name, len(svg) > 0, err)
	// Output:
	// lift_curve true <nil>
}
