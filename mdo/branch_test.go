package mdo

import (
	"context"
	"math"
	"testing"
)

// twoBranches is the loop y2 = 1 + 0.2·y1², y1 = y2: the fixed points are
// W = (1 ± √0.2)/0.4, a stable one at 1.382 (loop gain 0.4·W = 0.55)
// and a runaway one at 3.618 (gain 1.45).
func twoBranches(t *testing.T) *System {
	t.Helper()
	y1 := Var{Name: "y1", Default: 3.5, Min: 0, Max: 100}
	y2 := Var{Name: "y2", Default: 3.5, Min: 0, Max: 100}
	sys, err := NewSystem(
		FuncVars("pass", []Var{y2}, []Var{y1}, func(in, out []float64) error { out[0] = in[0]; return nil }),
		FuncVars("grow", []Var{y1}, []Var{y2}, func(in, out []float64) error { out[0] = 1 + 0.2*in[0]*in[0]; return nil }),
	)
	if err != nil {
		t.Fatal(err)
	}
	return sys
}

func TestRunawayBranchRejected(t *testing.T) {
	stable := (1 - math.Sqrt(0.2)) / 0.4
	for _, m := range Methods() {
		sys := twoBranches(t)
		if err := sys.SetSolver(SolverSettings{Method: m}); err != nil {
			t.Fatal(err)
		}
		// from 3.5, Newton's nearest root is the runaway one
		w := sys.NewWorkspace()
		if err := w.Analyze(context.Background()); err != nil {
			t.Fatalf("%s: %v", m, err)
		}
		if y, _ := w.Lookup("y1"); math.Abs(y-stable) > 1e-8 {
			t.Errorf("%s: y1 = %.10g (path %s), want the stable branch %.10g", m, y, w.Path(), stable)
		}
	}
}

func TestRunawayBranchReportedWithoutFallback(t *testing.T) {
	sys := twoBranches(t)
	if err := sys.SetSolver(SolverSettings{Method: Newton, NoFallback: true}); err != nil {
		t.Fatal(err)
	}
	err := sys.NewWorkspace().Analyze(context.Background())
	be, ok := err.(*BranchError)
	if !ok || be.Gain < 1.2 || be.Gain > 1.7 || Classify(err) != DoesNotClose {
		t.Fatalf("want a BranchError with gain about 1.45, got %v", err)
	}
}

// hiddenRunaway is the affine loop x ← c + J x of two coupling variables
// (p, q), J = V diag(0.2, 1.1) V⁻¹ with eigenvectors (1, 1.1) and
// (1, −0.9): its one fixed point is unstable (gain 1.1), but the branch
// check's push, (1, 1) in units of the scales, is 95 % the stable mode
// and 5 % the growing one, so the largest displacement shrinks for
// three sweeps (1, 0.245, 0.0985, 0.074) before it grows (0.0747, then
// by 1.1 a sweep). The eigenvalues are exact by construction.
func hiddenRunaway(t *testing.T) *System {
	t.Helper()
	v := func(name string) Var { return Var{Name: name, Default: 0, Min: -1e6, Max: 1e6} }
	p, q, u, w := v("p"), v("q"), v("u"), v("w")
	sys, err := NewSystem(
		FuncVars("mix", []Var{u, w}, []Var{p, q}, func(in, out []float64) error {
			out[0] = 1 + 0.695*in[0] - 0.45*in[1]
			out[1] = 1 - 0.4455*in[0] + 0.605*in[1]
			return nil
		}),
		FuncVars("pass", []Var{p, q}, []Var{u, w}, func(in, out []float64) error { out[0], out[1] = in[0], in[1]; return nil }),
	)
	if err != nil {
		t.Fatal(err)
	}
	return sys
}

// TestBranchCheckSeesHiddenGrowth: the short check's ratio of the last
// two displacements (0.75 after three sweeps) would accept the unstable
// fixed point of hiddenRunaway; the Ritz values of the displacements
// after ritzSweeps sweeps (0.2 and 1.1, exact in two dimensions) send it
// on to the full check, which measures the gain 1.1 and rejects it.
func TestBranchCheckSeesHiddenGrowth(t *testing.T) {
	sys := hiddenRunaway(t)
	if err := sys.SetSolver(SolverSettings{Method: Newton, NoFallback: true}); err != nil {
		t.Fatal(err)
	}
	err := sys.NewWorkspace().Analyze(context.Background())
	be, ok := err.(*BranchError)
	if !ok || math.Abs(be.Gain-1.1) > 0.01 || Classify(err) != DoesNotClose {
		t.Fatalf("want a BranchError with gain 1.1 (the growing mode's eigenvalue), got %v", err)
	}
}

// TestRitzGain checks ritzGain on displacements of known linear maps:
// Ritz values on a Krylov space that is invariant are eigenvalues
// (Saad, Numerical Methods for Large Eigenvalue Problems, 2nd ed. 2011,
// ch. 6, from memory), so a space that holds every mode gives the
// largest eigenvalue's real part exactly.
func TestRitzGain(t *testing.T) {
	cases := []struct {
		label string
		j     [][]float64 // the map
		d0    []float64
		want  float64
	}{
		{"hiddenRunaway's loop: the growing mode 5 % of the push", [][]float64{{0.695, -0.45}, {-0.4455, 0.605}}, []float64{1, 1}, 1.1},
		{"a contraction with a rotation: 0.5 ± 0.6i and 0.3", [][]float64{{0.5, -0.6, 0}, {0.6, 0.5, 0}, {0, 0, 0.3}}, []float64{1, 2, 3}, 0.5},
		{"triangular: eigenvalues 0.9, 0.4, -1.3", [][]float64{{0.9, 5, 1}, {0, 0.4, 2}, {0, 0, -1.3}}, []float64{1, 1, 1}, 0.9},
		{"one mode of four excited: 0.7", [][]float64{{0.7, 0, 0, 0}, {0, 1.5, 0, 0}, {0, 0, 2, 0}, {0, 0, 0, 3}}, []float64{1, 0, 0, 0}, 0.7},
		{"nothing moves", [][]float64{{0, 0}, {0, 0}}, []float64{1, 1}, 0},
	}
	for _, c := range cases {
		nt := len(c.d0)
		b := newBranchScratch(nt)
		copy(b.d, c.d0)
		for k := 1; k <= ritzSweeps; k++ {
			prev, next := b.d[(k-1)*nt:k*nt], b.d[k*nt:(k+1)*nt]
			for i := range next {
				next[i] = 0
				for l := range prev {
					next[i] += c.j[i][l] * prev[l]
				}
			}
		}
		if g := b.ritzGain(nt, ritzSweeps); math.Abs(g-c.want) > 1e-9 {
			t.Errorf("%s: ritzGain = %.12g, want %g", c.label, g, c.want)
		}
	}
}
