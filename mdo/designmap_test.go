package mdo

import (
	"math"
	"testing"
)

// TestDesignMapExact checks that designMap tells designs apart bit by bit
// and stays exact when two designs share a hash (the overflow map).
func TestDesignMapExact(t *testing.T) {
	var m designMap[int]
	a := []float64{0.5, 1, 2}
	negZero := []float64{math.Copysign(0, -1), 1, 2}
	zero := []float64{0, 1, 2}
	m.put(a, 1)
	m.put(zero, 2)
	if v, ok := m.get([]float64{0.5, 1, 2}); !ok || v != 1 {
		t.Errorf("get(a) = %d, %v; want 1, true", v, ok)
	}
	if _, ok := m.get(negZero); ok {
		t.Errorf("−0 found as 0: designs are compared bit by bit")
	}
	if _, ok := m.get(a[:2]); ok {
		t.Errorf("a prefix of a design found as the design")
	}
	// b takes a's place in the hash table as if their hashes were equal:
	// a then goes to the overflow map when put again
	b := []float64{7, 8, 9}
	m.first[hashDesign(a)] = designEntry[int]{d: b, v: 3}
	m.put(a, 4)
	if v, ok := m.get(a); !ok || v != 4 {
		t.Errorf("get(a) after a collision = %d, %v; want 4, true", v, ok)
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
	m.put(zero, 5)
	if v, _ := m.get(zero); v != 5 || m.len() != 3 {
		t.Errorf("put of a design held: value %d, len %d; want 5, 3", v, m.len())
	}
	m.reset()
	if _, ok := m.get(zero); ok || m.len() != 0 {
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
