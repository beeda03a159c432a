package plot

import (
	"fmt"
	"image/color"
	"strings"

	"couplet/mdo"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// DSMData is a design structure matrix: disciplines in execution order
// and, for each ordered pair, the variables the first produces and the
// second consumes.
type DSMData struct {
	Names []string
	// Links[i][j] are the variables discipline i passes to discipline j.
	Links [][][]string
	// Groups are the coupled groups as index ranges [first, last] of
	// Names.
	Groups [][2]int
}

// NewDSMData derives the matrix of a System from its disciplines'
// declared inputs and outputs, in execution order.
func NewDSMData(sys *mdo.System) (DSMData, error) {
	if sys == nil {
		return DSMData{}, fmt.Errorf("plot: NewDSMData of a nil System")
	}
	byName := map[string]mdo.Discipline{}
	for _, d := range sys.Disciplines() {
		byName[d.Name()] = d
	}
	var d DSMData
	for _, g := range sys.Groups() {
		first := len(d.Names)
		d.Names = append(d.Names, g...)
		if len(g) > 1 {
			d.Groups = append(d.Groups, [2]int{first, len(d.Names) - 1})
		}
	}
	for _, g := range sys.CoupledGroups() {
		if len(g) == 1 { // a discipline coupled to itself
			for i, n := range d.Names {
				if n == g[0] {
					d.Groups = append(d.Groups, [2]int{i, i})
				}
			}
		}
	}
	n := len(d.Names)
	d.Links = make([][][]string, n)
	for i, from := range d.Names {
		d.Links[i] = make([][]string, n)
		outs := map[string]bool{}
		for _, v := range byName[from].Outputs() {
			outs[v.Name] = true
		}
		for j, to := range d.Names {
			if i == j {
				continue
			}
			for _, v := range byName[to].Inputs() {
				if outs[v.Name] {
					d.Links[i][j] = append(d.Links[i][j], v.Name)
				}
			}
		}
	}
	return d, nil
}

// DSM draws a System's design structure matrix.
func DSM(sys *mdo.System) (*Figure, error) {
	d, err := NewDSMData(sys)
	if err != nil {
		return nil, err
	}
	return DSMFigure(d)
}

// DSMFigure draws a design structure matrix as a grid: disciplines on the
// diagonal in execution order; the cell in row i, column j lists what
// discipline i passes to discipline j (above the diagonal feed-forward,
// below it feedback); coupled groups are framed.
func DSMFigure(d DSMData) (*Figure, error) {
	n := len(d.Names)
	if n == 0 {
		return nil, fmt.Errorf("plot: the design structure matrix has no discipline")
	}
	if len(d.Links) != n {
		return nil, fmt.Errorf("plot: the design structure matrix has %d disciplines but %d rows of links", n, len(d.Links))
	}
	p := NewPlot("design structure matrix", "consumer (inputs from the row)", "producer (outputs to the column)")
	var ticks []plot.Tick
	for i, name := range d.Names {
		ticks = append(ticks, plot.Tick{Value: float64(i) + 0.5, Label: name})
	}
	p.X.Tick.Marker = plot.ConstantTicks(ticks)
	p.Y.Tick.Marker = plot.ConstantTicks(ticks)
	p.X.Tick.Label.Font.Size = vg.Points(8)
	p.Y.Tick.Label.Font.Size = vg.Points(8)
	p.X.Min, p.X.Max = 0, float64(n)
	p.Y.Min, p.Y.Max = 0, float64(n)
	p.Y.Scale = plot.InvertedScale{Normalizer: plot.LinearScale{}}
	p.Add(dsmGrid{d})
	side := max(12*vg.Centimeter, vg.Length(n)*2.4*vg.Centimeter)
	return NewFigure("dsm", p.Title.Text, side+2*vg.Centimeter, side, func(dc draw.Canvas) { p.Draw(dc) }), nil
}

// dsmGrid is the plotter that draws the matrix cells.
type dsmGrid struct{ d DSMData }

// Plot draws the cells, their text and the group frames.
func (g dsmGrid) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	n := len(g.d.Names)
	cell := func(i, j int) vg.Rectangle {
		x0, x1 := trX(float64(j)), trX(float64(j+1))
		y0, y1 := trY(float64(i)), trY(float64(i+1))
		return vg.Rectangle{Min: vg.Point{X: min(x0, x1), Y: min(y0, y1)}, Max: vg.Point{X: max(x0, x1), Y: max(y0, y1)}}
	}
	sty := plt.Title.TextStyle
	sty.Font.Size = vg.Points(7)
	sty.XAlign, sty.YAlign = draw.XCenter, draw.YCenter
	grid := draw.LineStyle{Color: color.Gray{Y: 180}, Width: vg.Points(0.5)}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			r := cell(i, j)
			var fill color.Color
			text := ""
			switch {
			case i == j:
				fill = color.RGBA{R: 60, G: 90, B: 140, A: 255}
				text = g.d.Names[i]
			case len(g.d.Links[i][j]) > 0:
				fill = color.RGBA{R: 198, G: 219, B: 239, A: 255}
				if j < i {
					fill = color.RGBA{R: 253, G: 208, B: 162, A: 255} // feedback
				}
				text = linkText(g.d.Links[i][j])
			}
			poly := []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}}
			if fill != nil {
				c.FillPolygon(fill, poly)
			}
			c.StrokeLines(grid, append(poly, r.Min))
			if text != "" {
				ts := sty
				if i == j {
					ts.Color = color.White
				}
				lines := strings.Split(text, "\n")
				mid := vg.Point{X: (r.Min.X + r.Max.X) / 2, Y: (r.Min.Y + r.Max.Y) / 2}
				h := ts.Height("M")
				for k, line := range lines {
					off := (vg.Length(len(lines)-1)/2 - vg.Length(k)) * h
					c.FillText(ts, vg.Point{X: mid.X, Y: mid.Y + off}, line)
				}
			}
		}
	}
	frame := draw.LineStyle{Color: color.RGBA{R: 214, G: 39, B: 40, A: 255}, Width: vg.Points(2)}
	for _, gr := range g.d.Groups {
		a, b := cell(gr[0], gr[0]), cell(gr[1], gr[1])
		lo := vg.Point{X: min(a.Min.X, b.Min.X), Y: min(a.Min.Y, b.Min.Y)}
		hi := vg.Point{X: max(a.Max.X, b.Max.X), Y: max(a.Max.Y, b.Max.Y)}
		c.StrokeLines(frame, []vg.Point{lo, {X: hi.X, Y: lo.Y}, hi, {X: lo.X, Y: hi.Y}, lo})
	}
}

// linkText lists up to three variables, then a count.
func linkText(vars []string) string {
	if len(vars) <= 3 {
		return strings.Join(vars, "\n")
	}
	return fmt.Sprintf("%s\n%s\n+%d more", vars[0], vars[1], len(vars)-2)
}
