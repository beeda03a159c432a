package plot

import (
	"context"
	"fmt"
	"math"
	"strings"
	"time"

	"couplet/mdo"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Residuals draws the residual history of each coupled group's solver
// (scaled residual, infinity norm, on a logarithmic axis) against the
// iteration, with each group's tolerance as a dashed line. Residuals that
// are exactly zero cannot be drawn on the log axis and are left out.
func Residuals(reports []mdo.CouplingReport) (*Figure, error) {
	if len(reports) == 0 {
		return nil, fmt.Errorf("plot: Residuals needs at least one solver report (the system has no coupled group?)")
	}
	p := NewPlot("coupling-solver residuals", "iteration", "scaled residual [-] (log scale)")
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = plot.LogTicks{Prec: 1}
	lo, hi := math.Inf(1), math.Inf(-1)
	maxIt := 1.0
	drawn := 0
	for k, rep := range reports {
		var xys plotter.XYs
		for i, r := range rep.History {
			if r > 0 && finite(r) {
				xys = append(xys, plotter.XY{X: float64(i + 1), Y: r})
				lo, hi = math.Min(lo, r), math.Max(hi, r)
			}
		}
		maxIt = math.Max(maxIt, float64(len(rep.History)))
		state := "converged"
		switch {
		case rep.Diverged:
			state = "diverged"
		case !rep.Converged:
			state = "not converged"
		}
		name := fmt.Sprintf("{%s} %s, %s in %d", strings.Join(rep.Disciplines, ", "), rep.Method, state, rep.CouplingIterations)
		if len(xys) == 0 {
			continue
		}
		l, pts, err := plotter.NewLinePoints(xys)
		if err != nil {
			return nil, fmt.Errorf("plot: residuals of group %d: %w", k, err)
		}
		c := palette[k%len(palette)]
		l.LineStyle.Color, l.LineStyle.Width = c, vg.Points(1.5)
		pts.GlyphStyle.Color, pts.GlyphStyle.Radius = c, vg.Points(1.5)
		p.Add(l, pts)
		p.Legend.Add(name, l, pts)
		drawn++
	}
	if drawn == 0 {
		return nil, fmt.Errorf("plot: Residuals: no report has a positive finite residual to draw")
	}
	for k, rep := range reports {
		if rep.Tolerance > 0 && finite(rep.Tolerance) {
			tol := plotter.XYs{{X: 1, Y: rep.Tolerance}, {X: maxIt, Y: rep.Tolerance}}
			l, err := plotter.NewLine(tol)
			if err != nil {
				return nil, fmt.Errorf("plot: tolerance of group %d: %w", k, err)
			}
			l.LineStyle.Color = palette[k%len(palette)]
			l.LineStyle.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
			p.Add(l)
			if k == 0 {
				p.Legend.Add("tolerance", l)
			}
			lo = math.Min(lo, rep.Tolerance)
		}
	}
	p.Y.Min, p.Y.Max = lo/3, hi*3
	p.X.Min, p.X.Max = 0, maxIt+1
	p.Legend.Left = false
	return NewFigure("residuals", p.Title.Text, 16*vg.Centimeter, 11*vg.Centimeter, func(dc draw.Canvas) { p.Draw(dc) }), nil
}

// reanalysisTimeout bounds the one analysis of the best design that
// BestResiduals runs.
const reanalysisTimeout = time.Minute

// BestResiduals draws the coupling-solver residuals of one re-analysis of
// a result's best design: its design values over the study's Fixed
// parameters, the rest at their defaults, as the evaluator sets them.
// Coupled groups of more than two disciplines are named by their first
// and last member and their size, so that the legend fits.
func BestResiduals(ctx context.Context, r *mdo.Result, st *mdo.Study) (*Figure, error) {
	if r == nil || r.Best == nil {
		return nil, fmt.Errorf("plot: BestResiduals needs a result with a best design")
	}
	if st == nil || st.System == nil {
		return nil, fmt.Errorf("plot: BestResiduals needs the study of the result, with its system")
	}
	sol, err := Reanalyse(ctx, r, st)
	if err != nil {
		return nil, err
	}
	return Residuals(shortGroupNames(sol.CouplingReports))
}

// Reanalyse runs the analysis of a result's best design once more (its
// design values over the study's Fixed parameters, the rest at their
// defaults, as the evaluator sets them) and returns its solution with the
// coupling-solver reports. The analysis is bounded to a minute.
func Reanalyse(ctx context.Context, r *mdo.Result, st *mdo.Study) (*mdo.Solution, error) {
	params := make(map[string]float64, len(st.Fixed)+len(r.Design))
	for k, x := range st.Fixed {
		params[k] = x
	}
	for k, x := range r.DesignValues() {
		if st.System.IsParameter(k) {
			params[k] = x
		}
	}
	ctx, cancel := context.WithTimeout(ctx, reanalysisTimeout)
	defer cancel()
	sol, err := st.System.Analyze(ctx, params)
	if err != nil {
		return nil, fmt.Errorf("plot: re-analysing the best design #%d: %w", r.Best.ID, err)
	}
	return sol, nil
}

// shortGroupNames returns copies of the reports whose groups of more
// than two disciplines are named by their first and last member and
// their size.
func shortGroupNames(reports []mdo.CouplingReport) []mdo.CouplingReport {
	out := make([]mdo.CouplingReport, len(reports))
	for i, r := range reports {
		out[i] = r.Clone()
		if n := len(r.Disciplines); n > 2 {
			out[i].Disciplines = []string{fmt.Sprintf("%s … %s: %d disciplines", r.Disciplines[0], r.Disciplines[n-1], n)}
		}
	}
	return out
}
