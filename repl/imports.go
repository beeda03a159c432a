package repl

import (
	"fmt"
	"go/parser"
	"go/token"
	"strconv"
	"strings"
)

// PreludeImports returns the packages every session imports before its
// first cell, so that a cell may use them without an import line. A cell
// may still import them again; repeated imports are dropped.
func PreludeImports() []string {
	return []string{"couplet/mdo", "couplet/disciplines", "couplet/optimizers", "couplet/repl/cell", "fmt", "math"}
}

// importPrelude imports the prelude into a fresh interpreter.
func (s *Session) importPrelude() error {
	s.imported = map[string]bool{}
	var b strings.Builder
	b.WriteString("import (\n")
	for _, p := range PreludeImports() {
		fmt.Fprintf(&b, "\t%q\n", p)
		s.imported[importKey("", p)] = true
	}
	fmt.Fprintf(&b, "\t%s %q\n", keepName, keepPath)
	b.WriteString(")")
	if _, err := s.it.Eval(b.String()); err != nil {
		return fmt.Errorf("repl: importing the prelude: %w", err)
	}
	return nil
}

// importKey identifies an import by its local name and path.
func importKey(name, path string) string { return name + " " + path }

// freshImports returns the source of an import chunk without the imports
// the session already has (the interpreter refuses a second import of a
// package as a redeclaration) and the keys of the new ones, to be
// recorded once the interpreter has taken them. An empty source means
// there is nothing left to import.
func (s *Session) freshImports(src string) (string, []string, error) {
	f, err := parser.ParseFile(token.NewFileSet(), "", "package p;"+src, parser.ImportsOnly)
	if err != nil {
		return "", nil, err
	}
	var keys []string
	var b strings.Builder
	n := 0
	for _, is := range f.Imports {
		path, err := strconv.Unquote(is.Path.Value)
		if err != nil {
			return "", nil, err
		}
		name := ""
		if is.Name != nil {
			name = is.Name.Name
		}
		key := importKey(name, path)
		if s.imported[key] {
			continue
		}
		keys = append(keys, key)
		if n == 0 {
			b.WriteString("import (\n")
		}
		n++
		fmt.Fprintf(&b, "\t%s %q\n", name, path)
	}
	if n == 0 {
		return "", nil, nil
	}
	b.WriteString(")")
	return b.String(), keys, nil
}
