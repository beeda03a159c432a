package disciplines

import "testing"

func missionDefaults() []float64 {
	in := make([]float64, misNumIn)
	for i, v := range NewMission().Inputs() {
		in[i] = v.Default
	}
	return in
}

func TestMissionDefaultsPrint(t *testing.T) {
	m := NewMission()
	out := make([]float64, misNumOut)
	if err := m.Compute(missionDefaults(), out); err != nil {
		t.Fatal(err)
	}
	for i, v := range m.Outputs() {
		t.Logf("%s = %g %s", v.Name, out[i], v.Unit)
	}
}

func BenchmarkMissionCompute(b *testing.B) {
	m := NewMission()
	in := missionDefaults()
	out := make([]float64, misNumOut)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if err := m.Compute(in, out); err != nil {
			b.Fatal(err)
		}
	}
}
