package optimizers

import (
	"context"
	"fmt"
	"testing"

	"couplet/disciplines"
	"couplet/mdo"
)

// benchGA runs a short GA (population 64, 5 generations: 384 analyses,
// cache off) on the study made by mk, with the given workers.
func benchGA(b *testing.B, mk func() (*mdo.Study, error), workers int) {
	b.Helper()
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		s, err := mk()
		if err != nil {
			b.Fatal(err)
		}
		s.Workers, s.Seed, s.CacheLimit = workers, 1, -1
		if _, err := (GA{Evolution: Evolution{Population: 64, Generations: 5}}).Minimize(context.Background(), s); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkGAPopulation measures GA generations, whose populations are
// evaluated as batches on the study's workers, with 1 and 2 workers: on
// Sellar (an analysis of a few microseconds, where the pool's overhead
// shows) and on the business jet (an analysis of about a millisecond).
func BenchmarkGAPopulation(b *testing.B) {
	bizjet := func() (*mdo.Study, error) { return bizjetStudy(disciplines.Swiftlet(), 45, 65) }
	for _, w := range []int{1, 2} {
		b.Run(fmt.Sprintf("sellar/workers=%d", w), func(b *testing.B) { benchGA(b, SellarMDF, w) })
	}
	for _, w := range []int{1, 2} {
		b.Run(fmt.Sprintf("bizjet/workers=%d", w), func(b *testing.B) { benchGA(b, bizjet, w) })
	}
}

// BenchmarkOptimizers measures each optimiser on Sellar (MDF).
func BenchmarkOptimizers(b *testing.B) {
	for _, o := range []Optimizer{NelderMead{}, CMAES{}, GA{}, DifferentialEvolution{}, ParticleSwarm{}} {
		b.Run(o.Name(), func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				s, err := SellarMDF()
				if err != nil {
					b.Fatal(err)
				}
				s.Seed, s.Workers = 1, 1
				if _, err := o.Minimize(context.Background(), s); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
