package repl_test

import (
	"context"
	"fmt"
	"os"

	"couplet/repl"
)

// A session runs cells; the value of a trailing expression is shown.
func ExampleSession_Exec() {
	s, err := repl.NewSession(repl.Options{Stdout: os.Stdout, Stderr: os.Stdout})
	if err != nil {
		panic(err)
	}
	s.Exec(context.Background(), "import \"math\"\n// dynamic pressure at 100 m/s, ISA sea level\nq := 0.5 * 1.225 * math.Pow(100, 2)\nq")
	s.Exec(context.Background(), "q.Span")
	// Output:
	// 6125
	// cell 2, line 1: q.Span undefined (type float64 has no field or method Span)
}

// A study file holds cells after a header line; a file without markers
// is one cell.
func ExampleParseStudy() {
	f, err := repl.ParseStudy(repl.FormatStudy([]string{"x := 1", "x + 1"}))
	if err != nil {
		panic(err)
	}
	fmt.Println(len(f.Cells), f.Cells[1].Source, f.Cells[1].Line)
	// Output: 2 x + 1 7
}
