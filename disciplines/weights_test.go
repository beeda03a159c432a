package disciplines

import (
	"testing"
)

// weightsDefaults returns the declared defaults of the weights inputs.
func weightsDefaults() []float64 {
	in := make([]float64, wtNumIn)
	for i, v := range NewWeights().Inputs() {
		in[i] = v.Default
	}
	return in
}

func TestWeightsDefaultsPrint(t *testing.T) {
	w := NewWeights()
	out := make([]float64, wtNumOut)
	if err := w.Compute(weightsDefaults(), out); err != nil {
		t.Fatal(err)
	}
	for i, v := range w.Outputs() {
		t.Logf("%s = %g %s", v.Name, out[i], v.Unit)
	}
}

func BenchmarkWeightsCompute(b *testing.B) {
	w := NewWeights()
	in := weightsDefaults()
	out := make([]float64, wtNumOut)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if err := w.Compute(in, out); err != nil {
			b.Fatal(err)
		}
	}
}
