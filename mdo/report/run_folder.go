package report

import (
	"cmp"
	"context"
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
// each other (each by one goroutine at a time), so a figure's drawing
// must not change what another figure's drawing reads.
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
// saved), concurrently, while evaluations.csv is formatted. It returns
// the files written.
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
	rec := NewRecord(run)
	if err := WriteRecord(p, rec); err != nil {
		return nil, err
	}
	files = append(files, p)
	var evs []*mdo.Evaluation
	// evaluations.csv is written while the figures are drawn
	var csvErr error
	var csvDone sync.WaitGroup
	csvPath := filepath.Join(dir, EvaluationsFile)
	if run.Store != nil {
		var err error
		if evs, err = run.Store.Evaluations(); err != nil {
			return files, fmt.Errorf("report: %w", err)
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
	// are saved as files too, then the further figures, all saved
	std := standardFigures(r, Options{Evaluations: evs, ScatterMatrix: run.ScatterMatrix})
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
	all := append(slices.Clip(std), extra...)
	saved := make([]bool, len(all))
	for i, f := range all {
		saved[i] = i >= len(std) || f.Name == "history" || f.Name == "pareto"
	}
	done := renderFigures(all, saved)
	csvDone.Wait()
	if run.Store != nil {
		if csvErr != nil {
			return files, fmt.Errorf("report: %w", csvErr)
		}
		files = append(files, csvPath)
	}
	written, err := writeFigures(dir, all, done, saved)
	files = append(files, written...)
	if err != nil {
		return files, err
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
// NAME.svg and NAME.png (the figures drawn concurrently, see
// renderFigures); one that fails as it is drawn is replaced in figs by
// its stand-in with the reason. err is a failure to write.
func saveFigures(dir string, figs []*plot.Figure) ([]string, error) {
	save := make([]bool, len(figs))
	for i := range save {
		save[i] = true
	}
	done := renderFigures(figs, save)
	files, err := writeFigures(dir, figs, done, save)
	for i, f := range figs {
		if f == nil || f.Reason != nil {
			continue
		}
		if drawErr := cmp.Or(done[i].svgErr, done[i].pngErr); drawErr != nil {
			figs[i] = plot.LeftOut(f.Name, f.Title, drawErr)
		}
	}
	return files, err
}

// writeFigures writes, for each figure with save[i] drawn without
// failure (done[i]), NAME.svg and NAME.png into dir, in order; it returns
// the files written. A figure that is nil, a stand-in (plot.LeftOut) or
// failed as it was drawn is not written.
func writeFigures(dir string, figs []*plot.Figure, done []rendered, save []bool) ([]string, error) {
	var files []string
	for i, f := range figs {
		d := done[i]
		if !save[i] || f == nil || f.Reason != nil || d.svgErr != nil || d.pngErr != nil {
			continue
		}
		for _, out := range []struct {
			ext string
			b   []byte
		}{{".svg", d.svg}, {".png", d.png}} {
			p := filepath.Join(dir, f.Name+out.ext)
			if err := runfolder.WriteFile(p, out.b); err != nil {
				return files, fmt.Errorf("report: %w", err)
			}
			files = append(files, p)
		}
	}
	return files, nil
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
