package report

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/runfolder"
	"couplet/mdo/store"
)

// The names of the files WriteRun writes into a run folder (the plots
// add NAME.svg and NAME.png for each figure drawn).
const (
	SummaryFile     = "summary.json"
	ReportFile      = "report.html"
	EvaluationsFile = "evaluations.csv"
	// StoreFile is a result's case store (written by the application's
	// recorder, not by WriteRun); a script's folder links its principal
	// result's under the same name (WriteIndex).
	StoreFile = "results.db"
)

// FigureSource draws a study's further figures for its run folder from
// the result and, when known, the study (nil otherwise). A figure that
// cannot be drawn is returned as plot.LeftOut with the reason; notes are
// further lines for the report. It is the hook through which an
// application adds its own pictures, unknown to the writer. WriteRun
// hands a source the run's recorded evaluations through ctx (see
// Evaluations).
type FigureSource func(ctx context.Context, r *mdo.Result, st *mdo.Study) (figs []*plot.Figure, notes []string)

// Run is a finished run to be written as a run folder by WriteRun.
type Run struct {
	// Result is the study's result. A nil Result writes summary.json
	// alone, saying the script handed over no result (Name, Seed, Cells).
	Result *mdo.Result
	// Study, if not nil, is the study of the result: the design structure
	// matrix of its system is drawn, and Figures receive it.
	Study *mdo.Study
	// Store, if not nil, is the run's case store (ended by the
	// optimiser): its evaluations go to evaluations.csv and feed the
	// standard plots.
	Store *store.Store
	// Script and ToolVersion go into the summary and the report.
	Script, ToolVersion string
	// ScatterMatrix adds the scatter matrix to the report (for a design
	// of experiments).
	ScatterMatrix bool
	// AllOutputs writes every output of the analyses to evaluations.csv;
	// by default it holds the status, design, objectives, constraints and
	// margins (results.db keeps every output either way).
	AllOutputs bool
	// Figures are the sources of the study's further figures, drawn after
	// the standard ones and before the design structure matrix.
	Figures []FigureSource
	// Notes are extra lines for the report.
	Notes []string
	// Name, Seed and Cells describe a run without a result.
	Name  string
	Seed  uint64
	Cells int
	// Started is the start of a run without a result.
	Started time.Time
}

// WriteRun writes a run's folder dir (created if need be): summary.json;
// with a store, evaluations.csv; the history and, for several
// objectives, the Pareto front, the further figures of the study and its
// design structure matrix, each as NAME.svg and NAME.png; and
// report.html, which embeds those and the parallel coordinates (and the
// scatter matrix if asked). A figure that cannot be drawn is left out
// with the reason written in its place in the report; the rest is still
// written. Every file is written atomically and never through a symbolic
// link. It returns the files written.
func WriteRun(ctx context.Context, dir string, run Run) ([]string, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("report: output folder: %w", err)
	}
	var files []string
	r := run.Result
	sopt := store.SummaryOptions{Script: run.Script, ToolVersion: run.ToolVersion}
	p := filepath.Join(dir, SummaryFile)
	if r == nil {
		started := run.Started
		if started.IsZero() {
			started = time.Now()
		}
		if err := store.WriteSummary(p, store.NoResultSummary(run.Name, run.Seed, run.Cells, started, sopt)); err != nil {
			return nil, fmt.Errorf("report: %w", err)
		}
		return []string{p}, nil
	}
	if err := store.WriteSummary(p, store.NewSummary(r, sopt)); err != nil {
		return nil, fmt.Errorf("report: %w", err)
	}
	files = append(files, p)
	var evs []*mdo.Evaluation
	if run.Store != nil {
		var err error
		if evs, err = run.Store.Evaluations(); err != nil {
			return files, fmt.Errorf("report: %w", err)
		}
		var b bytes.Buffer
		if err := run.Store.WriteCSVOf(&b, evs, store.CSVOptions{AllOutputs: run.AllOutputs}); err != nil {
			return files, fmt.Errorf("report: %w", err)
		}
		p := filepath.Join(dir, EvaluationsFile)
		if err := runfolder.WriteFile(p, b.Bytes()); err != nil {
			return files, fmt.Errorf("report: %w", err)
		}
		files = append(files, p)
	}
	// saved as files: the history (and front) and the further figures
	var saved, extra []*plot.Figure
	notes := append(append([]string(nil), r.Notes...), run.Notes...)
	if len(evs) > 0 {
		saved = append(saved, drawn("history", "optimisation history", func() (*plot.Figure, error) { return plot.History(r, evs) }))
		if len(r.Objectives) > 1 {
			saved = append(saved, drawn("pareto", "Pareto front", func() (*plot.Figure, error) { return plot.Pareto(r, evs) }))
		}
	}
	sctx := context.WithValue(ctx, evaluationsKey{}, evs)
	for _, src := range run.Figures {
		figs, n := src(sctx, r, run.Study)
		extra = append(extra, figs...)
		notes = append(notes, n...)
	}
	if len(evs) > 0 && r.Failed > 0 {
		// where each class of failed analysis falls in the design space
		extra = append(extra, drawn("failures", "failed analyses by class", func() (*plot.Figure, error) { return plot.FailureMap(r, evs) }))
	}
	if run.Study != nil && run.Study.System != nil {
		extra = append(extra, drawn("dsm", "design structure matrix", func() (*plot.Figure, error) { return plot.DSM(run.Study.System) }))
	}
	for _, figs := range [][]*plot.Figure{saved, extra} {
		written, err := saveFigures(dir, figs)
		files = append(files, written...)
		if err != nil {
			return files, err
		}
	}
	p = filepath.Join(dir, ReportFile)
	opt := Options{Script: run.Script, ToolVersion: run.ToolVersion, Evaluations: evs, ScatterMatrix: run.ScatterMatrix, Figures: extra, Notes: notes}
	if err := WriteFile(p, r, opt); err != nil {
		return files, err
	}
	return append(files, p), nil
}

// evaluationsKey keys the run's evaluations in a FigureSource's context.
type evaluationsKey struct{}

// Evaluations returns the run's recorded evaluations that WriteRun hands
// its FigureSources through their context (nil when the run has no
// store, or ctx is not a source's).
func Evaluations(ctx context.Context) []*mdo.Evaluation {
	evs, _ := ctx.Value(evaluationsKey{}).([]*mdo.Evaluation)
	return evs
}

// saveFigures writes each figure that can be drawn into dir as
// NAME.svg and NAME.png (saveFigure); one that fails as it is drawn is
// replaced in figs by its stand-in with the reason. err is a failure to
// write.
func saveFigures(dir string, figs []*plot.Figure) (files []string, err error) {
	for i, f := range figs {
		if f == nil || f.Reason != nil {
			continue
		}
		written, drawErr, err := saveFigure(dir, f)
		files = append(files, written...)
		if err != nil {
			return files, err
		}
		if drawErr != nil {
			figs[i] = plot.LeftOut(f.Name, f.Title, drawErr)
		}
	}
	return files, nil
}

// saveFigure writes a figure into dir as NAME.svg and NAME.png. A
// figure that fails as it is drawn is returned as drawErr with nothing written; err is
// a failure to write.
func saveFigure(dir string, f *plot.Figure) (files []string, drawErr, err error) {
	var svg, png bytes.Buffer
	if err := f.WriteSVG(&svg); err != nil {
		return nil, err, nil
	}
	if err := f.WritePNG(&png); err != nil {
		return nil, err, nil
	}
	for _, out := range []struct {
		ext string
		b   []byte
	}{{".svg", svg.Bytes()}, {".png", png.Bytes()}} {
		p := filepath.Join(dir, f.Name+out.ext)
		if err := runfolder.WriteFile(p, out.b); err != nil {
			return files, nil, fmt.Errorf("report: %w", err)
		}
		files = append(files, p)
	}
	return files, nil, nil
}

// drawn returns the figure make draws, or its stand-in with the reason
// it could not be drawn.
func drawn(name, title string, make func() (*plot.Figure, error)) *plot.Figure {
	f, err := make()
	if err != nil {
		return plot.LeftOut(name, title, err)
	}
	return f
}
