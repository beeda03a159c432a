package mdo

import (
	"math"
	"testing"
)

// TestDesignMapExact checks that designMap tells designs apart bit by bit
// and stays exact when two designs share a hash (the overflow map).
func TestDesignMapExact(t *testing.T) {
	designs := [][]float64{
		{0.5, 1, 2},
		{0, 1, 2},
		{7, 8, 9},
	}
	m := designMap[int]{design: func(i int) []float64 { return designs[i] }}
	a, zero, b := 0, 1, 2
	m.put(designs[a], a)
	m.put(designs[zero], zero)
	if v, ok := m.get([]float64{0.5, 1, 2}); !ok || v != a {
		t.Errorf("get(a) = %d, %v; want %d, true", v, ok, a)
	}
	if _, ok := m.get([]float64{math.Copysign(0, -1), 1, 2}); ok {
		t.Errorf("−0 found as 0: designs are compared bit by bit")
	}
	if _, ok := m.get(designs[a][:2]); ok {
		t.Errorf("a prefix of a design found as the design")
	}
	// b takes a's place in the hash table as if their hashes were equal:
	// a then goes to the overflow map when put again
	m.first[hashDesign(designs[a])] = b
	m.put(designs[a], a)
	if v, ok := m.get(designs[a]); !ok || v != a {
		t.Errorf("get(a) after a collision = %d, %v; want %d, true", v, ok, a)
	}
	if len(m.more) != 1 {
		t.Errorf("overflow holds %d designs, want 1", len(m.more))
	}
	if _, ok := m.get([]float64{7, 8, 10}); ok {
		t.Errorf("a design never put found")
	}
	if n := m.len(); n != 3 {
		t.Errorf("len = %d, want 3", n)
	}
	m.put(designs[zero], zero)
	if v, _ := m.get(designs[zero]); v != zero || m.len() != 3 {
		t.Errorf("put of a design held: value %d, len %d; want %d, 3", v, m.len(), zero)
	}
	m.reset()
	if _, ok := m.get(designs[zero]); ok || m.len() != 0 {
		t.Errorf("reset left %d designs", m.len())
	}
}

// TestEvaluationSlicesCapped checks that an Evaluation's slices, which
// share one array, cannot write into each other when appended to.
func TestEvaluationSlicesCapped(t *testing.T) {
	s, err := SellarStudy(MDF)
	if err != nil {
		t.Fatal(err)
	}
	e, err := s.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	ev, err := e.EvaluateOne(t.Context(), e.Start())
	if err != nil {
		t.Fatal(err)
	}
	design := append([]float64(nil), ev.Design...)
	objectives := append([]float64(nil), ev.Objectives...)
	_ = append(ev.X, -1)
	_ = append(ev.F, -1)
	_ = append(ev.G, -1)
	if !sameBits(ev.Design, design) || !sameBits(ev.Objectives, objectives) {
		t.Errorf("an append to X, F or G changed Design %v → %v or Objectives %v → %v", design, ev.Design, objectives, ev.Objectives)
	}
	if len(ev.Outputs) != len(e.OutputVars()) {
		t.Errorf("%d outputs, want %d", len(ev.Outputs), len(e.OutputVars()))
	}
}
