package plot

import (
	"errors"
	"strings"
	"testing"

	"couplet/mdo"
)

func TestFailureMap(t *testing.T) {
	// q = 2p over p ∈ [0, 10], h ∈ [0, 1]: the discipline refuses p > 5,
	// so half of a grid fails as a failed discipline.
	p := mdo.Var{Name: "p", Default: 1, Min: 0, Max: 10}
	h := mdo.Var{Name: "h", Default: 0, Min: 0, Max: 1}
	q := mdo.Var{Name: "q", Default: 1, Min: -100, Max: 100}
	sys, err := mdo.NewSystem(mdo.FuncVars("doubler", []mdo.Var{p, h}, []mdo.Var{q}, func(in, out []float64) error {
		if in[0] > 5 {
			return errors.New("p above 5 refused")
		}
		out[0] = 2*in[0] + in[1]
		return nil
	}))
	if err != nil {
		t.Fatal(err)
	}
	st := &mdo.Study{Name: "halves", System: sys, Design: []mdo.DesignVar{mdo.Continuous("p", 0, 10), mdo.Continuous("h", 0, 1)},
		Objectives: []mdo.Objective{mdo.Minimize("q")}, Workers: 1}
	var xs [][]float64
	for i := 0; i < 10; i++ {
		xs = append(xs, []float64{(float64(i) + 0.5) / 10, 0.5})
	}
	r, evs := gridRun(t, st, xs)
	f, err := FailureMap(r, evs)
	checkFigure(t, f, err, "converged (5)", "discipline-failed (5)")

	// a run without failures has no such figure, and says why
	good, goodEvs := sellarRun(t, 8)
	if _, err := FailureMap(good, goodEvs); err == nil || !strings.Contains(err.Error(), "no analysis failed") {
		t.Errorf("FailureMap of a run without failures: %v", err)
	}
}
