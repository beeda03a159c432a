package repl

import (
	"context"
	"errors"
	"slices"
	"strings"
	"testing"
)

// The frames of a panic are placed on the cell line that declared the
// code, even when a later cell's call reaches it (here the panic is in
// the cell's own goroutine, so that the cell fails and the frames can be
// seen without the process ending).
func TestPanicFramesArePlaced(t *testing.T) {
	type frame struct{ cell, line int }
	var got []frame
	s, _, _ := newTest(t, Options{OnPanicLine: func(c, l int) { got = append(got, frame{c, l}) }})
	ctx := context.Background()
	s.Exec(ctx, "func crack(n int) {\n\tif n > 2 {\n\t\tpanic(\"the spar cracks\")\n\t}\n\tcrack(n + 1)\n}")
	if c := s.Exec(ctx, "func() {\n\tcrack(0)\n}()"); c.Err == nil {
		t.Fatal("the panic did not fail the cell")
	}
	// the function places its panic on the line of the call of panic
	// (the interpreter's own frames name the line where the function
	// starts, the if on line 2)
	if len(got) == 0 || got[0] != (frame{1, 3}) {
		t.Errorf("frames %v, want the innermost first at cell 1, line 3 (the call of panic)", got)
	}
	got = nil
	// a panic on the first line of a statement chunk, which the
	// interpreter compiles after a wrapper of its own
	s.Exec(ctx, `func() { panic("the rib buckles") }()`)
	if len(got) == 0 || got[0] != (frame{3, 1}) {
		t.Errorf("frames %v, want the innermost first at cell 3, line 1", got)
	}
}

func TestPlaceFrame(t *testing.T) {
	ran := []ranChunk{
		{src: "x := 1", cell: 1, line: 1},
		{src: "func f() {\n\tpanic(1)\n}", cell: 2, line: 1},
		{src: "func g() {\n\tf()\n}", cell: 3, line: 4},
	}
	tests := []struct {
		name       string
		l, col     int
		fn         string
		cell, line int
		ok         bool
	}{
		{"only the call of panic there", 2, 2, "", 2, 2, true},
		{"two chunks fit, none calls panic there", 2, 3, "", 0, 0, false},
		{"two chunks fit, one declares the function", 2, 3, "g", 3, 5, true},
		{"two chunks fit, neither declares the function", 2, 3, "h", 0, 0, false},
		{"two chunks fit, in the statements' own function", 2, 3, "main", 0, 0, false},
		{"past every chunk", 9, 1, "f", 0, 0, false},
		{"past the wrapper of a declaration on its first line", 1, 14, "f", 2, 1, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			cell, line, ok := placeFrame(ran, tc.l, tc.col, tc.fn)
			if cell != tc.cell || line != tc.line || ok != tc.ok {
				t.Errorf("placeFrame(%d:%d) = cell %d line %d %v, want cell %d line %d %v", tc.l, tc.col, cell, line, ok, tc.cell, tc.line, tc.ok)
			}
		})
	}
}

// A session that keeps the cells of an interpreter that died numbers on
// after them, lists and saves them, and @restore runs those that had run
// to their end again, in their places.
func TestKeptCellsAndRestore(t *testing.T) {
	kept := []*Cell{
		{Number: 1, Source: "x := 2"},
		{Number: 2, Source: "go func() { panic(1) }()", Err: errors.New("the interpreter process died: panic: 1")},
		{Number: 3, Source: "y := x * 21"},
	}
	var started []int
	s, out, errb := newTest(t, Options{Kept: kept, OnCell: func(c *Cell, finished bool) {
		if !finished {
			started = append(started, c.Number)
		}
	}})
	ctx := context.Background()
	if s.NextNumber() != 4 {
		t.Fatalf("next cell %d, want 4", s.NextNumber())
	}
	if c := s.Exec(ctx, "y"); c.Err == nil {
		t.Fatalf("cell 4 found y (%v) before @restore", c.Value)
	}
	if script := s.Script(); !strings.Contains(script, "x := 2") || !strings.Contains(script, "y := x * 21") || strings.Contains(script, "panic") {
		t.Errorf("the session's script holds the kept cells that ran to their end only:\n%s", script)
	}
	serve(t, s, "@restore\n@restore\n")
	if !strings.Contains(out.String(), "restored 2 cells") || !strings.Contains(out.String(), "nothing to restore") {
		t.Errorf("output %q, stderr %q", out, errb)
	}
	if c := s.Exec(ctx, "y"); c.Err != nil || c.Value != 42 || c.Number != 5 {
		t.Errorf("cell %d: %v %v, want cell 5 showing 42 (2 × 21)", c.Number, c.Value, c.Err)
	}
	if want := []int{4, 1, 3, 5}; !slices.Equal(started, want) {
		t.Errorf("cells started %v, want %v", started, want)
	}
	var numbers []int
	for _, c := range s.Cells() {
		numbers = append(numbers, c.Number)
	}
	if want := []int{1, 2, 3, 4, 5}; !slices.Equal(numbers, want) {
		t.Errorf("cells %v, want %v", numbers, want)
	}
}
