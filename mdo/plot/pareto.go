package plot

import (
	"fmt"
	"slices"

	"couplet/mdo"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Pareto draws the first two objectives of every evaluation and the
// Pareto front (the result's front, or the non-dominated feasible points
// of evs when the result has none). Beyond 4000 evaluations the
// dominated and infeasible points are thinned evenly.
func Pareto(r *mdo.Result, evs []*mdo.Evaluation) (*Figure, error) {
	if r == nil || len(r.Objectives) < 2 {
		n := 0
		if r != nil {
			n = len(r.Objectives)
		}
		return nil, fmt.Errorf("plot: Pareto needs a study with at least two objectives, this one has %d", n)
	}
	o1, o2 := r.Objectives[0], r.Objectives[1]
	p := NewPlot(fmt.Sprintf("Pareto front: %s", r.Study), AxisLabel(o1.String(), unitOf(r, o1.Name)), AxisLabel(o2.String(), unitOf(r, o2.Name)))
	front := r.Front
	if len(front) == 0 {
		front = nonDominated(evs)
	}
	inFront := map[*mdo.Evaluation]bool{}
	for _, e := range front {
		inFront[e] = true
	}
	var feas, infeas plotter.XYs
	step := thinStep(len(evs), maxScatterPoints)
	for k, e := range evs {
		if k%step != 0 && !inFront[e] {
			continue
		}
		if inFront[e] || len(e.Objectives) < 2 || !finite(e.Objectives[0]) || !finite(e.Objectives[1]) {
			continue
		}
		xy := plotter.XY{X: e.Objectives[0], Y: e.Objectives[1]}
		if e.Feasible {
			feas = append(feas, xy)
		} else {
			infeas = append(infeas, xy)
		}
	}
	if err := AddScatter(p, infeas, infeasibleColor, draw.CrossGlyph{}, "infeasible"); err != nil {
		return nil, err
	}
	if err := AddScatter(p, feas, mutedColor, draw.CircleGlyph{}, "feasible, dominated"); err != nil {
		return nil, err
	}
	var fr plotter.XYs
	for _, e := range front {
		fr = append(fr, plotter.XY{X: e.Objectives[0], Y: e.Objectives[1]})
	}
	slices.SortFunc(fr, func(a, b plotter.XY) int {
		switch {
		case a.X < b.X:
			return -1
		case a.X > b.X:
			return 1
		}
		return 0
	})
	if len(fr) > 0 {
		l, pts, err := plotter.NewLinePoints(fr)
		if err != nil {
			return nil, fmt.Errorf("plot: Pareto front: %w", err)
		}
		l.LineStyle.Color, l.LineStyle.Width = feasibleColor, vg.Points(1.5)
		pts.GlyphStyle.Color, pts.GlyphStyle.Radius, pts.GlyphStyle.Shape = feasibleColor, vg.Points(3), draw.CircleGlyph{}
		p.Add(l, pts)
		p.Legend.Add(fmt.Sprintf("Pareto front (%d points)", len(fr)), l, pts)
	}
	if len(fr)+len(feas)+len(infeas) == 0 {
		return nil, fmt.Errorf("plot: Pareto of study %q: no evaluation has finite values of both objectives", r.Study)
	}
	return NewFigure("pareto", p.Title.Text, 16*vg.Centimeter, 12*vg.Centimeter, func(dc draw.Canvas) { p.Draw(dc) }), nil
}

// nonDominated returns the feasible evaluations no other dominates.
func nonDominated(evs []*mdo.Evaluation) []*mdo.Evaluation {
	var out []*mdo.Evaluation
	for _, a := range evs {
		if !a.Feasible || len(a.F) < 2 {
			continue
		}
		dominated := false
		for _, b := range evs {
			if b != a && b.Feasible && mdo.Dominates(b, a) {
				dominated = true
				break
			}
		}
		if !dominated {
			out = append(out, a)
		}
	}
	return out
}
