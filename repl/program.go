package repl

import (
	"context"
	"errors"
	"fmt"
	"go/parser"
	"go/token"
	"go/types"
	"reflect"
	"sort"
	"strconv"
	"strings"
	"sync"
	"time"

	"github.com/traefik/yaegi/interp"
)

// importSpecs lists the session's imports as import specs, and the name
// each package has in the session.
func (s *Session) importSpecs() ([]string, map[string]string) {
	keys := make([]string, 0, len(s.imported))
	for k := range s.imported {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	specs := []string{keepName + " " + strconv.Quote(keepPath)}
	local := map[string]string{}
	for _, k := range keys {
		name, path, _ := strings.Cut(k, " ")
		specs = append(specs, strings.TrimSpace(name+" "+strconv.Quote(path)))
		if name == "" {
			name = s.types.im.names[path]
			if name == "" {
				name = path[strings.LastIndex(path, "/")+1:]
			}
			local[path] = name
		} else if _, ok := local[path]; !ok && name != "_" && name != "." {
			local[path] = name
		}
	}
	return specs, local
}

// transform rewrites a cell for the interpreter (see transformCell).
func (s *Session) transform(c *Cell) (*cellProgram, error) {
	units, err := scanUnits(c.Source)
	if err != nil {
		return nil, err
	}
	specs, local := s.importSpecs()
	return transformCell(c.Source, c.Number, units, specs, local, s.types)
}

// runProgram runs a transformed cell. ran is false when the interpreter
// refused to compile the body function, before any of the cell's
// statements ran: the caller may then run the cell as it is.
func (s *Session) runProgram(ctx, hard context.Context, c *Cell, p *cellProgram) (ran bool, err error) {
	whole := chunk{kind: chunkStmt, src: c.Source, line: 1}
	for _, sp := range p.standIns {
		if err := s.it.Use(s.types.im.standInExports(sp, sp[strings.LastIndex(sp, "/")+1:])); err != nil {
			return false, fmt.Errorf("repl: naming the types of %s: %w", s.types.im.standIns[sp], err)
		}
	}
	if len(p.imports) > 0 {
		if err := s.importChunk(hard, c, chunk{kind: chunkImport, src: "import (" + strings.Join(p.imports, "; ") + ")", line: 1}); err != nil {
			return false, err
		}
	}
	if len(p.prev) > 0 {
		s.errBuf.reset()
		_, err := s.compile(strings.Join(p.prev, "; "))
		if err == nil {
			_, err = s.compile(strings.Join(p.keepPrev, "; "))
		}
		s.forwardStderr(s.errBuf.take())
		if err != nil {
			return true, s.cellError(c, whole, err, "")
		}
	}
	{
		s.errBuf.reset()
		s.ranChunk(c, p.decls, 1)
		_, err := s.compile(p.decls)
		trace := s.errBuf.take()
		s.forwardStderr(trace)
		if err != nil {
			if hard.Err() != nil {
				return true, s.stopped(ctx, c, 1)
			}
			return true, s.cellError(c, whole, err, "")
		}
		s.types.add(p.declared)
	}
	s.errBuf.reset()
	s.ranChunk(c, p.body, 1)
	if _, err := s.compile(p.body); err != nil {
		s.forwardStderr(s.errBuf.take())
		return false, s.cellError(c, whole, err, "")
	}
	s.shown, s.show = nil, false
	s.errBuf.reset()
	// The constant is the program's value: when the cell is stopped, the
	// interpreter's EvalWithContext returns at once and leaves its own
	// goroutine to finish by reading that value, and a constant reads
	// no memory that the next cell writes.
	s.exited, s.exitOnce = make(chan struct{}), &sync.Once{}
	if hard.Err() != nil {
		// stopped while it compiled: the call is not started, for the
		// interpreter gives a program started after its stop the new
		// run's mark, and such a program would never see the stop
		return true, s.stopped(ctx, c, firstLine(c.Source))
	}
	_, err = s.it.EvalWithContext(hard, p.call+"; 0")
	trace := s.errBuf.take()
	s.forwardStderr(trace)
	if err != nil {
		if hard.Err() != nil && (errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded)) {
			// The interpreter returns at once and leaves its goroutine
			// to unwind the body; wait for that (a grace period, a
			// second at least, at most: a host call may never come
			// back), so that the next cell does not run beside it.
			// The stop is seen at the body's next statement, but on a
			// loaded machine its goroutine may wait longer than a
			// short grace to be scheduled.
			t := time.NewTimer(max(s.opts.Grace, minUnwind))
			line := firstLine(c.Source)
			select {
			case <-s.exited:
				// the body has unwound: the line it was on when it
				// was stopped (a loop that never ends, say) is read
				// after its last write, unless a function of the
				// cells was held in a loop
				t.Stop()
				return true, s.stoppedIn(ctx, c, s.runningLine(c, p))
			case <-t.C:
				// the body may still be running: its line is not read
			}
			t.Stop()
			return true, s.stopped(ctx, c, line)
		}
		line := s.runningLine(c, p)
		var pe interp.Panic
		if errors.As(err, &pe) {
			return true, s.panicked(c, line, pe)
		}
		return true, s.cellError(c, whole, err, trace)
	}
	if p.show && s.show {
		s.display(c, p)
	}
	return true, nil
}

// minUnwind is the least time a stopped cell's body has to unwind
// before its line is given up (Options.Grace may be shorter).
const minUnwind = time.Second

// compile gives the interpreter source that declares and runs nothing of
// the user's (imports, the cell's declarations and hoisted variables,
// the body function) and waits for it. Stopping it part-way would leave
// the interpreter's goroutine compiling beside the next cell (a data race
// inside the interpreter); it ends by itself, and the cell's statements
// run only in the call that follows, which can be stopped.
func (s *Session) compile(src string) (reflect.Value, error) {
	return s.it.EvalWithContext(context.Background(), src)
}

// firstLine is the line of a cell's first statement or declaration
// after its imports.
func firstLine(src string) int {
	units, _ := scanUnits(src)
	for _, u := range units {
		if u.kind != chunkImport {
			return u.line
		}
	}
	return 1
}

// runningLine is the cell line the body function last recorded.
func (s *Session) runningLine(c *Cell, p *cellProgram) int {
	v, ok := s.it.Globals()[p.line]
	if !ok || !v.IsValid() || !v.CanInt() {
		return 1
	}
	l := int(v.Int())
	if n := strings.Count(c.Source, "\n") + 1; l < 1 || l > n {
		return 1
	}
	return l
}

// bodyExited is deferred by a cell's body function.
func (s *Session) bodyExited() {
	if s.exitOnce != nil {
		ch := s.exited
		s.exitOnce.Do(func() { close(ch) })
	}
}

// showValues receives the values of a cell's trailing expression.
func (s *Session) showValues(vs ...any) {
	s.shown, s.show = vs, true
}

// display shows the values of a cell's trailing expression: every value
// of a call with several results, less a last error that is nil; a nil
// single result of a call is not shown either.
func (s *Session) display(c *Cell, p *cellProgram) {
	vals := s.shown
	if len(vals) > 1 && p.errEnd && vals[len(vals)-1] == nil {
		vals = vals[:len(vals)-1]
	}
	var texts []string
	for i, v := range vals {
		if v == nil {
			if len(s.shown) == 1 && p.call1 {
				return
			}
			texts = append(texts, "<nil>")
			continue
		}
		if se, ok := v.(shownError); ok {
			v = se.shownText
		}
		if st, ok := v.(shownText); ok { // a cell's type with a String or Error method
			if i == 0 {
				c.Value = st.raw
			}
			texts = append(texts, st.text)
			continue
		}
		text, val, ok := formatValue(reflect.ValueOf(v))
		if !ok {
			continue
		}
		if i == 0 {
			c.Value = val
		}
		texts = append(texts, strings.TrimRight(text, "\n"))
	}
	if len(texts) > 0 {
		s.out.writeValue(strings.Join(texts, "\n"))
	}
}

// panicked is the error of a cell that panicked on a line. A script's
// panic(err) keeps err in the chain (the interpreter hands the value over
// as a reflect.Value). A panic a function of the cells placed (see
// placed.go) is reported on the line of its statement: in this cell, as
// the cell's line, in an earlier cell's code beside the line of this
// cell that was running.
func (s *Session) panicked(c *Cell, line int, p interp.Panic) error {
	var err error = p
	v := p.Value
	atCell, atLine := 0, 0
	if cp, ok := asCellPanic(v); ok {
		v = cp.value
		if cp.cell == c.Number {
			line = cp.line
		} else {
			atCell, atLine = cp.cell, cp.line
		}
	}
	if rv, ok := v.(reflect.Value); ok && rv.IsValid() && rv.CanInterface() {
		v = rv.Interface()
	}
	if ve, ok := v.(error); ok {
		err = panicError{p: p, value: ve}
	}
	return &CellError{Cell: c.Number, Line: line, Kind: "panic", Msg: panicText(v), AtCell: atCell, AtLine: atLine, Err: err}
}

// lineOf is line n (1-based) of src.
func lineOf(src string, n int) string {
	lines := strings.Split(src, "\n")
	if n < 1 || n > len(lines) {
		return ""
	}
	return lines[n-1]
}

// learnUntyped records, for the type check of later cells, what a cell
// run as it is declared: its functions, types and constants from their
// source, its variables from the types the interpreter gives them. A
// variable whose type cannot be written is forgotten, so that a later
// cell using it is run as it is too.
func (s *Session) learnUntyped(src string) {
	units, err := scanUnits(src)
	if err != nil {
		return
	}
	d := blank(src)
	for i := range units {
		if u := &units[i]; u.kind == chunkDecl && u.first != token.VAR {
			place(d, src, u)
		}
	}
	fset := token.NewFileSet()
	const prefix = "package main; "
	decls := map[string]bool{}
	if f, err := parser.ParseFile(fset, "decls", prefix+string(d), parser.SkipObjectResolution); err == nil {
		es := preludeOf(fset, f, string(d), len(prefix), nil)
		s.types.add(es)
		for _, e := range es {
			decls[e.name] = true
		}
	}
	_, local := s.importSpecs()
	g := s.it.Globals()
	for _, n := range declaredNames(src) {
		v, ok := g[n]
		if decls[n] || !ok || !v.IsValid() {
			continue
		}
		t := s.types.im.typeOf(v.Type())
		spec := "var " + n + " " + types.TypeString(t, func(p *types.Package) string {
			if name, ok := local[p.Path()]; ok {
				return name
			}
			return "?"
		})
		if !nameable(t, nil, s.types.im, map[types.Type]bool{}) || strings.Contains(spec, "?") {
			delete(s.types.entries, n)
			continue
		}
		s.types.add([]preludeEntry{{name: n, src: spec}})
	}
}

// genericHint explains an undefined member of a package whose every
// function is generic (slices, maps, cmp): the interpreter cannot call
// the generic functions of a compiled package.
func (s *Session) genericHint(msg string) string {
	m := qualifiedUndefinedRE.FindStringSubmatch(msg)
	if m == nil {
		return ""
	}
	_, local := s.importSpecs()
	for path, name := range local {
		if name == m[1] && len(s.types.im.tables[path]) == 0 {
			return fmt.Sprintf("; the functions of package %s are generic, and scripts cannot call the generic functions of a compiled package: write the loop out (or use package sort)", path)
		}
	}
	return ""
}
