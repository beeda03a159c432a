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
		{"endless loop in a function the cell calls", "spin := func() {\n\tfor {\n\t}\n}\nx := 1\nspin()\n_ = x", 6},
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
