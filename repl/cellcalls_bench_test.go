package repl

import (
	"context"
	"testing"
)

// BenchmarkCellFunctionCalls is the cost of 10 000 calls of a function
// a cell declares, from a loop of a cell: one that can panic (it indexes
// a slice, so it records its lines to place a panic), one that
// cannot (arithmetic alone, left as it is) and a function literal with
// a loop of its own (it registers its call, to place a stop), with the
// same function declared (which does not).
func BenchmarkCellFunctionCalls(b *testing.B) {
	for _, bc := range []struct{ name, fn string }{
		{"indexing", "func at(xs []float64, i int) float64 {\n\tv := xs[i%len(xs)]\n\treturn v * v\n}\nxs := []float64{1, 2, 3}\ncall := func(i int) float64 { return at(xs, i) }"},
		{"arithmetic", "func sq(x float64) float64 {\n\ty := x * x\n\treturn y + 1\n}\ncall := func(i int) float64 { return sq(float64(i)) }"},
		{"loop literal", "sum3 := func(x float64) float64 {\n\ty := 0.0\n\tfor k := 0; k < 3; k++ {\n\t\ty += x\n\t}\n\treturn y\n}\ncall := func(i int) float64 { return sum3(float64(i)) }"},
		{"loop declared", "func sum3(x float64) float64 {\n\ty := 0.0\n\tfor k := 0; k < 3; k++ {\n\t\ty += x\n\t}\n\treturn y\n}\ncall := func(i int) float64 { return sum3(float64(i)) }"},
	} {
		b.Run(bc.name, func(b *testing.B) {
			s, err := NewSession(Options{})
			if err != nil {
				b.Fatal(err)
			}
			defer s.Close()
			if c := s.Exec(context.Background(), bc.fn); c.Err != nil {
				b.Fatal(c.Err)
			}
			const loop = "total := 0.0\nfor i := 0; i < 10000; i++ {\n\ttotal += call(i)\n}\ntotal"
			b.ResetTimer()
			for b.Loop() {
				if c := s.Exec(context.Background(), loop); c.Err != nil {
					b.Fatal(c.Err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*10000), "ns/call")
		})
	}
}
