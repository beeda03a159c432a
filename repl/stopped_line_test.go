package repl

import (
	"context"
	"errors"
	"strings"
	"testing"
	"time"
)

// A cell that the time limit stops names the line it was on, once its
// body has unwound (a loop that never ends is stopped at its statement,
// not at the cell's first line), and the limit it reached. Before, every
// stopped cell was placed on its first statement and said only "time
// limit reached".
func TestStoppedCellNamesItsLine(t *testing.T) {
	tests := []struct {
		name string
		cell string
		line int
	}{
		{"loop whose counter is never raised", "total := 0.0\nfor i := 0; i < 10; {\n\ttotal += 1\n}", 3},
		{"empty endless loop", "n := 0\nn++\nfor {\n}", 3},
		// the loop's line, not the call's (6) since the stop is placed
		// inside the functions of the cells
		{"endless loop in a function the cell calls", "spin := func() {\n\tfor {\n\t}\n}\nx := 1\nspin()\n_ = x", 2},
		{"endless loop in a nested block", "if true {\n\tk := 0\n\tfor k >= 0 {\n\t\tk = 1\n\t}\n}", 4},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			limit := 300 * time.Millisecond
			s, _, _ := newTest(t, Options{Grace: 50 * time.Millisecond, TimeLimit: limit})
			ctx, cancel := context.WithTimeout(context.Background(), limit)
			defer cancel()
			c := s.Exec(ctx, tc.cell)
			var ce *CellError
			if !errors.As(c.Err, &ce) || ce.Kind != "stopped" {
				t.Fatalf("cell error %v, want the cell stopped", c.Err)
			}
			if ce.Line != tc.line {
				t.Errorf("stopped on line %d (%v), want line %d", ce.Line, ce, tc.line)
			}
			if !strings.Contains(ce.Error(), "the time limit of 300ms was reached") {
				t.Errorf("error %q does not name the time limit", ce)
			}
			if r := s.Exec(context.Background(), "6 * 7"); r.Err != nil {
				t.Errorf("session did not go on: %v", r.Err)
			}
		})
	}
}

// objectiveSpin is a cell whose objective function literal, called by
// the optimiser on the framework's workers, never leaves its loop from
// its fourth call: the stop is placed on the loop's statement (line 13),
// where it was placed on the optimiser's call (line 18) before.
const objectiveSpin = `import (
	"couplet/mdo"
	"couplet/optimizers"
	"couplet/repl/cell"
)
study, _ := mdo.SellarStudy(mdo.MDF)
calls := 0
study.Objectives = []mdo.Objective{mdo.MinimizeFunc("f", func(v mdo.Values) float64 {
	x := v.Get("x")
	calls++
	if calls > 3 {
		for i := 0; i < 10; {
			x += 1
		}
	}
	return x
})}
res, err := optimizers.NelderMead{MaxEvaluations: 200}.Minimize(cell.Context(), study)
_, _ = res, err`

// A cell stopped while a function literal of the cells is held in a loop
// (an objective the optimiser calls) names the line inside the literal;
// one declared by an earlier cell is named beside the line of the cell
// that ran.
func TestStoppedInsideAFunctionLiteral(t *testing.T) {
	tests := []struct {
		name   string
		cells  []string
		line   int
		atCell int
		atLine int
	}{
		{"objective literal", []string{objectiveSpin}, 13, 0, 0},
		{"function of an earlier cell", []string{"spin := func(n int) int {\n\tk := 0\n\tfor k < n {\n\t\tk *= 2\n\t}\n\treturn k\n}", "a := 1\nb := spin(5)\n_, _ = a, b"}, 2, 1, 4},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			limit := 300 * time.Millisecond
			s, _, _ := newTest(t, Options{Grace: 50 * time.Millisecond, TimeLimit: limit})
			for _, c := range tc.cells[:len(tc.cells)-1] {
				if r := s.Exec(context.Background(), c); r.Err != nil {
					t.Fatal(r.Err)
				}
			}
			ctx, cancel := context.WithTimeout(context.Background(), limit)
			defer cancel()
			c := s.Exec(ctx, tc.cells[len(tc.cells)-1])
			var ce *CellError
			if !errors.As(c.Err, &ce) || ce.Kind != "stopped" {
				t.Fatalf("cell error %v, want the cell stopped", c.Err)
			}
			if ce.Line != tc.line || ce.AtCell != tc.atCell || ce.AtLine != tc.atLine {
				t.Errorf("stopped on line %d, in the code of cell %d line %d (%v); want line %d, cell %d line %d", ce.Line, ce.AtCell, ce.AtLine, ce, tc.line, tc.atCell, tc.atLine)
			}
			if r := s.Exec(context.Background(), "6 * 7"); r.Err != nil {
				t.Errorf("session did not go on: %v", r.Err)
			}
		})
	}
}
