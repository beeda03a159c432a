package optimizers

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestSolveQP checks the interior-point QP solver on published examples.
func TestSolveQP(t *testing.T) {
	tests := []struct {
		name string
		p    qpProblem
		x    []float64
		z    []float64
	}{{
		// Nocedal & Wright, Numerical Optimization (2006), Example 16.4:
		// solution (1.4, 1.7), only the first constraint active with
		// multiplier 0.8.
		name: "N&W 16.4",
		p: qpProblem{
			H: mat.NewDense(2, 2, []float64{2, 0, 0, 2}), c: []float64{-2, -5},
			G: mat.NewDense(5, 2, []float64{1, -2, -1, -2, -1, 2, 1, 0, 0, 1}), h: []float64{-2, -6, -2, 0, 0},
		},
		x: []float64{1.4, 1.7}, z: []float64{0.8, 0, 0, 0, 0},
	}, {
		// Nocedal & Wright (2006), Example 16.2: minimise
		// 3x1² + 2x1x2 + x1x3 + 2.5x2² + 2x2x3 + 2x3² − 8x1 − 3x2 − 3x3
		// subject to x1 + x3 = 3, x2 + x3 = 0: solution (2, −1, 1).
		name: "N&W 16.2",
		p: qpProblem{
			H: mat.NewDense(3, 3, []float64{6, 2, 1, 2, 5, 2, 1, 2, 4}), c: []float64{-8, -3, -3},
			A: mat.NewDense(2, 3, []float64{1, 0, 1, 0, 1, 1}), b: []float64{3, 0},
		},
		x: []float64{2, -1, 1},
	}}
	for _, tc := range tests {
		sol, err := solveQP(tc.p)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		for i, want := range tc.x {
			if math.Abs(sol.x[i]-want) > 1e-8 {
				t.Errorf("%s: x%d = %.12g, want %g", tc.name, i+1, sol.x[i], want)
			}
		}
		for i, want := range tc.z {
			if math.Abs(sol.z[i]-want) > 1e-8 {
				t.Errorf("%s: z%d = %.12g, want %g", tc.name, i+1, sol.z[i], want)
			}
		}
	}
}

// TestSolveQPInfeasible: contradictory constraints are reported.
func TestSolveQPInfeasible(t *testing.T) {
	_, err := solveQP(qpProblem{
		H: mat.NewDense(1, 1, []float64{1}), c: []float64{0},
		G: mat.NewDense(2, 1, []float64{1, -1}), h: []float64{1, 0},
	})
	if err == nil {
		t.Error("x ≥ 1 and x ≤ 0 was solved")
	}
}

// TestSolveQPNonFinite: an iterate that is not finite ends the iteration
// with an error that names what broke (instead of iterating on NaN).
func TestSolveQPNonFinite(t *testing.T) {
	tests := []struct {
		name string
		p    qpProblem
		want string
	}{
		{"a limit that is not finite", qpProblem{
			H: mat.NewDense(1, 1, []float64{1}), c: []float64{0},
			G: mat.NewDense(2, 1, []float64{1, -1}), h: []float64{0, math.NaN()},
		}, "the slack of inequality 1 is NaN"},
		{"a gradient that is not finite", qpProblem{
			H: mat.NewDense(1, 1, []float64{1}), c: []float64{math.Inf(1)},
			G: mat.NewDense(1, 1, []float64{1}), h: []float64{0},
		}, "its residuals are not finite"},
	}
	for _, tc := range tests {
		_, err := solveQP(tc.p)
		var nf *qpNonFiniteError
		if !errors.As(err, &nf) || !errors.Is(err, errQPNotConverged) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want a non-finite iterate: %q", tc.name, err, tc.want)
		}
	}
}
