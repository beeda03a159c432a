package mdo

import (
	"context"
	"testing"
)

// BenchmarkSellarMDA measures one converged Sellar analysis per solver
// from the default start (x = 1, z = (5, 2), y = (1, 1)).
func BenchmarkSellarMDA(b *testing.B) {
	for _, m := range Methods() {
		b.Run(m.String(), func(b *testing.B) {
			sys, err := NewSystem(Sellar()...)
			if err != nil {
				b.Fatal(err)
			}
			if err := sys.SetSolver(SolverSettings{Method: m, Tolerance: 1e-10}); err != nil {
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
		})
	}
}
