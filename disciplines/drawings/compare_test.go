package drawings

import (
	"bytes"
	"context"
	"slices"
	"strings"
	"testing"

	"couplet/disciplines"
	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/report"
)

// A comparison of two aircraft results and one that is not an aircraft:
// the flags are the best designs' checklists, the planform overlay draws
// the two aircraft and a note names the other.
func TestCompareOptions(t *testing.T) {
	jet, _ := shortJetRun(t, nil)
	other, _ := shortJetRun(t, []mdo.Constraint{mdo.AtMost("perf.takeoff_field_length", 1800)})
	other.Study = "short jet, field limit"
	sellar, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	sellar.Workers = 1
	ev, err := sellar.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.EvaluateOne(context.Background(), []float64{0.1, 0.6, 0.1}); err != nil {
		t.Fatal(err)
	}
	sr, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		t.Fatal(err)
	}
	// flags: the rows of the best design's checklist
	want := disciplines.ResultChecklists(jet)
	flags := CompareFlags(jet)
	if len(want) == 0 || len(flags) != len(want[0].Checklist) {
		t.Fatalf("%d flags for a checklist of %d rows", len(flags), len(want[0].Checklist))
	}
	for i, row := range want[0].Checklist {
		if f := flags[i]; f.Rule != row.Rule || f.Value != row.Value || f.Pass != row.Pass || f.Unit != row.Unit {
			t.Errorf("flag %d = %+v, want the row %+v", i, f, row)
		}
	}
	if CompareFlags(sr) != nil {
		t.Error("a result that is not of an aircraft has checklist flags")
	}
	cs, err := report.ComparedResults(jet, other, sr)
	if err != nil {
		t.Fatal(err)
	}
	figs, notes := PlanformOverlay(context.Background(), cs)
	if len(figs) != 1 || figs[0].Name != "overlay_planform" || figs[0].Reason != nil {
		t.Fatalf("figures %v", figs)
	}
	var svg bytes.Buffer
	if err := figs[0].WriteSVG(&svg); err != nil {
		t.Fatal(err)
	}
	words, err := plot.SVGText(svg.Bytes())
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"short_jet", "short jet, field limit"} {
		if !slices.Contains(words, w) {
			t.Errorf("the overlay does not name %q: %q", w, words)
		}
	}
	if slices.Contains(words, "sellar") {
		t.Errorf("the overlay draws the Sellar result: %q", words)
	}
	if len(notes) != 1 || !strings.Contains(notes[0], "sellar left out: not aircraft results") {
		t.Errorf("notes %q", notes)
	}
	// without an aircraft there is nothing to draw, and nothing to say
	if figs, notes := PlanformOverlay(context.Background(), cs[2:]); len(figs) != 0 || len(notes) != 0 {
		t.Errorf("a comparison without an aircraft got %v and %q", figs, notes)
	}
}
