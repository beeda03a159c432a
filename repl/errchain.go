package repl

import (
	"go/ast"
	"go/token"
	"go/types"
	"reflect"
)

// errors.As with a target of a cell's error type (var e *myErr;
// errors.As(err, &e)) panicked in package errors ("*target must be
// interface or implement error"): the interpreter hands errors the
// target without the type's methods. The call becomes a loop of the
// cell's own over the errors of err's tree, in the order errors.As
// visits them (errorTree), which asserts each to the target's type.

// errorTree lists err and the errors it wraps, depth first, in the
// order errors.As visits them. An error of a cell's type comes as the
// interpreter gave it to the host, inside a wrapper whose first field,
// IValue, holds it, or as the shownError a cell's fmt.Errorf gave (see
// shown.go): it is listed as that value, which the cell's code can assert
// to its type.
func errorTree(err error) []any {
	var out []any
	var walk func(error)
	walk = func(e error) {
		for e != nil {
			var x any = e
			if se, ok := e.(shownError); ok {
				x = se.raw
			} else if v := reflect.ValueOf(e); v.Kind() == reflect.Struct && v.NumField() > 0 && v.Type().Field(0).Name == "IValue" && v.Field(0).CanInterface() {
				x = v.Field(0).Interface()
			}
			out = append(out, x)
			switch u := e.(type) {
			case interface{ Unwrap() error }:
				e = u.Unwrap()
			case interface{ Unwrap() []error }:
				for _, x := range u.Unwrap() {
					walk(x)
				}
				return
			default:
				return
			}
		}
	}
	walk(err)
	return out
}

// errorsAs are the edits that rewrite the errors.As calls in root whose
// target points to a value of a cell's type.
func errorsAs(root ast.Node, info *checked, qual types.Qualifier, canWrite func(types.Type) bool, off func(token.Pos) int) []edit {
	var out []edit
	ast.Inspect(root, func(n ast.Node) bool {
		c, ok := n.(*ast.CallExpr)
		if !ok || len(c.Args) != 2 || c.Ellipsis.IsValid() {
			return true
		}
		sel, ok := ast.Unparen(c.Fun).(*ast.SelectorExpr)
		if !ok {
			return true
		}
		fn, ok := info.Uses[sel.Sel].(*types.Func)
		if !ok || fn.Pkg() == nil || fn.Pkg().Path() != "errors" || fn.Name() != "As" {
			return true
		}
		ptr, ok := types.Unalias(info.TypeOf(c.Args[1])).(*types.Pointer)
		if !ok {
			return true
		}
		t := ptr.Elem()
		named, _ := types.Unalias(t).(*types.Named)
		if p, ok := types.Unalias(t).(*types.Pointer); ok {
			named, _ = types.Unalias(p.Elem()).(*types.Named)
		}
		if named == nil || named.Obj().Pkg() != info.pkg || !canWrite(t) {
			return true
		}
		if _, iface := named.Underlying().(*types.Interface); iface {
			return true
		}
		ts := types.TypeString(t, qual)
		out = append(out, edit{off: off(c.Pos()), del: off(c.Lparen) + 1 - off(c.Pos()),
			text: "func(couplet_e error, couplet_t *" + ts + ") bool { for _, couplet_x := range " + keepName + ".ErrorTree(couplet_e) { if couplet_v, ok := couplet_x.(" + ts + "); ok { *couplet_t = couplet_v; return true } }; return false }("})
		return true
	})
	return out
}
