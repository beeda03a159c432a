package repl

import (
	"go/ast"
	"go/parser"
	"go/token"
)

// declaredNames returns the top-level names a cell declares (functions,
// types, variables, constants, and variables defined with :=), for tab
// completion: the interpreter lists only exported names and variables.
func declaredNames(src string) []string {
	chunks, _, err := splitCell(src)
	if err != nil {
		return nil
	}
	var out []string
	addSpecs := func(specs []ast.Spec) {
		for _, sp := range specs {
			switch s := sp.(type) {
			case *ast.ValueSpec:
				for _, n := range s.Names {
					out = append(out, n.Name)
				}
			case *ast.TypeSpec:
				out = append(out, s.Name.Name)
			}
		}
	}
	for _, c := range chunks {
		switch c.kind {
		case chunkDecl:
			f, err := parser.ParseFile(token.NewFileSet(), "", "package p;"+c.src, 0)
			if err != nil {
				continue
			}
			for _, d := range f.Decls {
				switch d := d.(type) {
				case *ast.FuncDecl:
					if d.Recv == nil {
						out = append(out, d.Name.Name)
					}
				case *ast.GenDecl:
					addSpecs(d.Specs)
				}
			}
		case chunkStmt:
			f, err := parser.ParseFile(token.NewFileSet(), "", "package p; func _() {"+c.src+"\n}", 0)
			if err != nil {
				continue
			}
			for _, st := range f.Decls[0].(*ast.FuncDecl).Body.List {
				switch st := st.(type) {
				case *ast.AssignStmt:
					if st.Tok == token.DEFINE {
						for _, l := range st.Lhs {
							if id, ok := l.(*ast.Ident); ok && id.Name != "_" {
								out = append(out, id.Name)
							}
						}
					}
				case *ast.DeclStmt:
					if g, ok := st.Decl.(*ast.GenDecl); ok {
						addSpecs(g.Specs)
					}
				}
			}
		}
	}
	return out
}
