package repl

import (
	"fmt"
	"go/ast"
	"go/token"
	"go/types"
	"reflect"
	"runtime"
	"sort"
	"strconv"
	"strings"
)

// A panic in a function a cell declares (a function, a method, a
// function literal) is placed on the cell line of the statement that
// panicked: the interpreter's own report names only the line where the
// function starts. Each such function records, in a variable of its own
// call, the line of the statement it is on, and a deferred function
// recovers a panic, wraps its value with that cell and line (a
// *cellPanic) and panics again. The framework's recovers (an objective
// that panics is a failed evaluation) see the wrapped value, whose text
// names the cell and line; the cell's own recover calls are rewritten to
// unwrap it, so that a script recovers the value it panicked with, as in
// Go. A function that cannot panic by itself (arithmetic, calls of the
// cell's own functions, which place their own panics, and of package
// math) is left as it is: the recording costs a deferred call per call.

// cellPanic is a panic of a cell's code with the cell and line of the
// statement that panicked.
type cellPanic struct {
	value      any
	cell, line int
}

// Error names the value and the place, that of the innermost function
// of the cells that panicked.
func (p *cellPanic) Error() string {
	return fmt.Sprintf("%s (cell %d, line %d)", panicText(p.value), p.cell, p.line)
}

// panicText is the text of a panic's value, with the interpreter's
// wording of Go's run-time errors (it indexes, slices and follows
// pointers through package reflect) put back into Go's.
func panicText(v any) string {
	text := fmt.Sprint(v)
	switch {
	case text == "reflect: slice index out of range", text == "reflect: array index out of range", text == "reflect: string index out of range":
		return "runtime error: index out of range"
	case strings.HasPrefix(text, "reflect.Value.Slice") && strings.HasSuffix(text, "out of bounds"):
		return "runtime error: slice bounds out of range"
	case strings.HasPrefix(text, "reflect: call of reflect.Value.") && strings.HasSuffix(text, " on zero Value"),
		text == "reflect.Value.Call: call of nil function":
		return "runtime error: invalid memory address or nil pointer dereference"
	}
	if m := posRE.FindStringIndex(text); m != nil && strings.HasPrefix(text[m[1]:], "interface conversion: ") {
		return text[m[1]:] // less a position in the interpreter's own source
	}
	return text
}

// Unwrap returns the value the code panicked with, when it is an error.
func (p *cellPanic) Unwrap() error {
	if e, ok := p.value.(error); ok {
		return e
	}
	return nil
}

// asCellPanic is the *cellPanic a recovered value holds, if any (the
// interpreter may hand a value over as a reflect.Value).
func asCellPanic(v any) (*cellPanic, bool) {
	if rv, ok := v.(reflect.Value); ok && rv.IsValid() && rv.CanInterface() {
		v = rv.Interface()
	}
	p, ok := v.(*cellPanic)
	return p, ok
}

// placePanic is what a function of a cell panics again with (see
// repanic): the value
// it recovered, placed on the cell and line it was on, unless an inner
// function of the cells placed it already.
func placePanic(v any, cell, line int) any {
	if _, ok := asCellPanic(v); ok {
		return v
	}
	if rv, ok := v.(reflect.Value); ok && rv.IsValid() && rv.CanInterface() {
		v = rv.Interface()
	}
	return &cellPanic{value: v, cell: cell, line: line}
}

// repanic panics again with placePanic's value. It is the host that
// panics: a panic of the interpreter's code hands the framework's
// recovers a reflect.Value, which hides the *cellPanic (and the error
// it wraps) from them. The place of a panic placed here first goes to
// Options.OnPanicLine, before the frames the interpreter reports as the
// panic unwinds (the panic of a goroutine a cell started ends the
// process, and that is how it can still be placed).
func (s *Session) repanic(v any, cell, line int) {
	p := placePanic(v, cell, line)
	if _, was := asCellPanic(v); !was {
		if cp, ok := p.(*cellPanic); ok && !inStudyCheck() {
			s.notePanic(cp)
		}
		if s.opts.OnPanicLine != nil {
			s.opts.OnPanicLine(cell, line)
		}
	}
	panic(p)
}

// studyCheck is the function of package mdo through which Study.Check
// (and so cell.Attach, and every optimiser's start) calls each objective
// and constraint function once on the defaults, to refuse a misspelt
// name before the run: a panic there is none of the run's evaluations.
const studyCheck = "couplet/mdo.readsKnownNames"

// inStudyCheck reports whether the goroutine is in Study.Check's call of
// a function of the cells (a look at its stack, on a panic only).
func inStudyCheck() bool {
	pcs := make([]uintptr, 256)
	frames := runtime.CallersFrames(pcs[:runtime.Callers(2, pcs)])
	for {
		f, more := frames.Next()
		if f.Function == studyCheck {
			return true
		}
		if !more {
			return false
		}
	}
}

// A panic of the cells' code that the framework recovers (an objective,
// a constraint or a discipline that panics fails that evaluation, and
// the optimiser goes on) leaves the cell running to its end with nothing
// said; the session keeps each panic placed while a cell runs, forgets
// those the cells' own recover calls take back, and names what is left
// when the cell ends (see reportRecovered).

// notePanic keeps a panic placed while the cell runs.
func (s *Session) notePanic(p *cellPanic) {
	s.panicMu.Lock()
	defer s.panicMu.Unlock()
	if s.panics == nil {
		s.panics = map[*cellPanic]int{}
	}
	s.panics[p] = len(s.panics)
}

// unplace is what a script's recover call returns (unplacePanic); the
// panic it takes back is the script's own business, not the framework's.
func (s *Session) unplace(v any) any {
	if p, ok := asCellPanic(v); ok {
		s.panicMu.Lock()
		delete(s.panics, p)
		s.panicMu.Unlock()
	}
	return unplacePanic(v)
}

// takePanics returns the panics kept since the last call, oldest first,
// and forgets them.
func (s *Session) takePanics() []*cellPanic {
	s.panicMu.Lock()
	defer s.panicMu.Unlock()
	out := make([]*cellPanic, 0, len(s.panics))
	for p := range s.panics {
		out = append(out, p)
	}
	order := s.panics
	sort.Slice(out, func(i, j int) bool { return order[out[i]] < order[out[j]] })
	s.panics = nil
	return out
}

// recoveredReport is the note of a cell that ran to its end although
// code of the cells panicked in calls the framework recovered: how many,
// and each message and place with its count, the commonest first (at
// most three). "" when there were none.
func recoveredReport(cell int, ps []*cellPanic) string {
	if len(ps) == 0 {
		return ""
	}
	type group struct {
		text  string
		count int
	}
	var groups []*group
	byText := map[string]*group{}
	for _, p := range ps {
		t := p.Error()
		g := byText[t]
		if g == nil {
			g = &group{text: t}
			byText[t] = g
			groups = append(groups, g)
		}
		g.count++
	}
	sort.SliceStable(groups, func(i, j int) bool { return groups[i].count > groups[j].count })
	times := "once in a call"
	if len(ps) > 1 {
		times = fmt.Sprintf("%d times in calls", len(ps))
	}
	var b strings.Builder
	fmt.Fprintf(&b, "cell %d ran to its end, but code of the cells panicked %s the framework recovered (an objective, constraint or discipline that panics fails the evaluation, and the run goes on):", cell, times)
	for i, g := range groups {
		if i == 3 {
			fmt.Fprintf(&b, "\n  and %d more messages", len(groups)-3)
			break
		}
		fmt.Fprintf(&b, "\n  %d × %s", g.count, g.text)
	}
	return b.String()
}

// unplacePanic is what a script's recover call returns: the value the
// code panicked with (the interpreter's recover gives a value the
// interpreter's code panicked with as a reflect.Value).
func unplacePanic(v any) any {
	if p, ok := asCellPanic(v); ok {
		return p.value
	}
	if rv, ok := v.(reflect.Value); ok && rv.IsValid() && rv.CanInterface() {
		return rv.Interface()
	}
	return v
}

// placeVar is the variable of a function's call that holds its line.
const placeVar = "couplet_at"

// placing are the edits that place the panics of the functions in root
// (the function declarations and function literals of a cell's code;
// root itself when it is one) and unwrap the values the cell's recover
// calls return.
func placing(root ast.Node, info *checked, fset *token.FileSet, cell int, off func(token.Pos) int) []edit {
	var out []edit
	instrument := func(body *ast.BlockStmt, literal bool) {
		if body == nil {
			return
		}
		loops := literal && hasLoop(body)
		if !loops && !mayPanic(body, info) {
			return
		}
		// a function literal with a loop (an objective, say: what the
		// framework calls) also tells the session where it was held,
		// for a stopped cell (see Session.left); a declared function
		// does not pay for it (a deferred call of the host's)
		text := " " + placeVar + " := 0; "
		if loops {
			text += "defer " + keepName + ".Left(" + strconv.Itoa(cell) + ", &" + placeVar + "); "
		}
		if mayPanic(body, info) {
			text += "defer func() { if couplet_p := recover(); couplet_p != nil { " + keepName + ".Repanic(couplet_p, " + strconv.Itoa(cell) + ", " + placeVar + ") } }(); "
		}
		out = append(out, edit{off: off(body.Lbrace) + 1, text: text})
		out = append(out, lineRecords(body, fset, off, placeVar)...)
	}
	ast.Inspect(root, func(n ast.Node) bool {
		switch n := n.(type) {
		case *ast.FuncDecl:
			instrument(n.Body, false)
		case *ast.FuncLit:
			instrument(n.Body, true)
		case *ast.CallExpr:
			if id, ok := ast.Unparen(n.Fun).(*ast.Ident); ok && len(n.Args) == 0 && info.Uses[id] == types.Universe.Lookup("recover") {
				out = append(out, edit{off: off(n.Pos()), text: keepName + ".Unplaced("}, edit{off: off(n.End()), text: ")"})
			}
		}
		return true
	})
	return out
}

// hasLoop reports whether a function body holds a loop of its own (not
// one of a function literal inside it): where a stopped cell may have
// been held.
func hasLoop(body *ast.BlockStmt) bool {
	found := false
	ast.Inspect(body, func(n ast.Node) bool {
		switch n.(type) {
		case *ast.FuncLit:
			return false
		case *ast.ForStmt, *ast.RangeStmt:
			found = true
		}
		return !found
	})
	return found
}

// A cell that is stopped while a function literal of the cells runs a
// loop that never ends (an objective the optimiser calls, say) would be
// placed on the line of the cell's statement that called into the
// framework: the interpreter ends the function without a panic when it
// stops the cell, and without its interpreted deferred calls, but it
// makes the deferred calls of the host's functions. A literal with a
// loop therefore defers Session.left with the variable that holds its
// line, and a call that returns once the interpreter was stopped gives
// the place where it was held.

// left notes where a function literal of cell returned, from the line
// variable its statements write, when the running cell's interpreter
// has been stopped; the first such place (the innermost call) is kept.
func (s *Session) left(cell int, line *int) {
	s.panicMu.Lock()
	defer s.panicMu.Unlock()
	if s.hard == nil || s.hard.Err() == nil || s.heldCell > 0 || *line < 1 {
		return
	}
	s.heldCell, s.heldLine = cell, *line
}

// heldAt returns the place left kept (0, 0 if none) and forgets it. Call
// it once the body of a stopped cell has unwound.
func (s *Session) heldAt() (cell, line int) {
	s.panicMu.Lock()
	defer s.panicMu.Unlock()
	cell, line = s.heldCell, s.heldLine
	s.heldCell, s.heldLine = 0, 0
	return cell, line
}

// lineRecords are the edits that make each statement of a function body
// (in its blocks and clauses, not in the function literals inside it)
// record its cell line in the variable v first.
func lineRecords(body *ast.BlockStmt, fset *token.FileSet, off func(token.Pos) int, v string) []edit {
	var out []edit
	ast.Inspect(body, func(n ast.Node) bool {
		var list []ast.Stmt
		switch n := n.(type) {
		case *ast.FuncLit:
			return false
		case *ast.BlockStmt:
			list = n.List
		case *ast.CaseClause:
			list = n.Body
		case *ast.CommClause:
			list = n.Body
		}
		for _, st := range list {
			switch st.(type) {
			case *ast.CaseClause, *ast.CommClause:
				continue // the clauses of a switch or select
			}
			out = append(out, edit{off: off(st.Pos()), text: fmt.Sprintf("%s = %d; ", v, fset.Position(st.Pos()).Line)})
		}
		return true
	})
	return out
}

// mayPanic reports whether a function body can panic by itself: it calls
// panic, a function value or a function outside the cells (but those of
// package math), indexes or slices anything but a map it reads, follows
// a pointer, asserts a type without the comma-ok form, divides integers,
// shifts by a signed count, compares interfaces, makes, closes or sends.
// The function literals inside it are not its business (each is
// instrumented on its own), nor the calls of the cells' functions, which
// place their own panics.
func mayPanic(body *ast.BlockStmt, info *checked) bool {
	commaOK := map[ast.Expr]bool{}
	may := false
	// under is the underlying type of x (invalid where the type check
	// of a cell's declarations, which may use variables the cell
	// declares further on, found none)
	under := func(x ast.Expr) types.Type {
		if t := info.TypeOf(x); t != nil {
			return t.Underlying()
		}
		return types.Typ[types.Invalid]
	}
	isInteger := func(x ast.Expr) bool {
		b, ok := under(x).(*types.Basic)
		return ok && b.Info()&types.IsInteger != 0
	}
	isConst := func(x ast.Expr) bool { return info.Types[x].Value != nil }
	signedCount := func(x ast.Expr) bool {
		b, ok := under(x).(*types.Basic)
		return !isConst(x) && ok && b.Info()&types.IsUnsigned == 0
	}
	ast.Inspect(body, func(n ast.Node) bool {
		if may {
			return false
		}
		switch n := n.(type) {
		case *ast.FuncLit:
			return false
		case *ast.AssignStmt:
			if len(n.Lhs) == 2 && len(n.Rhs) == 1 {
				commaOK[ast.Unparen(n.Rhs[0])] = true
			}
			for _, l := range n.Lhs {
				if ix, ok := ast.Unparen(l).(*ast.IndexExpr); ok {
					if _, isMap := under(ix.X).(*types.Map); isMap {
						may = true // a nil map
					}
				}
			}
			switch n.Tok {
			case token.QUO_ASSIGN, token.REM_ASSIGN:
				may = may || isInteger(n.Lhs[0])
			case token.SHL_ASSIGN, token.SHR_ASSIGN:
				may = may || signedCount(n.Rhs[0])
			}
		case *ast.ValueSpec:
			if len(n.Names) == 2 && len(n.Values) == 1 {
				commaOK[ast.Unparen(n.Values[0])] = true
			}
		case *ast.TypeSwitchStmt:
			ast.Inspect(n.Assign, func(m ast.Node) bool {
				if ta, ok := m.(*ast.TypeAssertExpr); ok {
					commaOK[ta] = true
				}
				return true
			})
		case *ast.IncDecStmt:
			if ix, ok := ast.Unparen(n.X).(*ast.IndexExpr); ok {
				if _, isMap := under(ix.X).(*types.Map); isMap {
					may = true
				}
			}
		case *ast.TypeAssertExpr:
			may = !commaOK[n]
		case *ast.SliceExpr, *ast.SendStmt:
			may = true
		case *ast.StarExpr:
			may = !info.Types[n].IsType()
		case *ast.IndexExpr:
			tv := info.Types[n.X]
			if tv.IsType() || isGenericFunc(tv.Type) {
				return true
			}
			switch under(n.X).(type) {
			case *types.Map:
			case *types.Array:
				may = !isConst(n.Index)
			default:
				may = true
			}
		case *ast.SelectorExpr:
			if sel := info.Selections[n]; sel != nil {
				if sel.Indirect() {
					may = true
				}
				if _, isIface := sel.Recv().Underlying().(*types.Interface); isIface {
					may = true
				}
			}
		case *ast.BinaryExpr:
			switch n.Op {
			case token.QUO, token.REM:
				may = isInteger(n) && !isConst(n.Y)
			case token.SHL, token.SHR:
				may = signedCount(n.Y)
			case token.EQL, token.NEQ:
				_, l := under(n.X).(*types.Interface)
				_, r := under(n.Y).(*types.Interface)
				may = l || r
			}
		case *ast.RangeStmt:
			switch under(n.X).(type) {
			case *types.Pointer, *types.Signature:
				may = true
			}
		case *ast.CallExpr:
			may = callMayPanic(n, info)
		}
		return !may
	})
	return may
}

// isGenericFunc reports a generic function (an index expression on it
// instantiates it).
func isGenericFunc(t types.Type) bool {
	sig, ok := t.(*types.Signature)
	return ok && sig.TypeParams().Len() > 0
}

// callMayPanic reports whether a call can panic at the call (see
// mayPanic).
func callMayPanic(c *ast.CallExpr, info *checked) bool {
	fun := ast.Unparen(c.Fun)
	tv := info.Types[fun]
	if tv.IsType() {
		_, basic := tv.Type.Underlying().(*types.Basic)
		return !basic
	}
	if tv.IsBuiltin() {
		id, _ := fun.(*ast.Ident)
		if id == nil {
			return true
		}
		switch id.Name {
		case "len", "cap", "append", "min", "max", "real", "imag", "complex", "new", "print", "println", "delete", "copy", "clear":
			return false
		}
		return true
	}
	if _, lit := fun.(*ast.FuncLit); lit {
		return false
	}
	if ix, ok := fun.(*ast.IndexExpr); ok {
		fun = ix.X
	} else if ix, ok := fun.(*ast.IndexListExpr); ok {
		fun = ix.X
	}
	var id *ast.Ident
	switch f := fun.(type) {
	case *ast.Ident:
		id = f
	case *ast.SelectorExpr:
		id = f.Sel
		if sel := info.Selections[f]; sel != nil {
			if sel.Kind() != types.MethodVal || sel.Indirect() {
				return true
			}
			if _, isIface := sel.Recv().Underlying().(*types.Interface); isIface {
				return true
			}
		}
	default:
		return true
	}
	fn, ok := info.Uses[id].(*types.Func)
	if !ok || fn.Pkg() == nil {
		return true // a function value
	}
	switch fn.Pkg().Path() {
	case info.pkg.Path(), "math", "math/cmplx":
		return false
	}
	return true
}
