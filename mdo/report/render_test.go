package report

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/mdo/plot"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// Figures drawn concurrently give the bytes of drawing them one after
// another, each in its place, and a failure stays with its figure.
func TestRenderFiguresIsSequentialDrawing(t *testing.T) {
	r, evs := sellarResult(t, 40)
	hist, err := plot.History(r, evs)
	if err != nil {
		t.Fatal(err)
	}
	par, err := plot.ParallelCoordinates(r, evs)
	if err != nil {
		t.Fatal(err)
	}
	broken := plot.NewFigure("broken", "a broken figure", vg.Centimeter, vg.Centimeter, func(draw.Canvas) { panic("no axes to draw on") })
	figs := []*plot.Figure{ownFigure(t), hist, nil, broken, par, plot.LeftOut("gone", "a figure left out", fmt.Errorf("nothing to draw"))}
	png := []bool{true, true, false, true, false, true}
	done := renderFigures(figs, png)
	for i, f := range figs {
		if f == nil {
			if done[i].svg != nil || done[i].svgErr != nil {
				t.Errorf("figure %d is nil but drew something", i)
			}
			continue
		}
		var svg, pn bytes.Buffer
		svgErr := f.WriteSVG(&svg)
		if fmt.Sprint(svgErr) != fmt.Sprint(done[i].svgErr) || !bytes.Equal(svg.Bytes(), done[i].svg) {
			t.Errorf("%s: SVG drawn concurrently (err %v) differs from drawn alone (err %v)", f.Name, done[i].svgErr, svgErr)
		}
		if !png[i] {
			if done[i].png != nil || done[i].pngErr != nil {
				t.Errorf("%s: a PNG was drawn though none was asked for", f.Name)
			}
			continue
		}
		pngErr := f.WritePNG(&pn)
		if fmt.Sprint(pngErr) != fmt.Sprint(done[i].pngErr) || !bytes.Equal(pn.Bytes(), done[i].png) {
			t.Errorf("%s: PNG drawn concurrently (err %v) differs from drawn alone (err %v)", f.Name, done[i].pngErr, pngErr)
		}
	}
	if done[3].svgErr == nil || !strings.Contains(done[3].svgErr.Error(), "no axes to draw on") {
		t.Errorf("the broken figure's failure is %v", done[3].svgErr)
	}
}

// A further figure whose PNG fails as it is drawn gets no files, and the
// report has the reason in its place; the other figures are written.
func TestWriteRunFigureFailingAsPNG(t *testing.T) {
	dir := t.TempDir()
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	r, s := recordedRun(t, dir, st, 20)
	pngOnly := plot.NewFigure("raster", "a figure without a raster", 4*vg.Centimeter, 4*vg.Centimeter, func(c draw.Canvas) {
		if _, ok := c.Canvas.(*vgimg.Canvas); ok {
			panic("cannot be rasterised")
		}
		c.StrokeLine2(draw.LineStyle{Width: 1}, c.Min.X, c.Min.Y, c.Max.X, c.Max.Y)
	})
	src := func(context.Context, *mdo.Result, *mdo.Study) ([]*plot.Figure, []string) {
		return []*plot.Figure{pngOnly, ownFigure(t)}, nil
	}
	out := filepath.Join(dir, "out")
	if _, err := WriteRun(context.Background(), out, Run{Result: r, Study: st, Store: s, Script: script, Figures: []FigureSource{src}}); err != nil {
		t.Fatal(err)
	}
	for name, want := range map[string]bool{"raster.svg": false, "raster.png": false, "own.svg": true, "own.png": true, "history.png": true} {
		if _, err := os.Stat(filepath.Join(out, name)); (err == nil) != want {
			t.Errorf("%s written: %v, want %v", name, err == nil, want)
		}
	}
	page, err := os.ReadFile(filepath.Join(out, ReportFile))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(page), "(raster) could not be drawn: plot: rendering raster: cannot be rasterised") {
		t.Error("the report does not say why the raster figure is left out")
	}
}
