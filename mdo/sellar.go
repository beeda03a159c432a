package mdo

import "math"

// Sellar returns the disciplines of the Sellar problem (Sellar, Batill &
// Renaud, AIAA 96-0714, 1996), the classic two-discipline MDO test case:
//
//	discipline sellar1: y1 = z1² + z2 + x − 0.2·y2
//	discipline sellar2: y2 = sqrt(y1) + z1 + z2
//	discipline sellar_functions: f = x² + z2 + y1 + exp(−y2),
//	                             g1 = y1 (≥ 3.16), g2 = y2 (≤ 24)
//
// Design bounds are 0 ≤ x ≤ 10, −10 ≤ z1 ≤ 10, 0 ≤ z2 ≤ 10; the published
// optimum is z = (1.97764, 0), x = 0, y1 = 3.16, y2 = 3.75528, f = 3.18339.
// Defaults (the usual starting point) are x = 1, z = (5, 2), y1 = y2 = 1.
// The problem has a second, local optimum near z1 = −1.72 with f ≈ 4.13
// inside the same bounds; local optimisers started far from the global
// one may end there.
//
// Every discipline is Differentiable: it gives its analytic partials.
func Sellar() []Discipline {
	x := Var{Name: "x", Description: "local design variable", Default: 1, Min: 0, Max: 10}
	z1 := Var{Name: "z1", Description: "shared design variable 1", Default: 5, Min: -10, Max: 10}
	z2 := Var{Name: "z2", Description: "shared design variable 2", Default: 2, Min: 0, Max: 10}
	y1 := Var{Name: "y1", Description: "coupling variable of discipline 1", Default: 1, Min: 0, Max: 1000}
	y2 := Var{Name: "y2", Description: "coupling variable of discipline 2", Default: 1, Min: -1000, Max: 1000}
	f := Var{Name: "f", Description: "objective", Default: 1, Min: -1e6, Max: 1e6}
	d1 := WithPartials(FuncVars("sellar1", []Var{z1, z2, x, y2}, []Var{y1}, func(in, out []float64) error {
		out[0] = in[0]*in[0] + in[1] + in[2] - 0.2*in[3]
		return nil
	}), func(in, jac []float64) error {
		jac[0], jac[1], jac[2], jac[3] = 2*in[0], 1, 1, -0.2
		return nil
	})
	d2 := WithPartials(FuncVars("sellar2", []Var{y1, z1, z2}, []Var{y2}, func(in, out []float64) error {
		out[0] = math.Sqrt(in[0]) + in[1] + in[2]
		return nil
	}), func(in, jac []float64) error {
		jac[0], jac[1], jac[2] = 0.5/math.Sqrt(in[0]), 1, 1
		return nil
	})
	fn := WithPartials(FuncVars("sellar_functions", []Var{x, z2, y1, y2},
		[]Var{f, {Name: "g1", Description: "constraint quantity y1 (>= 3.16)", Default: 1, Min: -1e6, Max: 1e6},
			{Name: "g2", Description: "constraint quantity y2 (<= 24)", Default: 1, Min: -1e6, Max: 1e6}},
		func(in, out []float64) error {
			out[0] = in[0]*in[0] + in[1] + in[2] + math.Exp(-in[3])
			out[1] = in[2]
			out[2] = in[3]
			return nil
		}), func(in, jac []float64) error {
		// rows f, g1, g2; columns x, z2, y1, y2
		jac[0], jac[1], jac[2], jac[3] = 2*in[0], 1, 1, -math.Exp(-in[3])
		jac[4+2] = 1
		jac[8+3] = 1
		return nil
	})
	return []Discipline{d1, d2, fn}
}

// SellarStudy returns the Sellar optimisation as a Study over a fresh
// System: minimise f subject to y1 ≥ 3.16 and y2 ≤ 24.
func SellarStudy(form Formulation) (*Study, error) {
	sys, err := NewSystem(Sellar()...)
	if err != nil {
		return nil, err
	}
	return &Study{
		Name:        "sellar",
		System:      sys,
		Design:      []DesignVar{Continuous("x", 0, 10), Continuous("z1", -10, 10), Continuous("z2", 0, 10)},
		Objectives:  []Objective{Minimize("f")},
		Constraints: []Constraint{AtLeast("g1", 3.16), AtMost("g2", 24)},
		Formulation: form,
	}, nil
}
