package optimizers

import (
	"context"
	"math"
	"testing"

	"couplet/mdo"
)

// A step of the subproblem that reaches a bound says that the variable
// should go there, not that it is held there: the optimality measure
// counted the gradient of such a variable as a bound's multiplier, so
// that Sextant declared convergence at the start of any bowl whose
// minimum lies past the box (the first step reaching the bound), and on
// the invented business jet's wing stopped "converged" 22 kg above the
// optimum, its aspect ratio 3.19342 short of the 3.2 bound that the
// mass still fell towards. The optimum of a separable bowl clipped by the
// box is the clipped centre (first-order conditions of a bound-
// constrained problem, Nocedal & Wright, Numerical Optimization, 2nd
// ed., §12.3).
func TestSextantStepToABoundIsNotConvergence(t *testing.T) {
	tests := []struct {
		name    string
		centre  []float64 // the bowl's centre, beyond the box or inside
		start   []float64
		optimum []float64 // the centre clipped to [0, 1]
	}{
		{"past the upper bound", []float64{2}, []float64{0.5}, []float64{1}},
		{"past the lower bound", []float64{-1}, []float64{0.5}, []float64{0}},
		{"one past its bound, one inside", []float64{2, 0.3}, []float64{0.5, 0.9}, []float64{1, 0.3}},
		{"near the bound it reaches", []float64{1.05, -0.2}, []float64{0.97, 0.1}, []float64{1, 0}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := len(tc.centre)
			var ins []mdo.Var
			var design []mdo.DesignVar
			for j := 0; j < n; j++ {
				name := string(rune('a' + j))
				ins = append(ins, mdo.Var{Name: name, Default: tc.start[j], Min: 0, Max: 1})
				design = append(design, mdo.Continuous(name, 0, 1))
			}
			bowl := mdo.FuncVars("bowl", ins, []mdo.Var{{Name: "f", Default: 1, Min: -1e9, Max: 1e9}},
				func(in, out []float64) error {
					out[0] = 0
					for j, c := range tc.centre {
						out[0] += (in[j] - c) * (in[j] - c)
					}
					return nil
				})
			sys, err := mdo.NewSystem(bowl)
			if err != nil {
				t.Fatal(err)
			}
			st := &mdo.Study{Name: "bowl", System: sys, Design: design, Objectives: []mdo.Objective{mdo.Minimize("f")}, Seed: 1, Workers: 1}
			r, err := Sextant{}.Minimize(context.Background(), st)
			if err != nil {
				t.Fatal(err)
			}
			for j, want := range tc.optimum {
				if got := r.Best.Design[j]; math.Abs(got-want) > 1e-6 {
					t.Errorf("%s = %g at the end (%s, %d evaluations), want %g", st.Design[j].Name, got, r.Stop, r.Evaluations, want)
				}
			}
		})
	}
}
