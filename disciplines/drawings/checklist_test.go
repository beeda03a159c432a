package drawings

import (
	"context"
	"strings"
	"testing"

	"couplet/disciplines"
	"couplet/mdo"
)

// The checklist notes of an aircraft study: a heading for the best design
// and one line per rule, the flagged rules marked, as the disciplines
// checklist of the best design's recorded outputs gives them; a study
// that is not of an aircraft gets none.
func TestChecklistNotes(t *testing.T) {
	r, st := shortJetRun(t, nil)
	figs, notes := Checklist(context.Background(), r, st)
	if len(figs) != 0 {
		t.Errorf("%d figures, want none", len(figs))
	}
	want := disciplines.ResultChecklists(r)
	if len(want) != 1 || len(notes) != 1+len(want[0].Checklist) {
		t.Fatalf("%d notes for %d checklists", len(notes), len(want))
	}
	if !strings.HasPrefix(notes[0], "Designer's checklist, best design #") {
		t.Errorf("heading %q", notes[0])
	}
	flagged := 0
	for i, row := range want[0].Checklist {
		if notes[1+i] != "  "+row.Line() {
			t.Errorf("note %d = %q, want %q", 1+i, notes[1+i], row.Line())
		}
		if strings.Contains(notes[1+i], ": FLAG") {
			flagged++
		}
	}
	if flagged != len(want[0].Flagged()) {
		t.Errorf("%d lines flagged, checklist flags %d", flagged, len(want[0].Flagged()))
	}
	if _, notes := Checklist(context.Background(), &mdo.Result{}, nil); len(notes) != 0 {
		t.Errorf("empty result: notes %v", notes)
	}
}
