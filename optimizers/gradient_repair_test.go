package optimizers

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Broyden's update (Broyden, Math. Comp. 19, 1965) makes the Jacobian
// satisfy the secant condition J Δx = Δr of the step it is given, and
// changes nothing along directions orthogonal to the step.
func TestBroydenUpdate(t *testing.T) {
	tests := []struct {
		name           string
		jac            []float64 // 2 × 3, row-major
		x0, x1, r0, r1 []float64
	}{
		{"one coordinate", []float64{1, 0, 0, 0, 1, 0}, []float64{0, 0, 0}, []float64{0.5, 0, 0}, []float64{1, 2}, []float64{0, 3}},
		{"a diagonal step", []float64{1, 2, 3, 4, 5, 6}, []float64{0.1, 0.2, 0.3}, []float64{0.2, 0.1, 0.5}, []float64{-1, 1}, []float64{2, -2}},
		{"a step of length 0", []float64{1, 2, 3, 4, 5, 6}, []float64{0.1, 0.2, 0.3}, []float64{0.1, 0.2, 0.3}, []float64{-1, 1}, []float64{2, -2}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			before := mat.NewDense(2, 3, append([]float64(nil), tc.jac...))
			jac := mat.NewDense(2, 3, append([]float64(nil), tc.jac...))
			broydenUpdate(jac, tc.x0, tc.x1, tc.r0, tc.r1)
			dx := make([]float64, 3)
			ss := 0.0
			for k := range dx {
				dx[k] = tc.x1[k] - tc.x0[k]
				ss += dx[k] * dx[k]
			}
			if ss == 0 {
				if !mat.Equal(jac, before) {
					t.Errorf("a step of length 0 changed the Jacobian:\n%v", mat.Formatted(jac))
				}
				return
			}
			// orthogonal to dx: e = (dx[1], -dx[0], 0) unless dx is along the third axis
			ortho := []float64{dx[1], -dx[0], 0}
			for i := 0; i < 2; i++ {
				secant, was, now := 0.0, 0.0, 0.0
				for k := range dx {
					secant += jac.At(i, k) * dx[k]
					was += before.At(i, k) * ortho[k]
					now += jac.At(i, k) * ortho[k]
				}
				if d := tc.r1[i] - tc.r0[i]; math.Abs(secant-d) > 1e-12 {
					t.Errorf("row %d: J Δx = %g, want Δr = %g", i, secant, d)
				}
				if math.Abs(now-was) > 1e-12 {
					t.Errorf("row %d: J e changed from %g to %g along a direction orthogonal to the step", i, was, now)
				}
			}
		})
	}
}

// The repair moves the members it is given in place and leaves the
// caller's slice of them as it was: Nelder–Mead's and CMA-ES's samples
// map each repaired member back to its sample by its place in that
// slice. (The repair once rebuilt its list of members still infeasible in
// the caller's slice, so that a sample could take another's evaluation.)
func TestRepairKeepsTheCallersMembers(t *testing.T) {
	for _, broyden := range []bool{false, true} {
		s, err := WeldedBeam()
		if err != nil {
			t.Fatal(err)
		}
		e, err := newEngine(context.Background(), s, GA{}, 1, true)
		if err != nil {
			t.Fatal(err)
		}
		e.grad.broyden = broyden
		a := e.newMember([]float64{0.3, 0.3, 0.3, 0.3})
		b := e.newMember([]float64{0.05, 0.5, 0.5, 0.05})
		chosen := []*member{a, b}
		if err := e.evaluateAll(chosen); err != nil {
			t.Fatal(err)
		}
		if a.ev.Feasible || b.ev.Feasible {
			t.Fatalf("the points are feasible: %v, %v", a.ev.Feasible, b.ev.Feasible)
		}
		bViolation := b.ev.Violation
		// the first step asked for (a's) is taken as a repeat: a's repair
		// ends there, b's goes on
		asked := 0
		isNew := func(x []float64) bool { asked++; return asked > 1 && e.fresh.add(x) }
		if err := e.grad.newton(e.evaluateAll, e.dim, chosen, isNew); err != nil {
			t.Fatal(err)
		}
		if chosen[0] != a || chosen[1] != b {
			t.Errorf("broyden %v: the caller's slice holds other members after the repair", broyden)
		}
		if b.ev.Feasible || asked < 3 {
			t.Fatalf("broyden %v: b feasible %v after %d steps: the check needs b infeasible after its first step", broyden, b.ev.Feasible, asked)
		}
		if !(b.ev.Violation < bViolation) {
			t.Errorf("broyden %v: b's violation %g after the repair, %g before", broyden, b.ev.Violation, bViolation)
		}
	}
}

// Without equality constraints the GA's repairs count in its budget: the
// default GA on the welded beam (160 individuals for 100 generations)
// analyses 160 × 101 points with the repairs as without them.
func TestGARepairsCountInTheBudget(t *testing.T) {
	var best [2]float64
	for i, rate := range []float64{0, -1} {
		s, err := WeldedBeam()
		if err != nil {
			t.Fatal(err)
		}
		s.Seed = 1
		res, err := GA{EqualityHandling: EqualityHandling{GradientRate: rate}}.Minimize(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		if res.Analyses != 160*101 || res.Repeats != 0 {
			t.Errorf("GradientRate %g: %v, want %d analyses, no repeat", rate, res.EvalCounters, 160*101)
		}
		best[i] = res.Objective()
	}
	if best[0] == best[1] {
		t.Errorf("the same best cost %g with the repairs as without: they did not act", best[0])
	}
}
