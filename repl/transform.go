package repl

import (
	"fmt"
	"go/ast"
	"go/parser"
	"go/token"
	"go/types"
	"regexp"
	"sort"
	"strconv"
	"strings"
)

// The names the transformation adds to a session, all starting with
// sessionPrefix; no script needs them, and @vars does not list them.
const (
	sessionPrefix = "couplet_"

	// lineVar, with the cell's number, holds the cell line the running
	// body is on: one per cell, so that a stopped cell's body, which the
	// interpreter may leave running for a moment, writes nothing the
	// next cell writes
	lineVar   = "couplet_line_"
	showFunc  = keepName + ".Show"
	cellFunc  = "couplet_cell"
	resultVar = "couplet_r"
	// prevPrefix, with the name, is the variable that keeps the value an
	// earlier cell's variable had before a cell declares it again
	prevPrefix = "couplet_prev_"
)

// cellProgram is a cell rewritten for the interpreter (see the package
// doc): the cell's declarations and its hoisted variables at package
// level, its statements as the body of a function, and the call of it.
// Every piece keeps the cell's lines, so that the interpreter's errors
// and the recorded line of a panic are the lines of the cell.
type cellProgram struct {
	imports []string // alias imports the hoisted declarations need, as import specs
	// standIns are the stand-in packages (see symbolImporter.standIn)
	// among the imports, which the interpreter must be given first
	standIns []string
	// prev declares, and keepPrev sets, before decls run, the variables
	// that keep the values of an earlier cell's variables that the cell
	// declares again and reads first (x := x + 1)
	prev, keepPrev []string
	decls          string // package-level source: the cell's declarations and the hoisted variables ("" for none)
	body           string // the declaration of the body function
	call           string // the statement that runs the body
	lines          int    // lines of the cell
	line           string // the variable that holds the line the body is on
	// show is set when the cell ends in an expression whose values are
	// shown: call when it is a call, errLast when its last value is an
	// error (a nil error is not shown).
	show          bool
	call1, errEnd bool
	// declared is what the cell adds to the session's type-check
	// prelude, by name.
	declared []preludeEntry
}

// preludeEntry is one package-level declaration a later cell's type
// check must see: its name ("T.M" for a method) and its source (a
// function without its body).
type preludeEntry struct {
	name, src string
}

// typeState is what the session knows of its package-level names for the
// type check of the next cell.
type typeState struct {
	im      *symbolImporter
	order   []string
	entries map[string]string
}

// add records (or replaces) prelude entries.
func (t *typeState) add(es []preludeEntry) {
	for _, e := range es {
		if _, ok := t.entries[e.name]; !ok {
			t.order = append(t.order, e.name)
		}
		t.entries[e.name] = e.src
	}
}

// source is the prelude file of the type check, less the names the cell
// declares again.
func (t *typeState) source(imports string, except map[string]bool) string {
	var b strings.Builder
	b.WriteString("package main\n" + imports + "\n")
	for _, n := range t.order {
		if except[n] || except[strings.Split(n, ".")[0]] {
			continue
		}
		b.WriteString(t.entries[n])
		b.WriteString("\n")
	}
	return b.String()
}

// typeCheckError is a cell that the type check refused: the first error
// that compiled Go would also report, on its cell line.
type typeCheckError struct {
	line int
	msg  string
	// unwritable is set when the cell is valid Go but declares a variable
	// of a type a script cannot name (from a package scripts cannot
	// import), which cannot be hoisted.
	unwritable bool
}

func (e *typeCheckError) Error() string { return fmt.Sprintf("line %d: %s", e.line, e.msg) }

// interpreterMay reports whether the interpreter may still accept what
// the type check refused: a variable of a type scripts cannot name, a
// composite literal that sets a promoted field
// (the older flat settings literals, which the interpreter fills in), or
// a package member the symbol tables do not list. The cell is then run as
// it is, and the type check's message reported only if the interpreter
// refuses it too.
func (e *typeCheckError) interpreterMay() bool {
	return e.unwritable || strings.HasPrefix(e.msg, "unknown field ") || qualifiedUndefinedRE.MatchString(e.msg)
}

// qualifiedUndefinedRE matches the type check's message for a package
// member it does not know.
var qualifiedUndefinedRE = regexp.MustCompile(`^undefined: (\w+)\.\w+$`)

// softErrors are the type-check errors compiled Go reports that the
// session has always accepted (a cell is a scratch pad): they do not stop
// the transformation.
var softErrors = []string{"not used"}

// transformCell rewrites a cell for the interpreter. imports are the
// session's imports as specs ("name \"path\"" or "\"path\""), local maps
// an import path to the name it has in the session. It returns a
// *typeCheckError when the type check refuses the cell.
func transformCell(src string, number int, units []unit, imports []string, local map[string]string, ts *typeState) (*cellProgram, error) {
	p := &cellProgram{lines: strings.Count(src, "\n") + 1, line: lineVar + strconv.Itoa(number)}
	// D holds the declarations, B the statements (and var declarations,
	// which become assignments to hoisted variables); each keeps the
	// cell's offsets, the rest blanked.
	d, b := blank(src), blank(src)
	var lastStmt *unit
	for i := range units {
		u := &units[i]
		switch {
		case u.kind == chunkImport:
			continue
		case u.kind == chunkDecl && u.first != token.VAR:
			place(d, src, u)
			lastStmt = nil
		default:
			place(b, src, u)
			lastStmt = u
		}
	}
	importDecl := "import (" + strings.Join(imports, "; ") + ")"
	const pkgClause = "package main; "
	dPrefix := pkgClause + importDecl + "; "
	fn := cellFunc + strconv.Itoa(number)
	bodyHead := "func " + fn + "() (couplet_done bool) { defer " + keepName + ".Exited(); "
	bPrefix := pkgClause + importDecl + "; " + bodyHead
	const bodyTail = "\nreturn\n}"

	// pass 1: the statements as the body of a function, the declarations
	// beside it; this finds the variables to hoist and their types
	redeclared := declaredIn(dPrefix + string(d))
	fset := token.NewFileSet()
	files, err := parseAll(fset, ts.source(importDecl, redeclared), dPrefix+string(d), bPrefix+string(b)+bodyTail)
	if err != nil {
		return nil, err
	}
	info1, errs1 := check(fset, files, ts.im)
	if e := firstHard(fset, errs1, "body"); e != nil {
		return nil, e
	}
	body := bodyOf(files[2])
	body.List = body.List[:len(body.List)-1] // less the closing return
	mainPkg := info1.pkg
	qual := func(pkg *types.Package) string {
		if pkg == mainPkg {
			return ""
		}
		if n, ok := local[pkg.Path()]; ok {
			return n
		}
		path := pkg.Path()
		alias := "couplet_pkg_" + strings.NewReplacer("/", "_", ".", "_", "-", "_").Replace(path)
		if !ts.im.importable(path) {
			sp, name := ts.im.standIn(path)
			if n, ok := local[sp]; ok {
				return n
			}
			if !contains(p.standIns, sp) {
				p.standIns = append(p.standIns, sp)
			}
			path, alias = sp, name
		}
		spec := alias + " " + strconv.Quote(path)
		if !contains(p.imports, spec) {
			p.imports = append(p.imports, spec)
		}
		return alias
	}
	bOff := func(pos token.Pos) int { return fset.Position(pos).Offset - len(bPrefix) }

	var hoisted []string
	var edits []edit
	// hoist every variable the body's top level declares
	for _, st := range body.List {
		for {
			l, ok := st.(*ast.LabeledStmt)
			if !ok {
				break
			}
			st = l.Stmt
		}
		switch st := st.(type) {
		case *ast.AssignStmt:
			if st.Tok != token.DEFINE {
				continue
			}
			for _, l := range st.Lhs {
				if id, ok := l.(*ast.Ident); ok {
					if v := hoist(info1, id, mainPkg, ts.im, qual); v != "" {
						hoisted = append(hoisted, v)
					} else if id.Name != "_" && info1.Defs[id] != nil {
						return nil, &typeCheckError{line: fset.Position(id.Pos()).Line, msg: fmt.Sprintf("the type of %s cannot be written in a script (%s)", id.Name, info1.Defs[id].Type()), unwritable: true}
					}
				}
			}
			edits = append(edits, edit{off: bOff(st.TokPos), del: 2, text: " ="})
		case *ast.DeclStmt:
			g, ok := st.Decl.(*ast.GenDecl)
			if !ok || g.Tok != token.VAR {
				continue
			}
			// each spec becomes an assignment in place (the edits
			// leave its values to the other rewrites)
			if g.Lparen.IsValid() {
				edits = append(edits, edit{off: bOff(g.Pos()), del: bOff(g.Lparen) + 1 - bOff(g.Pos()), text: strings.Repeat(" ", bOff(g.Lparen)+1-bOff(g.Pos()))},
					edit{off: bOff(g.Rparen), del: 1, text: " "})
			} else {
				edits = append(edits, edit{off: bOff(g.Pos()), del: bOff(g.Specs[0].Pos()) - bOff(g.Pos())})
			}
			for _, sp := range g.Specs {
				vs := sp.(*ast.ValueSpec)
				for _, id := range vs.Names {
					if v := hoist(info1, id, mainPkg, ts.im, qual); v != "" {
						hoisted = append(hoisted, v)
					} else if id.Name != "_" {
						return nil, &typeCheckError{line: fset.Position(id.Pos()).Line, msg: fmt.Sprintf("the type of %s cannot be written in a script (%s)", id.Name, info1.Defs[id].Type()), unwritable: true}
					}
				}
				switch {
				case vs.Type == nil:
				case len(vs.Values) == 0:
					zero := "*new(" + textOf(fset, string(b), len(bPrefix), vs.Type) + ")"
					zeros := strings.TrimSuffix(strings.Repeat(zero+", ", len(vs.Names)), ", ")
					edits = append(edits, edit{off: bOff(vs.Type.Pos()), del: bOff(vs.Type.End()) - bOff(vs.Type.Pos()), text: "= " + zeros})
				default:
					// the hoisted variable has the type
					edits = append(edits, edit{off: bOff(vs.Type.Pos()), del: bOff(vs.Type.End()) - bOff(vs.Type.Pos())})
				}
				if g.Lparen.IsValid() {
					edits = append(edits, edit{off: bOff(vs.End()), text: ";"})
				}
			}
		}
	}
	// a use of an earlier cell's variable that the cell declares again
	// (x := x + 1) reads the value it had before the cell: it is kept
	// aside before the cell's declarations replace the variable
	var prevDecls []string
	prevOf := map[types.Object]string{}
	for _, h := range hoisted {
		name := strings.Fields(h)[1]
		old := mainPkg.Scope().Lookup(name)
		if _, ok := old.(*types.Var); !ok || fset.Position(old.Pos()).Filename != "prelude" || !nameable(old.Type(), mainPkg, ts.im, map[types.Type]bool{}) {
			continue
		}
		prevOf[old] = prevPrefix + name
		prevDecls = append(prevDecls, "var "+prevPrefix+name+" "+types.TypeString(old.Type(), qual))
	}
	if len(prevOf) > 0 {
		used := map[string]bool{}
		ast.Inspect(body, func(n ast.Node) bool {
			if id, ok := n.(*ast.Ident); ok {
				if prev, ok := prevOf[info1.Uses[id]]; ok {
					edits = append(edits, edit{off: bOff(id.Pos()), del: len(id.Name), text: prev})
					used[prev] = true
				}
			}
			return true
		})
		var kept []string
		for _, d := range prevDecls {
			if name := strings.Fields(d)[1]; used[name] {
				kept = append(kept, d)
				p.prev = append(p.prev, d)
				p.keepPrev = append(p.keepPrev, name+" = "+strings.TrimPrefix(name, prevPrefix))
			}
		}
		prevDecls = kept
	}
	// each statement of the body records its line (a panic reports it)
	var lineEdits []edit
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
			if bOff(st.Pos()) >= len(b) {
				continue // the body's closing return
			}
			lineEdits = append(lineEdits, edit{off: bOff(st.Pos()), text: fmt.Sprintf("%s = %d; ", p.line, fset.Position(st.Pos()).Line)})
		}
		return true
	})
	// the trailing expression hands its values to the session
	if n := len(body.List); n > 0 && lastStmt != nil {
		if es, ok := body.List[n-1].(*ast.ExprStmt); ok && fset.Position(es.Pos()).Offset-len(bPrefix) >= lastStmt.start && !isPrintCall(es.X) {
			_, isCall := ast.Unparen(es.X).(*ast.CallExpr)
			start, end := bOff(es.Pos()), bOff(es.End())
			tv := info1.Types[es.X]
			if tv.IsVoid() || tv.IsType() || tv.IsBuiltin() {
				tv.Type = nil
			}
			switch t := tv.Type.(type) {
			case *types.Tuple:
				if t.Len() > 0 {
					var rs []string
					for i := range t.Len() {
						rs = append(rs, resultVar+strconv.Itoa(i))
					}
					all := strings.Join(rs, ", ")
					edits = append(edits, edit{off: start, text: all + " := "}, edit{off: end, text: "; " + showFunc + "(" + all + ")"})
					p.show, p.call1 = true, isCall
					p.errEnd = types.Identical(t.At(t.Len()-1).Type(), types.Universe.Lookup("error").Type())
				}
			case nil:
			default:
				before, after := textWrap(tv.Type, mainPkg, qual, func(t types.Type) bool { return nameable(t, mainPkg, ts.im, map[types.Type]bool{}) })
				edits = append(edits, edit{off: start, text: showFunc + "(" + before}, edit{off: end, text: after + ")"})
				p.show, p.call1 = true, isCall
			}
		}
	}
	edits = append(edits, rewrites(body, info1, qual, ts.im, bOff, string(b))...)
	edits = append(edits, placing(body, info1, fset, number, bOff)...)
	canWrite := func(t types.Type) bool { return nameable(t, mainPkg, ts.im, map[types.Type]bool{}) }
	for _, decl := range files[2].Decls {
		if fd, ok := decl.(*ast.FuncDecl); ok {
			rf, rerr := rangeFuncs(fd, number, p.line, info1, qual, canWrite, bOff, string(b))
			if rerr != nil {
				return nil, &typeCheckError{line: fset.Position(rerr.pos).Line, msg: rerr.msg}
			}
			edits = append(edits, rf...)
		}
	}
	edits = append(edits, textArgs(body, info1, qual, canWrite, bOff)...)
	edits = append(edits, errorsAs(body, info1, qual, canWrite, bOff)...)
	dOff := func(pos token.Pos) int { return fset.Position(pos).Offset - len(dPrefix) }
	var dEdits []edit
	for _, decl := range files[1].Decls {
		if _, ok := decl.(*ast.FuncDecl); ok {
			dEdits = append(dEdits, placing(decl, info1, fset, number, dOff)...)
			dEdits = append(dEdits, rewrites(decl, info1, qual, ts.im, dOff, string(d))...)
			rf, rerr := rangeFuncs(decl, number, placeVar, info1, qual, canWrite, dOff, string(d))
			if rerr != nil {
				return nil, &typeCheckError{line: fset.Position(rerr.pos).Line, msg: rerr.msg}
			}
			dEdits = append(dEdits, rf...)
			dEdits = append(dEdits, textArgs(decl, info1, qual, canWrite, dOff)...)
			dEdits = append(dEdits, errorsAs(decl, info1, qual, canWrite, dOff)...)
		}
	}
	bText := applyEdits(string(b), append(lineEdits, edits...))
	dText := applyEdits(string(d), dEdits) + "\n" + strings.Join(append(append([]string(nil), hoisted...), "var "+p.line+" int"), "; ")
	// pass 2: the program the interpreter will run, with its declarations
	// at package level
	importDecl2 := importDecl
	if len(p.imports) > 0 {
		importDecl2 = "import (" + strings.Join(append(append([]string(nil), imports...), p.imports...), "; ") + ")"
	}
	for _, h := range hoisted {
		redeclared[strings.Fields(h)[1]] = true
	}
	fset2 := token.NewFileSet()
	dCheck := dText
	if len(prevDecls) > 0 {
		dCheck += "; " + strings.Join(prevDecls, "; ")
	}
	files2, err := parseAll(fset2, ts.source(importDecl2, redeclared), pkgClause+importDecl2+"; "+dCheck, pkgClause+importDecl2+"; "+bodyHead+bText+bodyTail)
	if err != nil {
		return nil, err
	}
	_, errs2 := check(fset2, files2, ts.im)
	if e := firstHard(fset2, errs2, "decls", "body"); e != nil {
		if e.line > p.lines {
			e.line = p.lines
		}
		return nil, e
	}
	p.decls = dText
	p.body = bodyHead + bText + bodyTail
	p.call = "_ = " + fn + "()"
	p.declared = preludeOf(fset2, files2[1], dText, len(pkgClause+importDecl2+"; "), hoisted)
	return p, nil
}

// declaredIn are the names a declarations file declares (a method
// as "T.M"); nil when it does not parse.
func declaredIn(src string) map[string]bool {
	out := map[string]bool{}
	f, err := parser.ParseFile(token.NewFileSet(), "", src, parser.SkipObjectResolution)
	if err != nil {
		return out
	}
	for _, d := range f.Decls {
		switch d := d.(type) {
		case *ast.FuncDecl:
			if d.Recv != nil && len(d.Recv.List) > 0 {
				out[recvName(d.Recv.List[0].Type)+"."+d.Name.Name] = true
			} else {
				out[d.Name.Name] = true
			}
		case *ast.GenDecl:
			for _, sp := range d.Specs {
				switch sp := sp.(type) {
				case *ast.TypeSpec:
					out[sp.Name.Name] = true
				case *ast.ValueSpec:
					for _, id := range sp.Names {
						out[id.Name] = true
					}
				}
			}
		}
	}
	return out
}

// hoist is the package-level declaration of a variable the body's top
// level declares ("" when the identifier declares nothing new, or its
// type cannot be written in a script).
func hoist(info *checked, id *ast.Ident, main *types.Package, im *symbolImporter, qual types.Qualifier) string {
	if id.Name == "_" {
		return ""
	}
	obj := info.Defs[id]
	if obj == nil {
		return ""
	}
	t := obj.Type()
	if !nameable(t, main, im, map[types.Type]bool{}) {
		return ""
	}
	return "var " + id.Name + " " + types.TypeString(t, qual)
}

// nameable reports whether a script can write the type: every named type
// in it is the cell package's own or an exported one of a package the
// interpreter has.
func nameable(t types.Type, main *types.Package, im *symbolImporter, seen map[types.Type]bool) bool {
	if seen[t] {
		return true
	}
	seen[t] = true
	switch t := t.(type) {
	case *types.Basic:
		return t.Kind() != types.Invalid && t.Info()&types.IsUntyped == 0
	case *types.Alias:
		return nameable(types.Unalias(t), main, im, seen)
	case *types.Named:
		obj := t.Obj()
		if obj.Pkg() != nil && obj.Pkg() != main && (!obj.Exported() || !im.importable(obj.Pkg().Path()) && im.reflectOf(t) == nil) {
			return false
		}
		if obj.Parent() != nil && obj.Pkg() == main && obj.Parent() != main.Scope() {
			return false // a type declared inside the body
		}
		for i := range t.TypeArgs().Len() {
			if !nameable(t.TypeArgs().At(i), main, im, seen) {
				return false
			}
		}
		return true
	case *types.Pointer:
		return nameable(t.Elem(), main, im, seen)
	case *types.Slice:
		return nameable(t.Elem(), main, im, seen)
	case *types.Array:
		return nameable(t.Elem(), main, im, seen)
	case *types.Map:
		return nameable(t.Key(), main, im, seen) && nameable(t.Elem(), main, im, seen)
	case *types.Chan:
		return nameable(t.Elem(), main, im, seen)
	case *types.Signature:
		return nameable(t.Params(), main, im, seen) && nameable(t.Results(), main, im, seen)
	case *types.Tuple:
		for i := range t.Len() {
			if !nameable(t.At(i).Type(), main, im, seen) {
				return false
			}
		}
		return true
	case *types.Struct:
		for i := range t.NumFields() {
			f := t.Field(i)
			if (!f.Exported() && f.Pkg() != main) || !nameable(f.Type(), main, im, seen) {
				return false
			}
		}
		return true
	case *types.Interface:
		for i := range t.NumMethods() {
			m := t.Method(i)
			if (!m.Exported() && m.Pkg() != main) || !nameable(m.Type(), main, im, seen) {
				return false
			}
		}
		return true
	}
	return false
}

// checked is the result of a type check.
type checked struct {
	*types.Info
	pkg *types.Package
}

// check type-checks the files of one cell and collects every error.
func check(fset *token.FileSet, files []*ast.File, im *symbolImporter) (*checked, []types.Error) {
	var errs []types.Error
	conf := types.Config{
		Importer: im,
		Error: func(err error) {
			if te, ok := err.(types.Error); ok {
				errs = append(errs, te)
			}
		},
	}
	info := &types.Info{
		Types:      map[ast.Expr]types.TypeAndValue{},
		Defs:       map[*ast.Ident]types.Object{},
		Uses:       map[*ast.Ident]types.Object{},
		Instances:  map[*ast.Ident]types.Instance{},
		Selections: map[*ast.SelectorExpr]*types.Selection{},
	}
	pkg, _ := conf.Check("main", fset, files, info)
	return &checked{Info: info, pkg: pkg}, errs
}

// firstHard is the first error in the named files that is not soft.
func firstHard(fset *token.FileSet, errs []types.Error, files ...string) *typeCheckError {
	for _, e := range errs {
		pos := fset.Position(e.Pos)
		if !contains(files, pos.Filename) || isSoft(e.Msg) {
			continue
		}
		return &typeCheckError{line: pos.Line, msg: e.Msg}
	}
	return nil
}

func isSoft(msg string) bool {
	for _, s := range softErrors {
		if strings.Contains(msg, s) {
			return true
		}
	}
	return false
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// parseAll parses the prelude, declaration and body files of a check.
func parseAll(fset *token.FileSet, prelude, decls, body string) ([]*ast.File, error) {
	var files []*ast.File
	for i, src := range []string{prelude, decls, body} {
		name := []string{"prelude", "decls", "body"}[i]
		f, err := parser.ParseFile(fset, name, src, parser.SkipObjectResolution)
		if err != nil {
			if i == 0 {
				return nil, fmt.Errorf("repl: the session's declarations do not parse: %w", err)
			}
			return nil, &typeCheckError{line: 1, msg: err.Error()}
		}
		files = append(files, f)
	}
	return files, nil
}

// bodyOf is the body of the cell function in the body file.
func bodyOf(f *ast.File) *ast.BlockStmt {
	for _, d := range f.Decls {
		if fd, ok := d.(*ast.FuncDecl); ok {
			return fd.Body
		}
	}
	return &ast.BlockStmt{}
}

// preludeOf lists what the cell declares at package level, functions
// without their bodies, for the type check of later cells.
func preludeOf(fset *token.FileSet, f *ast.File, text string, prefix int, hoisted []string) []preludeEntry {
	var out []preludeEntry
	src := func(from, to token.Pos) string {
		return text[fset.Position(from).Offset-prefix : fset.Position(to).Offset-prefix]
	}
	for _, d := range f.Decls {
		switch d := d.(type) {
		case *ast.FuncDecl:
			name := d.Name.Name
			if d.Recv != nil && len(d.Recv.List) > 0 {
				name = recvName(d.Recv.List[0].Type) + "." + name
			}
			end := d.End()
			if d.Body != nil {
				end = d.Body.Lbrace
			}
			out = append(out, preludeEntry{name: name, src: src(d.Pos(), end)})
		case *ast.GenDecl:
			if d.Tok == token.IMPORT {
				continue
			}
			if d.Tok == token.VAR {
				continue // only the hoisted variables: the cell's own are statements of the body
			}
			for _, sp := range d.Specs {
				var names []string
				switch sp := sp.(type) {
				case *ast.TypeSpec:
					names = []string{sp.Name.Name}
				case *ast.ValueSpec:
					for _, id := range sp.Names {
						names = append(names, id.Name)
					}
				}
				out = append(out, preludeEntry{name: strings.Join(names, ","), src: d.Tok.String() + " (" + src(sp.Pos(), sp.End()) + "\n)"})
			}
		}
	}
	for _, h := range hoisted {
		name := strings.Fields(h)[1]
		out = append(out, preludeEntry{name: name, src: h})
	}
	return out
}

// recvName is the type name of a method's receiver.
func recvName(x ast.Expr) string {
	switch x := x.(type) {
	case *ast.StarExpr:
		return recvName(x.X)
	case *ast.IndexExpr:
		return recvName(x.X)
	case *ast.IndexListExpr:
		return recvName(x.X)
	case *ast.ParenExpr:
		return recvName(x.X)
	case *ast.Ident:
		return x.Name
	}
	return "?"
}

// blank is a copy of src with every byte but the newlines a space.
func blank(src string) []byte {
	b := []byte(src)
	for i, c := range b {
		if c != '\n' {
			b[i] = ' '
		}
	}
	return b
}

// place copies a unit, and the semicolon that ends it, into dst.
func place(dst []byte, src string, u *unit) {
	copy(dst[u.start:u.end], src[u.start:u.end])
	if u.end < len(src) && src[u.end] == ';' {
		dst[u.end] = ';'
	}
}

// textOf is the source of a node of the body file.
func textOf(fset *token.FileSet, b string, prefix int, n ast.Node) string {
	return b[fset.Position(n.Pos()).Offset-prefix : fset.Position(n.End()).Offset-prefix]
}

// edit replaces del bytes at off by text.
type edit struct {
	off, del int
	text     string
}

// applyEdits applies edits that do not overlap; insertions at one
// offset keep their order.
func applyEdits(src string, edits []edit) string {
	sort.SliceStable(edits, func(i, j int) bool { return edits[i].off < edits[j].off })
	var b strings.Builder
	at := 0
	for _, e := range edits {
		if e.off < at {
			continue
		}
		b.WriteString(src[at:e.off])
		b.WriteString(e.text)
		at = e.off + e.del
	}
	b.WriteString(src[at:])
	return b.String()
}

// rewrites are the edits that take a cell's code around the
// interpreter's faults inside functions, each keeping the lines: a
// method value of a framework type becomes a closure over its receiver,
// a generic function called without its type arguments gets those the
// type check inferred, a range over an integer becomes a counted loop,
// and a loop variable a closure captures gets a copy per iteration (as
// Go 1.22 gives it).
func rewrites(root ast.Node, info *checked, qual types.Qualifier, im *symbolImporter, off func(token.Pos) int, src string) []edit {
	var out []edit
	text := func(n ast.Node) string { return src[off(n.Pos()):off(n.End())] }
	canWrite := func(t types.Type) bool { return nameable(t, info.pkg, im, map[types.Type]bool{}) }
	called := map[ast.Expr]bool{}
	ast.Inspect(root, func(n ast.Node) bool {
		if c, ok := n.(*ast.CallExpr); ok {
			called[ast.Unparen(c.Fun)] = true
		}
		return true
	})
	ast.Inspect(root, func(n ast.Node) bool {
		switch n := n.(type) {
		case *ast.SelectorExpr:
			sel := info.Selections[n]
			if sel != nil && sel.Kind() == types.MethodExpr && sel.Obj().Pkg() != info.pkg {
				if e, ok := methodExpr(n, sel, qual, canWrite, off); ok {
					out = append(out, e)
				}
				return true
			}
			if sel == nil || sel.Kind() != types.MethodVal || called[n] || sel.Obj().Pkg() == info.pkg {
				return true
			}
			sig, ok := sel.Type().(*types.Signature)
			recv := sel.Recv()
			ptr := false
			if ms, ok := sel.Obj().Type().(*types.Signature); ok && ms.Recv() != nil {
				if _, isPtr := ms.Recv().Type().(*types.Pointer); isPtr {
					if _, already := recv.Underlying().(*types.Pointer); !already {
						recv, ptr = types.NewPointer(recv), true
					}
				}
			}
			if !ok || !canWrite(recv) || !canWrite(sig) {
				return true
			}
			params, args, results := signatureText(sig, 0, qual)
			call := "couplet_m." + n.Sel.Name + "(" + strings.Join(args, ", ") + ")"
			if sig.Results().Len() > 0 {
				call = "return " + call
			}
			prefix := "func(couplet_m " + types.TypeString(recv, qual) + ") " + types.TypeString(sig, qual) +
				" { return func(" + strings.Join(params, ", ") + ") " + results + " { " + call + " } }("
			suffix := ")"
			if ptr {
				prefix, suffix = prefix+"&(", "))"
			}
			out = append(out, edit{off: off(n.X.Pos()), text: prefix}, edit{off: off(n.X.End()), del: off(n.End()) - off(n.X.End()), text: suffix})
		case *ast.CallExpr:
			var id *ast.Ident
			switch f := ast.Unparen(n.Fun).(type) {
			case *ast.Ident:
				id = f
			case *ast.SelectorExpr:
				id = f.Sel
			}
			if id == nil {
				return true
			}
			inst, ok := info.Instances[id]
			if !ok || inst.TypeArgs.Len() == 0 {
				return true
			}
			var args []string
			for i := range inst.TypeArgs.Len() {
				t := inst.TypeArgs.At(i)
				if !canWrite(t) {
					return true
				}
				args = append(args, types.TypeString(t, qual))
			}
			out = append(out, edit{off: off(id.End()), text: "[" + strings.Join(args, ", ") + "]"})
		case *ast.RangeStmt:
			tv := info.Types[n.X]
			b, ok := tv.Type.Underlying().(*types.Basic)
			if ok && b.Info()&types.IsInteger != 0 {
				t := types.Default(tv.Type)
				if !canWrite(t) {
					return true
				}
				k := strconv.Itoa(off(n.Pos()))
				count, i := "couplet_n"+k, "couplet_i"+k
				head := "for " + count + ", " + i + " := " + text(n.X) + ", " + types.TypeString(t, qual) + "(0); " + i + " < " + count + "; " + i + "++ {"
				if id, ok := n.Key.(*ast.Ident); ok && id.Name != "_" {
					head += " " + id.Name + " " + n.Tok.String() + " " + i + ";"
				}
				span := src[off(n.For) : off(n.Body.Lbrace)+1]
				head += strings.Repeat("\n", strings.Count(span, "\n"))
				out = append(out, edit{off: off(n.For), del: len(span), text: head})
				return true
			}
			if _, isFunc := types.Unalias(tv.Type).Underlying().(*types.Signature); n.Tok != token.DEFINE || isFunc {
				return true // a range over a function has a variable per iteration (rangefunc.go)
			}
			var names []string
			for _, x := range []ast.Expr{n.Key, n.Value} {
				if id, ok := x.(*ast.Ident); ok && id.Name != "_" && captured(n.Body, info.Defs[id], info) {
					names = append(names, id.Name)
				}
			}
			if len(names) > 0 {
				l := strings.Join(names, ", ")
				out = append(out, edit{off: off(n.Body.Lbrace) + 1, text: " " + l + " := " + l + ";"})
			}
		case *ast.ForStmt:
			init, ok := n.Init.(*ast.AssignStmt)
			if !ok || init.Tok != token.DEFINE {
				return true
			}
			var names []string
			for _, x := range init.Lhs {
				if id, ok := x.(*ast.Ident); ok && id.Name != "_" {
					obj := info.Defs[id]
					if captured(n.Body, obj, info) && !assigned(n.Body, obj, info) {
						names = append(names, id.Name)
					}
				}
			}
			if len(names) > 0 {
				l := strings.Join(names, ", ")
				out = append(out, edit{off: off(n.Body.Lbrace) + 1, text: " " + l + " := " + l + ";"})
			}
		}
		return true
	})
	return out
}

// signatureText writes the parameters of a signature from the from-th
// on, named couplet_a0, couplet_a1, …, the arguments that pass them on,
// and its results.
func signatureText(sig *types.Signature, from int, qual types.Qualifier) (params, args []string, results string) {
	for i := from; i < sig.Params().Len(); i++ {
		name := "couplet_a" + strconv.Itoa(i)
		t := sig.Params().At(i).Type()
		if sig.Variadic() && i == sig.Params().Len()-1 {
			params = append(params, name+" ..."+types.TypeString(t.(*types.Slice).Elem(), qual))
			args = append(args, name+"...")
			continue
		}
		params = append(params, name+" "+types.TypeString(t, qual))
		args = append(args, name)
	}
	results = types.TypeString(sig.Results(), qual)
	if sig.Results().Len() == 1 {
		results = strings.Trim(results, "()")
	}
	return params, args, results
}

// methodExpr is the edit that writes a method expression of a framework
// type, such as (*mdo.Result).Feasible, as a function literal that calls
// the method on its first argument.
func methodExpr(n *ast.SelectorExpr, sel *types.Selection, qual types.Qualifier, canWrite func(types.Type) bool, off func(token.Pos) int) (edit, bool) {
	sig, ok := sel.Type().(*types.Signature)
	if !ok || sig.Params().Len() == 0 || !canWrite(sig) {
		return edit{}, false
	}
	params, args, results := signatureText(sig, 1, qual)
	params = append([]string{"couplet_m " + types.TypeString(sig.Params().At(0).Type(), qual)}, params...)
	call := "couplet_m." + n.Sel.Name + "(" + strings.Join(args, ", ") + ")"
	if sig.Results().Len() > 0 {
		call = "return " + call
	}
	text := "(func(" + strings.Join(params, ", ") + ") " + results + " { " + call + " })"
	return edit{off: off(n.Pos()), del: off(n.End()) - off(n.Pos()), text: text}, true
}

// captured reports whether a function literal in body uses obj, or body
// takes its address.
func captured(body ast.Node, obj types.Object, info *checked) bool {
	if obj == nil {
		return false
	}
	found := false
	ast.Inspect(body, func(n ast.Node) bool {
		switch n := n.(type) {
		case *ast.FuncLit:
			ast.Inspect(n.Body, func(m ast.Node) bool {
				if id, ok := m.(*ast.Ident); ok && info.Uses[id] == obj {
					found = true
				}
				return !found
			})
			return false
		case *ast.UnaryExpr:
			if id, ok := ast.Unparen(n.X).(*ast.Ident); ok && n.Op == token.AND && info.Uses[id] == obj {
				found = true
			}
		}
		return !found
	})
	return found
}

// assigned reports whether body assigns obj.
func assigned(body ast.Node, obj types.Object, info *checked) bool {
	found := false
	is := func(x ast.Expr) bool {
		id, ok := ast.Unparen(x).(*ast.Ident)
		return ok && info.Uses[id] == obj
	}
	ast.Inspect(body, func(n ast.Node) bool {
		switch n := n.(type) {
		case *ast.AssignStmt:
			for _, l := range n.Lhs {
				found = found || is(l)
			}
		case *ast.IncDecStmt:
			found = found || is(n.X)
		}
		return !found
	})
	return found
}
