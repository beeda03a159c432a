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
	// Err is the interpreter's own error, if any.
	Err error
}

// Error implements error.
func (e *CellError) Error() string {
	switch e.Kind {
	case "panic":
		return fmt.Sprintf("cell %d, line %d: panic: %s", e.Cell, e.Line, e.Msg)
	case "stopped":
		return fmt.Sprintf("cell %d, line %d: stopped: %s", e.Cell, e.Line, e.Msg)
	}
	return fmt.Sprintf("cell %d, line %d: %s", e.Cell, e.Line, e.Msg)
}

// Unwrap returns the interpreter's error.
func (e *CellError) Unwrap() error { return e.Err }
