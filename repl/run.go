package repl

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"couplet/mdo"
	"couplet/mdo/report"
	"couplet/mdo/runfolder"
	"couplet/mdo/store"
)

// RunOptions configure a headless replay of a study file.
type RunOptions struct {
	// File is the study file; OutDir the output folder (created).
	File, OutDir string
	// Seed, when SeedSet, overrides the seed the script declares.
	Seed    uint64
	SeedSet bool
	// Timeout, if positive, limits the whole replay; a running cell is
	// cancelled when it is reached.
	Timeout time.Duration
	// Policy is the sandbox policy.
	Policy Policy
	// Stdout receives the cells' output, Stderr the reports.
	Stdout, Stderr io.Writer
	// Progress, if not nil, draws the progress of optimisations.
	Progress *Progress
	// Figures are the sources of a study's further figures in the run
	// folder; nil takes DefaultFigures.
	Figures []report.FigureSource
	// Grace is the time a cancelled cell has to come back (default 2 s).
	Grace time.Duration
	// PickUp continues the case stores an interrupted replay of the same
	// script and seed left in OutDir (see RunOutputs.PickUp); OutDir
	// must hold one.
	PickUp bool
	// Replace clears every file of the run OutDir holds (the tool's and
	// the script's own, see runfolder.Clear) before this one starts.
	// Without PickUp or Replace, an OutDir holding a run is refused.
	Replace bool
	// EveryOutput writes every output to evaluations.csv (see
	// RunOutputs.EveryOutput).
	EveryOutput bool
	// Guarded says that the caller has already taken the output folder's
	// lock and checked what it holds (Guard): a supervising process that
	// runs Run in a child process of its own does so, and holds the lock
	// while the child runs.
	Guarded bool
	// Watch, if not nil, is told what the run does as it does it: each
	// cell as it starts, each result the script publishes with the case
	// store that recorded it, and the start of the folder's writing. A
	// supervising process learns from it what to write should the
	// process running the script die.
	Watch func(RunEvent)
}

// RunEvent is one step of a run, for RunOptions.Watch.
type RunEvent struct {
	// Kind is "cell" (a cell starts), "published" (the script published
	// a result) or "writing" (the run's folder is being written).
	Kind string `json:"kind"`
	// Cell is the number of the cell that starts or publishes; Line its
	// first line in the study file.
	Cell int `json:"cell,omitempty"`
	Line int `json:"line,omitempty"`
	// Study is the published result's study, Store the path of the case
	// store that recorded its run ("" if none did).
	Study string `json:"study,omitempty"`
	Store string `json:"store,omitempty"`
}

// RunRecord is what a replay produced.
type RunRecord struct {
	File   string
	Script string // the study file's text
	// Result is the study result handed over by the script (nil if none).
	Result *mdo.Result
	// Summary is what summary.json holds when there is a result.
	Summary *store.Summary
	Cells   []*Cell
}

// UsageError is an error in how the tool was called (exit status 2).
type UsageError struct{ Err error }

// Error implements error.
func (e *UsageError) Error() string { return e.Err.Error() }

// Unwrap returns the underlying error.
func (e *UsageError) Unwrap() error { return e.Err }

// Run replays a study file headless: it refuses the script before it
// runs if it imports anything the sandbox does not allow, runs its cells
// in order, and writes OutDir/summary.json from the result the script
// published (cell.Publish) or, failing that, the last *mdo.Result a cell
// showed. A failing cell stops the run with an error that names the file
// line, the cell and its line.
func Run(ctx context.Context, opts RunOptions) (*RunRecord, error) {
	if opts.File == "" || opts.OutDir == "" {
		return nil, &UsageError{Err: fmt.Errorf("run needs a study file and --out DIR")}
	}
	// The time limit covers everything from here: reading, splitting and
	// checking the script as well as its cells.
	if opts.Timeout > 0 {
		var cancel context.CancelFunc
		ctx, cancel = context.WithTimeout(ctx, opts.Timeout)
		defer cancel()
	}
	text, err := os.ReadFile(opts.File)
	if err != nil {
		return nil, &UsageError{Err: fmt.Errorf("reading the study file: %w", err)}
	}
	f, err := ParseStudy(string(text))
	if err != nil {
		return nil, &UsageError{Err: fmt.Errorf("%s: %w", opts.File, err)}
	}
	if !opts.Guarded {
		lock, err := Guard(opts)
		if err != nil {
			return nil, err
		}
		defer lock.Release()
	}
	watch := opts.Watch
	if watch == nil {
		watch = func(RunEvent) {}
	}
	out, errw := opts.Stdout, opts.Stderr
	if out == nil {
		out = io.Discard
	}
	if errw == nil {
		errw = io.Discard
	}
	outs := NewRunOutputs(opts.OutDir)
	outs.PickUp = opts.PickUp
	outs.Figures = opts.Figures
	outs.EveryOutput = opts.EveryOutput
	outs.KeepEvaluations = true
	defer outs.Close()
	s, err := NewSession(Options{
		Policy: opts.Policy, Stdout: out, Stderr: errw, NoErrorEcho: true, OutDir: opts.OutDir,
		Seed: opts.Seed, SeedSet: opts.SeedSet, Progress: opts.Progress, Outputs: outs, Grace: opts.Grace, TimeLimit: opts.Timeout,
		Script: string(text),
		OnPublish: func(r *mdo.Result) {
			ev := RunEvent{Kind: "published", Study: r.Study}
			if st := outs.storeOf(r); st != nil {
				ev.Store = st.Path()
			}
			watch(ev)
		},
	})
	if err != nil {
		return nil, err
	}
	// Check every import before anything runs.
	for i, c := range f.Cells {
		if limitPassed(ctx) {
			why := "the run was cancelled"
			if opts.Timeout > 0 && ctx.Err() != context.Canceled {
				why = fmt.Sprintf("the time limit of %v was reached", opts.Timeout)
			}
			return nil, fmt.Errorf("%s: %s while the script was checked (cell %d); nothing ran", opts.File, why, i+1)
		}
		_, refs, err := splitCell(c.Source)
		if err != nil {
			continue // reported when the cell runs
		}
		if err := opts.Policy.check(i+1, refs); err != nil {
			return nil, fmt.Errorf("%s:%d: %w", opts.File, c.Line+err.(*RefusedImportError).Line-1, err)
		}
	}
	// A time limit that stops the study is a failure of the run (exit 1),
	// even when the optimiser came back with its best point so far: the
	// output folder is written, then this is returned.
	timedOut := func() error {
		if opts.Timeout > 0 && errors.Is(ctx.Err(), context.DeadlineExceeded) {
			return fmt.Errorf("%s: the time limit of %v was reached; the output folder holds what the study had by then", opts.File, opts.Timeout)
		}
		return nil
	}
	started := time.Now()
	rec := &RunRecord{File: opts.File, Script: string(text)}
	for i, c := range f.Cells {
		watch(RunEvent{Kind: "cell", Cell: i + 1, Line: c.Line})
		cl := s.Exec(ctx, c.Source)
		rec.Cells = append(rec.Cells, cl)
		if cl.Err != nil {
			line := c.Line
			var ce *CellError
			if errors.As(cl.Err, &ce) {
				line = c.Line + ce.Line - 1
			}
			var pe *PickUpError
			if errors.As(cl.Err, &pe) {
				// the folder holds another run (its seed, say): a
				// usage error, and nothing of this run is written
				return rec, &UsageError{Err: fmt.Errorf("%s:%d: %w", opts.File, line, pe)}
			}
			return rec, writeEarlier(ctx, s, outs, opts, errw, rec, fmt.Errorf("%s:%d: %w", opts.File, line, cl.Err))
		}
		if ctx.Err() != nil && i < len(f.Cells)-1 {
			return rec, writeEarlier(ctx, s, outs, opts, errw, rec, fmt.Errorf("%s: %s after cell %d; cells %d to %d were not run", opts.File, s.reason(ctx), cl.Number, cl.Number+1, len(f.Cells)))
		}
		if cl.Interrupted {
			fmt.Fprintf(errw, "%s: cell %d was cancelled (%s) and returned its best point so far\n", opts.File, cl.Number, s.reason(ctx))
		}
	}
	rec.Result = resultOf(s)
	watch(RunEvent{Kind: "writing"})
	if rec.Result == nil {
		fmt.Fprintf(errw, "%s: the script handed over no result (call cell.Publish(result)); summary.json has no best point\n", opts.File)
		seed, _ := s.Env().SeedUsed()
		run := report.Run{Name: trimExt(filepath.Base(opts.File)), Seed: seed, Cells: len(f.Cells), Started: started,
			Script: rec.Script, ToolVersion: toolVersion()}
		if _, err := report.WriteRun(context.WithoutCancel(ctx), opts.OutDir, run); err != nil {
			return rec, err
		}
		return rec, timedOut()
	}
	sum := store.NewSummary(rec.Result, store.SummaryOptions{Script: rec.Script, ToolVersion: toolVersion()})
	rec.Summary = &sum
	// the folder is written in full even when the time limit or an
	// interrupt stopped the study
	if _, err := outs.writeResults(context.WithoutCancel(ctx), rec.Script, resultsOf(s), false); err != nil {
		return rec, fmt.Errorf("writing the run's output: %w", err)
	}
	if r := rec.Result; r.Evaluations > 0 && r.Failed == r.Evaluations {
		e := &AllFailedError{Study: r.Study, Evaluations: r.Evaluations}
		if st := outs.storeOf(r); st != nil {
			if e.Reasons, err = commonestFailures(st, 3); err != nil {
				return rec, err
			}
		} else if r.Best != nil {
			e.Reasons = []FailureReason{{Example: r.Best.Err}}
		}
		return rec, e
	}
	return rec, timedOut()
}

// writeEarlier writes the run folder of the result the script handed
// over before a cell failed or the run was stopped (nothing if there is
// none), so that what a later cell does cannot undo an earlier result,
// and returns the run's error (with the folder's, if it could not be
// written).
func writeEarlier(ctx context.Context, s *Session, outs *RunOutputs, opts RunOptions, errw io.Writer, rec *RunRecord, runErr error) error {
	r := resultOf(s)
	if r == nil {
		return runErr
	}
	if opts.Watch != nil {
		opts.Watch(RunEvent{Kind: "writing"})
	}
	rec.Result = r
	sum := store.NewSummary(r, store.SummaryOptions{Script: rec.Script, ToolVersion: toolVersion()})
	rec.Summary = &sum
	// the run's own deadline or cancellation has passed: the folder is
	// written all the same
	dir, err := outs.writeResults(context.WithoutCancel(ctx), rec.Script, resultsOf(s), false)
	if err != nil {
		return fmt.Errorf("%w; writing the output of the earlier result: %v", runErr, err)
	}
	fmt.Fprintf(errw, "%s: the result handed over before the run stopped (study %s, best #%s) is written into %s\n", opts.File, r.Study, bestID(r), dir)
	return runErr
}

// bestID formats the number of a result's best evaluation.
func bestID(r *mdo.Result) string {
	if r.Best == nil {
		return "none"
	}
	return fmt.Sprint(r.Best.ID)
}

// Guard readies the output folder of a replay before anything runs: it
// takes the folder's lock and checks what the folder holds (see
// guardFolder), and for PickUp compares the study file with the script
// the folder's case stores recorded (see checkPickUp). Every refusal is a
// *UsageError. The caller releases the lock when the run is over.
func Guard(opts RunOptions) (*runfolder.Lock, error) {
	if opts.File == "" || opts.OutDir == "" {
		return nil, &UsageError{Err: fmt.Errorf("run needs a study file and --out DIR")}
	}
	text, err := os.ReadFile(opts.File)
	if err != nil {
		return nil, &UsageError{Err: fmt.Errorf("reading the study file: %w", err)}
	}
	if _, err := ParseStudy(string(text)); err != nil {
		return nil, &UsageError{Err: fmt.Errorf("%s: %w", opts.File, err)}
	}
	lock, err := guardFolder(opts, "--pick-up continues it if it was interrupted, --replace clears its files and runs afresh, or choose another folder")
	if err != nil {
		return nil, err
	}
	if opts.PickUp {
		if err := checkPickUp(opts, string(text)); err != nil {
			lock.Release()
			return nil, err
		}
	}
	return lock, nil
}

// guardFolder takes the lock on the output folder and checks what it
// holds: a folder another run holds is refused, naming the holder; a
// folder holding an earlier run is refused unless PickUp continues it or
// Replace clears it first; PickUp into a folder with no case store is
// refused. Every refusal is a *UsageError.
func guardFolder(opts RunOptions, choices string) (*runfolder.Lock, error) {
	if opts.PickUp && opts.Replace {
		return nil, &UsageError{Err: fmt.Errorf("--pick-up continues the run in %s and --replace clears it: choose one", opts.OutDir)}
	}
	lock, err := runfolder.TakeLock(opts.OutDir)
	if err != nil {
		return nil, &UsageError{Err: err}
	}
	found, err := runfolder.Occupied(opts.OutDir)
	if err != nil {
		lock.Release()
		return nil, &UsageError{Err: err}
	}
	switch {
	case opts.PickUp && !slices.ContainsFunc(found, func(n string) bool { return path.Base(n) == StoreFile }):
		lock.Release()
		return nil, &UsageError{Err: fmt.Errorf("--pick-up: nothing to pick up in %s: none of its result folders holds a results.db of an interrupted run", opts.OutDir)}
	case opts.Replace:
		if err := runfolder.Clear(opts.OutDir); err != nil {
			lock.Release()
			return nil, &UsageError{Err: err}
		}
	case !opts.PickUp && len(found) > 0:
		lock.Release()
		return nil, &UsageError{Err: fmt.Errorf("%s holds another run (%s); %s", opts.OutDir, listFiles(found), choices)}
	}
	return lock, nil
}

// listFiles names a few files, the folder's own before its result
// folders', the case store, summary and report first.
func listFiles(names []string) string {
	names = slices.Clone(names)
	rank := func(n string) int {
		r := 0
		if strings.Contains(n, "/") {
			r = 3
		}
		switch n = path.Base(n); {
		case strings.HasPrefix(n, "results"):
			return r
		case n == "summary.json" || n == "report.html":
			return r + 1
		}
		return r + 2
	}
	slices.SortStableFunc(names, func(a, b string) int { return rank(a) - rank(b) })
	if len(names) > 4 {
		return strings.Join(names[:4], ", ") + fmt.Sprintf(" and %d more", len(names)-4)
	}
	return strings.Join(names, ", ")
}

// resultsOf returns the results a session's script handed over: those
// published, in order, else the last shown (none if neither).
func resultsOf(s *Session) []*mdo.Result {
	if p := s.Env().Published(); len(p) > 0 {
		return p
	}
	if r := resultOf(s); r != nil {
		return []*mdo.Result{r}
	}
	return nil
}

// resultOf returns the principal result a session's script handed
// over: the last published, else the last shown.
func resultOf(s *Session) *mdo.Result {
	if p := s.Env().Published(); len(p) > 0 {
		return p[len(p)-1]
	}
	cells := s.Cells()
	for i := len(cells) - 1; i >= 0; i-- {
		if r, ok := cells[i].Value.(*mdo.Result); ok && r != nil {
			return r
		}
	}
	return nil
}

// trimExt drops a file name's extension.
func trimExt(name string) string { return name[:len(name)-len(filepath.Ext(name))] }

// checkPickUp refuses a pick-up when a case store in the output folder
// recorded another script than the study file's text, or another seed
// than --seed gives: the whole file is the identity, so any change (a
// constraint's bound, an optimiser setting) is refused before anything
// runs, naming the first cell that differs.
func checkPickUp(opts RunOptions, text string) error {
	paths, err := filepath.Glob(filepath.Join(opts.OutDir, "*", StoreFile))
	if err != nil {
		return &UsageError{Err: fmt.Errorf("--pick-up: %w", err)}
	}
	for _, p := range paths {
		st, err := store.Open(p)
		if err != nil {
			return &UsageError{Err: fmt.Errorf("--pick-up: %w", err)}
		}
		meta, ok := st.Run()
		st.Close()
		if !ok {
			continue
		}
		if change := firstChange(meta.Script, text); change != "" {
			return &UsageError{Err: fmt.Errorf("--pick-up: %s holds a run of another version of %s: %s; picking it up would mix the two. Run the changed study into a new folder, or restore the file", p, opts.File, change)}
		}
		if opts.SeedSet && opts.Seed != meta.Seed {
			return &UsageError{Err: fmt.Errorf("--pick-up: %s holds a run with seed %d, not --seed %d; picking it up would mix the two. Pick it up with --seed %d, or run into a new folder", p, meta.Seed, opts.Seed, meta.Seed)}
		}
	}
	return nil
}

// limitPassed reports whether ctx has ended or its deadline has passed
// (read from the clock, so that a limit shorter than the checks is seen
// before the context's timer has fired).
func limitPassed(ctx context.Context) bool {
	d, ok := ctx.Deadline()
	return ctx.Err() != nil || (ok && !time.Now().Before(d))
}
