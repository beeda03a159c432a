package mdo

import (
	"context"
	"math"
	"testing"
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

// sellarByHand is the floor of BenchmarkSellarOverhead: plain
// Gauss–Seidel on the two Sellar equations (Sellar, Batill & Renaud,
// 1996) written out, from y = (1, 1) at x = 1, z = (5, 2), until the
// largest change of y1, y2 relative to max(1, |y|) is below tol. It
// returns the state and the sweeps.
func sellarByHand(tol float64) (y1, y2 float64, sweeps int) {
	x, z1, z2 := 1.0, 5.0, 2.0
	y1, y2 = 1, 1
	for sweeps = 1; sweeps < 1000; sweeps++ {
		n1 := z1*z1 + z2 + x - 0.2*y2
		n2 := math.Sqrt(n1) + z1 + z2
		d := math.Max(math.Abs(n1-y1)/math.Max(1, math.Abs(n1)), math.Abs(n2-y2)/math.Max(1, math.Abs(n2)))
		y1, y2 = n1, n2
		if d < tol {
			break
		}
	}
	return y1, y2, sweeps
}

// BenchmarkSellarOverhead runs the framework's plain Gauss–Seidel on
// Sellar and the hand-written loop of the same equations from the same
// start to the same tolerance (1e-10) in one binary: the ratio of their
// ns/op is the framework's overhead on tiny disciplines.
func BenchmarkSellarOverhead(b *testing.B) {
	const tol = 1e-10
	b.Run("framework", func(b *testing.B) { benchSellar(b, GaussSeidel, tol) })
	b.Run("by-hand", func(b *testing.B) {
		b.ReportAllocs()
		var sweeps int
		var y float64
		for b.Loop() {
			var y1, y2 float64
			y1, y2, sweeps = sellarByHand(tol)
			y += y1 + y2
		}
		if math.IsNaN(y) {
			b.Fatal("NaN")
		}
		b.ReportMetric(float64(sweeps), "iterations")
	})
}

// benchSellar measures converged Sellar analyses with solver m to tol
// from the default start.
func benchSellar(b *testing.B, m Method, tol float64) {
	sys, err := NewSystem(Sellar()...)
	if err != nil {
		b.Fatal(err)
	}
	if err := sys.SetSolver(SolverSettings{Method: m, Tolerance: tol}); err != nil {
		b.Fatal(err)
	}
	w := sys.NewWorkspace()
	ctx := context.Background()
	b.ReportAllocs()
	for b.Loop() {
		if err := w.Analyze(ctx); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(w.CouplingReports()[0].CouplingIterations), "iterations")
}
