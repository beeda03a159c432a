package drawings

import (
	"context"
	"fmt"

	"couplet/disciplines"
	"couplet/mdo"
	"couplet/mdo/plot"
)

// Checklist returns, as report notes, the designer's checklist
// (disciplines.ResultChecklists) of the best design and of each design on
// the front of an aircraft study: for each design a heading line with the
// count of flagged rules, then one line per rule with its value, band,
// flag and source. It draws no figure; a result that is not of an
// aircraft gets no notes. Its signature is that of report.FigureSource,
// the hook through which a run folder gets a study's further output.
func Checklist(_ context.Context, r *mdo.Result, _ *mdo.Study) (figs []*plot.Figure, notes []string) {
	for _, lc := range disciplines.ResultChecklists(r) {
		notes = append(notes, fmt.Sprintf("Designer's checklist, %s: %d of %d rules of thumb flagged (flags, not constraints).",
			lc.Label, len(lc.Flagged()), len(lc.Checklist)))
		for _, row := range lc.Checklist {
			notes = append(notes, "  "+row.Line())
		}
	}
	return nil, notes
}
