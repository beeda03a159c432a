package drawings

import (
	"context"
	"fmt"
	"math"
	"strings"

	"couplet/disciplines"
	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/report"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// CompareOptions are the aircraft's contributions to a comparison of
// results (report.Compare): the designer's checklist flags of each best
// design (CompareFlags) and the overlay of the planforms
// (PlanformOverlay).
func CompareOptions() report.CompareOptions {
	return report.CompareOptions{Flags: CompareFlags, Overlays: []report.OverlaySource{PlanformOverlay}}
}

// CompareFlags returns the designer's checklist (disciplines.ResultChecklists)
// of a result's best design as comparison flags; nil for a result that is
// not of an aircraft. Its signature is that of report.FlagSource.
func CompareFlags(r *mdo.Result) []report.Flag {
	for _, lc := range disciplines.ResultChecklists(r) {
		if !strings.HasPrefix(lc.Label, "best design") {
			continue
		}
		out := make([]report.Flag, 0, len(lc.Checklist))
		for _, row := range lc.Checklist {
			out = append(out, report.Flag{Rule: row.Rule, Value: row.Value, Unit: row.Unit, Band: row.Band, Pass: row.Pass})
		}
		return out
	}
	return nil
}

// PlanformOverlay draws the top-view outlines (fuselage, wing and
// horizontal tail) of the best designs of the compared aircraft results,
// one colour each, nose up, on one scale. Results without the aircraft
// geometry outputs are left out with a note; without an aircraft result
// it draws nothing and says nothing. Its signature is that of report.OverlaySource.
func PlanformOverlay(_ context.Context, results []report.Compared) (figs []*plot.Figure, notes []string) {
	type design struct {
		label string
		a     Aircraft
		i     int
	}
	var ds []design
	var skipped []string
	for i, c := range results {
		r := c.Result
		if r == nil || r.Best == nil || len(r.Best.Outputs) != len(r.Outputs) {
			continue
		}
		get := func(name string) (float64, bool) {
			x, err := r.Lookup(name)
			return x, err == nil && !math.IsNaN(x) && !math.IsInf(x, 0)
		}
		ok := true
		for _, name := range aircraftGeometry {
			if _, has := get(name); !has {
				ok = false
			}
		}
		if !ok {
			skipped = append(skipped, c.Label)
			continue
		}
		a := aircraftOf(get, disciplines.DefaultGeometryOptions())
		a.Name = c.Label
		if err := a.Validate(); err != nil {
			notes = append(notes, fmt.Sprintf("planform overlay: %s left out: %v", c.Label, err))
			continue
		}
		ds = append(ds, design{c.Label, a, i})
	}
	if len(ds) == 0 {
		return nil, notes
	}
	if len(skipped) > 0 {
		notes = append(notes, "planform overlay: "+strings.Join(skipped, ", ")+" left out: not aircraft results (no wing and fuselage geometry outputs)")
	}
	title := "planforms of the best designs, nose up"
	p := plot.NewPlot(title, "spanwise position y [m]", "position aft of the nose x [m]")
	var allY, allX []float64
	for _, d := range ds {
		col := plot.LineColor(d.i)
		var outlines [][2][]float64
		if d.a.FuselageLength > 0 {
			ys, xs := d.a.fuselageOutline()
			outlines = append(outlines, [2][]float64{ys, xs})
		}
		wing, htail, _ := d.a.surfaces()
		for _, s := range []surface{wing, htail} {
			if s.span > 0 {
				ys, xs := s.outline(false)
				outlines = append(outlines, [2][]float64{ys, xs})
			}
		}
		for k, o := range outlines {
			pts := make(plotter.XYs, 0, len(o[0])+1)
			for j := range o[0] {
				pts = append(pts, plotter.XY{X: o[0][j], Y: o[1][j]})
			}
			pts = append(pts, pts[0]) // closed
			name := ""
			if k == 0 {
				name = d.label
			}
			if err := plot.AddLine(p, pts, col, 1.5, name); err != nil {
				return append(figs, plot.LeftOut("overlay_planform", title, err)), notes
			}
			allY, allX = append(allY, o[0]...), append(allX, o[1]...)
		}
	}
	w, h := 16*vg.Centimeter, 16*vg.Centimeter
	fig := equalAspect(p, allY, allX, w, h)
	return []*plot.Figure{plot.NewFigure("overlay_planform", title, w, h, func(dc draw.Canvas) { fig(dc) })}, notes
}
