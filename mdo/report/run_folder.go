package report

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"sync"
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
// Evaluations). The figures of a run folder are drawn concurrently with
// each other (each by one goroutine at a time), and the sources are
// called while the standard figures are drawn, so neither a source nor a
// figure's drawing may change what another reads (the result, the study,
// the evaluations).
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
	// Solvers and SolverNote are the coupling solvers of the run's
	// system when it began (see CouplingSolvers); both empty take them
	// from Study.
	Solvers    []CouplingSolver
	SolverNote string
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

// WriteRun writes a run's folder dir (created if need be): summary.json
// (the result's Record);
// with a store, evaluations.csv; the history and, for several
// objectives, the Pareto front, the further figures of the study and its
// design structure matrix, each as NAME.svg and NAME.png; and
// report.html, which embeds those and the parallel coordinates (and the
// scatter matrix if asked). A figure that cannot be drawn is left out
// with the reason written in its place in the report; the rest is still
// written. Every file is written atomically and never through a symbolic
// link. The figures are drawn once each (the report's copies are those
// saved), concurrently, while evaluations.csv is formatted, the standard
// ones while the further figures are made, each saved as soon as it is
// drawn. A file that cannot be written does not stop the others: the
// error joins every failure. It returns the files written.
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
	// a file that cannot be written does not stop the others: the
	// failures are joined
	var errs []error
	rec := NewRecord(run)
	if err := WriteRecord(p, rec); err != nil {
		errs = append(errs, err)
	} else {
		files = append(files, p)
	}
	var evs []*mdo.Evaluation
	// evaluations.csv is written while the figures are drawn
	var csvErr error
	var csvDone sync.WaitGroup
	csvPath := filepath.Join(dir, EvaluationsFile)
	if run.Store != nil {
		var err error
		if evs, err = run.Store.Evaluations(); err != nil {
			return files, errors.Join(append(errs, fmt.Errorf("report: %w", err))...)
		}
		csvDone.Add(1)
		go func() {
			defer csvDone.Done()
			csvErr = runfolder.WriteFileFrom(csvPath, func(w io.Writer) error {
				return run.Store.WriteCSVOf(w, evs, store.CSVOptions{AllOutputs: run.AllOutputs})
			})
		}()
	}
	// the report's standard figures, of which the history (and front)
	// are saved as files too, are drawn while the further figures are
	// made; those are all saved
	d := newFigureDrawer(dir)
	std := standardFigures(r, Options{Evaluations: evs, ScatterMatrix: run.ScatterMatrix})
	d.add(std, func(i int) (bool, bool) {
		save := std[i] != nil && (std[i].Name == "history" || std[i].Name == "pareto")
		return save, save
	})
	var extra []*plot.Figure
	notes := append(append([]string(nil), r.Notes...), run.Notes...)
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
	d.add(extra, func(int) (bool, bool) { return true, true })
	all := append(slices.Clip(std), extra...)
	jobs := d.wait()
	csvDone.Wait()
	if run.Store != nil {
		if csvErr != nil {
			errs = append(errs, fmt.Errorf("report: %w", csvErr))
		} else {
			files = append(files, csvPath)
		}
	}
	done := make([]rendered, len(jobs))
	for i, j := range jobs {
		done[i] = j.out
		files = append(files, j.files...)
		if j.err != nil {
			errs = append(errs, j.err)
		}
	}
	// a further figure that failed as its files were drawn has the
	// reason in its place (a standard one shows its SVG if that was drawn)
	for i := len(std); i < len(all); i++ {
		if d := &done[i]; d.svgErr == nil && d.pngErr != nil {
			d.svgErr = d.pngErr
		}
	}
	p = filepath.Join(dir, ReportFile)
	opt := Options{Script: run.Script, ToolVersion: run.ToolVersion, Evaluations: evs, NoStandardPlots: true, Figures: all, Notes: notes, Record: &rec, drawn: done}
	if err := WriteFile(p, r, opt); err != nil {
		errs = append(errs, err)
	} else {
		files = append(files, p)
	}
	return files, errors.Join(errs...)
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
// NAME.svg and NAME.png (the figures drawn concurrently, see
// figureDrawer), in order; one that fails as it is drawn is replaced in
// figs by its stand-in with the reason. err joins the failures to write.
func saveFigures(dir string, figs []*plot.Figure) ([]string, error) {
	d := newFigureDrawer(dir)
	d.add(figs, func(int) (bool, bool) { return true, true })
	var files []string
	var errs []error
	for i, j := range d.wait() {
		files = append(files, j.files...)
		if j.err != nil {
			errs = append(errs, j.err)
		}
		if f := figs[i]; f != nil && f.Reason == nil {
			if drawErr := cmp.Or(j.out.svgErr, j.out.pngErr); drawErr != nil {
				figs[i] = plot.LeftOut(f.Name, f.Title, drawErr)
			}
		}
	}
	return files, errors.Join(errs...)
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
