package mdo

import (
	"context"
	"math"
	"testing"
)

// TestAndersonOnALinearLoop solves the three-variable linear loop
//
//	a = 0.5 b + 0.3 c + 1,  b = 0.4 a − 0.2 c + 2,  c = 0.3 a + 0.3 b + 3
//
// whose solution is that of the linear system (I − M) y = b, computed
// here by Gaussian elimination (exact algebra, no source needed).
// Anderson acceleration must reach it to the tolerance in fewer sweeps
// than plain and Aitken-relaxed Gauss–Seidel: on a linear map it combines
// the sweeps like GMRES (Walker & Ni, SIAM J. Numer. Anal. 49(4), 2011).
func TestAndersonOnALinearLoop(t *testing.T) {
	// the solution of (I − M) y = b by Gaussian elimination
	m := [3][3]float64{{0, 0.5, 0.3}, {0.4, 0, -0.2}, {0.3, 0.3, 0}}
	rhs := [3]float64{1, 2, 3}
	var a [3][4]float64
	for i := range a {
		for j := 0; j < 3; j++ {
			a[i][j] = -m[i][j]
		}
		a[i][i] += 1
		a[i][3] = rhs[i]
	}
	for p := 0; p < 3; p++ {
		for i := p + 1; i < 3; i++ {
			f := a[i][p] / a[p][p]
			for j := p; j < 4; j++ {
				a[i][j] -= f * a[p][j]
			}
		}
	}
	var want [3]float64
	for i := 2; i >= 0; i-- {
		s := a[i][3]
		for j := i + 1; j < 3; j++ {
			s -= a[i][j] * want[j]
		}
		want[i] = s / a[i][i]
	}
	iters := map[Method]int{}
	for _, method := range []Method{GaussSeidel, AitkenGaussSeidel, AndersonGaussSeidel} {
		sys, err := NewSystem(
			lin("da", []string{"b", "c"}, "a", []float64{0.5, 0.3}, 1),
			lin("db", []string{"a", "c"}, "b", []float64{0.4, -0.2}, 2),
			lin("dc", []string{"a", "b"}, "c", []float64{0.3, 0.3}, 3),
		)
		if err != nil {
			t.Fatal(err)
		}
		if err := sys.SetSolver(SolverSettings{Method: method, Tolerance: 1e-12}); err != nil {
			t.Fatal(err)
		}
		w := sys.NewWorkspace()
		if err := w.Analyze(context.Background()); err != nil {
			t.Fatalf("%s: %v", method, err)
		}
		for i, n := range []string{"a", "b", "c"} {
			if got := w.Get(n); math.Abs(got-want[i]) > 1e-10 {
				t.Errorf("%s: %s = %.15g, want %.15g", method, n, got, want[i])
			}
		}
		iters[method] = w.CouplingReports()[0].CouplingIterations
	}
	if iters[AndersonGaussSeidel] >= iters[AitkenGaussSeidel] || iters[AndersonGaussSeidel] >= iters[GaussSeidel] {
		t.Errorf("iterations %v: Anderson should need the fewest", iters)
	}
	t.Logf("iterations: %v", iters)
}

// TestAndersonDropsDependentDifferences feeds the step the iterates of
// one scalar linear map in two equal components: every difference column
// is parallel to the newest, so all but it are left out (kept, they would
// make the least-squares problem singular), and the step is the secant
// step of the newest alone, exact for a linear map.
func TestAndersonDropsDependentDifferences(t *testing.T) {
	a := newAndersonScratch(2)
	next := make([]float64, 2)
	// iterates of the scalar map g(y) = 0.5 y + 1 in both components:
	// y = 0, 1, 1.5, 1.75 give f = 1, 0.5, 0.25, 0.125 and g = 1, 1.5, 1.75, 1.875
	ys := []float64{0, 1, 1.5, 1.75}
	for it, y := range ys {
		g := 0.5*y + 1
		a.step(it+1, []float64{g - y, g - y}, []float64{g, g}, next)
	}
	// after the delay the first accelerated step lands on the fixed point 2
	// (the secant of a linear map is exact)
	for k, x := range next {
		if math.Abs(x-2) > 1e-12 {
			t.Errorf("next[%d] = %.15g, want 2", k, x)
		}
	}
}

// TestClipIsMaxMin checks clip against math.Max(lo, math.Min(hi, x)) bit
// for bit, NaN, infinities, signed zeros and empty ranges included.
func TestClipIsMaxMin(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	negZero := math.Copysign(0, -1)
	xs := []float64{nan, inf, -inf, 0, negZero, 1, -1, 2, 5, 1e300, -1e-300}
	ranges := [][2]float64{{0, 1}, {-1, 1}, {-math.MaxFloat64, math.MaxFloat64}, {2, 1}, {0, 0}, {1, 5}, {-inf, inf},
		{negZero, 0}, {negZero, negZero}, {0, negZero}, {-1, negZero}, {negZero, 1}}
	for _, r := range ranges {
		for _, x := range xs {
			want := math.Max(r[0], math.Min(r[1], x))
			got := clip(x, r[0], r[1])
			if math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
				t.Errorf("clip(%g, %g, %g) = %g, want %g", x, r[0], r[1], got, want)
			}
		}
	}
}
