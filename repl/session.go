package repl

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"reflect"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"sync"
	"time"

	"github.com/traefik/yaegi/interp"

	"couplet/mdo"
	"couplet/mdo/report"
	"couplet/mdo/runfolder"
	"couplet/repl/cell"
	"couplet/repl/symbols"
	"couplet/repl/symbols/trusted"
)

// Options configure a Session.
type Options struct {
	// Policy is the sandbox policy (the zero value is the sandbox).
	Policy Policy
	// Stdout receives what cells print and the values they show; Stderr
	// the error reports. Nil means io.Discard.
	Stdout, Stderr io.Writer
	// OutDir is the study's output folder (cell.WriteFile, the results
	// store); empty means none.
	OutDir string
	// Seed, when SeedSet, overrides the seed scripts declare.
	Seed    uint64
	SeedSet bool
	// Progress, if not nil, draws the progress of optimisations (make it
	// only for a terminal); nil keeps them quiet.
	Progress *Progress
	// NoErrorEcho keeps cell failures off Stderr (the caller reports
	// them itself); they are still returned in Cell.Err.
	NoErrorEcho bool
	// Recorder, if not nil, makes the recorder cell.Attach installs.
	Recorder func(st *mdo.Study) (mdo.Recorder, error)
	// Outputs, if not nil, records the attached studies and writes the
	// report on demand (@report); with OutDir set and neither Recorder
	// nor Outputs given, the session makes its own, and holds the
	// folder's lock while it lives: a folder another run or session
	// holds, or one holding an earlier run, is refused (a *UsageError)
	// unless ReplaceOld clears the earlier run's files first.
	Outputs *RunOutputs
	// ReplaceOld clears the files of the run OutDir holds before the
	// session makes its own outputs there (see runfolder.Clear).
	ReplaceOld bool
	// Script, if not empty, is the whole study file a headless run
	// replays: the identity every attached study records (Study.Script)
	// and a pick-up compares. Empty means the cells run so far, the
	// running one included.
	Script string
	// OnPublish, if not nil, is called with each result the script
	// publishes (cell.Publish), as it is published.
	OnPublish func(*mdo.Result)
	// Grace is how long a cancelled cell may take to come back (an
	// optimiser returning its best point) before the interpreter is
	// stopped; default 2 s.
	Grace time.Duration
	// TimeLimit is the time limit the caller set on the cells' context
	// (`couplet run --timeout`), named by the report of a cell it stops;
	// 0 when there is none or it is not known.
	TimeLimit time.Duration

	// Kept, if not empty, are the cells of an earlier interpreter of this
	// session, which died: the session starts with them as its history,
	// under their numbers, without running them. @cells lists them,
	// @save saves them, @again runs one, @restore runs those that had
	// run to their end again, bringing back their variables.
	Kept []*Cell
	// OnCell, if not nil, is called when a cell starts (finished false)
	// and when it has ended (finished true), with the cell.
	OnCell func(c *Cell, finished bool)
	// OnPanicLine, if not nil, is called, from the panicking goroutine,
	// with the cell and line of each frame of a panic in a cell's code
	// that can be placed, innermost first, as the panic unwinds (see
	// placePanic).
	OnPanicLine func(cell, line int)
}

// Cell is one executed cell of a session.
type Cell struct {
	Number int
	Source string
	// Output is what the cell printed, followed by its shown value: its
	// first MiB, with a note of how much more was printed (all of it is
	// streamed to Options.Stdout as it is printed).
	Output string
	// Value is the value of the trailing expression, if one was shown.
	Value any
	// Err is nil when the cell ran to its end.
	Err error
	// Interrupted is set when the cell was cancelled but came back by
	// itself (an optimiser returning its best point so far).
	Interrupted bool
	Elapsed     time.Duration
}

// Session is a notebook session: an interpreter and the cells run in it.
// Exec and the commands must be called from one goroutine; Interrupt may
// be called from any.
type Session struct {
	opts Options
	env  *cell.Env
	it   *interp.Interpreter

	out    *cellWriter
	errBuf *lockedBuffer

	cells    []*Cell
	next     int
	imported map[string]bool // imports the interpreter already has
	current  *Cell           // the cell Exec runs, nil between cells

	mu         sync.Mutex
	running    bool
	cellCtx    context.Context
	cancelSoft context.CancelFunc
	cancelHard context.CancelFunc
	interrupts int

	lock *runfolder.Lock // the output folder's, when the session made its outputs
	kept any             // the value of the command expression Eval runs

	types *typeState // the package-level names, for the type check of a cell
	shown []any      // the values a cell's trailing expression handed over
	show  bool       // set when the trailing expression was reached
	// exited is closed when the running cell's body function returns
	exited   chan struct{}
	exitOnce *sync.Once
	// unrestored are the numbers of the Kept cells @restore has not run
	unrestored map[int]bool
	// ran are the chunks the cells ran, the last ranKept (guarded by mu),
	// for OnPanicLine
	ran []ranChunk
	// panics are the panics of the cells' code placed while the cell
	// runs and not taken back by its recover calls, numbered in order
	// (guarded by panicMu; see notePanic)
	panicMu sync.Mutex
	panics  map[*cellPanic]int
	// hard is the context the running cell's interpreter runs under,
	// and heldCell, heldLine where a function literal of the cells was
	// when it stopped (see left); guarded by panicMu
	hard               context.Context
	heldCell, heldLine int
}

// NewSession starts a session with a fresh interpreter.
func NewSession(opts Options) (*Session, error) {
	if opts.Stdout == nil {
		opts.Stdout = io.Discard
	}
	if opts.Stderr == nil {
		opts.Stderr = io.Discard
	}
	if opts.Grace <= 0 {
		opts.Grace = 2 * time.Second
	}
	var lock *runfolder.Lock
	if opts.Outputs == nil && opts.Recorder == nil && opts.OutDir != "" {
		var err error
		if lock, err = GuardSessionFolder(opts.OutDir, opts.ReplaceOld); err != nil {
			return nil, err
		}
		opts.Outputs = NewRunOutputs(opts.OutDir)
	}
	if opts.Recorder == nil && opts.Outputs != nil {
		opts.Recorder = opts.Outputs.Recorder
	}
	s := &Session{opts: opts, lock: lock}
	if err := s.reset(); err != nil {
		lock.Release()
		return nil, err
	}
	s.keep(opts.Kept)
	return s, nil
}

// GuardSessionFolder takes the lock of a session's output folder dir and
// refuses a folder that holds another run, unless replace clears that
// run's files first (a *UsageError). The caller releases the lock.
func GuardSessionFolder(dir string, replace bool) (*runfolder.Lock, error) {
	return guardFolder(RunOptions{OutDir: dir, Replace: replace}, "--replace clears its files first, or choose another folder")
}

// keep makes the cells of an earlier interpreter the session's history.
func (s *Session) keep(cells []*Cell) {
	if len(cells) == 0 {
		return
	}
	s.unrestored = map[int]bool{}
	for _, c := range cells {
		s.cells = append(s.cells, c)
		s.unrestored[c.Number] = true
		s.next = max(s.next, c.Number+1)
	}
}

// reset replaces the interpreter and forgets every cell.
func (s *Session) reset() error {
	s.out = &cellWriter{w: s.opts.Stdout}
	s.errBuf = &lockedBuffer{onWrite: s.placePanic}
	s.env = cell.NewEnv(cell.Host{
		Context:  s.currentContext,
		Seed:     s.opts.Seed,
		SeedSet:  s.opts.SeedSet,
		OutDir:   s.opts.OutDir,
		Progress: s.progressFor(),
		Recorder: s.opts.Recorder,
		Script:   s.identity,
		Programs: s.opts.Policy.Gate(),
		EveryOutput: func() {
			if s.opts.Outputs != nil {
				s.opts.Outputs.askEveryOutput()
			}
		},
		Published: s.opts.OnPublish,
		AddFigures: func(r *mdo.Result, srcs []report.FigureSource) {
			if s.opts.Outputs != nil {
				s.opts.Outputs.AddFigures(r, srcs...)
			}
		},
	})
	it := interp.New(interp.Options{Stdout: s.out, Stderr: s.errBuf, Stdin: strings.NewReader("")})
	if err := it.Use(symbols.Symbols); err != nil {
		return fmt.Errorf("repl: loading the symbol tables: %w", err)
	}
	if s.opts.Policy.Trusted {
		if err := it.Use(trusted.Symbols); err != nil {
			return fmt.Errorf("repl: loading the trusted symbol tables: %w", err)
		}
	}
	if err := it.Use(s.env.Exports()); err != nil {
		return fmt.Errorf("repl: loading the cell package: %w", err)
	}
	keep := interp.Exports{keepPath + "/keep": {"Value": reflect.ValueOf(s.keepValue), "Show": reflect.ValueOf(s.showValues), "Exited": reflect.ValueOf(s.bodyExited),
		"Repanic": reflect.ValueOf(s.repanic), "Left": reflect.ValueOf(s.left), "Unplaced": reflect.ValueOf(s.unplace), "Text": reflect.ValueOf(showText), "Fault": reflect.ValueOf(showError), "ErrorTree": reflect.ValueOf(errorTree)}}
	if err := it.Use(keep); err != nil {
		return fmt.Errorf("repl: loading the command package: %w", err)
	}
	tables := []interp.Exports{symbols.Symbols, s.env.Exports(), keep}
	if s.opts.Policy.Trusted {
		tables = append(tables, trusted.Symbols)
	}
	s.types = &typeState{im: newSymbolImporter(tables...), entries: map[string]string{}}
	s.it = it
	s.cells = nil
	s.next = 1
	s.unrestored = nil
	s.mu.Lock()
	s.ran = nil
	s.mu.Unlock()
	return s.importPrelude()
}

// progressFor is the progress factory handed to the cell package.
func (s *Session) progressFor() func(string) func(mdo.Progress) {
	if s.opts.Progress == nil {
		return nil
	}
	return s.opts.Progress.For
}

// Close closes the session's case stores and releases its output
// folder.
func (s *Session) Close() error {
	var err error
	if s.opts.Outputs != nil {
		err = s.opts.Outputs.Close()
	}
	if lerr := s.lock.Release(); err == nil {
		err = lerr
	}
	s.lock = nil
	return err
}

// Env returns the session's cell environment (published results, seed).
func (s *Session) Env() *cell.Env { return s.env }

// Cells returns the cells run so far, in order.
func (s *Session) Cells() []*Cell { return append([]*Cell(nil), s.cells...) }

// NextNumber returns the number the next cell will get.
func (s *Session) NextNumber() int { return s.next }

// Script returns the source of the successful cells as a study file.
func (s *Session) Script() string {
	var srcs []string
	for _, c := range s.cells {
		if c.Err == nil {
			srcs = append(srcs, c.Source)
		}
	}
	return FormatStudy(srcs)
}

// identity is the script an attached study records and a pick-up
// compares: the whole file of a headless run, else the successful cells
// so far and the running one.
func (s *Session) identity() string {
	if s.opts.Script != "" {
		return s.opts.Script
	}
	var srcs []string
	for _, c := range s.cells {
		if c.Err == nil {
			srcs = append(srcs, c.Source)
		}
	}
	if s.current != nil && !slices.Contains(s.cells, s.current) {
		srcs = append(srcs, s.current.Source)
	}
	return FormatStudy(srcs)
}

// currentContext is the context of the running cell.
func (s *Session) currentContext() context.Context {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.cellCtx == nil {
		return context.Background()
	}
	return s.cellCtx
}

// Interrupt cancels the running cell: the first call cancels the cell's
// context (optimisers return their best point so far) and stops the
// interpreter if the cell has not come back after the grace period; a
// second call stops it at once. It reports whether a cell was running.
func (s *Session) Interrupt() bool {
	s.mu.Lock()
	defer s.mu.Unlock()
	if !s.running {
		return false
	}
	s.interrupts++
	if s.interrupts == 1 {
		s.cancelSoft()
	} else {
		s.cancelHard()
	}
	return true
}

// Exec runs one cell. Its output goes to the session's Stdout as it is
// produced; a failure is reported on Stderr and returned in Cell.Err (a
// *CellError or a *RefusedImportError). ctx bounds the cell: when it is
// cancelled or its deadline passes, the cell is cancelled as by Interrupt.
func (s *Session) Exec(ctx context.Context, src string) *Cell {
	c := &Cell{Number: s.next, Source: strings.TrimRight(src, "\n")}
	s.next++
	s.run(ctx, c)
	s.cells = append(s.cells, c)
	return c
}

// run runs cell c, a new one or a kept one run again in its place, and
// records how it ended in it.
func (s *Session) run(ctx context.Context, c *Cell) {
	c.Err, c.Value, c.Interrupted = nil, nil, false
	if s.opts.OnCell != nil {
		s.opts.OnCell(c, false)
	}
	start := time.Now()
	s.current = c
	s.takePanics()
	published := len(s.env.Published())
	c.Err = s.exec(ctx, c)
	if ps := s.takePanics(); c.Err == nil {
		if note := recoveredReport(c.Number, ps); note != "" {
			fmt.Fprintln(s.opts.Stderr, note)
		}
	}
	if c.Err == nil && !s.opts.NoErrorEcho {
		// a headless run says it of its result itself (AllFailedError)
		for _, r := range s.env.Published()[published:] {
			if note := allFailedNote(c.Number, r); note != "" {
				fmt.Fprintln(s.opts.Stderr, note)
			}
		}
	}
	s.current = nil
	c.Elapsed = time.Since(start)
	s.opts.Progress.Close()
	c.Output = s.out.take()
	if c.Err != nil && !s.opts.NoErrorEcho {
		fmt.Fprintln(s.opts.Stderr, c.Err)
	}
	if s.opts.OnCell != nil {
		s.opts.OnCell(c, true)
	}
}

// exec splits, checks and runs the chunks of a cell.
func (s *Session) exec(ctx context.Context, c *Cell) error {
	chunks, imports, err := splitCell(c.Source)
	if err != nil {
		var le *lineError
		if errors.As(err, &le) {
			return &CellError{Cell: c.Number, Line: le.line, Kind: "syntax", Msg: le.msg, Err: err}
		}
		return &CellError{Cell: c.Number, Line: 1, Kind: "syntax", Msg: err.Error(), Err: err}
	}
	if err := s.opts.Policy.check(c.Number, imports); err != nil {
		return err
	}
	soft, hard, release := s.guard(ctx)
	defer release()
	for _, ch := range chunks {
		if ch.kind != chunkImport {
			continue
		}
		if err := s.importChunk(hard, c, ch); err != nil {
			return err
		}
	}
	prog, terr := s.transform(c)
	var te *typeCheckError
	if errors.As(terr, &te) && !te.interpreterMay() {
		return &CellError{Cell: c.Number, Line: te.line, Kind: "compile", Msg: te.msg + renamedHint(te.msg, lineOf(c.Source, te.line)) + s.nearHint(te.msg), Err: terr}
	}
	if terr == nil {
		ran, err := s.runProgram(ctx, hard, c, prog)
		if ran || err == nil {
			return s.finish(ctx, soft, c, err)
		}
		terr = err // the interpreter cannot compile the function; try the cell as it is
	}
	if err := s.runChunks(ctx, hard, c, chunks); err != nil {
		if errors.As(terr, &te) {
			var ce *CellError
			if errors.As(err, &ce) && ce.Kind == "compile" {
				// the type check names the real cause and its line
				return &CellError{Cell: c.Number, Line: te.line, Kind: "compile", Msg: te.msg + renamedHint(te.msg, lineOf(c.Source, te.line)) + s.genericHint(te.msg) + s.nearHint(te.msg), Err: err}
			}
		}
		if ce, ok := terr.(*CellError); ok {
			var old *CellError
			if errors.As(err, &old) && old.Kind == "compile" {
				return ce
			}
		}
		s.learnUntyped(c.Source)
		return err
	}
	s.learnUntyped(c.Source)
	return s.finish(ctx, soft, c, nil)
}

// importChunk gives the interpreter a cell's imports it does not have.
func (s *Session) importChunk(hard context.Context, c *Cell, ch chunk) error {
	fresh, keys, err := s.freshImports(ch.src)
	if err != nil {
		return s.cellError(c, ch, err, "")
	}
	if fresh == "" {
		return nil
	}
	s.errBuf.reset()
	if _, err := s.compile(fresh); err != nil {
		s.forwardStderr(s.errBuf.take())
		return s.cellError(c, ch, err, "")
	}
	for _, k := range keys {
		s.imported[k] = true
	}
	return nil
}

// finish notes a cell that was cancelled but came back by itself.
func (s *Session) finish(ctx, soft context.Context, c *Cell, err error) error {
	if err == nil && soft.Err() != nil {
		c.Interrupted = true
		fmt.Fprintf(s.opts.Stderr, "cell %d was cancelled (%s) and returned what it had\n", c.Number, s.reason(ctx))
	}
	return err
}

// runChunks runs a cell chunk by chunk at the interpreter's top level:
// the way of a cell the type check refused (it may still be one the
// interpreter accepts, such as a literal of an older settings layout).
func (s *Session) runChunks(ctx, hard context.Context, c *Cell, chunks []chunk) error {
	for _, ch := range chunks {
		if hard.Err() != nil {
			return s.stopped(ctx, c, ch.line)
		}
		src := ch.src
		var newImports []string
		if ch.kind == chunkImport {
			fresh, keys, err := s.freshImports(src)
			if err != nil {
				return s.cellError(c, ch, err, "")
			}
			if fresh == "" {
				continue
			}
			src, newImports = fresh, keys
		}
		s.errBuf.reset()
		s.ranChunk(c, src, ch.line)
		v, err := s.it.EvalWithContext(hard, src)
		if err == nil {
			for _, k := range newImports {
				s.imported[k] = true
			}
		}
		trace := s.errBuf.take()
		s.forwardStderr(trace)
		if err != nil {
			if hard.Err() != nil && (errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded)) {
				return s.stopped(ctx, c, ch.line)
			}
			return s.cellError(c, ch, err, trace)
		}
		if ch.expr && !ch.quiet {
			if text, val, ok := formatValue(v); ok && !(ch.call && val == nil) {
				c.Value = val
				s.out.writeValue(text)
			}
		}
	}
	return nil
}

// guard makes the running code interruptible, for a cell and for a
// command's expression alike: soft is cancelled by ctx or the first
// Interrupt (cell.Context returns it, so optimisers return their best
// point); hard, which the interpreter runs under, a grace period later or
// by a second Interrupt. release ends the guard.
func (s *Session) guard(ctx context.Context) (soft, hard context.Context, release func()) {
	soft, cancelSoft := context.WithCancel(ctx)
	hard, cancelHard := context.WithCancel(context.Background())
	var timer *time.Timer
	var tmu sync.Mutex
	stopWatch := context.AfterFunc(soft, func() {
		tmu.Lock()
		timer = time.AfterFunc(s.opts.Grace, cancelHard)
		tmu.Unlock()
	})
	s.mu.Lock()
	s.running, s.cellCtx, s.cancelSoft, s.cancelHard, s.interrupts = true, soft, cancelSoft, cancelHard, 0
	s.mu.Unlock()
	s.panicMu.Lock()
	s.hard, s.heldCell, s.heldLine = hard, 0, 0
	s.panicMu.Unlock()
	return soft, hard, func() {
		s.panicMu.Lock()
		s.hard = nil
		s.panicMu.Unlock()
		stopWatch()
		tmu.Lock()
		if timer != nil {
			timer.Stop()
		}
		tmu.Unlock()
		cancelHard()
		cancelSoft()
		s.mu.Lock()
		s.running, s.cellCtx = false, nil
		s.mu.Unlock()
	}
}

// stopped is the error of a cell stopped by the interpreter.
func (s *Session) stopped(ctx context.Context, c *Cell, line int) error {
	return &CellError{Cell: c.Number, Line: line, Kind: "stopped", Msg: s.reason(ctx)}
}

// stoppedIn is stopped for a cell whose body has unwound: placed where a
// function of the cells with a loop was when the interpreter ended it
// (see Session.left), in this cell as its line, in an earlier cell's
// code beside the line of this cell that was running.
func (s *Session) stoppedIn(ctx context.Context, c *Cell, line int) error {
	e := &CellError{Cell: c.Number, Line: line, Kind: "stopped", Msg: s.reason(ctx)}
	switch cell, at := s.heldAt(); {
	case at == 0:
	case cell == c.Number:
		e.Line = at
	default:
		e.AtCell, e.AtLine = cell, at
	}
	return e
}

// reason tells why the running cell was cancelled.
func (s *Session) reason(ctx context.Context) string {
	s.mu.Lock()
	n := s.interrupts
	s.mu.Unlock()
	switch {
	case n > 0:
		return "interrupted (Ctrl-C)"
	case errors.Is(ctx.Err(), context.DeadlineExceeded):
		if s.opts.TimeLimit > 0 {
			return fmt.Sprintf("the time limit of %v was reached", s.opts.TimeLimit)
		}
		return "time limit reached"
	}
	return "cancelled"
}

// posRE finds the line:column an interpreter error starts with.
var posRE = regexp.MustCompile(`^(?:[^\s:]*\.go:)?(\d+):(\d+): `)

// panicRE finds the frames the interpreter prints when a cell panics.
var panicRE = regexp.MustCompile(`(?m)^(\d+):(\d+): panic: main\(\.\.\.\)$`)

// cellError turns an interpreter error into a CellError on a cell line.
func (s *Session) cellError(c *Cell, ch chunk, err error, trace string) error {
	var p interp.Panic
	if errors.As(err, &p) {
		line := ch.line
		// The outermost frame is the chunk itself; use its line when the
		// interpreter placed it inside the chunk.
		if m := panicRE.FindAllStringSubmatch(trace, -1); len(m) > 0 {
			l, _ := strconv.Atoi(m[len(m)-1][1])
			if l >= 1 && l <= strings.Count(ch.src, "\n")+1 {
				line = ch.line + l - 1
			}
		}
		return s.panicked(c, line, p)
	}
	msg := err.Error()
	line := ch.line
	if m := posRE.FindStringSubmatch(msg); m != nil {
		// The interpreter sometimes places an error in a source of its
		// own; trust the line only when it lies inside the chunk.
		if l, _ := strconv.Atoi(m[1]); l >= 1 && l <= strings.Count(ch.src, "\n")+1 {
			line = ch.line + l - 1
		}
		msg = msg[len(m[0]):]
	}
	msg = cleanMessage(msg)
	if lines := strings.Split(ch.src, "\n"); line-ch.line >= 0 && line-ch.line < len(lines) {
		msg += renamedHint(msg, lines[line-ch.line]) + s.nearHint(msg)
	}
	return &CellError{Cell: c.Number, Line: line, Kind: "compile", Msg: msg, Err: err}
}

// cleanMessage rewords the interpreter messages that would mislead.
func cleanMessage(msg string) string {
	if strings.Contains(msg, "unable to find source related to") {
		return "package not available to study scripts: " + msg[:strings.Index(msg, " error:")]
	}
	if msg == "constant definition loop" {
		return "undefined name on this line (the interpreter reports it as a constant definition loop): check the spelling of the names used"
	}
	if strings.Contains(msg, "CFG post-order panic") {
		return "the interpreter could not compile this statement (" + msg + ")"
	}
	return msg
}

// forwardStderr passes on what the interpreter wrote to its standard
// error, less its own panic trace.
func (s *Session) forwardStderr(trace string) {
	if trace == "" {
		return
	}
	var keep []string
	for _, l := range strings.Split(strings.TrimRight(trace, "\n"), "\n") {
		if strings.Contains(l, ": panic: ") && posRE.MatchString(l) {
			continue
		}
		keep = append(keep, l)
	}
	if len(keep) > 0 {
		fmt.Fprintln(s.opts.Stderr, strings.Join(keep, "\n"))
	}
}

// Eval evaluates a Go expression in the session, for the commands that
// take one (cmd names the command in errors, e.g. "@coupling"). The
// expression may be preceded by imports; it goes through the sandbox
// check of a cell (a refused import is a *RefusedImportError naming the
// command, and nothing runs) and runs as a cell does: Interrupt, or the
// end of ctx, stops it (the error then says why, and wraps the
// interpreter's context.Canceled). It is not kept as a cell. Statements and declarations are refused: they
// belong in a cell.
func (s *Session) Eval(ctx context.Context, cmd, expr string) (any, error) {
	chunks, imports, err := splitCell(expr)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", cmd, err)
	}
	if err := s.opts.Policy.check(0, imports); err != nil {
		var re *RefusedImportError
		if errors.As(err, &re) {
			re.Command = cmd
		}
		return nil, err
	}
	if len(chunks) == 0 || !chunks[len(chunks)-1].expr {
		return nil, fmt.Errorf("%s takes an expression (imports may come first), not %q: run statements in a cell", cmd, expr)
	}
	for _, ch := range chunks[:len(chunks)-1] {
		if ch.kind != chunkImport {
			return nil, fmt.Errorf("%s takes an expression (imports may come first), not %q: run statements in a cell", cmd, expr)
		}
	}
	_, hard, release := s.guard(ctx)
	defer release()
	s.kept = nil
	for _, ch := range chunks {
		src := ch.src
		if ch.expr {
			// The interpreter runs a stopped expression's call a second
			// time, out of reach of the stop, when it is asked for the
			// value; an argument of a host function it stops for good.
			// The constant after it is the program's value: the
			// interpreter's abandoned goroutine then reads no memory
			// the next cell writes (see runProgram).
			src = keepName + ".Value(" + src + "); 0"
		}
		var newImports []string
		if ch.kind == chunkImport {
			fresh, keys, err := s.freshImports(src)
			if err != nil {
				return nil, err
			}
			if fresh == "" {
				continue
			}
			src, newImports = fresh, keys
		}
		s.errBuf.reset()
		_, err = s.it.EvalWithContext(hard, src)
		s.forwardStderr(s.errBuf.take())
		if err != nil {
			if hard.Err() != nil && (errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded)) {
				return nil, fmt.Errorf("stopped: %s: %w", s.reason(ctx), err)
			}
			return nil, err
		}
		for _, k := range newImports {
			s.imported[k] = true
		}
	}
	v := s.kept
	s.kept = nil
	if v == nil {
		return nil, fmt.Errorf("%s has no value", expr)
	}
	return v, nil
}

// keepPath is the import path of the host package through which Eval
// receives a command's value, imported as keepName by every session
// (scripts cannot import it: the sandbox does not list it).
const (
	keepPath = "couplet/repl/internal/keep"
	keepName = "couplet_keep"
)

// keepValue receives a command expression's value.
func (s *Session) keepValue(v any) { s.kept = v }

// Globals returns the names of the session's variables and constants,
// less those the session declares for itself (see transform.go).
func (s *Session) Globals() map[string]reflect.Value {
	g := s.it.Globals()
	for n := range g {
		if strings.HasPrefix(n, sessionPrefix) {
			delete(g, n)
		}
	}
	return g
}

// outputKept is how much of a cell's printed output Cell.Output keeps:
// the output itself is streamed to Stdout as it is printed, so a cell
// that prints gigabytes holds no more than this in memory.
const outputKept = 1 << 20

// cellWriter streams what a cell prints to the session's Stdout and keeps
// the first outputKept bytes of it for Cell.Output.
type cellWriter struct {
	mu      sync.Mutex
	w       io.Writer
	kept    bytes.Buffer
	written int64 // bytes written since the last take
	// nl is true when the last byte written was a newline.
	nl bool
}

func (c *cellWriter) Write(p []byte) (int, error) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if room := outputKept - c.kept.Len(); room > 0 {
		c.kept.Write(p[:min(room, len(p))])
	}
	c.written += int64(len(p))
	if len(p) > 0 {
		c.nl = p[len(p)-1] == '\n'
	}
	return c.w.Write(p)
}

// writeValue shows a value on a line of its own.
func (c *cellWriter) writeValue(text string) {
	c.mu.Lock()
	pre := ""
	if c.written > 0 && !c.nl {
		pre = "\n"
	}
	c.mu.Unlock()
	if !strings.HasSuffix(text, "\n") {
		text += "\n"
	}
	io.WriteString(c, pre+text)
}

// take returns what was kept of the output since the last take, with a
// note of what was printed but not kept, and starts afresh.
func (c *cellWriter) take() string {
	c.mu.Lock()
	defer c.mu.Unlock()
	s := c.kept.String()
	if more := c.written - int64(c.kept.Len()); more > 0 {
		s += fmt.Sprintf("\n… (%d more bytes printed, not kept)\n", more)
	}
	c.kept = bytes.Buffer{}
	c.written, c.nl = 0, false
	return s
}

// lockedBuffer is a buffer safe for the interpreter's goroutines.
type lockedBuffer struct {
	mu  sync.Mutex
	buf bytes.Buffer
	// onWrite, if not nil, sees each write as it is made
	onWrite func(string)
}

func (b *lockedBuffer) Write(p []byte) (int, error) {
	if b.onWrite != nil {
		b.onWrite(string(p))
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.buf.Write(p)
}

func (b *lockedBuffer) reset() {
	b.mu.Lock()
	b.buf.Reset()
	b.mu.Unlock()
}

func (b *lockedBuffer) take() string {
	b.mu.Lock()
	defer b.mu.Unlock()
	s := b.buf.String()
	b.buf.Reset()
	return s
}

// panicError is the interpreter's panic of an error value: errors.Is and
// errors.As reach both the panic and the error the script panicked with.
type panicError struct {
	p     interp.Panic
	value error
}

func (e panicError) Error() string   { return e.p.Error() }
func (e panicError) Unwrap() []error { return []error{e.p, e.value} }
