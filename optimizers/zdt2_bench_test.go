package optimizers

import (
	"context"
	"testing"

	"couplet/mdo"
)

// zdt2 is problem ZDT2 (Zitzler, Deb & Thiele, 2000) with 30 variables in
// [0, 1]: f1 = x1, g = 1 + 9 Σᵢ₌₂ⁿ xᵢ/(n − 1), f2 = g (1 − (f1/g)²). Its
// Pareto front is the concave f2 = 1 − f1² (g = 1).
func zdt2() (*mdo.Study, error) {
	const n = 30
	lo, hi := make([]float64, n), make([]float64, n)
	for i := range hi {
		hi[i] = 1
	}
	s, _, err := funcStudy("zdt2", lo, hi, []string{"f1", "f2"},
		func(in, out []float64) error {
			sum := 0.0
			for _, x := range in[1:] {
				sum += x
			}
			g := 1 + 9*sum/float64(len(in)-1)
			q := in[0] / g
			out[0] = in[0]
			out[1] = g * (1 - q*q)
			return nil
		})
	if err != nil {
		return nil, err
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f1"), mdo.Minimize("f2")}
	return s, nil
}

// BenchmarkNSGA2ZDT2 runs NSGA-II (population 100, 1 999 generations:
// 200 000 evaluations) on ZDT2 with one worker and reports the size of
// the Pareto archive at the end.
func BenchmarkNSGA2ZDT2(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		s, err := zdt2()
		if err != nil {
			b.Fatal(err)
		}
		s.Seed, s.Workers = 1, 1
		r, err := (NSGA2{Evolution: Evolution{Population: 100, Generations: 1999}}).Minimize(context.Background(), s)
		if err != nil {
			b.Fatal(err)
		}
		if r.Evaluations+r.Repeats != 200000 {
			b.Fatalf("%v, want 200 000 points asked for", r.EvalCounters)
		}
		b.ReportMetric(float64(len(r.Front)), "front")
		b.ReportMetric(float64(r.Evaluations), "evaluations")
	}
}
