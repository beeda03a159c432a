package disciplines

import "testing"

func stabilityDefaults() []float64 {
	in := make([]float64, stNumIn)
	for i, v := range NewStability().Inputs() {
		in[i] = v.Default
	}
	return in
}

func TestStabilityDefaultsPrint(t *testing.T) {
	s := NewStability()
	out := make([]float64, stNumOut)
	if err := s.Compute(stabilityDefaults(), out); err != nil {
		t.Fatal(err)
	}
	for i, v := range s.Outputs() {
		t.Logf("%s = %g %s", v.Name, out[i], v.Unit)
	}
}

func BenchmarkStabilityCompute(b *testing.B) {
	s := NewStability()
	in := stabilityDefaults()
	out := make([]float64, stNumOut)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if err := s.Compute(in, out); err != nil {
			b.Fatal(err)
		}
	}
}
