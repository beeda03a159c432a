package repl

import (
	"fmt"
	"go/ast"
	"go/constant"
	"go/token"
	"go/types"
	"strings"
)

// A value of a type a cell declares reaches package fmt without its
// methods (the interpreter hands a host function the value's data), so
// fmt.Println(m), m a cell's type with a String method, printed the bare
// value. The print calls of a cell hand such a value over as a shownText
// instead: its method's text beside the value, formatted as fmt formats
// a Stringer (or an error): the text for %v, %s, %q, %x and %X, the
// value for the other verbs and for %#v. Only a value whose type the cell
// names in the call's argument is reached; one held in an interface is
// not.

// shownText is a cell value's String (or Error) text beside the value.
type shownText struct {
	text string
	raw  any
}

// Format formats the text or the value, as fmt's handling of methods
// would.
func (t shownText) Format(f fmt.State, verb rune) {
	switch verb {
	case 'v', 's', 'q', 'x', 'X':
		if verb != 'v' || !f.Flag('#') {
			fmt.Fprintf(f, fmt.FormatString(f, verb), t.text)
			return
		}
	}
	fmt.Fprintf(f, fmt.FormatString(f, verb), t.raw)
}

// String is the text (a trailing expression shows it).
func (t shownText) String() string { return t.text }

// showText is the shownText of a value and its method's text.
func showText(text string, raw any) any { return shownText{text: text, raw: raw} }

// shownError is the shownText of a value of a cell's error type: an
// error itself, so that fmt.Errorf's %w wraps it (errors.As finds the
// value inside, see errorTree).
type shownError struct{ shownText }

// Error is the text of the value's Error method.
func (e shownError) Error() string { return e.text }

// showError is the shownError of a value and its Error text.
func showError(text string, raw any) any { return shownError{shownText{text: text, raw: raw}} }

// printArgs gives, for the printing functions of package fmt, the index
// of the first argument printed.
var printArgs = map[string]int{
	"Print": 0, "Println": 0, "Sprint": 0, "Sprintln": 0, "Fprint": 1, "Fprintln": 1, "Append": 1, "Appendln": 1,
	"Printf": 1, "Sprintf": 1, "Errorf": 1, "Fprintf": 2, "Appendf": 2,
}

// textMethod is the method fmt would call to print a value of type t, a
// cell's own type: "Error" or "String" ("" for none, for a type that
// formats itself, and for a type not the cell's).
func textMethod(t types.Type, main *types.Package) string {
	n, _ := types.Unalias(t).(*types.Named)
	if p, ok := types.Unalias(t).(*types.Pointer); ok {
		n, _ = types.Unalias(p.Elem()).(*types.Named)
	}
	if n == nil || n.Obj().Pkg() != main {
		return ""
	}
	if _, iface := n.Underlying().(*types.Interface); iface {
		return ""
	}
	has := func(name string) bool {
		obj, _, _ := types.LookupFieldOrMethod(t, true, main, name)
		fn, ok := obj.(*types.Func)
		if !ok {
			return false
		}
		sig := fn.Type().(*types.Signature)
		return sig.Params().Len() == 0 && sig.Results().Len() == 1 && types.Identical(sig.Results().At(0).Type(), types.Typ[types.String])
	}
	if obj, _, _ := types.LookupFieldOrMethod(t, true, main, "Format"); obj != nil {
		return ""
	}
	switch {
	case has("Error"):
		return "Error"
	case has("String"):
		return "String"
	}
	return ""
}

// textWrap is the text around an expression of type t that hands it to
// fmt as a shownText ("", "" when it needs none).
func textWrap(t types.Type, main *types.Package, qual types.Qualifier, canWrite func(types.Type) bool) (before, after string) {
	m := textMethod(t, main)
	if m == "" || !canWrite(t) {
		return "", ""
	}
	nilCheck := ""
	if _, ptr := types.Unalias(t).(*types.Pointer); ptr {
		nilCheck = "if couplet_s == nil { return couplet_s }; " // fmt prints <nil>
	}
	show := ".Text("
	if m == "Error" {
		show = ".Fault("
	}
	return "func(couplet_s " + types.TypeString(t, qual) + ") any { " + nilCheck + "return " + keepName + show + "couplet_s." + m + "(), couplet_s) }(", ")"
}

// textArgs are the edits that hand the values of a cell's types printed
// by package fmt's functions in root over as shownTexts.
func textArgs(root ast.Node, info *checked, qual types.Qualifier, canWrite func(types.Type) bool, off func(token.Pos) int) []edit {
	var out []edit
	ast.Inspect(root, func(n ast.Node) bool {
		c, ok := n.(*ast.CallExpr)
		if !ok || c.Ellipsis.IsValid() {
			return true
		}
		sel, ok := ast.Unparen(c.Fun).(*ast.SelectorExpr)
		if !ok {
			return true
		}
		fn, ok := info.Uses[sel.Sel].(*types.Func)
		if !ok || fn.Pkg() == nil || fn.Pkg().Path() != "fmt" {
			return true
		}
		first, ok := printArgs[fn.Name()]
		if !ok || len(c.Args) < first {
			return true
		}
		if strings.HasSuffix(fn.Name(), "f") {
			// a format with %T or an argument index would see the
			// stand-in's type or place
			f := info.Types[c.Args[first-1]].Value
			if f == nil || f.Kind() != constant.String || !plainFormat(constant.StringVal(f)) {
				return true
			}
		}
		for _, a := range c.Args[first:] {
			if before, after := textWrap(info.TypeOf(a), info.pkg, qual, canWrite); before != "" {
				out = append(out, edit{off: off(a.Pos()), text: before}, edit{off: off(a.End()), text: after})
			}
		}
		return true
	})
	return out
}

// plainFormat reports a format whose verbs take their arguments in turn
// (no argument index, no * width or precision) and none of them %T.
func plainFormat(f string) bool {
	for i := 0; i < len(f); i++ {
		if f[i] != '%' {
			continue
		}
		i++
		for i < len(f) && strings.IndexByte("+-# 0123456789.", f[i]) >= 0 {
			i++
		}
		if i < len(f) && (f[i] == '[' || f[i] == '*' || f[i] == 'T') {
			return false
		}
	}
	return true
}
