package repl

import (
	"errors"
	"fmt"
	"strings"
	"testing"
)

func TestIncomplete(t *testing.T) {
	tests := []struct {
		src  string
		want bool
	}{
		{"x := 1", false},
		{"x := 1\n", false},
		{"func f() {", true},
		{"func f() {\n return 1\n}", false},
		{"x := []float64{1,\n", true},
		{"y := 3 +", true},
		{"y := 3 +\n 4", false},
		{"a := b &&", true},
		{"s := `raw\nstring", true},
		{"s := `raw\nstring`", false},
		{"/* comment", true},
		{"f(a,", true},
		{"x.", true},
		{"x++", false},
		{"if a {\n} else", true},
		{"m := map[string]int{\"a\": 1}", false},
		{"x := 1 }", false}, // an excess brace is an error, not more input
		{"", false},
		{"   \n", false},
		{"x = ", true},
		{"ch <-", true},
		{"case 1:", false},
	}
	for _, tc := range tests {
		if got := Incomplete(tc.src); got != tc.want {
			t.Errorf("Incomplete(%q) = %v, want %v", tc.src, got, tc.want)
		}
	}
}

func TestSplitCell(t *testing.T) {
	type want struct {
		kind  chunkKind
		line  int
		expr  bool
		quiet bool
	}
	tests := []struct {
		name    string
		src     string
		chunks  []want
		imports []string
	}{
		{"imports then statements", "import \"fmt\"\nimport \"math\"\nx := math.Pi\nfmt.Println(x)",
			[]want{{chunkImport, 1, false, false}, {chunkStmt, 3, false, false}, {chunkStmt, 4, true, true}}, []string{"fmt", "math"}},
		{"import block", "import (\n\t\"fmt\"\n\t\"couplet/mdo\"\n)\nmdo.Minimize(\"f\")",
			[]want{{chunkImport, 1, false, false}, {chunkStmt, 5, true, false}}, []string{"fmt", "couplet/mdo"}},
		{"declarations grouped", "func f() int { return 1 }\ntype T struct{ A int }\nvar v = 2\nf() + v",
			[]want{{chunkDecl, 1, false, false}, {chunkStmt, 4, true, false}}, nil},
		{"method and literal", "func (t T) M() int { return t.A }\nfunc() { x = 1 }()",
			[]want{{chunkDecl, 1, false, false}, {chunkStmt, 2, true, false}}, nil},
		{"if header semicolon", "if err := f(); err != nil {\n\tpanic(err)\n}\ny",
			[]want{{chunkStmt, 1, false, false}, {chunkStmt, 4, true, false}}, nil},
		{"for header", "for i := 0; i < 3; i++ {\n\tn += i\n}",
			[]want{{chunkStmt, 1, false, false}}, nil},
		{"semicolons on a line", "a := 1; b := 2; a + b",
			[]want{{chunkStmt, 1, false, false}, {chunkStmt, 1, false, false}, {chunkStmt, 1, true, false}}, nil},
		{"comment lines", "// a comment\nx := 1\n\n// another\nx",
			[]want{{chunkStmt, 2, false, false}, {chunkStmt, 5, true, false}}, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			chunks, imports, err := splitCell(tc.src)
			if err != nil {
				t.Fatalf("splitCell: %v", err)
			}
			if len(chunks) != len(tc.chunks) {
				t.Fatalf("got %d chunks %+v, want %d", len(chunks), chunks, len(tc.chunks))
			}
			for i, w := range tc.chunks {
				c := chunks[i]
				if c.kind != w.kind || c.line != w.line || c.expr != w.expr || c.quiet != w.quiet {
					t.Errorf("chunk %d = {kind %d line %d expr %v quiet %v} %q, want %+v", i, c.kind, c.line, c.expr, c.quiet, c.src, w)
				}
			}
			if len(imports) != len(tc.imports) {
				t.Fatalf("imports %v, want %v", imports, tc.imports)
			}
			for i, p := range tc.imports {
				if imports[i].path != p {
					t.Errorf("import %d = %q, want %q", i, imports[i].path, p)
				}
			}
		})
	}
}

func TestSplitCellSyntaxErrors(t *testing.T) {
	tests := []struct {
		src  string
		line int
	}{
		{"x := 1\ny := (2 +\nz := 3", 3},
		{"x := 1\nimport \"fmt\"", 2},
		{"a := 1\nb := 2\nc := )", 3},
		{"s := \"open", 1},
	}
	for _, tc := range tests {
		_, _, err := splitCell(tc.src)
		var le *lineError
		if !errors.As(err, &le) {
			t.Errorf("splitCell(%q) error %v, want a line error", tc.src, err)
			continue
		}
		if le.line != tc.line {
			t.Errorf("splitCell(%q) error on line %d (%v), want line %d", tc.src, le.line, err, tc.line)
		}
	}
}

// manyStatements is a cell of n assignments, one a line.
func manyStatements(n int) string {
	var b strings.Builder
	b.WriteString("x := 0\n")
	for i := 1; i < n; i++ {
		fmt.Fprintf(&b, "x = x + %d\n", i)
	}
	return b.String()
}

// BenchmarkSplitCell splits cells of growing size: the time per
// statement (ns/op divided by the size) stays flat when splitting is
// linear in the cell's size.
func BenchmarkSplitCell(b *testing.B) {
	for _, n := range []int{5000, 20000, 80000, 320000} {
		src := manyStatements(n)
		b.Run(fmt.Sprintf("statements=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				chunks, _, err := splitCell(src)
				if err != nil || len(chunks) != n {
					b.Fatalf("%d chunks, %v", len(chunks), err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/statement")
		})
	}
}
