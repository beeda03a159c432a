package mdo

import (
	"context"
	"math"
	"testing"
	"time"
)

// BenchmarkSellarMDA measures one converged Sellar analysis per solver
// from the default start (x = 1, z = (5, 2), y = (1, 1)).
func BenchmarkSellarMDA(b *testing.B) {
	for _, m := range Methods() {
		b.Run(m.String(), func(b *testing.B) {
			benchSellar(b, m, 1e-10)
		})
	}
}

// sellarByHand is the floor of BenchmarkSellarOverhead: the analysis the
// framework runs on Sellar (Sellar, Batill & Renaud, 1996) written out.
// Plain Gauss–Seidel on the two coupled equations from y = (1, 1) at
// x = 1, z = (5, 2), until the largest change of y1, y2 in units of their
// scale is at most tol (the framework's test: scale max(|default|, 1) = 1),
// then the functions f, g1, g2 of sellar_functions. It returns them and
// the sweeps.
func sellarByHand(tol float64) (f, g1, g2 float64, sweeps int) {
	x, z1, z2 := 1.0, 5.0, 2.0
	y1, y2 := 1.0, 1.0
	for sweeps = 1; sweeps < 1000; sweeps++ {
		n1 := z1*z1 + z2 + x - 0.2*y2
		n2 := math.Sqrt(n1) + z1 + z2
		d := math.Max(math.Abs(n1-y1), math.Abs(n2-y2))
		y1, y2 = n1, n2
		if d <= tol {
			break
		}
	}
	return x*x + z2 + y1 + math.Exp(-y2), y1, y2, sweeps
}

// BenchmarkSellarOverhead runs the framework's plain Gauss–Seidel on
// Sellar and the hand-written loop of the same equations from the same
// start to the same tolerance (1e-10) in one binary: the ratio of their
// ns/op is the framework's overhead on tiny disciplines. The ratio
// sub-benchmark alternates batches of both (sellarBatch analyses each)
// and reports the ratio of the fastest batch of each: a batch that
// another process interrupts is slower, never faster, so the fastest
// ones are those that ran alone, and the ratio holds on a loaded machine.
func BenchmarkSellarOverhead(b *testing.B) {
	const tol = 1e-10
	b.Run("framework", func(b *testing.B) { benchSellar(b, GaussSeidel, tol) })
	b.Run("ratio", func(b *testing.B) {
		const sellarBatch = 50
		w := sellarWorkspace(b, GaussSeidel, tol)
		ctx := context.Background()
		framework, hand := time.Duration(math.MaxInt64), time.Duration(math.MaxInt64)
		var sum float64
		for b.Loop() {
			t0 := time.Now()
			for range sellarBatch {
				if err := w.Analyze(ctx); err != nil {
					b.Fatal(err)
				}
			}
			t1 := time.Now()
			for range sellarBatch {
				f, g1, g2, _ := sellarByHand(tol)
				sum += f + g1 + g2
			}
			framework, hand = min(framework, t1.Sub(t0)), min(hand, time.Since(t1))
		}
		if math.IsNaN(sum) {
			b.Fatal("NaN")
		}
		b.ReportMetric(float64(framework)/sellarBatch, "framework-ns")
		b.ReportMetric(float64(hand)/sellarBatch, "by-hand-ns")
		b.ReportMetric(float64(framework)/float64(hand), "framework/by-hand")
	})
	b.Run("by-hand", func(b *testing.B) {
		b.ReportAllocs()
		var sweeps int
		var sum float64
		for b.Loop() {
			var f, g1, g2 float64
			f, g1, g2, sweeps = sellarByHand(tol)
			sum += f + g1 + g2
		}
		if math.IsNaN(sum) {
			b.Fatal("NaN")
		}
		b.ReportMetric(float64(sweeps), "iterations")
	})
}

// sellarWorkspace returns a workspace of Sellar with solver m to tol.
func sellarWorkspace(tb testing.TB, m Method, tol float64) *Workspace {
	sys, err := NewSystem(Sellar()...)
	if err != nil {
		tb.Fatal(err)
	}
	if err := sys.SetSolver(SolverSettings{Method: m, Tolerance: tol}); err != nil {
		tb.Fatal(err)
	}
	return sys.NewWorkspace()
}

// benchSellar measures converged Sellar analyses with solver m to tol
// from the default start.
func benchSellar(b *testing.B, m Method, tol float64) {
	w := sellarWorkspace(b, m, tol)
	ctx := context.Background()
	b.ReportAllocs()
	for b.Loop() {
		if err := w.Analyze(ctx); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(w.CouplingReports()[0].CouplingIterations), "iterations")
}

// TestSellarByHandIsTheFramework checks that the floor of
// BenchmarkSellarOverhead computes what the framework computes: the same
// f, g1, g2 to 1e-12 and the same number of sweeps.
func TestSellarByHandIsTheFramework(t *testing.T) {
	const tol = 1e-10
	w := sellarWorkspace(t, GaussSeidel, tol)
	if err := w.Analyze(context.Background()); err != nil {
		t.Fatal(err)
	}
	f, g1, g2, sweeps := sellarByHand(tol)
	for _, c := range []struct {
		name string
		hand float64
	}{{"f", f}, {"g1", g1}, {"g2", g2}} {
		if got := w.Get(c.name); math.Abs(got-c.hand) > 1e-12 {
			t.Errorf("%s: framework %.15g, by hand %.15g", c.name, got, c.hand)
		}
	}
	if it := w.CouplingReports()[0].CouplingIterations; it != sweeps {
		t.Errorf("framework %d iterations, by hand %d sweeps", it, sweeps)
	}
}
