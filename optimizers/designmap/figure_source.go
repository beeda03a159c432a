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
		if st == nil || r == nil || r.Best == nil {
			return []*plot.Figure{plot.LeftOut(name, title, fmt.Errorf("designmap: no study or no best design to map around"))}, nil
		}
		at := map[string]float64{}
		for i, d := range r.Design {
			if i < len(r.Best.Design) {
				at[d.Name] = r.Best.Design[i]
			}
		}
		for k, v := range spec.At {
			at[k] = v
		}
		s := spec
		s.At = at
		// The map's analyses are not the run's: they go to no store.
		study := *st
		study.Recorder = nil
		d, err := Sample(ctx, &study, s)
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
