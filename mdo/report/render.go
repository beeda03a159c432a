package report

import (
	"bytes"
	"cmp"
	"runtime"
	"slices"
	"strings"
	"sync"

	"couplet/mdo/plot"
)

// rendered is a figure drawn as SVG and, when asked, as PNG.
type rendered struct {
	svg, png []byte
	// svgErr and pngErr are the figure's failures as it was drawn (its
	// Reason for a stand-in, plot.LeftOut); pngErr is nil when no PNG
	// was asked for.
	svgErr, pngErr error
}

// inline returns the figure's SVG element without the XML prolog, for
// embedding in a page (as plot.Figure.InlineSVG), or its failure.
func (r *rendered) inline() (string, error) {
	if r.svgErr != nil {
		return "", r.svgErr
	}
	s := string(r.svg)
	if i := strings.Index(s, "<svg"); i >= 0 {
		s = s[i:]
	}
	return s, nil
}

// renderFigures draws each figure of figs as SVG and, where png[i] (png
// may be nil), as PNG. The figures are drawn concurrently with each other,
// on as many goroutines as the process has processors; each figure is
// drawn by one goroutine at a time, its SVG then its PNG. A nil figure
// gives a zero rendered. The results are those of drawing the figures
// one after another, in order.
func renderFigures(figs []*plot.Figure, png []bool) []rendered {
	out := make([]rendered, len(figs))
	next := make(chan int)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(figs)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				out[i] = drawFigure(figs[i], png != nil && png[i])
			}
		}()
	}
	// the largest first, so that the last one taken is a small one
	for _, i := range bySize(figs) {
		next <- i
	}
	close(next)
	wg.Wait()
	return out
}

// drawFigure draws one figure as SVG and, if withPNG, as PNG.
func drawFigure(f *plot.Figure, withPNG bool) rendered {
	var r rendered
	if f == nil {
		return r
	}
	var b bytes.Buffer
	r.svgErr = f.WriteSVG(&b)
	r.svg = b.Bytes()
	if withPNG {
		var p bytes.Buffer
		r.pngErr = f.WritePNG(&p)
		r.png = p.Bytes()
	}
	return r
}

// bySize returns the indices of figs by decreasing area (the order of
// figs among equals), a guess at the time each takes to draw.
func bySize(figs []*plot.Figure) []int {
	idx := make([]int, len(figs))
	area := make([]float64, len(figs))
	for i, f := range figs {
		idx[i] = i
		if f != nil {
			area[i] = float64(f.Width) * float64(f.Height)
		}
	}
	slices.SortStableFunc(idx, func(a, b int) int { return cmp.Compare(area[b], area[a]) })
	return idx
}
