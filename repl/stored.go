package repl

import (
	"context"
	"fmt"
	"path/filepath"
	"slices"

	"couplet/mdo/report"
	"couplet/mdo/store"
)

// WriteStored writes the output folder dir from the case stores that
// recorded the results a script published, when the process that ran
// the script can no longer write it (it died). Each result is rebuilt
// from its store (store.Result) and written with report.WriteRun into
// the result folder holding the store; then dir's summary.json and
// index.html list them, the last as the principal result, with the
// results the folder held before (a @report of the session, say: see
// report.WriteIndex). script is the study file's text. The study's
// system died with that process, so the design structure matrix is left
// out, and the coupling solvers are those the store recorded (a store
// written before it kept them: those an earlier report of the run
// recorded in its folder, else its record says they were not at hand);
// figures drawn from the result
// alone (the aircraft drawings of its best design) are kept. figures nil
// takes DefaultFigures; allOutputs writes every output to the CSV files
// (--every-output). It returns the principal result's folder.
func WriteStored(ctx context.Context, dir, script string, stores []string, figures []report.FigureSource, allOutputs bool) (string, error) {
	if figures == nil {
		figures = DefaultFigures()
	}
	var entries []report.IndexEntry
	for i, p := range stores {
		if slices.Contains(stores[i+1:], p) {
			continue // the index lists a result once, where it was last published
		}
		e, err := writeStored(ctx, dir, script, p, figures, allOutputs)
		if err != nil {
			return "", err
		}
		entries = append(entries, e)
	}
	if len(entries) == 0 {
		return "", nil
	}
	if _, err := report.WriteIndex(dir, entries); err != nil {
		return "", fmt.Errorf("repl: writing the index of %s: %w", dir, err)
	}
	return filepath.Join(dir, entries[len(entries)-1].Folder), nil
}

// writeStored writes the result folder of one case store.
func writeStored(ctx context.Context, dir, script, path string, figures []report.FigureSource, allOutputs bool) (report.IndexEntry, error) {
	st, err := store.Open(path)
	if err != nil {
		return report.IndexEntry{}, fmt.Errorf("repl: reading back a published result: %w", err)
	}
	defer st.Close()
	r, err := st.Result()
	if err != nil {
		return report.IndexEntry{}, fmt.Errorf("repl: reading back a published result: %w", err)
	}
	run := report.Run{Result: r, Store: st, Script: script, ToolVersion: toolVersion(), ScatterMatrix: isDOE(r), Figures: figures, AllOutputs: allOutputs}
	// the study's system died with the interpreter: the coupling solvers
	// are those the store recorded as the run began, else (a store
	// written before it kept them) those an earlier writing of this run's
	// folder recorded (a @report), if any
	if rec, err := st.StoredRecord(); err == nil && (len(rec.CouplingSolvers) > 0 || rec.SolverNote != "") {
		run.Solvers, run.SolverNote = rec.CouplingSolvers, rec.SolverNote
	} else if old, err := report.ReadRecord(filepath.Join(filepath.Dir(path), report.SummaryFile)); err == nil {
		now := store.NewSummary(r, store.SummaryOptions{})
		if old.Study == now.Study && old.Seed == now.Seed && old.Timestamps.Started == now.Timestamps.Started && (len(old.CouplingSolvers) > 0 || old.SolverNote != "") {
			run.Solvers, run.SolverNote = old.CouplingSolvers, old.SolverNote
		}
	}
	if _, err := report.WriteRun(ctx, filepath.Dir(path), run); err != nil {
		return report.IndexEntry{}, fmt.Errorf("repl: writing the published result of %s: %w", path, err)
	}
	folder, err := filepath.Rel(dir, filepath.Dir(path))
	if err != nil {
		return report.IndexEntry{}, fmt.Errorf("repl: %w", err)
	}
	rec, err := report.ReadRecord(filepath.Join(filepath.Dir(path), report.SummaryFile))
	if err != nil {
		return report.IndexEntry{}, fmt.Errorf("repl: %w", err)
	}
	return report.IndexEntry{Folder: folder, Summary: rec}, nil
}
