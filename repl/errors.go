package repl

import "fmt"

// CellError reports a cell that failed: a syntax or compile error, a
// panic, or a cell stopped by Ctrl-C or the run's time limit. Line is the
// line of the cell (1-based) where it failed.
type CellError struct {
	Cell int
	Line int
	// Kind is "syntax", "compile", "panic", "stopped" or "error".
	Kind string
	Msg  string
	// AtCell and AtLine place a panic that happened in the code of an
	// earlier cell (a function it declared, which this cell called), or
	// a stop that held such a function in a loop: the cell and line of
	// the statement that panicked or was running. Line is then
	// the line of this cell that was running. Both are 0 otherwise.
	AtCell, AtLine int
	// Err is the interpreter's own error, if any.
	Err error
}

// Error implements error.
func (e *CellError) Error() string {
	switch e.Kind {
	case "panic":
		if e.AtCell > 0 {
			return fmt.Sprintf("cell %d, line %d: panic: %s (in the code of cell %d, line %d)", e.Cell, e.Line, e.Msg, e.AtCell, e.AtLine)
		}
		return fmt.Sprintf("cell %d, line %d: panic: %s", e.Cell, e.Line, e.Msg)
	case "stopped":
		if e.AtCell > 0 {
			return fmt.Sprintf("cell %d, line %d: stopped: %s (in the code of cell %d, line %d)", e.Cell, e.Line, e.Msg, e.AtCell, e.AtLine)
		}
		return fmt.Sprintf("cell %d, line %d: stopped: %s", e.Cell, e.Line, e.Msg)
	}
	return fmt.Sprintf("cell %d, line %d: %s", e.Cell, e.Line, e.Msg)
}

// Unwrap returns the interpreter's error.
func (e *CellError) Unwrap() error { return e.Err }
