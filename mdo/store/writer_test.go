package store

import (
	"testing"

	"couplet/mdo"
)

// The text an encoded batch binds is its own: encoding the next batch
// into the same buffers leaves the rows of the previous one unchanged, so
// nothing depends on the driver copying bound text before the buffers are
// reused.
func TestEncodedRowsOwnTheirText(t *testing.T) {
	evs := make([]mdo.Evaluation, 6)
	for i := range evs {
		syntheticEval(&evs[i], i)
	}
	b := &encBatch{evs: []*mdo.Evaluation{&evs[0], &evs[1], &evs[2]}}
	b.encode()
	first := append([]encRow(nil), b.rows...)
	var want []string
	for _, r := range first {
		want = append(want, string([]byte(r.numbers)), string([]byte(r.outputs)))
	}
	b.evs = []*mdo.Evaluation{&evs[3], &evs[4], &evs[5]}
	b.encode()
	for i, r := range first {
		if r.numbers != want[2*i] || r.outputs != want[2*i+1] {
			t.Errorf("row %d of the first batch changed when the next was encoded:\n numbers %q, was %q\n outputs %q, was %q", i, r.numbers, want[2*i], r.outputs, want[2*i+1])
		}
	}
	if b.rows[0].numbers == first[0].numbers {
		t.Errorf("the two batches encoded the same numbers %q; the test needs different evaluations", first[0].numbers)
	}
}
