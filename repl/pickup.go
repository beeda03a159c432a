package repl

import "fmt"

// PickUpError reports a case store that --pick-up cannot continue: it
// holds a run of another script or seed. A headless run reports it as a
// usage error (exit status 2), like any other problem of the output
// folder.
type PickUpError struct {
	// Path is the store file.
	Path string
	Err  error
}

// Error implements error.
func (e *PickUpError) Error() string { return fmt.Sprintf("--pick-up: %v", e.Err) }

// Unwrap returns the store's refusal.
func (e *PickUpError) Unwrap() error { return e.Err }
