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
	// KeepWithin, if positive, keeps the evaluations of a session's runs
	// in memory beside their stores, as KeepEvaluations does, as long as
	// those kept take no more than this many bytes (an estimate from each
	// run's count of evaluations and values): @report then writes a
	// result's folder from memory. A run begun when the kept evaluations
	// fill the budget keeps none, and when a run ends past it, the oldest
	// runs' kept evaluations are let go (their stores closed, the run that
	// ended included if it alone passes it); the report of such a run
	// reads its evaluations back from its results.db, which holds every
	// one of them, and says so. The folder is the same, byte for byte,
	// either way. The couplet command gives it a quarter of the session's
	// --memory-cap. The budget is checked when a run begins and when it
	// ends: a run that keeps its evaluations holds them all until it ends
	// (no more than a report read back from results.db holds while it is
	// written).
	KeepWithin int64

	// use is held while a result's folder is written and while kept
	// evaluations are let go, so that a store is not closed as a report
	// reads it
	use sync.Mutex
	// kept are the stores that keep their evaluations within KeepWithin,
	// oldest first, with the estimate of what they hold (guarded by mu)
	kept []keptStore
	// letGo are the stores whose kept evaluations were let go (closed)
	letGo map[*store.Store]bool
	// readBack counts the reports written from a results.db read back
	// because the run's evaluations were let go; notes holds what the
	// last report of a result said about it
	readBack int
	notes    map[*mdo.Result]string

	mu      sync.Mutex
	stores  []*store.Store
	ended   map[*mdo.Result]*store.Store
	studies map[string]*mdo.Study                 // study name → study, for the DSM and further figures
	added   map[*mdo.Result][]report.FigureSource // further figures a script asked for (cell.AddFigures)
	folders map[string]bool                       // result folders taken in this session
	storeIn map[*store.Store]string
	// solvers are the coupling solvers of each store's study when its
	// run began, with the note report.CouplingSolvers gives
	solvers map[*store.Store]solverSnapshot
	written []writtenResult // results written, in order, for the index
}

// solverSnapshot is what report.CouplingSolvers gave as a run began.
type solverSnapshot struct {
	solvers []report.CouplingSolver
	note    string
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
		folders: map[string]bool{}, storeIn: map[*store.Store]string{}, solvers: map[*store.Store]solverSnapshot{}, letGo: map[*store.Store]bool{}, notes: map[*mdo.Result]string{}}
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

// options are the store options of every run: a run keeps its
// evaluations with KeepEvaluations, or within KeepWithin while the
// evaluations kept leave room.
func (o *RunOutputs) options() store.Options {
	o.mu.Lock()
	defer o.mu.Unlock()
	return store.Options{ToolVersion: toolVersion(), Overwrite: true, KeepEvaluations: o.KeepEvaluations || o.roomToKeep()}
}

// keptStore is a store that keeps its evaluations within KeepWithin.
type keptStore struct {
	s *store.Store
	// perRow estimates the bytes an evaluation kept takes; bytes is the
	// estimate of the whole run's, set when it ends (0 while it runs)
	perRow, bytes int64
	ended         bool
}

// roomToKeep reports whether a run begun now keeps its evaluations
// within KeepWithin (never with KeepEvaluations, which keeps them all).
// The caller holds o.mu.
func (o *RunOutputs) roomToKeep() bool {
	if o.KeepEvaluations || o.KeepWithin <= 0 {
		return false
	}
	var held int64
	for _, k := range o.kept {
		held += k.bytes
	}
	return held < o.KeepWithin
}

// keptRowBytes estimates the memory an evaluation of a run kept by its
// store takes: the record itself (288 bytes, mdo.Evaluation) and its
// values (design point in the unit box and physical, objectives twice,
// constraints three times with the margins, outputs), 8 bytes each, with
// room for a failure's message. The values are shared with the
// evaluations the optimiser holds as long as it holds them; the estimate
// counts them whole.
func keptRowBytes(info mdo.RunInfo) int64 {
	n := 2*len(info.Design) + 2*len(info.Objectives) + 3*len(info.Constraints) + len(info.Outputs)
	return 288 + 8*int64(n) + 64
}

// keeping notes a store that keeps its evaluations within KeepWithin
// (one made with options() when there was room), with the estimate of
// an evaluation of its run.
func (o *RunOutputs) keeping(s *store.Store, info mdo.RunInfo, keeps bool) {
	if !keeps {
		return
	}
	o.mu.Lock()
	defer o.mu.Unlock()
	for _, k := range o.kept {
		if k.s == s {
			return
		}
	}
	o.kept = append(o.kept, keptStore{s: s, perRow: keptRowBytes(info)})
}

// runEnded estimates what the run of a store that ended keeps and, past
// KeepWithin, lets the oldest runs' kept evaluations go (their stores
// closed: their results.db holds every evaluation) until the rest fit.
func (o *RunOutputs) runEnded(s *store.Store) error {
	o.use.Lock()
	defer o.use.Unlock()
	o.mu.Lock()
	var held int64
	for i := range o.kept {
		if k := &o.kept[i]; k.s == s {
			k.ended, k.bytes = true, int64(s.Rows())*k.perRow
		}
		held += o.kept[i].bytes
	}
	var release []*store.Store
	for held > o.KeepWithin {
		i := slices.IndexFunc(o.kept, func(k keptStore) bool { return k.ended })
		if i < 0 {
			break
		}
		held -= o.kept[i].bytes
		release = append(release, o.kept[i].s)
		o.letGo[o.kept[i].s] = true
		o.kept = slices.Delete(o.kept, i, i+1)
	}
	o.mu.Unlock()
	var first error
	for _, st := range release {
		if err := st.Close(); err != nil && first == nil {
			first = fmt.Errorf("repl: letting the kept evaluations of %s go: %w", st.Path(), err)
		}
	}
	return first
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
	keeps   bool // the store keeps its evaluations within KeepWithin
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
	opt := r.o.options()
	s, err := store.PickUp(r.path, opt)
	if err != nil {
		return nil, err
	}
	r.keeps = opt.KeepEvaluations && !r.o.KeepEvaluations
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
		opt := r.o.options()
		if s, err = store.Create(path, opt); err != nil {
			return err
		}
		r.keeps = opt.KeepEvaluations && !r.o.KeepEvaluations
		r.o.keep(s)
	}
	r.o.keeping(s, info, r.keeps)
	r.o.mu.Lock()
	r.o.storeIn[s] = filepath.Base(filepath.Dir(s.Path()))
	var snap solverSnapshot
	snap.solvers, snap.note = report.CouplingSolvers(r.o.studies[r.study])
	r.o.solvers[s] = snap
	r.o.mu.Unlock()
	r.path = ""
	r.cur = s
	if err := s.Begin(info); err != nil {
		return err
	}
	// results.db keeps the record summary.json and the report give: the
	// caution, the goals as declared and the coupling solvers
	rec := store.RunRecord{Caution: report.Caution, CouplingSolvers: snap.solvers, SolverNote: snap.note}
	if st := r.o.study(r.study); st != nil {
		// those of the run's (the run adds IDF's consistency constraints,
		// whose relations End writes)
		for _, o := range st.Objectives {
			if slices.Contains(info.Objectives, o.Name) {
				rec.Objectives = append(rec.Objectives, o)
			}
		}
		for _, c := range st.Constraints {
			if slices.Contains(info.Constraints, c.Name) {
				rec.Constraints = append(rec.Constraints, c)
			}
		}
	}
	return s.SetRunRecord(rec)
}

// study returns the study of a name (nil if none was attached).
func (o *RunOutputs) study(name string) *mdo.Study {
	o.mu.Lock()
	defer o.mu.Unlock()
	return o.studies[name]
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
	if r.keeps {
		if lerr := r.o.runEnded(r.cur); err == nil {
			err = lerr
		}
	}
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
	o.use.Lock()
	defer o.use.Unlock()
	o.mu.Lock()
	snap, ok := o.solvers[st]
	o.mu.Unlock()
	if !ok {
		// no store recorded the run: its study's system now
		snap.solvers, snap.note = report.CouplingSolvers(study)
	}
	st, note, err := o.readable(st)
	if err != nil {
		return dir, nil, err
	}
	if note != "" {
		defer st.Close()
	} else if st != nil {
		// what the optimiser added to its result after End (the best
		// point's sensitivity), so that results.db records what the
		// folder's summary and report say
		if err := st.SetOutcome(r); err != nil {
			return dir, nil, err
		}
	}
	o.mu.Lock()
	o.notes[r] = note
	o.mu.Unlock()
	files, err := report.WriteRun(ctx, dir, report.Run{
		Result: r, Study: study, Store: st, Script: script, ToolVersion: toolVersion(),
		ScatterMatrix: isDOE(r), Figures: figs, AllOutputs: o.everyOutput(),
		Solvers: snap.solvers, SolverNote: snap.note,
	})
	// a folder whose summary.json was written goes into the index even
	// if another of its files could not be written
	if slices.Contains(files, filepath.Join(dir, report.SummaryFile)) {
		o.mu.Lock()
		o.written = slices.DeleteFunc(o.written, func(w writtenResult) bool { return w.folder == folder })
		o.written = append(o.written, writtenResult{folder: folder, r: r})
		o.mu.Unlock()
	}
	return dir, files, err
}

// readable returns the store to write a result's folder from: st
// itself, or, when its kept evaluations were let go (KeepWithin), its
// results.db opened again to be read back, with a note that says so
// (the caller closes that store). The caller holds o.use.
func (o *RunOutputs) readable(st *store.Store) (*store.Store, string, error) {
	o.mu.Lock()
	gone := st != nil && o.letGo[st]
	o.mu.Unlock()
	if !gone {
		return st, "", nil
	}
	back, err := store.Open(st.Path())
	if err != nil {
		return nil, "", fmt.Errorf("repl: reading back the evaluations of %s: %w", st.Path(), err)
	}
	o.mu.Lock()
	o.readBack++
	o.mu.Unlock()
	return back, fmt.Sprintf("its %d evaluations were read back from %s: keeping them in memory beside the session's other results would pass the share of the memory cap the session keeps for them (%s); nothing is lost",
		back.Rows(), st.Path(), formatBytes(o.KeepWithin)), nil
}

// formatBytes writes a size in MiB (KiB below one MiB).
func formatBytes(n int64) string {
	if n < 1<<20 {
		return fmt.Sprintf("%d KiB", n>>10)
	}
	return fmt.Sprintf("%d MiB", n>>20)
}

// reportNote is what the last writing of r's folder said of it ("" if
// nothing): that its evaluations were read back from results.db.
func (o *RunOutputs) reportNote(r *mdo.Result) string {
	o.mu.Lock()
	defer o.mu.Unlock()
	return o.notes[r]
}

// writeResults writes the folder of each result (in order; a result
// given twice once), then the output folder's summary.json and
// index.html listing every result the folder holds (report.WriteIndex),
// with the last of rs as the principal one. It returns the principal
// result's folder. A folder that cannot be written in full does not stop
// the others nor the index (which lists the results whose folders were
// written); the error joins every failure.
func (o *RunOutputs) writeResults(ctx context.Context, script string, rs []*mdo.Result, fresh bool) (string, error) {
	dirs := map[*mdo.Result]string{}
	var errs []error
	for _, r := range rs {
		if _, ok := dirs[r]; ok {
			continue
		}
		dir, _, err := o.writeRun(ctx, script, r, fresh)
		if err != nil {
			errs = append(errs, err)
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
	return dir, errors.Join(append(errs, o.writeIndex())...)
}

// writeIndex writes the output folder's summary.json and index.html
// from the results written by this process (their summary.json), the
// last the principal, with those the folder held before
// (report.WriteIndex).
func (o *RunOutputs) writeIndex() error {
	o.mu.Lock()
	written := slices.Clone(o.written)
	o.mu.Unlock()
	if len(written) == 0 {
		return nil
	}
	var entries []report.IndexEntry
	for _, w := range written {
		// the record as the result's folder holds it
		rec, err := report.ReadRecord(filepath.Join(o.dir, w.folder, report.SummaryFile))
		if err != nil {
			return fmt.Errorf("repl: the index of %s: %w", o.dir, err)
		}
		entries = append(entries, report.IndexEntry{Folder: w.folder, Summary: rec})
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
