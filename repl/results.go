package repl

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"unicode"

	"couplet/disciplines/drawings"
	"couplet/mdo"
	"couplet/mdo/report"
	"couplet/mdo/runfolder"
	"couplet/mdo/store"
)

// RunOutputs records the runs of a session's studies into its output
// folder DIR, each run of an optimiser in a result folder of its own
// named by its study: DIR/STUDY/results.db (one row per evaluation), and
// DIR/STUDY-2/results.db for the next run of a study of the same name.
// It writes the run folder of a result with report.WriteRun into the
// folder of the run that produced it: summary.json, the evaluations as
// CSV, the plots as SVG and PNG (with the study's further figures from
// Figures) and the self-contained report.html; and DIR's own
// summary.json and index.html, listing every result the folder holds:
// those written now and those written there before by this session or
// an earlier interpreter of it (report.WriteIndex, whose doc gives the
// order). Use Recorder as the session's recorder, then Close it.
type RunOutputs struct {
	dir string
	// PickUp makes each run continue the store an earlier, interrupted
	// replay of the same script and seed left in dir: its evaluations
	// answer the optimiser's points again without analysis.
	PickUp bool
	// Figures are the sources of a study's further figures; nil takes
	// DefaultFigures.
	Figures []report.FigureSource
	// EveryOutput writes every output of the analyses to each result's
	// evaluations.csv (the --every-output flag, or cell.EveryOutput in a
	// script); by default it holds the status, design, objectives,
	// constraints and margins, and results.db keeps every output.
	EveryOutput bool
	// KeepEvaluations keeps each run's evaluations in memory beside its
	// store until Close (store.Options.KeepEvaluations), so that its
	// folder is written without reading results.db back: for a replay
	// (Run), which writes every folder as soon as the script has run.
	KeepEvaluations bool

	mu      sync.Mutex
	stores  []*store.Store
	ended   map[*mdo.Result]*store.Store
	studies map[string]*mdo.Study                 // study name → study, for the DSM and further figures
	added   map[*mdo.Result][]report.FigureSource // further figures a script asked for (cell.AddFigures)
	folders map[string]bool                       // result folders taken in this session
	storeIn map[*store.Store]string
	written []writtenResult // results written, in order, for the index
}

// writtenResult is a result whose folder was written.
type writtenResult struct {
	folder string
	r      *mdo.Result
}

// DefaultFigures are the further figures of a run folder when none are
// given: the aircraft drawings and the designer's checklist (report
// notes), which a study without aircraft geometry does not get.
func DefaultFigures() []report.FigureSource {
	return []report.FigureSource{drawings.Figures, drawings.Checklist}
}

// NewRunOutputs returns the outputs of a run into dir.
func NewRunOutputs(dir string) *RunOutputs {
	return &RunOutputs{dir: dir, ended: map[*mdo.Result]*store.Store{}, studies: map[string]*mdo.Study{}, added: map[*mdo.Result][]report.FigureSource{},
		folders: map[string]bool{}, storeIn: map[*store.Store]string{}}
}

// Recorder makes the recorder cell.Attach installs in a study: each run
// of an optimiser on it is recorded in a store of its own.
func (o *RunOutputs) Recorder(st *mdo.Study) (mdo.Recorder, error) {
	o.mu.Lock()
	o.studies[st.Name] = st
	o.mu.Unlock()
	return &runRecorder{o: o, study: st.Name}, nil
}

// StoreFile is the name of a result folder's case store.
const StoreFile = report.StoreFile

// nextPath reserves the result folder of the next run of a study and
// returns its store file, creating the folders if need be.
func (o *RunOutputs) nextPath(study string) (string, error) {
	o.mu.Lock()
	defer o.mu.Unlock()
	folder, err := o.newFolder(study)
	if err != nil {
		return "", err
	}
	return filepath.Join(o.dir, folder, StoreFile), nil
}

// newFolder takes the next free result folder of a study's name in the
// output folder and creates it: the name itself, then NAME-2, NAME-3...
// A name taken in this session, held by a file or a symbolic link, or
// by a comparison's folder (cell.Compare), is skipped; a folder left by
// an earlier run (picked up or cleared) is used again. The caller holds o.mu.
func (o *RunOutputs) newFolder(study string) (string, error) {
	base := FolderName(study)
	for i := 1; ; i++ {
		name := base
		if i > 1 {
			name = fmt.Sprintf("%s-%d", base, i)
		}
		if o.folders[name] {
			continue
		}
		p := filepath.Join(o.dir, name)
		if fi, err := os.Lstat(p); err == nil && !fi.IsDir() {
			continue
		}
		if _, err := os.Lstat(filepath.Join(p, runfolder.ComparisonFile)); err == nil {
			continue // a comparison's folder (cell.Compare), not a result's
		}
		if err := os.MkdirAll(p, 0o755); err != nil {
			return "", fmt.Errorf("repl: creating the result folder: %w", err)
		}
		o.folders[name] = true
		return name, nil
	}
}

// FolderName is the result folder name of a study: its name in lower
// case with every run of characters other than letters, digits and '_'
// made one '-' ("Aft sweep" gives "aft-sweep"); "study" if nothing is
// left.
func FolderName(study string) string {
	var b strings.Builder
	dash := false
	for _, r := range strings.ToLower(study) {
		if r < 128 && (unicode.IsLetter(r) || unicode.IsDigit(r) || r == '_') {
			if dash && b.Len() > 0 {
				b.WriteByte('-')
			}
			dash = false
			b.WriteRune(r)
			continue
		}
		dash = true
	}
	if b.Len() == 0 {
		return "study"
	}
	return b.String()
}

// options are the store options of every run.
func (o *RunOutputs) options() store.Options {
	return store.Options{ToolVersion: toolVersion(), Overwrite: true, KeepEvaluations: o.KeepEvaluations}
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
	study   string
	path    string       // store file reserved by PickedUp
	pending *store.Store // store reopened by PickedUp
	cur     *store.Store
}

// PickedUp implements mdo.PickUpRecorder: it reserves the run's store file
// and, with PickUp and an existing file, reopens it and returns its
// evaluations (refusing a store of another script or seed).
func (r *runRecorder) PickedUp(script string, seed uint64) ([]*mdo.Evaluation, error) {
	path, err := r.o.nextPath(r.study)
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
			if path, err = r.o.nextPath(r.study); err != nil {
				return err
			}
		}
		if s, err = store.Create(path, r.o.options()); err != nil {
			return err
		}
		r.o.keep(s)
	}
	r.o.mu.Lock()
	r.o.storeIn[s] = filepath.Base(filepath.Dir(s.Path()))
	r.o.mu.Unlock()
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

// writeRun writes the run folder of a result with report.WriteRun, from
// the store that recorded it and the study of its name, into the result
// folder of that run (a new folder of the study's name for a result no
// store recorded), and returns the folder's path and the files written.
// A result written before goes into its folder again, unless fresh asks
// for a report that never overwrites one: then a folder that holds a
// report already is left as it is and a new folder of the study's name
// is taken.
func (o *RunOutputs) writeRun(ctx context.Context, script string, r *mdo.Result, fresh bool) (string, []string, error) {
	o.mu.Lock()
	st := o.ended[r]
	study := o.studies[r.Study]
	figs := o.Figures
	if figs == nil {
		figs = DefaultFigures()
	}
	figs = append(slices.Clip(figs), o.added[r]...)
	folder := ""
	for _, w := range o.written {
		if w.r == r {
			folder = w.folder
		}
	}
	if folder == "" && st != nil {
		folder = o.storeIn[st]
	}
	if folder != "" && fresh {
		if _, err := os.Lstat(filepath.Join(o.dir, folder, report.ReportFile)); err == nil {
			folder = ""
		}
	}
	var err error
	if folder == "" {
		folder, err = o.newFolder(r.Study)
	}
	o.mu.Unlock()
	if err != nil {
		return "", nil, err
	}
	dir := filepath.Join(o.dir, folder)
	files, err := report.WriteRun(ctx, dir, report.Run{
		Result: r, Study: study, Store: st, Script: script, ToolVersion: toolVersion(),
		ScatterMatrix: isDOE(r), Figures: figs, AllOutputs: o.everyOutput(),
	})
	if err != nil {
		return dir, files, err
	}
	o.mu.Lock()
	o.written = slices.DeleteFunc(o.written, func(w writtenResult) bool { return w.folder == folder })
	o.written = append(o.written, writtenResult{folder: folder, r: r})
	o.mu.Unlock()
	return dir, files, nil
}

// writeResults writes the folder of each result (in order; a result
// given twice once), then the output folder's summary.json and
// index.html listing every result the folder holds (report.WriteIndex),
// with the last of rs as the principal one. It returns the principal result's folder.
func (o *RunOutputs) writeResults(ctx context.Context, script string, rs []*mdo.Result, fresh bool) (string, error) {
	dirs := map[*mdo.Result]string{}
	for _, r := range rs {
		if _, ok := dirs[r]; ok {
			continue
		}
		dir, _, err := o.writeRun(ctx, script, r, fresh)
		if err != nil {
			return dir, err
		}
		dirs[r] = dir
	}
	if len(rs) == 0 {
		return "", nil
	}
	// the principal result goes last in the index
	dir := dirs[rs[len(rs)-1]]
	o.mu.Lock()
	if i := slices.IndexFunc(o.written, func(w writtenResult) bool { return filepath.Join(o.dir, w.folder) == dir }); i >= 0 {
		w := o.written[i]
		o.written = append(slices.Delete(o.written, i, i+1), w)
	}
	o.mu.Unlock()
	return dir, o.writeIndex(script)
}

// writeIndex writes the output folder's summary.json and index.html
// from the results written by this process, the last the principal,
// with those the folder held before (report.WriteIndex).
func (o *RunOutputs) writeIndex(script string) error {
	o.mu.Lock()
	var entries []report.IndexEntry
	for _, w := range o.written {
		entries = append(entries, report.IndexEntry{Folder: w.folder,
			Summary: store.NewSummary(w.r, store.SummaryOptions{Script: script, ToolVersion: toolVersion()})})
	}
	o.mu.Unlock()
	if len(entries) == 0 {
		return nil
	}
	_, err := report.WriteIndex(o.dir, entries)
	return err
}

// AddFigures adds further figure sources to the run folder of result r
// (cell.AddFigures), drawn after Figures.
func (o *RunOutputs) AddFigures(r *mdo.Result, srcs ...report.FigureSource) {
	o.mu.Lock()
	o.added[r] = append(o.added[r], srcs...)
	o.mu.Unlock()
}

// storeOf returns the store that recorded the run of r (nil if none).
func (o *RunOutputs) storeOf(r *mdo.Result) *store.Store {
	o.mu.Lock()
	defer o.mu.Unlock()
	return o.ended[r]
}

// TakeExisting marks every folder the output folder holds now as taken,
// so that no study of this session uses it again: the fresh interpreter
// of a session whose interpreter died starts with the result folders of
// the one that died, whose results are written there.
func (o *RunOutputs) TakeExisting() error {
	entries, err := os.ReadDir(o.dir)
	if err != nil && !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("repl: reading the output folder: %w", err)
	}
	o.mu.Lock()
	defer o.mu.Unlock()
	for _, e := range entries {
		if e.IsDir() {
			o.folders[e.Name()] = true
		}
	}
	return nil
}

// StorePath returns the path of the case store that recorded the run of
// r, or "" if none did (for the parent of an interpreter process, which
// writes the result from it if the process dies).
func (o *RunOutputs) StorePath(r *mdo.Result) string {
	if st := o.storeOf(r); st != nil {
		return st.Path()
	}
	return ""
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

// everyOutput reports whether the CSV files get every output.
func (o *RunOutputs) everyOutput() bool {
	o.mu.Lock()
	defer o.mu.Unlock()
	return o.EveryOutput
}

// askEveryOutput is cell.EveryOutput: the CSV files of the results
// written from now on get every output.
func (o *RunOutputs) askEveryOutput() {
	o.mu.Lock()
	o.EveryOutput = true
	o.mu.Unlock()
}
