package repl

import (
	"fmt"
	"go/ast"
	"go/parser"
	"go/scanner"
	"go/token"
	"strconv"
	"strings"
)

// chunkKind says how the interpreter must receive a chunk of a cell.
type chunkKind int

const (
	chunkImport chunkKind = iota // import declarations
	chunkDecl                    // func, type, var and const declarations
	chunkStmt                    // one statement (or expression)
)

// chunk is a piece of a cell evaluated by one call of the interpreter.
// The interpreter parses a source that starts with a declaration keyword
// as a file (declarations only) and anything else as statements, so a
// cell that mixes them is cut into chunks; each statement is a chunk of
// its own so that a failure is placed on its line.
type chunk struct {
	kind chunkKind
	src  string
	line int // line of the cell on which the chunk starts (1-based)
	// expr is set for a trailing expression statement whose value is
	// shown; quiet when it is a call to a printing function.
	expr  bool
	quiet bool
	// call is set when the expression is a function call: a nil result
	// (an error that did not happen) is not shown.
	call bool
}

// importRef is one import of a cell with the line it is on.
type importRef struct {
	path string
	line int
}

// unit is one top-level statement or declaration of a cell: the span
// [start, end) of its source, the line it starts on (1-based) and its
// first token.
type unit struct {
	kind       chunkKind
	start, end int
	line       int
	first      token.Token
}

// scanUnits cuts a cell into its top-level statements and declarations.
// A scanner error is returned as a *lineError.
func scanUnits(src string) ([]unit, error) {
	fset := token.NewFileSet()
	file := fset.AddFile("cell", -1, len(src))
	var s scanner.Scanner
	var scanErr error
	s.Init(file, []byte(src), func(pos token.Position, msg string) {
		if scanErr == nil {
			scanErr = &lineError{line: pos.Line, msg: msg}
		}
	}, 0)
	var units []unit
	depth := 0
	header := false
	start, startLine := -1, 0
	var first []token.Token // first tokens of the current unit
	var firstLit []string
	closeUnit := func(end int) {
		if start < 0 {
			return
		}
		units = append(units, unit{kind: classify(first, firstLit), start: start, end: end, line: startLine, first: first[0]})
		start = -1
		first, firstLit = first[:0], firstLit[:0]
	}
	for {
		pos, tok, lit := s.Scan()
		if tok == token.EOF {
			closeUnit(len(src))
			break
		}
		off := file.Offset(pos)
		if tok == token.SEMICOLON && depth == 0 && !(header && lit == ";") {
			closeUnit(off)
			header = false
			continue
		}
		if depth == 0 {
			switch tok {
			case token.IF, token.FOR, token.SWITCH, token.SELECT:
				header = true // its init; cond; post semicolons do not end it
			case token.LBRACE:
				header = false
			}
		}
		if start < 0 {
			// the scanner's file knows the line of every offset
			start, startLine = off, file.Line(pos)
		}
		if len(first) < 64 { // enough for a long receiver: func (p *pair[K, V]) swap(
			first = append(first, tok)
			firstLit = append(firstLit, lit)
		}
		switch tok {
		case token.LPAREN, token.LBRACK, token.LBRACE:
			depth++
		case token.RPAREN, token.RBRACK, token.RBRACE:
			depth--
		}
	}
	if scanErr != nil {
		return nil, scanErr
	}
	return units, nil
}

// splitCell cuts a cell into chunks, checks its syntax and lists its
// imports. A syntax error is returned as a *lineError with the line.
func splitCell(src string) ([]chunk, []importRef, error) {
	units, err := scanUnits(src)
	if err != nil {
		return nil, nil, err
	}
	// Group consecutive imports and consecutive declarations.
	var chunks []chunk
	for i := 0; i < len(units); {
		u := units[i]
		j := i + 1
		if u.kind != chunkStmt {
			for j < len(units) && units[j].kind == u.kind {
				j++
			}
		}
		text := src[u.start:units[j-1].end]
		chunks = append(chunks, chunk{kind: u.kind, src: text, line: u.line})
		i = j
	}
	// Imports must come first, as in a Go file.
	seenOther := false
	var imports []importRef
	for k := range chunks {
		c := &chunks[k]
		switch c.kind {
		case chunkImport:
			if seenOther {
				return nil, nil, &lineError{line: c.line, msg: "imports must come at the start of a cell, before any other code"}
			}
			refs, err := parseImports(c)
			if err != nil {
				return nil, nil, err
			}
			imports = append(imports, refs...)
		case chunkDecl:
			seenOther = true
			if _, err := parser.ParseFile(token.NewFileSet(), "", "package p;"+c.src, parser.SkipObjectResolution); err != nil {
				return nil, nil, chunkSyntaxError(c, err)
			}
		case chunkStmt:
			seenOther = true
			f, err := parser.ParseFile(token.NewFileSet(), "", "package p; func _() {"+c.src+"\n}", parser.SkipObjectResolution)
			if err != nil {
				return nil, nil, chunkSyntaxError(c, err)
			}
			if k == len(chunks)-1 {
				body := f.Decls[0].(*ast.FuncDecl).Body.List
				if len(body) == 1 {
					if es, ok := body[0].(*ast.ExprStmt); ok {
						c.expr = true
						c.quiet = isPrintCall(es.X)
						_, c.call = es.X.(*ast.CallExpr)
					}
				}
			}
		}
	}
	return chunks, imports, nil
}

// classify tells the chunk kind from the first tokens of a unit.
func classify(tok []token.Token, lit []string) chunkKind {
	if len(tok) == 0 {
		return chunkStmt
	}
	switch tok[0] {
	case token.IMPORT:
		return chunkImport
	case token.TYPE, token.CONST, token.VAR:
		return chunkDecl
	case token.FUNC:
		if len(tok) > 1 && tok[1] == token.IDENT {
			return chunkDecl // func name(...)
		}
		if len(tok) > 1 && tok[1] == token.LPAREN {
			// A method has a receiver list followed by a name and "(";
			// a function literal has parameters followed by a result or "{".
			d := 0
			for k := 1; k < len(tok); k++ {
				switch tok[k] {
				case token.LPAREN:
					d++
				case token.RPAREN:
					d--
					if d == 0 {
						if k+2 < len(tok) && tok[k+1] == token.IDENT && tok[k+2] == token.LPAREN {
							return chunkDecl
						}
						return chunkStmt
					}
				}
			}
		}
	}
	return chunkStmt
}

// isPrintCall reports calls of fmt's printing functions, whose byte count
// is not worth showing.
func isPrintCall(x ast.Expr) bool {
	call, ok := x.(*ast.CallExpr)
	if !ok {
		return false
	}
	sel, ok := call.Fun.(*ast.SelectorExpr)
	if !ok {
		return false
	}
	pkg, ok := sel.X.(*ast.Ident)
	if !ok || pkg.Name != "fmt" {
		return false
	}
	return strings.HasPrefix(sel.Sel.Name, "Print") || strings.HasPrefix(sel.Sel.Name, "Fprint")
}

// parseImports lists the import paths of an import chunk.
func parseImports(c *chunk) ([]importRef, error) {
	fset := token.NewFileSet()
	f, err := parser.ParseFile(fset, "", "package p;"+c.src, parser.ImportsOnly)
	if err != nil {
		return nil, chunkSyntaxError(c, err)
	}
	var out []importRef
	for _, is := range f.Imports {
		p, err := strconv.Unquote(is.Path.Value)
		if err != nil {
			return nil, &lineError{line: c.line + fset.Position(is.Pos()).Line - 1, msg: "bad import path " + is.Path.Value}
		}
		out = append(out, importRef{path: p, line: c.line + fset.Position(is.Pos()).Line - 1})
	}
	return out, nil
}

// chunkSyntaxError places a go/parser error on the line of the cell.
func chunkSyntaxError(c *chunk, err error) error {
	if list, ok := err.(scanner.ErrorList); ok && len(list) > 0 {
		return &lineError{line: c.line + list[0].Pos.Line - 1, msg: list[0].Msg}
	}
	return &lineError{line: c.line, msg: err.Error()}
}

// lineError is an error placed on a line of a cell; the session adds the
// cell number when it reports it.
type lineError struct {
	line int
	msg  string
}

func (e *lineError) Error() string { return fmt.Sprintf("line %d: %s", e.line, e.msg) }

// Incomplete reports whether src needs more lines before it can be run:
// an open bracket, brace or parenthesis, an unterminated raw string or
// block comment, or a trailing operator, comma, dot or "else".
func Incomplete(src string) bool {
	if strings.TrimSpace(src) == "" {
		return false
	}
	fset := token.NewFileSet()
	file := fset.AddFile("cell", -1, len(src))
	var s scanner.Scanner
	open := false
	s.Init(file, []byte(src), func(_ token.Position, msg string) {
		if strings.Contains(msg, "raw string literal not terminated") || strings.Contains(msg, "comment not terminated") {
			open = true
		}
	}, 0)
	depth := 0
	last := token.ILLEGAL
	for {
		_, tok, lit := s.Scan()
		if tok == token.EOF {
			break
		}
		switch tok {
		case token.LPAREN, token.LBRACK, token.LBRACE:
			depth++
		case token.RPAREN, token.RBRACK, token.RBRACE:
			depth--
		}
		if tok == token.SEMICOLON && lit == "\n" {
			continue
		}
		last = tok
	}
	if open || depth > 0 {
		return true
	}
	switch {
	case last.IsOperator():
		switch last {
		case token.RPAREN, token.RBRACK, token.RBRACE, token.SEMICOLON, token.INC, token.DEC, token.ELLIPSIS, token.COLON:
			return false
		}
		return true
	case last == token.ELSE:
		return true
	}
	return false
}
