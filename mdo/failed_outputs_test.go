package mdo_test

import (
	"context"
	"errors"
	"testing"

	"couplet/mdo"
)

// A failed analysis leaves no outputs on its evaluation: the workspace
// still holds the variables' defaults, which would read as if computed.
func TestFailedAnalysisHasNoOutputs(t *testing.T) {
	p := mdo.Var{Name: "p", Default: 1, Min: 0, Max: 10}
	q := mdo.Var{Name: "q", Default: 1, Min: -100, Max: 100}
	sys, err := mdo.NewSystem(mdo.FuncVars("doubler", []mdo.Var{p}, []mdo.Var{q}, func(in, out []float64) error {
		if in[0] > 5 {
			return errors.New("p above 5 refused")
		}
		out[0] = 2 * in[0]
		return nil
	}))
	if err != nil {
		t.Fatal(err)
	}
	st := &mdo.Study{Name: "failing", System: sys, Design: []mdo.DesignVar{mdo.Continuous("p", 0, 10)},
		Objectives: []mdo.Objective{mdo.Minimize("q")}, Workers: 1}
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	evs, err := ev.Evaluate(context.Background(), [][]float64{{0.2}, {0.8}})
	if err != nil {
		t.Fatal(err)
	}
	if !evs[0].Converged || len(evs[0].Outputs) != len(ev.OutputVars()) {
		t.Errorf("the converged point has outputs %v, want one per output variable", evs[0].Outputs)
	}
	if evs[1].Converged || evs[1].Outputs != nil {
		t.Errorf("the failed point has outputs %v (converged %v), want none", evs[1].Outputs, evs[1].Converged)
	}
}
