package plot

import (
	"math"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
)

// A plot pads its data area so that no marker and no line is cut at an
// edge: it asks each plotter for the box of every point (GlyphBoxes) and
// pads by the left-, right-, bottom- and top-most box (gonum's padX and
// padY: of the boxes that end furthest out, the first). The scatters and
// lines of a figure of thousands of evaluations gave thousands of boxes,
// twice per drawing, all of one size. markers and lines give only the
// boxes that can be chosen: of boxes of one size, those at the least or
// greatest x or y of the plotter's points, and any within 1e-6 of the
// axis of it (two points that far apart end at different places unless
// the data area is narrower than 1e-4 pt), each value once, its first
// box (a later box at the same value ends at the same place, and the
// first is chosen). So the figure is the same, byte for byte, drawn from
// a few boxes.

// nearEdge is how close to the least or greatest value of its points,
// in the axis' normalised units, a box is kept (see above).
const nearEdge = 1e-6

// maxEdgeBoxes caps the boxes kept per edge; past it every box is given.
const maxEdgeBoxes = 64

// markers is a scatter that gives only the boxes of its markers that can
// pad the plot (see above).
type markers struct{ *plotter.Scatter }

// GlyphBoxes implements plot.GlyphBoxer.
func (m markers) GlyphBoxes(p *plot.Plot) []plot.GlyphBox {
	r := m.GlyphStyle.Radius
	rect := vg.Rectangle{Min: vg.Point{X: -r, Y: -r}, Max: vg.Point{X: +r, Y: +r}}
	if m.GlyphStyleFunc != nil {
		return m.Scatter.GlyphBoxes(p)
	}
	return edgeBoxes(p, m.XYs, rect, func() []plot.GlyphBox { return m.Scatter.GlyphBoxes(p) })
}

// lines is a line that gives only the boxes of its points that can pad
// the plot (see above).
type lines struct{ *plotter.Line }

// GlyphBoxes implements plot.GlyphBoxer.
func (l lines) GlyphBoxes(p *plot.Plot) []plot.GlyphBox {
	r := 0.5 * l.LineStyle.Width
	rect := vg.Rectangle{Min: vg.Point{X: -r, Y: -r}, Max: vg.Point{X: +r, Y: +r}}
	return edgeBoxes(p, l.XYs, rect, func() []plot.GlyphBox { return l.Line.GlyphBoxes(p) })
}

// edgeBoxes returns, in order, the boxes of size rect at the points xys
// (normalised by p's axes) that can pad p (see above); of a size of no
// positive width or height, or with more than maxEdgeBoxes near an edge,
// all the boxes (all).
func edgeBoxes(p *plot.Plot, xys plotter.XYs, rect vg.Rectangle, all func() []plot.GlyphBox) []plot.GlyphBox {
	size := rect.Size()
	if !(size.X > 0 && size.Y > 0) {
		return all()
	}
	// inRange is what plot.Plot.GlyphBoxes keeps (NaN included, which is
	// never chosen on its axis)
	inRange := func(x, y float64) bool { return !(x < 0 || x > 1 || y < 0 || y > 1) }
	loX, hiX, loY, hiY := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, pt := range xys {
		x, y := p.X.Norm(pt.X), p.Y.Norm(pt.Y)
		if !inRange(x, y) {
			continue
		}
		// a NaN is skipped (the built-in min and max would give NaN)
		if x < loX {
			loX = x
		}
		if x > hiX {
			hiX = x
		}
		if y < loY {
			loY = y
		}
		if y > hiY {
			hiY = y
		}
	}
	var out []plot.GlyphBox
	var seen [4][]float64 // the values kept near each edge
	near := func(edge int, v, at float64, sign float64) bool {
		if !(sign*(v-at) <= nearEdge) {
			return false
		}
		if slices.Contains(seen[edge], v) {
			return false
		}
		seen[edge] = append(seen[edge], v)
		return true
	}
	for _, pt := range xys {
		x, y := p.X.Norm(pt.X), p.Y.Norm(pt.Y)
		if !inRange(x, y) {
			continue
		}
		k := near(0, x, loX, 1)
		k = near(1, x, hiX, -1) || k
		k = near(2, y, loY, 1) || k
		k = near(3, y, hiY, -1) || k
		if k {
			out = append(out, plot.GlyphBox{X: x, Y: y, Rectangle: rect})
		}
	}
	for _, vs := range seen {
		if len(vs) > maxEdgeBoxes {
			return all()
		}
	}
	return out
}
