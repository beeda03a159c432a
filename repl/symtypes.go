package repl

import (
	"fmt"
	"go/constant"
	"go/token"
	"go/types"
	"reflect"
	"strings"

	"github.com/traefik/yaegi/interp"
)

// symbolImporter is a types.Importer over the interpreter's symbol
// tables: it rebuilds, from the reflect values the tables hold, the
// go/types view of every package a cell may import, so that a cell can be
// type-checked before the interpreter sees it (see transform.go). Types
// a table only mentions (a field's type from a package scripts cannot
// import) get a package of their own, which cannot be imported.
type symbolImporter struct {
	tables map[string]map[string]reflect.Value // by import path
	names  map[string]string                   // package name by import path
	pkgs   map[string]*types.Package
	filled map[string]bool
	named  map[reflect.Type]*types.Named
	// stand-ins: the private packages that name the types of a package
	// scripts cannot import (a value of one may still come out of a
	// call), by their path, with the path of the package they stand for
	standIns map[string]string
}

// standInPrefix starts the import path of a stand-in package.
const standInPrefix = "couplet/repl/internal/standin/"

// standIn is the import path and local name of the stand-in of a
// package scripts cannot import.
func (im *symbolImporter) standIn(path string) (string, string) {
	name := strings.NewReplacer("/", "_", ".", "_", "-", "_").Replace(path)
	sp := standInPrefix + name
	im.standIns[sp] = path
	return sp, "couplet_standin_" + name
}

// reflectOf is the reflect type of a named type the tables reach.
func (im *symbolImporter) reflectOf(n *types.Named) reflect.Type {
	for t, m := range im.named {
		if m == n {
			return t
		}
	}
	return nil
}

// standInExports is the symbol table of a stand-in package: the exported
// named types of the package it stands for that the tables reach.
func (im *symbolImporter) standInExports(sp, name string) interp.Exports {
	syms := map[string]reflect.Value{}
	for t, n := range im.named {
		if n.Obj().Pkg().Path() == im.standIns[sp] && n.Obj().Exported() {
			syms[n.Obj().Name()] = reflect.Zero(reflect.PointerTo(t))
		}
	}
	return interp.Exports{sp + "/" + name: syms}
}

// newSymbolImporter indexes the symbol tables ("path/name" keys, as
// interp.Exports has them).
func newSymbolImporter(tables ...interp.Exports) *symbolImporter {
	im := &symbolImporter{
		tables: map[string]map[string]reflect.Value{},
		names:  map[string]string{},
		pkgs:   map[string]*types.Package{},
		filled: map[string]bool{},
		named:  map[reflect.Type]*types.Named{},

		standIns: map[string]string{},
	}
	for _, t := range tables {
		for key, syms := range t {
			i := strings.LastIndex(key, "/")
			if i < 0 {
				continue
			}
			path, name := key[:i], key[i+1:]
			im.names[path] = name
			m := im.tables[path]
			if m == nil {
				m = map[string]reflect.Value{}
				im.tables[path] = m
			}
			for n, v := range syms {
				m[n] = v
			}
		}
	}
	return im
}

// importable reports whether a cell may name the package's types.
func (im *symbolImporter) importable(path string) bool {
	_, ok := im.tables[path]
	return ok
}

// Import implements types.Importer.
func (im *symbolImporter) Import(path string) (*types.Package, error) {
	if orig, ok := im.standIns[path]; ok {
		p := types.NewPackage(path, "standin")
		for _, n := range im.named {
			if n.Obj().Pkg().Path() == orig && n.Obj().Exported() {
				tn := types.NewTypeName(token.NoPos, p, n.Obj().Name(), nil)
				types.NewAlias(tn, n)
				p.Scope().Insert(tn)
			}
		}
		p.MarkComplete()
		return p, nil
	}
	syms, ok := im.tables[path]
	if !ok {
		return nil, fmt.Errorf("package %q is not in the interpreter's symbol tables", path)
	}
	pkg := im.pkg(path)
	if im.filled[path] {
		return pkg, nil
	}
	im.filled[path] = true
	scope := pkg.Scope()
	for name, v := range syms {
		if strings.HasPrefix(name, "_") || !v.IsValid() {
			continue // interface wrappers of the extractor
		}
		if obj := im.object(pkg, name, v); scope.Lookup(name) == nil {
			scope.Insert(obj)
		}
	}
	pkg.MarkComplete()
	return pkg, nil
}

// pkg returns the package object of an import path.
func (im *symbolImporter) pkg(path string) *types.Package {
	if p := im.pkgs[path]; p != nil {
		return p
	}
	name := im.names[path]
	if name == "" {
		name = path[strings.LastIndex(path, "/")+1:]
	}
	p := types.NewPackage(path, name)
	im.pkgs[path] = p
	return p
}

// object is the declared object of one table entry: a type (a nil
// pointer to it), a variable (addressable), a function, or a constant.
func (im *symbolImporter) object(pkg *types.Package, name string, v reflect.Value) types.Object {
	if c, ok := v.Interface().(constant.Value); ok && !v.CanAddr() {
		return types.NewConst(token.NoPos, pkg, name, untypedOf(c), c)
	}
	t := v.Type()
	switch {
	case v.CanAddr():
		return types.NewVar(token.NoPos, pkg, name, im.typeOf(t))
	case t.Kind() == reflect.Pointer && v.IsNil():
		typ := im.typeOf(t.Elem())
		if n, ok := typ.(*types.Named); ok && n.Obj().Name() == name && n.Obj().Pkg() == pkg {
			return n.Obj()
		}
		tn := types.NewTypeName(token.NoPos, pkg, name, nil)
		types.NewAlias(tn, typ)
		return tn
	case t.Kind() == reflect.Func:
		sig, _ := im.typeOf(t).(*types.Signature)
		return types.NewFunc(token.NoPos, pkg, name, sig)
	}
	if c := constantOf(v); c != nil {
		return types.NewConst(token.NoPos, pkg, name, im.typeOf(t), c)
	}
	return types.NewVar(token.NoPos, pkg, name, im.typeOf(t))
}

// untypedOf is the untyped type of an untyped constant.
func untypedOf(c constant.Value) types.Type {
	switch c.Kind() {
	case constant.Bool:
		return types.Typ[types.UntypedBool]
	case constant.String:
		return types.Typ[types.UntypedString]
	case constant.Int:
		return types.Typ[types.UntypedInt]
	case constant.Float:
		return types.Typ[types.UntypedFloat]
	case constant.Complex:
		return types.Typ[types.UntypedComplex]
	}
	return types.Typ[types.Invalid]
}

// constantOf is the constant value of a typed constant's reflect value,
// nil for a kind that cannot be a constant.
func constantOf(v reflect.Value) constant.Value {
	switch v.Kind() {
	case reflect.Bool:
		return constant.MakeBool(v.Bool())
	case reflect.String:
		return constant.MakeString(v.String())
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		return constant.MakeInt64(v.Int())
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr:
		return constant.MakeUint64(v.Uint())
	case reflect.Float32, reflect.Float64:
		return constant.MakeFloat64(v.Float())
	}
	return nil
}

var basicKinds = map[reflect.Kind]types.BasicKind{
	reflect.Bool: types.Bool, reflect.Int: types.Int, reflect.Int8: types.Int8, reflect.Int16: types.Int16,
	reflect.Int32: types.Int32, reflect.Int64: types.Int64, reflect.Uint: types.Uint, reflect.Uint8: types.Uint8,
	reflect.Uint16: types.Uint16, reflect.Uint32: types.Uint32, reflect.Uint64: types.Uint64,
	reflect.Uintptr: types.Uintptr, reflect.Float32: types.Float32, reflect.Float64: types.Float64,
	reflect.Complex64: types.Complex64, reflect.Complex128: types.Complex128, reflect.String: types.String,
	reflect.UnsafePointer: types.UnsafePointer,
}

// typeOf converts a reflect type into its go/types form.
func (im *symbolImporter) typeOf(t reflect.Type) types.Type {
	if t.Name() != "" {
		if t.PkgPath() == "" {
			if t.Kind() == reflect.Interface && t.Name() == "error" {
				return types.Universe.Lookup("error").Type()
			}
			if k, ok := basicKinds[t.Kind()]; ok {
				return types.Typ[k]
			}
		} else {
			return im.namedOf(t)
		}
	}
	return im.literalOf(t)
}

// namedOf is the named type of a reflect type with a package, with its
// methods (those of T with a value receiver, those only *T has with a
// pointer receiver).
func (im *symbolImporter) namedOf(t reflect.Type) *types.Named {
	if n := im.named[t]; n != nil {
		return n
	}
	pkg := im.pkg(t.PkgPath())
	obj := types.NewTypeName(token.NoPos, pkg, t.Name(), nil)
	n := types.NewNamed(obj, nil, nil)
	im.named[t] = n
	n.SetUnderlying(im.literalOf(t).Underlying())
	if t.Kind() == reflect.Interface {
		return n
	}
	seen := map[string]bool{}
	for i := range t.NumMethod() {
		m := t.Method(i)
		seen[m.Name] = true
		n.AddMethod(im.method(pkg, m, n))
	}
	pt := reflect.PointerTo(t)
	for i := range pt.NumMethod() {
		if m := pt.Method(i); !seen[m.Name] {
			n.AddMethod(im.method(pkg, m, types.NewPointer(n)))
		}
	}
	return n
}

// method is a method of a named type, from its reflect method (whose
// function type takes the receiver first).
func (im *symbolImporter) method(pkg *types.Package, m reflect.Method, recv types.Type) *types.Func {
	ft := m.Type
	params := make([]*types.Var, 0, ft.NumIn())
	for i := 1; i < ft.NumIn(); i++ {
		params = append(params, types.NewParam(token.NoPos, pkg, "", im.typeOf(ft.In(i))))
	}
	results := make([]*types.Var, 0, ft.NumOut())
	for i := range ft.NumOut() {
		results = append(results, types.NewParam(token.NoPos, pkg, "", im.typeOf(ft.Out(i))))
	}
	sig := types.NewSignatureType(types.NewVar(token.NoPos, pkg, "", recv), nil, nil,
		types.NewTuple(params...), types.NewTuple(results...), ft.IsVariadic())
	return types.NewFunc(token.NoPos, pkg, m.Name, sig)
}

// literalOf is the type literal of a reflect type's structure.
func (im *symbolImporter) literalOf(t reflect.Type) types.Type {
	switch t.Kind() {
	case reflect.Pointer:
		return types.NewPointer(im.typeOf(t.Elem()))
	case reflect.Slice:
		return types.NewSlice(im.typeOf(t.Elem()))
	case reflect.Array:
		return types.NewArray(im.typeOf(t.Elem()), int64(t.Len()))
	case reflect.Map:
		return types.NewMap(im.typeOf(t.Key()), im.typeOf(t.Elem()))
	case reflect.Chan:
		dir := types.SendRecv
		switch t.ChanDir() {
		case reflect.SendDir:
			dir = types.SendOnly
		case reflect.RecvDir:
			dir = types.RecvOnly
		}
		return types.NewChan(dir, im.typeOf(t.Elem()))
	case reflect.Func:
		var params, results []*types.Var
		for i := range t.NumIn() {
			params = append(params, types.NewParam(token.NoPos, nil, "", im.typeOf(t.In(i))))
		}
		for i := range t.NumOut() {
			results = append(results, types.NewParam(token.NoPos, nil, "", im.typeOf(t.Out(i))))
		}
		return types.NewSignatureType(nil, nil, nil, types.NewTuple(params...), types.NewTuple(results...), t.IsVariadic())
	case reflect.Struct:
		fields := make([]*types.Var, t.NumField())
		tags := make([]string, t.NumField())
		for i := range t.NumField() {
			f := t.Field(i)
			var pkg *types.Package
			if f.PkgPath != "" {
				pkg = im.pkg(f.PkgPath)
			}
			fields[i] = types.NewField(token.NoPos, pkg, f.Name, im.typeOf(f.Type), f.Anonymous)
			tags[i] = string(f.Tag)
		}
		return types.NewStruct(fields, tags)
	case reflect.Interface:
		methods := make([]*types.Func, 0, t.NumMethod())
		for i := range t.NumMethod() {
			m := t.Method(i)
			var pkg *types.Package
			if m.PkgPath != "" {
				pkg = im.pkg(m.PkgPath)
			}
			sig, _ := im.literalOf(m.Type).(*types.Signature)
			methods = append(methods, types.NewFunc(token.NoPos, pkg, m.Name, sig))
		}
		return types.NewInterfaceType(methods, nil).Complete()
	}
	if k, ok := basicKinds[t.Kind()]; ok {
		return types.Typ[k]
	}
	return types.Typ[types.Invalid]
}
