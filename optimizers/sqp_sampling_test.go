package optimizers

import (
	"context"
	"math"
	"testing"

	"couplet/mdo"
)

// kinkStudy is an invented problem whose optimum lies on a kink, as a
// component sized to the larger of two requirements puts it: minimise
// f = max(x1, 3·x2) + 0.1(x1² + x2²) subject to x1 + x2 ≥ b, 0 ≤ x1 ≤ 2,
// 0 ≤ x2 ≤ 3. On the kink x1 = 3t, x2 = t, f = 3t + t², so the optimum is
// 4t = b with f* = 3b/4 + b²/16 and d f*/d b = 3/4 + b/8 (worked by hand:
// the gradients (1, 0) and (0, 3) of the two pieces, weighted 0.725 and
// 0.275 at b = 1, balance the constraint's).
func kinkStudy(b float64) (*mdo.Study, error) {
	s, _, err := funcStudy("kink", []float64{0, 0}, []float64{2, 3}, []string{"f", "g"},
		func(in, out []float64) error {
			out[0] = math.Max(in[0], 3*in[1]) + 0.1*(in[0]*in[0]+in[1]*in[1])
			out[1] = in[0] + in[1]
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f")}
	s.Constraints = []mdo.Constraint{mdo.AtLeast("g", b)}
	return s, nil
}

// TestSextantOptimumOnAKink: the ordinary step's line search fails at
// the kink; the gradient-sampling steps reach the optimum and pass the
// convergence test, and the limit's multiplier is d f*/d b.
func TestSextantOptimumOnAKink(t *testing.T) {
	for _, b := range []float64{1, 1.5} {
		s, err := kinkStudy(b)
		if err != nil {
			t.Fatal(err)
		}
		res, rep, err := Sextant{}.Explore(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		want := 3*b/4 + b*b/16
		opt := rep.Optima[0]
		t.Logf("b = %g: f = %.10g in %d analyses, optimality %.2g", b, res.Objective(), res.Analyses, opt.Optimality)
		// the sampling certifies the optimum to its smallest radius,
		// 1e-4 of the box: the end point lies within about 1e-6 of the
		// kink, and f within the slope times that
		if !res.Feasible() || math.Abs(res.Objective()-want) > 1e-5*want {
			t.Errorf("b = %g: f = %.10g (feasible %v), want %.10g within 1e-5 relative", b, res.Objective(), res.Feasible(), want)
		}
		if !opt.Sampled {
			t.Errorf("b = %g: the optimum was reached without sampling the gradients", b)
		}
		if !opt.Converged || res.Sensitivity == nil {
			t.Fatalf("b = %g: not converged (optimality %.3g, violation %.3g)", b, opt.Optimality, opt.Violation)
		}
		if got, w := res.Sensitivity.Limits[0].PerUnit, 0.75+b/8; math.Abs(got-w) > 0.01*w {
			t.Errorf("b = %g: d f*/d b = %.6g, want %.6g within 1 %%", b, got, w)
		}
	}
}
