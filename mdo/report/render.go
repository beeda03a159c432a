package report

import (
	"bytes"
	"errors"
	"fmt"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"sync"

	"couplet/mdo/plot"
	"couplet/mdo/runfolder"
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
// on as many goroutines as the process has processors (see
// figureDrawer); each figure is drawn by one goroutine at a time, its SVG
// then its PNG. A nil figure gives a zero rendered. The results are those
// of drawing the figures one after another, in order.
func renderFigures(figs []*plot.Figure, png []bool) []rendered {
	d := newFigureDrawer("")
	d.add(figs, func(i int) (bool, bool) { return png != nil && png[i], false })
	jobs := d.wait()
	out := make([]rendered, len(jobs))
	for i, j := range jobs {
		out[i] = j.out
	}
	return out
}

// figureDrawer draws the figures handed to it (add) on up to as many
// goroutines as the process has processors, the largest waiting first
// (a guess at the time each takes, so that the last one taken is a small
// one), while its caller goes on: a run folder's standard figures are
// drawn while its further figures are made. A figure to be saved has its
// files written into dir as soon as it is drawn. wait returns every
// figure's drawing, in the order they were added.
type figureDrawer struct {
	dir  string
	mu   sync.Mutex
	cond sync.Cond // signalled when a figure is added and when no more will be
	jobs []*drawJob
	next []int // the jobs waiting to be drawn
	done bool  // no more figures will be added
	wg   sync.WaitGroup
}

// drawJob is one figure handed to a figureDrawer.
type drawJob struct {
	f         *plot.Figure
	png, save bool
	out       rendered
	// files are the files written for a saved figure, in order (NAME.svg,
	// NAME.png); err is a failure to write them
	files []string
	err   error
}

// newFigureDrawer starts the goroutines of a figureDrawer that saves
// figures into dir.
func newFigureDrawer(dir string) *figureDrawer {
	d := &figureDrawer{dir: dir}
	d.cond.L = &d.mu
	for range runtime.GOMAXPROCS(0) {
		d.wg.Add(1)
		go d.work()
	}
	return d
}

// add hands figs to the drawer; opt(i) says whether figs[i] is drawn as
// PNG too and whether it is saved (a saved figure is drawn as PNG).
func (d *figureDrawer) add(figs []*plot.Figure, opt func(i int) (png, save bool)) {
	d.mu.Lock()
	defer d.mu.Unlock()
	for i, f := range figs {
		png, save := opt(i)
		d.next = append(d.next, len(d.jobs))
		d.jobs = append(d.jobs, &drawJob{f: f, png: png || save, save: save})
	}
	d.cond.Broadcast()
}

// take returns the largest figure waiting (the first added among equals),
// waiting for one; nil when none is left and no more will be added.
func (d *figureDrawer) take() *drawJob {
	d.mu.Lock()
	defer d.mu.Unlock()
	for len(d.next) == 0 && !d.done {
		d.cond.Wait()
	}
	if len(d.next) == 0 {
		return nil
	}
	best := 0
	for k := 1; k < len(d.next); k++ {
		if area(d.jobs[d.next[k]].f) > area(d.jobs[d.next[best]].f) {
			best = k
		}
	}
	j := d.jobs[d.next[best]]
	d.next = slices.Delete(d.next, best, best+1)
	return j
}

// work draws (and saves) figures until none is left.
func (d *figureDrawer) work() {
	defer d.wg.Done()
	for j := d.take(); j != nil; j = d.take() {
		j.out = drawFigure(j.f, j.png)
		if j.save {
			j.files, j.err = saveDrawn(d.dir, j.f, j.out)
		}
	}
}

// wait waits for every figure added to be drawn (and saved) and returns
// them in the order they were added. No figure is added after.
func (d *figureDrawer) wait() []*drawJob {
	d.mu.Lock()
	d.done = true
	d.cond.Broadcast()
	d.mu.Unlock()
	d.wg.Wait()
	return d.jobs
}

// saveDrawn writes a figure drawn without failure into dir as NAME.svg
// and NAME.png and returns the files written; a figure that is nil, a
// stand-in (plot.LeftOut) or failed as it was drawn is not written. Both
// files are tried; the error joins the failures.
func saveDrawn(dir string, f *plot.Figure, d rendered) ([]string, error) {
	if f == nil || f.Reason != nil || d.svgErr != nil || d.pngErr != nil {
		return nil, nil
	}
	var files []string
	var errs []error
	for _, out := range []struct {
		ext string
		b   []byte
	}{{".svg", d.svg}, {".png", d.png}} {
		p := filepath.Join(dir, f.Name+out.ext)
		if err := runfolder.WriteFile(p, out.b); err != nil {
			errs = append(errs, fmt.Errorf("report: %w", err))
			continue
		}
		files = append(files, p)
	}
	return files, errors.Join(errs...)
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

// area is the figure's area, a guess at the time it takes to draw (0
// for none).
func area(f *plot.Figure) float64 {
	if f == nil {
		return 0
	}
	return float64(f.Width) * float64(f.Height)
}
