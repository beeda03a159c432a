package optimizers

import (
	"context"
	"testing"
)

// BenchmarkPSOPressureVessel is the budget row of the speed issue: the
// default particle swarm (80 particles on its 4 variables) on the
// pressure vessel for at most 4 999 generations after the first and
// 200 000 evaluations, the budget that ends it. It reports the
// analyses and repeats of a run and the best cost found; with the
// fresh-point rule every point asked for is analysed.
func BenchmarkPSOPressureVessel(b *testing.B) {
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		s, err := PressureVessel()
		if err != nil {
			b.Fatal(err)
		}
		s.Seed, s.Workers = 1, 1
		res, err := ParticleSwarm{Evolution: Evolution{Generations: 4999, MaxEvaluations: 200000}}.Minimize(context.Background(), s)
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(res.Analyses), "analyses/op")
		b.ReportMetric(float64(res.Repeats), "repeats/op")
		b.ReportMetric(res.Objective(), "best-cost")
	}
}
