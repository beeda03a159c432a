package report

import (
	"fmt"
	"os"
	"path/filepath"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/store"
)

// RunFiles says what WriteRun writes besides summary.json and
// report.html.
type RunFiles struct {
	// Store is the run's case store (already ended by the optimiser); its
	// evaluations feed the standard plots and the CSV export. Nil leaves
	// those out.
	Store *store.Store
	// Script and ToolVersion go into the summary and the report.
	Script, ToolVersion string
	// Figures are the plots the study asked for; each is saved as
	// NAME.svg and NAME.png and embedded in the report.
	Figures []*plot.Figure
	// StandardPlots also saves the standard plots (history, parallel
	// coordinates, Pareto front) as files.
	StandardPlots bool
	// ScatterMatrix adds the scatter matrix (for a design of experiments).
	ScatterMatrix bool
	// CSV writes evaluations.csv from the store.
	CSV bool
}

// WriteRun writes a finished run's files into dir (created if needed):
// summary.json, report.html, and as asked evaluations.csv and the plots.
// It returns the files written.
func WriteRun(dir string, r *mdo.Result, f RunFiles) ([]string, error) {
	if r == nil {
		return nil, fmt.Errorf("report: WriteRun(%s): the result is nil", dir)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("report: output folder: %w", err)
	}
	var files []string
	p := filepath.Join(dir, "summary.json")
	if err := store.WriteSummary(p, r, store.SummaryOptions{Script: f.Script, ToolVersion: f.ToolVersion}); err != nil {
		return files, err
	}
	files = append(files, p)
	var evs []*mdo.Evaluation
	if f.Store != nil {
		var err error
		if evs, err = f.Store.Evaluations(); err != nil {
			return files, err
		}
		if f.CSV {
			p := filepath.Join(dir, "evaluations.csv")
			out, err := os.Create(p)
			if err != nil {
				return files, fmt.Errorf("report: %w", err)
			}
			if err := f.Store.WriteCSV(out); err != nil {
				out.Close()
				return files, err
			}
			if err := out.Close(); err != nil {
				return files, fmt.Errorf("report: %w", err)
			}
			files = append(files, p)
		}
	}
	figs := append([]*plot.Figure(nil), f.Figures...)
	if f.StandardPlots && len(evs) > 0 {
		std, _ := standardFigures(r, Options{Evaluations: evs, ScatterMatrix: f.ScatterMatrix})
		figs = append(std, figs...)
	}
	saved, err := plot.SaveAll(dir, figs...)
	files = append(files, saved...)
	if err != nil {
		return files, err
	}
	p = filepath.Join(dir, "report.html")
	opt := Options{Script: f.Script, ToolVersion: f.ToolVersion, Evaluations: evs, ScatterMatrix: f.ScatterMatrix, Figures: f.Figures}
	if err := WriteFile(p, r, opt); err != nil {
		return files, err
	}
	return append(files, p), nil
}
