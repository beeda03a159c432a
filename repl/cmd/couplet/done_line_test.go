package main

import (
	"testing"

	"couplet/mdo"
	"couplet/mdo/store"
	"couplet/repl"
)

// The last line of a run whose best point is infeasible names the
// constraint it violates most (by the scaled violation, as the optimisers
// rank it), with its value and how many are violated; before, it said
// only "(infeasible)", and a headless run's reader had to open the
// report to learn why.
func TestDoneLineNamesTheWorstViolation(t *testing.T) {
	takeoff := mdo.AtMost("perf.takeoff_field_length", 600)
	landing := mdo.AtMost("perf.landing_field_length", 500)
	margin := mdo.AtLeast("fuel_volume_margin", 0).WithFunc(func(mdo.Values) float64 { return 0 }).WithScale(1000).WithUnit("kg")
	point := func(feasible, converged bool, cons, g []float64) *mdo.Evaluation {
		return &mdo.Evaluation{ID: 3, Feasible: feasible, Converged: converged, Constraints: cons, G: g, Err: "does not close: mass.takeoff runs away"}
	}
	outputs := []mdo.Var{{Name: "perf.takeoff_field_length", Unit: "m"}, {Name: "perf.landing_field_length", Unit: "m"}}
	tests := []struct {
		name string
		res  *mdo.Result
		want string
	}{
		{"feasible", &mdo.Result{Constraints: []mdo.Constraint{takeoff}, Outputs: outputs, Best: point(true, true, []float64{590}, []float64{-10.0 / 600})},
			"couplet run: s.study: 2 cells, 7 evaluations, best objective 9488.47 (feasible)"},
		// 708.6/600 = 1.18 against 682.4/500 = 1.36: the landing limit
		// is the worse, though the take-off misses by more metres
		{"two violated, the worse by scale", &mdo.Result{Constraints: []mdo.Constraint{takeoff, landing}, Outputs: outputs,
			Best: point(false, true, []float64{1308.6, 1182.4}, []float64{708.6 / 600, 682.4 / 500})},
			"couplet run: s.study: 2 cells, 7 evaluations, best objective 9488.47 (infeasible; worst of 2 violated: perf.landing_field_length <= 500 at 1182.4 m)"},
		{"a function constraint with its unit", &mdo.Result{Constraints: []mdo.Constraint{takeoff, margin}, Outputs: outputs,
			Best: point(false, true, []float64{590, -2500}, []float64{-10.0 / 600, 2.5})},
			"couplet run: s.study: 2 cells, 7 evaluations, best objective 9488.47 (infeasible; worst of 1 violated: fuel_volume_margin >= 0 at -2500 kg)"},
		{"a best point whose analysis failed", &mdo.Result{Constraints: []mdo.Constraint{takeoff}, Outputs: outputs, Best: point(false, false, []float64{0}, []float64{0})},
			"couplet run: s.study: 2 cells, 7 evaluations, best objective 9488.47 (infeasible; its analysis failed: does not close: mass.takeoff runs away)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rec := &repl.RunRecord{Cells: make([]*repl.Cell, 2), Result: tc.res,
				Summary: &store.Summary{Evaluations: 7, Best: &store.SummaryPoint{Objective: 9488.47, Feasible: tc.res.Best.Feasible}}}
			if got := doneLine("dir/s.study", rec); got != tc.want {
				t.Errorf("got  %s\nwant %s", got, tc.want)
			}
		})
	}
}
