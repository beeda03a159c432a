package repl

import (
	"fmt"
	"go/ast"
	"go/token"
	"go/types"
	"strconv"
	"strings"
)

// A range over a function (for x := range seq, seq a
// func(yield func(T) bool)) is a Go 1.23 loop the interpreter does not
// know. It becomes the call the loop stands for, the body a function
// literal that yield calls:
//
//	for k, v := range seq { BODY }
//	  → { seq(func(k K, v V) bool { BODY; return true }); after }
//
// inside BODY, continue is return true, break is return false, a return
// from the enclosing function keeps its values, stops the loop and is
// made after the call, and a break or continue of an outer loop is made
// after the call too. A yield called again after the body stopped the
// loop panics as in Go. Each piece keeps the cell's lines. Refused with a
// message: a defer in the body, and a return or an outer loop's break
// or continue inside a range over a function inside another.

// rangeFuncPanic is Go's panic when an iterator calls yield again after
// the loop body stopped it.
const rangeFuncPanic = "runtime error: range function continued iteration after function for loop body returned false"

// rangeFuncError is a range over a function the rewrite cannot take: the
// type check's error on its line.
type rangeFuncError struct {
	pos token.Pos
	msg string
}

// rangeFuncs are the edits that rewrite the ranges over functions in
// root. sig is the signature of the function whose body root is, or
// of the enclosing function for the function literals and declarations
// found inside (nil for root a declaration).
func rangeFuncs(root ast.Node, cell int, rootLine string, info *checked, qual types.Qualifier, canWrite func(types.Type) bool, off func(token.Pos) int, src string) ([]edit, *rangeFuncError) {
	r := &rangeRewriter{info: info, qual: qual, canWrite: canWrite, off: off, src: src, cell: cell, root: root, rootLine: rootLine}
	r.walk(root, nil, rootLine)
	return r.out, r.err
}

type rangeRewriter struct {
	info     *checked
	qual     types.Qualifier
	canWrite func(types.Type) bool
	off      func(token.Pos) int
	src      string
	out      []edit
	err      *rangeFuncError
	n        int // loops rewritten, for their names
	cell     int
	root     ast.Node
	rootLine string // the variable that holds the line of root, a function
}

// placing is the start of a loop body's function: the panics in it are
// placed on the line its enclosing function records in lineV (see
// placed.go).
func (r *rangeRewriter) placing(lineV string) string {
	return "defer func() { if couplet_p := recover(); couplet_p != nil { " + keepName + ".Repanic(couplet_p, " + strconv.Itoa(r.cell) + ", " + lineV + ") } }(); "
}

// walk looks for ranges over functions in n, in a function of signature
// sig that records its line in lineV.
func (r *rangeRewriter) walk(n ast.Node, sig *types.Signature, lineV string) {
	ast.Inspect(n, func(m ast.Node) bool {
		if r.err != nil {
			return false
		}
		switch m := m.(type) {
		case *ast.FuncDecl:
			if m.Body != nil {
				var s *types.Signature
				if obj := r.info.Defs[m.Name]; obj != nil {
					s, _ = obj.Type().(*types.Signature)
				}
				lv := placeVar
				if m == r.root {
					lv = r.rootLine
				}
				r.walk(m.Body, s, lv)
			}
			return false
		case *ast.FuncLit:
			s, _ := r.info.TypeOf(m).(*types.Signature)
			r.walk(m.Body, s, placeVar)
			return false
		case *ast.LabeledStmt:
			if rs, ok := m.Stmt.(*ast.RangeStmt); ok && r.isRangeFunc(rs) {
				r.rewrite(rs, sig, m, lineV)
				return false
			}
		case *ast.RangeStmt:
			if r.isRangeFunc(m) {
				r.rewrite(m, sig, nil, lineV)
				return false
			}
		}
		return true
	})
}

// isRangeFunc reports a range over a function.
func (r *rangeRewriter) isRangeFunc(rs *ast.RangeStmt) bool {
	t := r.info.TypeOf(rs.X)
	if t == nil {
		return false
	}
	_, ok := t.Underlying().(*types.Signature)
	return ok
}

// rewrite rewrites one range over a function (and those inside it).
func (r *rangeRewriter) rewrite(rs *ast.RangeStmt, sig *types.Signature, labelled *ast.LabeledStmt, lineV string) {
	fail := func(pos token.Pos, msg string) {
		if r.err == nil {
			r.err = &rangeFuncError{pos: pos, msg: msg}
		}
	}
	seq := r.info.TypeOf(rs.X).Underlying().(*types.Signature)
	if seq.Params().Len() != 1 || seq.Results().Len() != 0 {
		fail(rs.X.Pos(), "cannot range over this function: it must be a func(yield func(...) bool)")
		return
	}
	yield, ok := seq.Params().At(0).Type().Underlying().(*types.Signature)
	if !ok || yield.Results().Len() != 1 || !types.Identical(yield.Results().At(0).Type(), types.Typ[types.Bool]) {
		fail(rs.X.Pos(), "cannot range over this function: its argument must be a func(...) bool")
		return
	}
	k := strconv.Itoa(r.n)
	r.n++
	done, ret, exit := "couplet_done"+k, "couplet_ret"+k, "couplet_exit"+k
	// the parameters: the loop's variables, or stand-ins that the
	// body assigns to the variables a = range assigns
	vars := []ast.Expr{rs.Key, rs.Value}
	var params, assigns []string
	for i := range yield.Params().Len() {
		t := yield.Params().At(i).Type()
		if !r.canWrite(t) {
			fail(rs.X.Pos(), fmt.Sprintf("cannot range over this function in a script: the type %s cannot be written", t))
			return
		}
		name := "_"
		if i < 2 && vars[i] != nil {
			if id, ok := vars[i].(*ast.Ident); ok && (rs.Tok == token.DEFINE || id.Name == "_") {
				name = id.Name
			} else {
				name = "couplet_v" + k + "_" + strconv.Itoa(i)
				assigns = append(assigns, r.text(vars[i])+" = "+name+"; ")
			}
		}
		params = append(params, name+" "+types.TypeString(t, r.qual))
	}
	// the loop's own label, and the labels inside its body
	own := ""
	if labelled != nil {
		own = labelled.Label.Name
		r.out = append(r.out, edit{off: r.off(labelled.Pos()), del: r.off(labelled.Colon) + 1 - r.off(labelled.Pos()), text: strings.Repeat(" ", r.off(labelled.Colon)+1-r.off(labelled.Pos()))})
	}
	inner := map[string]bool{}
	ast.Inspect(rs.Body, func(m ast.Node) bool {
		if l, ok := m.(*ast.LabeledStmt); ok {
			inner[l.Label.Name] = true
		}
		_, lit := m.(*ast.FuncLit)
		return !lit
	})
	var usesRet bool
	var exits []string // the statements made after the call, by exit code - 1
	stop := "{ " + done + " = true; return false }"
	var jumps func(n ast.Node, loops, breakables int, nestedRange bool)
	jumps = func(n ast.Node, loops, breakables int, nestedRange bool) {
		ast.Inspect(n, func(m ast.Node) bool {
			if r.err != nil {
				return false
			}
			switch m := m.(type) {
			case *ast.FuncLit:
				return false
			case *ast.ForStmt:
				jumps(m.Body, loops+1, breakables+1, nestedRange)
				return false
			case *ast.RangeStmt:
				jumps(m.Body, loops+1, breakables+1, nestedRange || r.isRangeFunc(m))
				return false
			case *ast.SwitchStmt:
				jumps(m.Body, loops, breakables+1, nestedRange)
				return false
			case *ast.TypeSwitchStmt:
				jumps(m.Body, loops, breakables+1, nestedRange)
				return false
			case *ast.SelectStmt:
				jumps(m.Body, loops, breakables+1, nestedRange)
				return false
			case *ast.DeferStmt:
				fail(m.Pos(), "a defer inside a range over a function is not supported in a script (it would run at the end of each pass, not of the function): defer before the loop")
				return false
			case *ast.ReturnStmt:
				if nestedRange {
					fail(m.Pos(), "a return inside a range over a function that is inside another is not supported in a script: set a variable and break")
					return false
				}
				usesRet = true
				if len(m.Results) == 0 {
					r.out = append(r.out, edit{off: r.off(m.Pos()), del: len("return"), text: "{ " + ret + " = true; " + done + " = true; return false }"})
					return false
				}
				var tmps []string
				for i := range m.Results {
					tmps = append(tmps, "couplet_rv"+k+"_"+strconv.Itoa(i))
				}
				r.out = append(r.out, edit{off: r.off(m.Pos()), del: len("return"), text: "{ " + strings.Join(tmps, ", ") + " ="},
					edit{off: r.off(m.End()), text: "; " + ret + " = true; " + done + " = true; return false }"})
			case *ast.BranchStmt:
				if m.Tok != token.BREAK && m.Tok != token.CONTINUE {
					return true
				}
				var text string
				switch {
				case m.Label == nil && m.Tok == token.BREAK && breakables == 0,
					m.Label != nil && m.Label.Name == own && m.Tok == token.BREAK:
					text = stop
				case m.Label == nil && m.Tok == token.CONTINUE && loops == 0,
					m.Label != nil && m.Label.Name == own && m.Tok == token.CONTINUE:
					text = "return true"
				case m.Label != nil && !inner[m.Label.Name]:
					// a loop outside this one
					if nestedRange {
						fail(m.Pos(), "a break or continue of an outer loop inside a range over a function that is inside another is not supported in a script")
						return false
					}
					exits = append(exits, m.Tok.String()+" "+m.Label.Name)
					text = "{ " + exit + " = " + strconv.Itoa(len(exits)) + "; " + done + " = true; return false }"
				default:
					return true
				}
				r.out = append(r.out, edit{off: r.off(m.Pos()), del: r.off(m.End()) - r.off(m.Pos()), text: text})
			}
			return true
		})
	}
	jumps(rs.Body, 0, 0, false)
	if r.err != nil {
		return
	}
	// the ranges over functions inside the body
	r.walk(rs.Body, sig, lineV)

	var head strings.Builder
	head.WriteString("{ " + done + " := false; ")
	if usesRet {
		head.WriteString("var " + ret + " bool; ")
		if sig != nil {
			for i := range sig.Results().Len() {
				if !r.canWrite(sig.Results().At(i).Type()) {
					fail(rs.Pos(), "cannot return from inside a range over a function here: the result type cannot be written in a script")
					return
				}
				head.WriteString("var couplet_rv" + k + "_" + strconv.Itoa(i) + " " + types.TypeString(sig.Results().At(i).Type(), r.qual) + "; ")
			}
		}
	}
	if len(exits) > 0 {
		head.WriteString("var " + exit + " int; ")
	}
	// the range expression stays where it is (other rewrites may edit it)
	before := r.src[r.off(rs.For):r.off(rs.X.Pos())]
	open, closing := "(", ")"
	switch rs.X.(type) {
	case *ast.Ident, *ast.SelectorExpr, *ast.CallExpr, *ast.IndexExpr, *ast.IndexListExpr, *ast.FuncLit, *ast.ParenExpr:
		open, closing = "", "" // (the interpreter cannot call a parenthesised function name)
	}
	head.WriteString(open + strings.Repeat("\n", strings.Count(before, "\n")))
	r.out = append(r.out, edit{off: r.off(rs.For), del: len(before), text: head.String()})
	after := r.src[r.off(rs.X.End()) : r.off(rs.Body.Lbrace)+1]
	r.out = append(r.out, edit{off: r.off(rs.X.End()), del: len(after), text: closing + "(func(" + strings.Join(params, ", ") + ") bool { if " + done + " { panic(" + strconv.Quote(rangeFuncPanic) + ") }; " + r.placing(lineV) +
		strings.Join(assigns, "") + strings.Repeat("\n", strings.Count(after, "\n"))})
	var tail strings.Builder
	tail.WriteString("; return true }); ")
	if usesRet {
		var tmps []string
		if sig != nil {
			for i := range sig.Results().Len() {
				tmps = append(tmps, "couplet_rv"+k+"_"+strconv.Itoa(i))
			}
		}
		tail.WriteString("if " + ret + " { return " + strings.Join(tmps, ", ") + " }; ")
	}
	for i, e := range exits {
		tail.WriteString("if " + exit + " == " + strconv.Itoa(i+1) + " { " + e + " }; ")
	}
	tail.WriteString("}")
	r.out = append(r.out, edit{off: r.off(rs.Body.Rbrace), del: 1, text: tail.String()})
}

// text is the source of a node.
func (r *rangeRewriter) text(n ast.Node) string {
	return r.src[r.off(n.Pos()):r.off(n.End())]
}
