package optimizers

import (
	"fmt"
	"math"

	"couplet/mdo"
)

// Published optima of the benchmark problems, for tests and comparisons.
const (
	// SellarOptimum: Sellar, Batill & Renaud, AIAA 96-0714 (1996).
	SellarOptimum = 3.18339
	// G06Optimum: CEC 2006 constrained suite, Liang et al. (2006).
	G06Optimum = -6961.81388
	// G08Optimum: CEC 2006 constrained suite, Liang et al. (2006).
	G08Optimum = -0.0958250
	// G11Optimum: CEC 2006 constrained suite, Liang et al. (2006), with
	// the equality tolerance 1e-4.
	G11Optimum = 0.7499
	// ZDT1Hypervolume is the hypervolume of the ZDT1 front to the
	// reference point (1, 1): ∫₀¹ √f₁ df₁ = 2/3 (Zitzler, Deb & Thiele, 2000).
	ZDT1Hypervolume = 2.0 / 3
)

// SellarMDF returns the Sellar problem under the MDF formulation (every
// point a converged coupled analysis).
func SellarMDF() (*mdo.Study, error) { return mdo.SellarStudy(mdo.MDF) }

// SellarIDF returns the Sellar problem under the IDF formulation (the
// coupling variables y1, y2 become design variables with consistency
// constraints).
func SellarIDF() (*mdo.Study, error) { return mdo.SellarStudy(mdo.IDF) }

// funcStudy builds a study over a System of one discipline: inputs x1…xn
// with the given bounds (all design variables), outputs named outs
// computed by fn.
func funcStudy(name string, lower, upper []float64, outs []string, fn mdo.ComputeFunc) (*mdo.Study, *mdo.System, error) {
	in := make([]mdo.Var, len(lower))
	design := make([]mdo.DesignVar, len(lower))
	for i := range lower {
		n := fmt.Sprintf("x%d", i+1)
		in[i] = mdo.Var{Name: n, Description: fmt.Sprintf("design variable %d", i+1), Default: (lower[i] + upper[i]) / 2, Min: lower[i], Max: upper[i]}
		design[i] = mdo.Continuous(n, lower[i], upper[i])
	}
	out := make([]mdo.Var, len(outs))
	for i, n := range outs {
		out[i] = mdo.Var{Name: n, Description: name + " output " + n}
	}
	sys, err := mdo.NewSystem(mdo.FuncVars(name, in, out, fn))
	if err != nil {
		return nil, nil, fmt.Errorf("optimizers: benchmark %s: %w", name, err)
	}
	return &mdo.Study{Name: name, System: sys, Design: design}, sys, nil
}

// G06 returns problem g06 of the CEC 2006 constrained suite (Liang et al.,
// 2006): minimise f = (x1 − 10)³ + (x2 − 20)³ subject to
// −(x1 − 5)² − (x2 − 5)² + 100 ≤ 0 and (x1 − 6)² + (x2 − 5)² − 82.81 ≤ 0,
// 13 ≤ x1 ≤ 100, 0 ≤ x2 ≤ 100. Optimum f* = −6961.81388 at
// (14.095, 0.84296), both constraints active.
func G06() (*mdo.Study, error) {
	s, _, err := funcStudy("g06", []float64{13, 0}, []float64{100, 100}, []string{"f", "g1", "g2"},
		func(in, out []float64) error {
			x1, x2 := in[0], in[1]
			out[0] = math.Pow(x1-10, 3) + math.Pow(x2-20, 3)
			out[1] = -(x1-5)*(x1-5) - (x2-5)*(x2-5) + 100
			out[2] = (x1-6)*(x1-6) + (x2-5)*(x2-5) - 82.81
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f")}
	s.Constraints = []mdo.Constraint{mdo.AtMost("g1", 0), mdo.AtMost("g2", 0)}
	return s, nil
}

// G08 returns problem g08 of the CEC 2006 constrained suite (Liang et al.,
// 2006): minimise f = −sin³(2π x1)·sin(2π x2)/(x1³ (x1 + x2)) subject to
// x1² − x2 + 1 ≤ 0 and 1 − x1 + (x2 − 4)² ≤ 0, 0 ≤ x1, x2 ≤ 10. Optimum
// f* = −0.0958250 at (1.22797, 4.24537). At x1 = 0 the objective is not
// finite and the point is an infeasible evaluation.
func G08() (*mdo.Study, error) {
	s, _, err := funcStudy("g08", []float64{0, 0}, []float64{10, 10}, []string{"f", "g1", "g2"},
		func(in, out []float64) error {
			x1, x2 := in[0], in[1]
			s1 := math.Sin(2 * math.Pi * x1)
			out[0] = -s1 * s1 * s1 * math.Sin(2*math.Pi*x2) / (x1 * x1 * x1 * (x1 + x2))
			out[1] = x1*x1 - x2 + 1
			out[2] = 1 - x1 + (x2-4)*(x2-4)
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f")}
	s.Constraints = []mdo.Constraint{mdo.AtMost("g1", 0), mdo.AtMost("g2", 0)}
	return s, nil
}

// G11 returns problem g11 of the CEC 2006 constrained suite (Liang et al.,
// 2006): minimise f = x1² + (x2 − 1)² subject to h = x2 − x1² = 0 within
// the suite's equality tolerance 1e-4, −1 ≤ x1, x2 ≤ 1. Optimum
// f* = 0.7499 at (±0.70711, 0.5).
func G11() (*mdo.Study, error) {
	s, _, err := funcStudy("g11", []float64{-1, -1}, []float64{1, 1}, []string{"f", "h"},
		func(in, out []float64) error {
			x1, x2 := in[0], in[1]
			out[0] = x1*x1 + (x2-1)*(x2-1)
			out[1] = x2 - x1*x1
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f")}
	s.Constraints = []mdo.Constraint{mdo.EqualTo("h", 0, 1e-4)}
	return s, nil
}

// ZDT1 returns the two-objective problem ZDT1 (Zitzler, Deb & Thiele,
// 2000) with n variables in [0, 1]: f1 = x1, g = 1 + 9 Σᵢ₌₂ⁿ xᵢ/(n − 1),
// f2 = g (1 − √(f1/g)). Its Pareto front is f2 = 1 − √f1 (g = 1), with
// hypervolume 2/3 to the reference point (1, 1). The usual n is 30.
func ZDT1(n int) (*mdo.Study, error) {
	if n < 2 {
		return nil, fmt.Errorf("optimizers: ZDT1 n = %d, must be >= 2", n)
	}
	lo, hi := make([]float64, n), make([]float64, n)
	for i := range hi {
		hi[i] = 1
	}
	s, _, err := funcStudy("zdt1", lo, hi, []string{"f1", "f2"},
		func(in, out []float64) error {
			sum := 0.0
			for _, x := range in[1:] {
				sum += x
			}
			g := 1 + 9*sum/float64(len(in)-1)
			out[0] = in[0]
			out[1] = g * (1 - math.Sqrt(in[0]/g))
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f1"), mdo.Minimize("f2")}
	return s, nil
}

// Rosenbrock returns the n-variable Rosenbrock function
// Σᵢ 100 (xᵢ₊₁ − xᵢ²)² + (1 − xᵢ)² on [−5, 10]ⁿ, unconstrained, with its
// minimum 0 at (1, …, 1).
func Rosenbrock(n int) (*mdo.Study, error) {
	if n < 2 {
		return nil, fmt.Errorf("optimizers: Rosenbrock n = %d, must be >= 2", n)
	}
	lo, hi := make([]float64, n), make([]float64, n)
	for i := range lo {
		lo[i], hi[i] = -5, 10
	}
	s, _, err := funcStudy("rosenbrock", lo, hi, []string{"f"},
		func(in, out []float64) error {
			f := 0.0
			for i := 0; i+1 < len(in); i++ {
				a, b := in[i+1]-in[i]*in[i], 1-in[i]
				f += 100*a*a + b*b
			}
			out[0] = f
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f")}
	return s, nil
}
