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
	// G07Optimum: CEC 2006 constrained suite, Liang et al. (2006) (from
	// memory).
	G07Optimum = 24.3062090681
	// G09Optimum: CEC 2006 constrained suite, Liang et al. (2006) (from
	// memory).
	G09Optimum = 680.630057374402
	// WeldedBeamOptimum: the welded beam design problem in the form of
	// Deb (Comput. Methods Appl. Mech. Eng. 186, 2000) and Coello (Comput.
	// Ind. 41, 2000), best known f* = 1.724852 (from memory).
	WeldedBeamOptimum = 1.724852
	// PressureVesselOptimum: the pressure vessel design problem of
	// Sandgren (J. Mech. Des. 112, 1990) and Kannan & Kramer (J. Mech. Des.
	// 116, 1994) with both thicknesses in multiples of 0.0625 in, best
	// known f* = 6059.714 at Ts = 0.8125, Th = 0.4375, R = 42.098446,
	// L = 176.636596 (as tabulated by Coello, Comput. Ind. 41, 2000, and
	// later comparisons; from memory).
	PressureVesselOptimum = 6059.714
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

// G07 returns problem g07 of the CEC 2006 constrained suite (Liang et al.,
// 2006; definition from memory): minimise
//
//	f = x1² + x2² + x1x2 − 14x1 − 16x2 + (x3 − 10)² + 4(x4 − 5)² + (x5 − 3)²
//	    + 2(x6 − 1)² + 5x7² + 7(x8 − 11)² + 2(x9 − 10)² + (x10 − 7)² + 45
//
// subject to eight inequalities g1…g8 ≤ 0 (three linear, five quadratic),
// −10 ≤ xᵢ ≤ 10. Optimum f* = 24.3062090681 with g1…g6 active.
func G07() (*mdo.Study, error) {
	lo, hi := fill(10, -10), fill(10, 10)
	s, _, err := funcStudy("g07", lo, hi, []string{"f", "g1", "g2", "g3", "g4", "g5", "g6", "g7", "g8"},
		func(in, out []float64) error {
			x1, x2, x3, x4, x5, x6, x7, x8, x9, x10 := in[0], in[1], in[2], in[3], in[4], in[5], in[6], in[7], in[8], in[9]
			sq := func(a float64) float64 { return a * a }
			out[0] = x1*x1 + x2*x2 + x1*x2 - 14*x1 - 16*x2 + sq(x3-10) + 4*sq(x4-5) + sq(x5-3) +
				2*sq(x6-1) + 5*x7*x7 + 7*sq(x8-11) + 2*sq(x9-10) + sq(x10-7) + 45
			out[1] = -105 + 4*x1 + 5*x2 - 3*x7 + 9*x8
			out[2] = 10*x1 - 8*x2 - 17*x7 + 2*x8
			out[3] = -8*x1 + 2*x2 + 5*x9 - 2*x10 - 12
			out[4] = 3*sq(x1-2) + 4*sq(x2-3) + 2*x3*x3 - 7*x4 - 120
			out[5] = 5*x1*x1 + 8*x2 + sq(x3-6) - 2*x4 - 40
			out[6] = x1*x1 + 2*sq(x2-2) - 2*x1*x2 + 14*x5 - 6*x6
			out[7] = 0.5*sq(x1-8) + 2*sq(x2-4) + 3*x5*x5 - x6 - 30
			out[8] = -3*x1 + 6*x2 + 12*sq(x9-8) - 7*x10
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f")}
	for k := 1; k <= 8; k++ {
		s.Constraints = append(s.Constraints, mdo.AtMost(fmt.Sprintf("g%d", k), 0))
	}
	return s, nil
}

// G09 returns problem g09 of the CEC 2006 constrained suite (Liang et al.,
// 2006; definition from memory): minimise
//
//	f = (x1 − 10)² + 5(x2 − 12)² + x3⁴ + 3(x4 − 11)² + 10x5⁶ + 7x6² + x7⁴
//	    − 4x6x7 − 10x6 − 8x7
//
// subject to g1 = −127 + 2x1² + 3x2⁴ + x3 + 4x4² + 5x5 ≤ 0,
// g2 = −282 + 7x1 + 3x2 + 10x3² + x4 − x5 ≤ 0,
// g3 = −196 + 23x1 + x2² + 6x6² − 8x7 ≤ 0,
// g4 = 4x1² + x2² − 3x1x2 + 2x3² + 5x6 − 11x7 ≤ 0, −10 ≤ xᵢ ≤ 10.
// Optimum f* = 680.630057374402 with g1 and g4 active.
func G09() (*mdo.Study, error) {
	s, _, err := funcStudy("g09", fill(7, -10), fill(7, 10), []string{"f", "g1", "g2", "g3", "g4"},
		func(in, out []float64) error {
			x1, x2, x3, x4, x5, x6, x7 := in[0], in[1], in[2], in[3], in[4], in[5], in[6]
			out[0] = (x1-10)*(x1-10) + 5*(x2-12)*(x2-12) + math.Pow(x3, 4) + 3*(x4-11)*(x4-11) +
				10*math.Pow(x5, 6) + 7*x6*x6 + math.Pow(x7, 4) - 4*x6*x7 - 10*x6 - 8*x7
			out[1] = -127 + 2*x1*x1 + 3*math.Pow(x2, 4) + x3 + 4*x4*x4 + 5*x5
			out[2] = -282 + 7*x1 + 3*x2 + 10*x3*x3 + x4 - x5
			out[3] = -196 + 23*x1 + x2*x2 + 6*x6*x6 - 8*x7
			out[4] = 4*x1*x1 + x2*x2 - 3*x1*x2 + 2*x3*x3 + 5*x6 - 11*x7
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f")}
	for k := 1; k <= 4; k++ {
		s.Constraints = append(s.Constraints, mdo.AtMost(fmt.Sprintf("g%d", k), 0))
	}
	return s, nil
}

// WeldedBeam returns the welded beam design problem (Ragsdell & Phillips,
// J. Eng. Ind. 98, 1976, in the form of Deb, 2000, and Coello, 2000;
// definition from memory): minimise the cost f = 1.10471 h² l +
// 0.04811 t b (14 + l) of a beam welded to a support, design x1 = h
// (weld thickness), x2 = l (weld length), x3 = t (beam height),
// x4 = b (beam thickness), in inches, under the load P = 6000 lb at
// L = 14 in (E = 30e6 psi, G = 12e6 psi), subject to the weld shear
// stress τ ≤ 13 600 psi, the bending stress σ = 6PL/(b t²) ≤ 30 000 psi,
// h ≤ b, 0.10471 h² + 0.04811 t b (14 + l) ≤ 5, h ≥ 0.125, the end
// deflection δ = 4PL³/(E t³ b) ≤ 0.25 in and the buckling load
// P_c = 4.013 E √(t² b⁶/36)/L² (1 − t/(2L) √(E/(4G))) ≥ P;
// 0.1 ≤ h, b ≤ 2, 0.1 ≤ l, t ≤ 10. Best known f* = 1.724852 at
// (0.205730, 3.470489, 9.036624, 0.205730).
func WeldedBeam() (*mdo.Study, error) {
	const P, L, E, G = 6000.0, 14.0, 30e6, 12e6
	s, _, err := funcStudy("welded_beam", []float64{0.1, 0.1, 0.1, 0.1}, []float64{2, 10, 10, 2},
		[]string{"f", "tau", "sigma", "h_minus_b", "cost_limit", "delta", "buckling_margin"},
		func(in, out []float64) error {
			h, l, t, b := in[0], in[1], in[2], in[3]
			tau1 := P / (math.Sqrt2 * h * l)
			M := P * (L + l/2)
			R := math.Sqrt(l*l/4 + (h+t)*(h+t)/4)
			J := 2 * (math.Sqrt2 * h * l * (l*l/12 + (h+t)*(h+t)/4))
			tau2 := M * R / J
			out[0] = 1.10471*h*h*l + 0.04811*t*b*(14+l)
			out[1] = math.Sqrt(tau1*tau1 + 2*tau1*tau2*l/(2*R) + tau2*tau2)
			out[2] = 6 * P * L / (b * t * t)
			out[3] = h - b
			out[4] = 0.10471*h*h + 0.04811*t*b*(14+l)
			out[5] = 4 * P * L * L * L / (E * t * t * t * b)
			pc := 4.013 * E * math.Sqrt(t*t*math.Pow(b, 6)/36) / (L * L) * (1 - t/(2*L)*math.Sqrt(E/(4*G)))
			out[6] = pc - P
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f")}
	s.Constraints = []mdo.Constraint{
		mdo.AtMost("tau", 13600), mdo.AtMost("sigma", 30000), mdo.AtMost("h_minus_b", 0),
		mdo.AtMost("cost_limit", 5), mdo.AtLeast("x1", 0.125), mdo.AtMost("delta", 0.25),
		mdo.AtLeast("buckling_margin", 0).WithScale(P),
	}
	return s, nil
}

// PressureVessel returns the pressure vessel design problem (Sandgren, J.
// Mech. Des. 112, 1990; Kannan & Kramer, J. Mech. Des. 116, 1994; in the
// form of Coello, Comput. Ind. 41, 2000; definition from memory): minimise
// the cost of material, forming and welding of a cylindrical vessel capped
// by hemispherical heads,
//
//	f = 0.6224 Ts R L + 1.7781 Th R² + 3.1661 Ts² L + 19.84 Ts² R,
//
// subject to the shell thickness Ts ≥ 0.0193 R, the head thickness
// Th ≥ 0.00954 R, the volume π R² L + 4/3 π R³ ≥ 1 296 000 in³ and
// L ≤ 240 in. The thicknesses come in rolled plate of multiples of
// 0.0625 in: the design variables x1 and x2 are the integer numbers of
// sixteenths, 1 ≤ x1, x2 ≤ 99 (Ts = 0.0625 x1, Th = 0.0625 x2), and
// x3 = R, x4 = L in inches, 10 ≤ R, L ≤ 200. Best known f* = 6059.714 at
// x = (13, 7, 42.098446, 176.636596), with the shell-thickness and
// volume constraints active.
func PressureVessel() (*mdo.Study, error) {
	const sixteenth = 0.0625
	s, _, err := funcStudy("pressure_vessel", []float64{1, 1, 10, 10}, []float64{99, 99, 200, 200},
		[]string{"f", "shell", "head", "volume", "length"},
		func(in, out []float64) error {
			ts, th, r, l := sixteenth*in[0], sixteenth*in[1], in[2], in[3]
			out[0] = 0.6224*ts*r*l + 1.7781*th*r*r + 3.1661*ts*ts*l + 19.84*ts*ts*r
			out[1] = 0.0193*r - ts
			out[2] = 0.00954*r - th
			out[3] = math.Pi*r*r*l + 4.0/3*math.Pi*r*r*r
			out[4] = l
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Design[0].Integer, s.Design[1].Integer = true, true
	s.Objectives = []mdo.Objective{mdo.Minimize("f")}
	s.Constraints = []mdo.Constraint{
		mdo.AtMost("shell", 0), mdo.AtMost("head", 0),
		mdo.AtLeast("volume", 1296000), mdo.AtMost("length", 240),
	}
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
