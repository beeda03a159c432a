// Package cell is the bridge between a study script and the session or
// headless runner that runs it. Scripts import it as
//
//	import "couplet/repl/cell"
//
// and call its functions as cell.Context(), cell.Attach(study) and so on.
// Each interpreter gets its own Env bound to its session, so these calls
// reach the running session without any global state: the package-level
// names a script sees are the methods of that session's Env.
//
// The hand-over of results: a script passes its study result to
// cell.Publish; `couplet run` writes summary.json (and the rest of the
// output folder) from the last published result. When a script publishes
// nothing, the last *mdo.Result shown as the value of a cell is used.
package cell

import (
	"bytes"
	"context"
	"fmt"
	"strings"
	"sync"

	"couplet/mdo"
	"couplet/mdo/external"
	"couplet/mdo/plot"
	"couplet/mdo/report"
	"couplet/mdo/runfolder"
)

// ImportPath is the path under which scripts import this package.
const ImportPath = "couplet/repl/cell"

// Host is what an Env needs from the session or runner that owns it.
// Every field is optional.
type Host struct {
	// Context returns the context of the running cell; cancelled on
	// Ctrl-C or when the run's time limit is reached.
	Context func() context.Context
	// Seed, when SeedSet, overrides the seed a script declares (the
	// --seed flag of `couplet run`).
	Seed    uint64
	SeedSet bool
	// OutDir is the output folder of the study; created on first use.
	OutDir string
	// Progress, if not nil, makes the progress callback installed by
	// Attach; nil means no progress display.
	Progress func(label string) func(mdo.Progress)
	// Recorder, if not nil, makes the recorder Attach installs for a
	// study (the results store of a run).
	Recorder func(st *mdo.Study) (mdo.Recorder, error)
	// Script returns the source text of the study so far, kept by Attach
	// in Study.Script for provenance.
	Script func() string
	// Programs approves the external programs the script may run; nil
	// approves none.
	Programs *external.Gate
	// EveryOutput, if not nil, asks for every output of the analyses in
	// the run's evaluations.csv files (cell.EveryOutput).
	EveryOutput func()
	// Published, if not nil, is called with each result Publish hands
	// over, as it is handed over.
	Published func(r *mdo.Result)
	// AddFigures, if not nil, adds further figure sources to the run
	// folder of a result (cell.AddFigures).
	AddFigures func(r *mdo.Result, sources []report.FigureSource)
}

// Env is one session's view of the running study: the functions a script
// calls through the cell package.
type Env struct {
	host Host

	mu        sync.Mutex
	published []*mdo.Result
	seedUsed  uint64
	seedKnown bool
}

// NewEnv returns an Env served by host.
func NewEnv(host Host) *Env { return &Env{host: host} }

// Context returns the context of the running cell. Pass it to optimisers
// and long analyses so that Ctrl-C (or the run's --timeout) stops them
// and they return their best point so far.
func (e *Env) Context() context.Context {
	if e.host.Context == nil {
		return context.Background()
	}
	if ctx := e.host.Context(); ctx != nil {
		return ctx
	}
	return context.Background()
}

// Seed returns the study seed: def, unless the run overrides it with
// --seed. The value returned is the one reported in summary.json.
func (e *Env) Seed(def uint64) uint64 {
	s := def
	if e.host.SeedSet {
		s = e.host.Seed
	}
	e.mu.Lock()
	e.seedUsed, e.seedKnown = s, true
	e.mu.Unlock()
	return s
}

// Attach readies a study for a run in this session: it checks the study
// against its system (mdo.Study.Check: a misspelt name, even one that an
// objective or constraint function reads, is refused here), applies the
// --seed override, keeps the script text for provenance, installs the
// progress display (on a terminal only) and the run's recorder. Fields the
// script has already set (Progress, Recorder, Script) are kept.
func (e *Env) Attach(st *mdo.Study) error {
	if st == nil {
		return fmt.Errorf("cell: Attach: the study is nil")
	}
	if err := st.Check(); err != nil {
		return fmt.Errorf("cell: Attach: %w", err)
	}
	st.Seed = e.Seed(st.Seed)
	if st.Script == "" && e.host.Script != nil {
		st.Script = e.host.Script()
	}
	if st.Progress == nil && e.host.Progress != nil {
		st.Progress = e.host.Progress(st.Name)
	}
	if st.Recorder == nil && e.host.Recorder != nil {
		rec, err := e.host.Recorder(st)
		if err != nil {
			return fmt.Errorf("cell: Attach: making the recorder of study %q: %w", st.Name, err)
		}
		st.Recorder = rec
	}
	return nil
}

// Progress returns a callback for Study.Progress that shows the
// optimiser's iteration, best objective and feasibility while it runs (on
// a terminal; it does nothing otherwise). Attach installs it for you.
func (e *Env) Progress(label string) func(mdo.Progress) {
	if e.host.Progress == nil {
		return func(mdo.Progress) {}
	}
	return e.host.Progress(label)
}

// Publish hands a study result to the run: `couplet run` writes
// summary.json from the last result published.
func (e *Env) Publish(r *mdo.Result) error {
	if r == nil {
		return fmt.Errorf("cell: Publish: the result is nil")
	}
	e.mu.Lock()
	e.published = append(e.published, r)
	e.mu.Unlock()
	if e.host.Published != nil {
		e.host.Published(r)
	}
	return nil
}

// Published returns the results published so far, oldest first.
func (e *Env) Published() []*mdo.Result {
	e.mu.Lock()
	defer e.mu.Unlock()
	return append([]*mdo.Result(nil), e.published...)
}

// SeedUsed returns the last seed handed out by Seed or Attach.
func (e *Env) SeedUsed() (uint64, bool) {
	e.mu.Lock()
	defer e.mu.Unlock()
	return e.seedUsed, e.seedKnown
}

// WriteFile writes data to a file of the study's output folder. name is a
// plain file name (letters, digits, '.', '-', '_'); paths are refused, so
// a script cannot write outside its output folder, and so are the tool's
// own names (results*.db and its journals, summary.json, report.html, index.html, comparison.html,
// evaluations.csv, any .svg or .png: a figure is saved with SaveFigure).
// The file is written to a temporary
// file renamed over the name, never through a symbolic link.
func (e *Env) WriteFile(name string, data []byte) error {
	if err := checkName(name); err != nil {
		return err
	}
	dir := e.host.OutDir
	if dir == "" {
		return fmt.Errorf("cell: WriteFile(%q): this session has no output folder (start it with --out DIR)", name)
	}
	if err := runfolder.WriteOwn(dir, name, data); err != nil {
		if l := strings.ToLower(name); strings.HasSuffix(l, ".svg") || strings.HasSuffix(l, ".png") {
			return fmt.Errorf("cell: WriteFile(%q): %w; save a figure with cell.SaveFigure", name, err)
		}
		return fmt.Errorf("cell: WriteFile(%q): %w", name, err)
	}
	return nil
}

// SaveFigure writes a figure the script drew (a map, a carpet, a
// picture of its own from plot.NewFigure) into the study's output folder
// as NAME.svg and NAME.png, NAME being the figure's Name: a plain name
// of letters, digits, '-' and '_'. The tool's own figures go into the
// result folders below, so the script's never take their names. A
// figure that cannot be drawn (plot.LeftOut) returns its reason and
// writes nothing.
func (e *Env) SaveFigure(f *plot.Figure) error {
	if f == nil {
		return fmt.Errorf("cell: SaveFigure: the figure is nil")
	}
	dir := e.host.OutDir
	if dir == "" {
		return fmt.Errorf("cell: SaveFigure(%q): this session has no output folder (start it with --out DIR)", f.Name)
	}
	var svg, png bytes.Buffer
	if err := f.WriteSVG(&svg); err != nil {
		return fmt.Errorf("cell: SaveFigure(%q): %w", f.Name, err)
	}
	if err := f.WritePNG(&png); err != nil {
		return fmt.Errorf("cell: SaveFigure(%q): %w", f.Name, err)
	}
	if _, err := runfolder.WriteOwnFigure(dir, f.Name, svg.Bytes(), png.Bytes()); err != nil {
		return fmt.Errorf("cell: SaveFigure(%q): %w", f.Name, err)
	}
	return nil
}

// AddFigures adds further figures to the run folder of result r: each
// source (a report.FigureSource, such as the design-space maps and
// carpets of package optimizers/designmap) draws its figures into r's
// report and folder when the folder is written, after the tool's own.
// In a session without an output folder it does nothing.
func (e *Env) AddFigures(r *mdo.Result, sources ...report.FigureSource) error {
	if r == nil {
		return fmt.Errorf("cell: AddFigures: the result is nil")
	}
	for i, s := range sources {
		if s == nil {
			return fmt.Errorf("cell: AddFigures: source %d is nil", i+1)
		}
	}
	if e.host.AddFigures != nil {
		e.host.AddFigures(r, sources)
	}
	return nil
}

// OutDir returns the output folder of the study ("" when there is none).
func (e *Env) OutDir() string { return e.host.OutDir }

// checkName accepts plain file names only.
func checkName(name string) error {
	if name == "" || name == "." || name == ".." || strings.HasPrefix(name, ".") {
		return fmt.Errorf("cell: file name %q is not allowed: use a plain name such as \"points.csv\"", name)
	}
	for _, r := range name {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '.' || r == '-' || r == '_') {
			return fmt.Errorf("cell: file name %q is not allowed: only letters, digits, '.', '-' and '_' (no paths)", name)
		}
	}
	return nil
}

// EveryOutput asks for every output of the analyses in the run's
// evaluations.csv files, as the --every-output flag of `couplet run`
// does; by default they hold the status, design, objectives, constraints
// and margins. results.db keeps every output either way.
func (e *Env) EveryOutput() {
	if e.host.EveryOutput != nil {
		e.host.EveryOutput()
	}
}
