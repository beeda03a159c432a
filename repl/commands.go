package repl

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"

	"couplet/mdo"
)

// CommandPrefix starts a session command; no Go statement starts with it.
const CommandPrefix = "@"

// command is one session command.
type command struct {
	name, args, help string
	run              func(s *Session, ctx context.Context, arg string) (quit bool)
}

// commands lists the session commands in the order help shows them.
func commands() []command {
	return []command{
		{"cells", "", "list the cells of this session with their state", (*Session).cmdCells},
		{"again", "N", "run cell N again (as a new cell)", (*Session).cmdAgain},
		{"save", "FILE", "save the successful cells as a study file (.study); refused while a cell was interrupted (Ctrl-C), whose replay would run to its end and give another result", (*Session).cmdSave},
		{"replay", "FILE", "run the cells of a study file in this session", (*Session).cmdReplay},
		{"restore", "", "after the interpreter died: run the kept cells that had run to their end again, in order, in the fresh interpreter, to bring back their variables", (*Session).cmdRestore},
		{"coupling", "EXPR", "show the design structure matrix of a system (or of a study's system)", (*Session).cmdCoupling},
		{"report", "EXPR", "write the report, plots and summary of a result into a new folder of its study's name under the output folder (--out); an earlier report is never overwritten", (*Session).cmdReport},
		{"catalogue", "EXPR [PREFIX]", "list the variables of a system or study (unit, default, range, producer, consumers), those starting with PREFIX", (*Session).cmdCatalogue},
		{"vars", "", "list the session's variables", (*Session).cmdVars},
		{"imports", "", "list the packages a script may import", (*Session).cmdImports},
		{"fresh", "", "start afresh: forget every cell and variable", (*Session).cmdFresh},
		{"help", "", "show this help", (*Session).cmdHelp},
		{"quit", "", "leave the session (Ctrl-D, or Ctrl-C twice at an empty prompt, too)", (*Session).cmdQuit},
	}
}

// CommandNames returns the command names with their prefix.
func CommandNames() []string {
	var out []string
	for _, c := range commands() {
		out = append(out, CommandPrefix+c.name)
	}
	return out
}

// Command runs a session command line (starting with CommandPrefix) and
// reports whether the session should end.
func (s *Session) Command(ctx context.Context, line string) (quit bool) {
	line = strings.TrimSpace(strings.TrimPrefix(strings.TrimSpace(line), CommandPrefix))
	name, arg, _ := strings.Cut(line, " ")
	arg = strings.TrimSpace(arg)
	for _, c := range commands() {
		if c.name == name {
			return c.run(s, ctx, arg)
		}
	}
	fmt.Fprintf(s.opts.Stderr, "unknown command %s%s; type %shelp for the list\n", CommandPrefix, name, CommandPrefix)
	return false
}

// HelpText is the session's help.
func HelpText() string {
	var b strings.Builder
	fmt.Fprintf(&b, "couplet %s notebook: type Go; a cell runs when it is complete (two blank lines force it).\n", Version)
	b.WriteString("The value of a trailing expression is shown. Ctrl-C stops the running cell (an optimiser\n")
	b.WriteString("returns its best point so far); Tab completes package members and variables.\n\n")
	b.WriteString("The couplet command runs the cells in an interpreter process of its own. If that process\n")
	b.WriteString("dies (a panic in a goroutine, a stack overflow, memory past its cap, a kill), the session\n")
	b.WriteString("says which cell and what ended it, writes the results published before (with --out), ends\n")
	b.WriteString("the programs the cells started and starts a fresh interpreter that keeps the cells but not\n")
	b.WriteString("their variables: @cells lists them, @save saves them, @again N runs one, @restore runs\n")
	b.WriteString("again those that had run to their end.\n\n")
	w := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	for _, c := range commands() {
		fmt.Fprintf(w, "  %s%s %s\t%s\n", CommandPrefix, c.name, c.args, c.help)
	}
	w.Flush()
	b.WriteString(`
Scripts reach the session through package couplet/repl/cell: cell.Context() for the
running cell's context, cell.Attach(study) for seed, progress display and recording,
cell.Publish(result) to hand the result to 'couplet run', cell.WriteFile(name, data)
to write into the study's output folder. The packages mdo, disciplines, optimizers,
cell, fmt and math are imported in every session; import others as usual.

Results are conceptual-design estimates from simplified methods. They are not for
certification, flight or airworthiness decisions: defer to the applicable regulations
and to licensed engineering practice.
`)
	return b.String()
}

func (s *Session) cmdHelp(_ context.Context, _ string) bool {
	fmt.Fprint(s.opts.Stdout, HelpText())
	return false
}

func (s *Session) cmdQuit(_ context.Context, _ string) bool { return true }

func (s *Session) cmdCells(_ context.Context, _ string) bool {
	if len(s.cells) == 0 {
		fmt.Fprintln(s.opts.Stdout, "no cells yet")
		return false
	}
	w := tabwriter.NewWriter(s.opts.Stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(w, "cell\tstate\ttime\tfirst line")
	for _, c := range s.cells {
		state := "ok"
		switch {
		case c.Err != nil:
			state = "failed"
		case c.Interrupted:
			state = "cancelled"
		}
		first, _, _ := strings.Cut(c.Source, "\n")
		if n := strings.Count(c.Source, "\n"); n > 0 {
			first += fmt.Sprintf("  (+%d lines)", n)
		}
		fmt.Fprintf(w, "%d\t%s\t%s\t%s\n", c.Number, state, c.Elapsed.Round(1e6), first)
	}
	w.Flush()
	return false
}

func (s *Session) cmdAgain(ctx context.Context, arg string) bool {
	n, err := strconv.Atoi(arg)
	if err != nil {
		fmt.Fprintf(s.opts.Stderr, "%sagain needs a cell number, got %q\n", CommandPrefix, arg)
		return false
	}
	for _, c := range s.cells {
		if c.Number == n {
			s.Exec(ctx, c.Source)
			return false
		}
	}
	fmt.Fprintf(s.opts.Stderr, "there is no cell %d (cells are 1 to %d)\n", n, s.next-1)
	return false
}

// studyPath adds the .study extension when a file name has none.
func studyPath(p string) string {
	if filepath.Ext(p) == "" {
		return p + ".study"
	}
	return p
}

func (s *Session) cmdSave(_ context.Context, arg string) bool {
	if arg == "" {
		fmt.Fprintf(s.opts.Stderr, "%ssave needs a file name\n", CommandPrefix)
		return false
	}
	var srcs []string
	for i, c := range s.cells {
		if c.Err != nil {
			continue
		}
		if c.Interrupted {
			// a later run of the same source to its end takes its place
			if slices.ContainsFunc(s.cells[i+1:], func(d *Cell) bool { return d.Source == c.Source && d.Err == nil && !d.Interrupted }) {
				continue
			}
			fmt.Fprintln(s.opts.Stderr, interruptedSave(c))
			return false
		}
		srcs = append(srcs, c.Source)
	}
	p := studyPath(arg)
	if err := WriteStudy(p, srcs); err != nil {
		fmt.Fprintln(s.opts.Stderr, err)
		return false
	}
	fmt.Fprintf(s.opts.Stdout, "saved %d cells to %s\n", len(srcs), p)
	return false
}

// interruptedSave is the refusal of @save when a cell was interrupted and
// no later cell ran the same source to its end: its replay would run on
// to the end and give another answer, so the message names the cell, the
// evaluations it reached and what to do.
func interruptedSave(c *Cell) string {
	reached := ""
	if r, ok := c.Value.(*mdo.Result); ok && r != nil {
		reached = fmt.Sprintf(" after %d evaluations", r.Evaluations)
	}
	return fmt.Sprintf("%ssave: cell %d was interrupted%s; a replay would run it to its end and give another result, so it is not saved. "+
		"Run it again to its end (%sagain %d), or bound it in its source (an optimiser's MaxEvaluations) and run that cell, then %ssave again",
		CommandPrefix, c.Number, reached, CommandPrefix, c.Number, CommandPrefix)
}

func (s *Session) cmdReplay(ctx context.Context, arg string) bool {
	if arg == "" {
		fmt.Fprintf(s.opts.Stderr, "%sreplay needs a file name\n", CommandPrefix)
		return false
	}
	f, err := ReadStudy(studyPath(arg))
	if err != nil {
		fmt.Fprintln(s.opts.Stderr, err)
		return false
	}
	if err := s.Replay(ctx, f, true); err != nil {
		fmt.Fprintf(s.opts.Stderr, "replay stopped: %v\n", err)
	}
	return false
}

// Replay checks every import of the study against the sandbox, then runs
// its cells in order, stopping at the first that fails. When echo is set
// each cell's source is shown before it runs, after its prompt.
func (s *Session) Replay(ctx context.Context, f *StudyFile, echo bool) error {
	for i, c := range f.Cells {
		_, refs, err := splitCell(c.Source)
		if err != nil {
			continue // reported with its cell when it runs
		}
		if err := s.opts.Policy.check(s.next+i, refs); err != nil {
			return err
		}
	}
	for _, c := range f.Cells {
		if echo {
			fmt.Fprintf(s.opts.Stdout, "%s%s\n", Prompt(s.next), strings.ReplaceAll(c.Source, "\n", "\n"+ContinuePrompt))
		}
		if r := s.Exec(ctx, c.Source); r.Err != nil {
			return r.Err
		}
		if ctx.Err() != nil {
			return ctx.Err()
		}
	}
	return nil
}

func (s *Session) cmdRestore(ctx context.Context, _ string) bool {
	if len(s.unrestored) == 0 {
		fmt.Fprintln(s.opts.Stdout, "nothing to restore: every cell ran in this interpreter")
		return false
	}
	ran := 0
	for _, c := range s.cells {
		if !s.unrestored[c.Number] {
			continue
		}
		delete(s.unrestored, c.Number)
		if c.Err != nil || c.Interrupted {
			continue // it is kept as it ended, and not run
		}
		fmt.Fprintf(s.opts.Stdout, "%s%s\n", Prompt(c.Number), strings.ReplaceAll(c.Source, "\n", "\n"+ContinuePrompt))
		s.run(ctx, c)
		if c.Err != nil || ctx.Err() != nil {
			fmt.Fprintf(s.opts.Stderr, "%srestore stopped at cell %d; %srestore runs the cells after it\n", CommandPrefix, c.Number, CommandPrefix)
			return false
		}
		ran++
	}
	fmt.Fprintf(s.opts.Stdout, "restored %d cells\n", ran)
	return false
}

func (s *Session) cmdCoupling(ctx context.Context, arg string) bool {
	if arg == "" {
		fmt.Fprintf(s.opts.Stderr, "%scoupling needs a system or a study, e.g. %scoupling sys\n", CommandPrefix, CommandPrefix)
		return false
	}
	v, err := s.Eval(ctx, CommandPrefix+"coupling", arg)
	if err != nil {
		fmt.Fprintf(s.opts.Stderr, "%scoupling %s: %v\n", CommandPrefix, arg, err)
		return false
	}
	var sys *mdo.System
	switch t := v.(type) {
	case *mdo.System:
		sys = t
	case *mdo.Study:
		sys = t.System
	case mdo.Study:
		sys = t.System
	}
	if sys == nil {
		fmt.Fprintf(s.opts.Stderr, "%scoupling %s: want a *mdo.System or a *mdo.Study, got %T\n", CommandPrefix, arg, v)
		return false
	}
	fmt.Fprint(s.opts.Stdout, sys.DSM())
	return false
}

func (s *Session) cmdVars(_ context.Context, _ string) bool {
	g := s.Globals()
	names := make([]string, 0, len(g))
	for n := range g {
		names = append(names, n)
	}
	sort.Strings(names)
	w := tabwriter.NewWriter(s.opts.Stdout, 0, 0, 2, ' ', 0)
	for _, n := range names {
		v := g[n]
		t := "?"
		if v.IsValid() {
			t = v.Type().String()
		}
		fmt.Fprintf(w, "%s\t%s\n", n, t)
	}
	w.Flush()
	return false
}

func (s *Session) cmdImports(_ context.Context, _ string) bool {
	state := "sandbox on"
	if s.opts.Policy.Trusted {
		state = "sandbox lifted by " + TrustFlag
	}
	fmt.Fprintf(s.opts.Stdout, "importable packages (%s):\n  %s\n", state, strings.Join(s.opts.Policy.Importable(), "\n  "))
	return false
}

func (s *Session) cmdFresh(_ context.Context, _ string) bool {
	if err := s.reset(); err != nil {
		fmt.Fprintln(s.opts.Stderr, err)
		return false
	}
	fmt.Fprintln(s.opts.Stdout, "fresh session: every cell and variable forgotten")
	return false
}

func (s *Session) cmdReport(ctx context.Context, arg string) bool {
	if arg == "" {
		fmt.Fprintf(s.opts.Stderr, "%sreport needs a result, e.g. %sreport result\n", CommandPrefix, CommandPrefix)
		return false
	}
	if s.opts.Outputs == nil || s.opts.OutDir == "" {
		fmt.Fprintf(s.opts.Stderr, "%sreport: this session has no output folder; start it with --out DIR\n", CommandPrefix)
		return false
	}
	v, err := s.Eval(ctx, CommandPrefix+"report", arg)
	if err != nil {
		fmt.Fprintf(s.opts.Stderr, "%sreport %s: %v\n", CommandPrefix, arg, err)
		return false
	}
	r, ok := v.(*mdo.Result)
	if !ok || r == nil {
		fmt.Fprintf(s.opts.Stderr, "%sreport %s: want a *mdo.Result, got %T\n", CommandPrefix, arg, v)
		return false
	}
	if err := os.MkdirAll(s.opts.OutDir, 0o755); err != nil {
		fmt.Fprintf(s.opts.Stderr, "%sreport: %v\n", CommandPrefix, err)
		return false
	}
	dir, err := s.opts.Outputs.writeResults(ctx, s.Script(), []*mdo.Result{r}, true)
	if err != nil {
		fmt.Fprintf(s.opts.Stderr, "%sreport: %v\n", CommandPrefix, err)
		return false
	}
	fmt.Fprintf(s.opts.Stdout, "wrote %s\n", filepath.Join(dir, "report.html"))
	if note := s.opts.Outputs.reportNote(r); note != "" {
		fmt.Fprintf(s.opts.Stdout, "(%s)\n", note)
	}
	return false
}
