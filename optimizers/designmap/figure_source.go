package designmap

import (
	"context"
	"fmt"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/report"
)

// Figures returns the report.FigureSource that draws the map of spec for a
// run folder: the run's study is sampled on demand, its other design
// variables at the run's best design unless spec.At fixes them. Without a
// study or a best design the map is left out, with the reason.
func Figures(spec Spec) report.FigureSource {
	return func(ctx context.Context, r *mdo.Result, st *mdo.Study) ([]*plot.Figure, []string) {
		name := fileName("map_" + spec.Quantity)
		title := fmt.Sprintf("map over %s and %s", spec.X, spec.Y)
		study, at, err := aroundBest(r, st, spec.At)
		if err != nil {
			return []*plot.Figure{plot.LeftOut(name, title, err)}, nil
		}
		s := spec
		s.At = at
		d, err := Sample(ctx, study, s)
		if err != nil {
			return []*plot.Figure{plot.LeftOut(name, title, err)}, nil
		}
		f, err := Figure(d)
		if err != nil {
			return []*plot.Figure{plot.LeftOut(name, title, err)}, nil
		}
		return []*plot.Figure{f}, []string{fmt.Sprintf("The map of %s over %s and %s took %d further analyses on a %d × %d grid, the other design variables at the best design.", d.Quantity, d.X, d.Y, d.Analyses, len(d.Xs), len(d.Ys))}
	}
}

// CarpetFigures returns the report.FigureSource that draws the carpet
// plot of spec for a run folder, analysed on demand as Figures does, the
// other design variables at the run's best design unless spec.At fixes
// them.
func CarpetFigures(spec CarpetSpec) report.FigureSource {
	return func(ctx context.Context, r *mdo.Result, st *mdo.Study) ([]*plot.Figure, []string) {
		name := fileName("carpet_" + spec.Quantity)
		title := fmt.Sprintf("carpet over %s and %s", spec.X, spec.Y)
		study, at, err := aroundBest(r, st, spec.At)
		if err != nil {
			return []*plot.Figure{plot.LeftOut(name, title, err)}, nil
		}
		s := spec
		s.At = at
		d, err := Carpet(ctx, study, s)
		if err != nil {
			return []*plot.Figure{plot.LeftOut(name, title, err)}, nil
		}
		f, err := CarpetFigure(d)
		if err != nil {
			return []*plot.Figure{plot.LeftOut(name, title, err)}, nil
		}
		return []*plot.Figure{f}, []string{fmt.Sprintf("The carpet of %s over %s and %s took %d further analyses (%d values of each), the other design variables at the best design.", d.Quantity, d.X, d.Y, d.Analyses, len(d.Xs))}
	}
}

// aroundBest returns a copy of the run's study that records nothing (the
// figure's analyses are not the run's) and the design values to fix: the
// run's best design, overridden by at.
func aroundBest(r *mdo.Result, st *mdo.Study, at map[string]float64) (*mdo.Study, map[string]float64, error) {
	if st == nil || r == nil || r.Best == nil {
		return nil, nil, fmt.Errorf("designmap: no study or no best design to draw around")
	}
	fixed := map[string]float64{}
	for i, d := range r.Design {
		if i < len(r.Best.Design) {
			fixed[d.Name] = r.Best.Design[i]
		}
	}
	for k, v := range at {
		fixed[k] = v
	}
	study := *st
	study.Recorder = nil
	return &study, fixed, nil
}

// RecordedFigures returns the report.FigureSource that draws the map of
// spec from the run's recorded analyses (FromEvaluations, handed over by
// report.WriteRun as report.Evaluations), without a further analysis;
// the map and its note say it is interpolated. Without recorded
// analyses the map is left out, with the reason.
func RecordedFigures(spec Spec) report.FigureSource {
	return func(ctx context.Context, r *mdo.Result, _ *mdo.Study) ([]*plot.Figure, []string) {
		name := fileName("recorded_map_" + spec.Quantity)
		title := fmt.Sprintf("map over %s and %s from the recorded analyses", spec.X, spec.Y)
		evs := report.Evaluations(ctx)
		if r == nil || len(evs) == 0 {
			return []*plot.Figure{plot.LeftOut(name, title, fmt.Errorf("designmap: the run has no recorded analyses to interpolate"))}, nil
		}
		d, err := FromEvaluations(r, evs, spec)
		if err != nil {
			return []*plot.Figure{plot.LeftOut(name, title, err)}, nil
		}
		f, err := Figure(d)
		if err != nil {
			return []*plot.Figure{plot.LeftOut(name, title, err)}, nil
		}
		return []*plot.Figure{f}, []string{fmt.Sprintf("The map of %s over %s and %s from the run's analyses is %s; the other design variables sit at the best design.", d.Quantity, d.X, d.Y, d.Interpolated)}
	}
}
