package mdo

import (
	"context"
	"strings"
	"testing"
)

// panicky is a Discipline type of its own (not a Func) whose Compute
// panics when its input exceeds 5.
type panicky struct{}

func (panicky) Name() string   { return "panicky" }
func (panicky) Inputs() []Var  { return []Var{{Name: "p", Default: 1, Min: 0, Max: 10}} }
func (panicky) Outputs() []Var { return []Var{{Name: "q", Default: 1, Min: -100, Max: 100}} }
func (panicky) Compute(in, out []float64) error {
	if in[0] > 5 {
		panic("input beyond what panicky handles")
	}
	out[0] = 2 * in[0]
	return nil
}

func TestPanickingDisciplineIsAFailedEvaluation(t *testing.T) {
	for _, workers := range []int{1, 2} {
		sys, err := NewSystem(panicky{})
		if err != nil {
			t.Fatal(err)
		}
		st := &Study{Name: "panic", System: sys, Design: []DesignVar{Continuous("p", 0, 10)},
			Objectives: []Objective{Minimize("q")}, Workers: workers}
		ev, err := st.NewEvaluator()
		if err != nil {
			t.Fatal(err)
		}
		evs, err := ev.Evaluate(context.Background(), [][]float64{{0.1}, {0.9}, {0.2}, {0.8}})
		if err != nil {
			t.Fatal(err)
		}
		for i, e := range evs {
			bad := i%2 == 1
			if bad != !e.Converged {
				t.Errorf("workers %d, point %d: converged %v, err %q", workers, i, e.Converged, e.Err)
			}
			if bad && (e.Failure != DisciplineFailed || !strings.Contains(e.Err, "panicky") || !strings.Contains(e.Err, "panic")) {
				t.Errorf("workers %d, point %d: failure %v, err %q", workers, i, e.Failure, e.Err)
			}
		}
	}
}
