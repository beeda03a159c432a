package repl

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sync"

	"couplet/disciplines/drawings"
	"couplet/mdo"
	"couplet/mdo/report"
	"couplet/mdo/store"
)

// RunOutputs records the runs of a session's studies into its output
// folder, the case store DIR/results.db (one row per evaluation; a
// script that runs several optimisations gets results-2.db, ...), and
// writes the run folder of a result with report.WriteRun: summary.json,
// the evaluations as CSV, the plots as SVG and PNG (with the study's
// further figures from Figures) and the self-contained DIR/report.html.
// Use Recorder as the session's recorder, then Close it.
type RunOutputs struct {
	dir string
	// PickUp makes each run continue the store an earlier, interrupted
	// replay of the same script and seed left in dir: its evaluations
	// answer the optimiser's points again without analysis.
	PickUp bool
	// Figures are the sources of a study's further figures; nil takes
	// DefaultFigures.
	Figures []report.FigureSource

	mu      sync.Mutex
	runs    int
	stores  []*store.Store
	ended   map[*mdo.Result]*store.Store
	studies map[string]*mdo.Study // study name → study, for the DSM and further figures
}

// DefaultFigures are the further figures of a run folder when none are
// given: the aircraft drawings and the designer's checklist (report
// notes), which a study without aircraft geometry does not get.
func DefaultFigures() []report.FigureSource {
	return []report.FigureSource{drawings.Figures, drawings.Checklist}
}

// NewRunOutputs returns the outputs of a run into dir.
func NewRunOutputs(dir string) *RunOutputs {
	return &RunOutputs{dir: dir, ended: map[*mdo.Result]*store.Store{}, studies: map[string]*mdo.Study{}}
}

// Recorder makes the recorder cell.Attach installs in a study: each run
// of an optimiser on it is recorded in a store of its own.
func (o *RunOutputs) Recorder(st *mdo.Study) (mdo.Recorder, error) {
	o.mu.Lock()
	o.studies[st.Name] = st
	o.mu.Unlock()
	return &runRecorder{o: o}, nil
}

// nextPath reserves the store file of the next run, creating the output
// folder if need be.
func (o *RunOutputs) nextPath() (string, error) {
	o.mu.Lock()
	defer o.mu.Unlock()
	if err := os.MkdirAll(o.dir, 0o755); err != nil {
		return "", fmt.Errorf("repl: creating the output folder: %w", err)
	}
	o.runs++
	name := "results.db"
	if o.runs > 1 {
		name = fmt.Sprintf("results-%d.db", o.runs)
	}
	return filepath.Join(o.dir, name), nil
}

// options are the store options of every run.
func (o *RunOutputs) options() store.Options {
	return store.Options{ToolVersion: toolVersion(), Overwrite: true}
}

// keep registers a store for Close.
func (o *RunOutputs) keep(s *store.Store) {
	o.mu.Lock()
	o.stores = append(o.stores, s)
	o.mu.Unlock()
}

// runRecorder records each run of an optimiser on one study in a store of
// its own; with PickUp it first reopens the store of an interrupted run.
type runRecorder struct {
	o       *RunOutputs
	path    string       // store file reserved by PickedUp
	pending *store.Store // store reopened by PickedUp
	cur     *store.Store
}

// PickedUp implements mdo.PickUpRecorder: it reserves the run's store file
// and, with PickUp and an existing file, reopens it and returns its
// evaluations (refusing a store of another script or seed).
func (r *runRecorder) PickedUp(script string, seed uint64) ([]*mdo.Evaluation, error) {
	path, err := r.o.nextPath()
	if err != nil {
		return nil, err
	}
	r.path = path
	if !r.o.PickUp {
		return nil, nil
	}
	if _, err := os.Stat(r.path); errors.Is(err, os.ErrNotExist) {
		return nil, nil
	}
	s, err := store.PickUp(r.path, r.o.options())
	if err != nil {
		return nil, err
	}
	evs, err := s.PickedUp(script, seed)
	if err != nil {
		s.Close()
		return nil, &PickUpError{Path: r.path, Err: err}
	}
	r.o.keep(s)
	r.pending = s
	return evs, nil
}

func (r *runRecorder) Begin(info mdo.RunInfo) error {
	s := r.pending
	r.pending = nil
	if s == nil {
		path := r.path
		var err error
		if path == "" {
			if path, err = r.o.nextPath(); err != nil {
				return err
			}
		}
		if s, err = store.Create(path, r.o.options()); err != nil {
			return err
		}
		r.o.keep(s)
	}
	r.path = ""
	r.cur = s
	return s.Begin(info)
}

func (r *runRecorder) Record(e *mdo.Evaluation) error {
	if r.cur == nil {
		return errors.New("repl: Record before Begin")
	}
	return r.cur.Record(e)
}

func (r *runRecorder) Iteration(p mdo.Progress) error {
	if r.cur == nil {
		return nil
	}
	return r.cur.Iteration(p)
}

func (r *runRecorder) End(res *mdo.Result) error {
	if r.cur == nil {
		return errors.New("repl: End before Begin")
	}
	err := r.cur.End(res)
	r.o.mu.Lock()
	r.o.ended[res] = r.cur
	r.o.mu.Unlock()
	return err
}

// writeRun writes the run folder of a result into dir with
// report.WriteRun, from the store that recorded it and the study of its
// name, and returns the files written.
func (o *RunOutputs) writeRun(ctx context.Context, dir, script string, r *mdo.Result) ([]string, error) {
	o.mu.Lock()
	st := o.ended[r]
	study := o.studies[r.Study]
	figs := o.Figures
	o.mu.Unlock()
	if figs == nil {
		figs = DefaultFigures()
	}
	return report.WriteRun(ctx, dir, report.Run{
		Result: r, Study: study, Store: st, Script: script, ToolVersion: toolVersion(),
		ScatterMatrix: isDOE(r), Figures: figs,
	})
}

// storeOf returns the store that recorded the run of r (nil if none).
func (o *RunOutputs) storeOf(r *mdo.Result) *store.Store {
	o.mu.Lock()
	defer o.mu.Unlock()
	return o.ended[r]
}

// toolVersion names the program in the files it writes.
func toolVersion() string { return "couplet " + Version }

// isDOE reports a design of experiments (its result stops "complete").
func isDOE(r *mdo.Result) bool { return r.Stop == mdo.StopComplete }

// Close closes the stores.
func (o *RunOutputs) Close() error {
	o.mu.Lock()
	defer o.mu.Unlock()
	var first error
	for _, s := range o.stores {
		if err := s.Close(); err != nil && first == nil {
			first = err
		}
	}
	o.stores = nil
	return first
}
