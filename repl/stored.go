package repl

import (
	"context"
	"fmt"

	"couplet/mdo/report"
	"couplet/mdo/store"
)

// WriteStored writes a run folder from the case store that recorded a
// published result, when the process that ran the script can no longer
// write it (it died): the result is rebuilt from the store
// (store.Result) and written with report.WriteRun, script being the study
// file's text. The study's system died with that process, so the design
// structure matrix is left out; figures drawn from the result alone (the
// aircraft drawings of its best design) are kept. figures nil takes
// DefaultFigures. It returns the summary written.
func WriteStored(ctx context.Context, dir, script, storePath string, figures []report.FigureSource) (*store.Summary, error) {
	st, err := store.Open(storePath)
	if err != nil {
		return nil, fmt.Errorf("repl: reading back the published result: %w", err)
	}
	defer st.Close()
	r, err := st.Result()
	if err != nil {
		return nil, fmt.Errorf("repl: reading back the published result: %w", err)
	}
	if figures == nil {
		figures = DefaultFigures()
	}
	run := report.Run{Result: r, Store: st, Script: script, ToolVersion: toolVersion(), ScatterMatrix: isDOE(r), Figures: figures}
	if _, err := report.WriteRun(ctx, dir, run); err != nil {
		return nil, fmt.Errorf("repl: writing the published result of %s: %w", storePath, err)
	}
	sum := store.NewSummary(r, store.SummaryOptions{Script: script, ToolVersion: toolVersion()})
	return &sum, nil
}
