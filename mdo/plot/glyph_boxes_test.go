package plot

import (
	"bytes"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// TestEdgeBoxesDrawTheSame: a plot of scatters and lines that give only
// the boxes that can pad it (markers, lines) is drawn the same, byte for
// byte as SVG and PNG, as with every point's box, for points in order,
// at random, on plateaus (the first of equal boxes is the one chosen),
// within a hair of each other and outside the axes' range, on a
// linear, inverted and logarithmic axis, and the few boxes kept.
func TestEdgeBoxesDrawTheSame(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	n := 400
	series := map[string]func(i int) (float64, float64){
		"rising":  func(i int) (float64, float64) { return float64(i), 50 - 40*math.Exp(-float64(i)/500) },
		"random":  func(i int) (float64, float64) { return rng.Float64() * 10, rng.NormFloat64() },
		"plateau": func(i int) (float64, float64) { return float64(i / 10), float64(5 - i/100) },
		"hair":    func(i int) (float64, float64) { return 1 + float64(i%7)*1e-15, 1 + float64(i%5)*1e-13 },
		"beyond":  func(i int) (float64, float64) { return float64(i) - 50, float64(i % 50) },
	}
	for name, at := range series {
		for _, scale := range []string{"linear", "inverted", "log"} {
			t.Run(name+"/"+scale, func(t *testing.T) {
				xys := make(plotter.XYs, n)
				for i := range xys {
					xys[i].X, xys[i].Y = at(i)
					if scale == "log" {
						xys[i].Y = 1 + math.Abs(xys[i].Y)
					}
				}
				draws := func(few bool) ([]byte, []byte, int) {
					p := NewPlot(name, "x", "y")
					switch scale {
					case "inverted":
						p.Y.Scale = plot.InvertedScale{Normalizer: plot.LinearScale{}}
					case "log":
						p.Y.Scale = plot.LogScale{}
						p.Y.Tick.Marker = plot.LogTicks{}
					}
					s, err := plotter.NewScatter(xys)
					if err != nil {
						t.Fatal(err)
					}
					s.GlyphStyle.Radius = vg.Points(2)
					l, err := plotter.NewLine(xys)
					if err != nil {
						t.Fatal(err)
					}
					l.LineStyle.Width = vg.Points(3)
					if few {
						p.Add(markers{s}, lines{l})
					} else {
						p.Add(s, l)
					}
					if name == "beyond" {
						p.X.Min, p.X.Max = 0, 300 // the points outside are dropped
					}
					kept := 0
					if few {
						kept = len(p.GlyphBoxes(p))
					}
					f := NewFigure("f", name, 12*vg.Centimeter, 8*vg.Centimeter, func(dc draw.Canvas) { p.Draw(dc) })
					var svg, png bytes.Buffer
					if err := f.WriteSVG(&svg); err != nil {
						t.Fatal(err)
					}
					if err := f.WritePNG(&png); err != nil {
						t.Fatal(err)
					}
					return svg.Bytes(), png.Bytes(), kept
				}
				svgAll, pngAll, _ := draws(false)
				svgFew, pngFew, kept := draws(true)
				if !bytes.Equal(svgAll, svgFew) {
					t.Error("the SVG drawn from the edge boxes differs from the one drawn from every box")
				}
				if !bytes.Equal(pngAll, pngFew) {
					t.Error("the PNG drawn from the edge boxes differs from the one drawn from every box")
				}
				if name != "hair" && kept > 40 {
					t.Errorf("%d boxes kept of %d points, want a few", kept, 2*n)
				}
			})
		}
	}
}
