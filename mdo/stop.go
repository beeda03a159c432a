package mdo

import (
	"fmt"
	"strings"
)

// StopReason says why an optimiser or a design of experiments stopped; it
// is Result.Stop. Its text (String) is what the store and summary.json
// keep, and ParseStopReason reads it back.
type StopReason int

// The reasons a run stops. The zero value, NotStopped, is the reason of a
// run that has not ended (or was killed before it could say why).
const (
	// NotStopped: the run has not ended.
	NotStopped StopReason = iota
	// StopConverged: the method's own convergence test was met.
	StopConverged
	// StopBudget: the evaluation budget (MaxEvaluations) was spent.
	StopBudget
	// StopIterations: the number of generations or iterations was reached.
	StopIterations
	// StopComplete: a design of experiments evaluated all its points.
	StopComplete
	// StopCancelled: the context was cancelled.
	StopCancelled
	// StopDeadline: the context's deadline passed.
	StopDeadline
	// StopStalled: the method could make no more progress before its
	// convergence test was met (a line search that finds no decrease, a
	// local minimum of the constraint violation); Result.StopDetail
	// says which.
	StopStalled
)

// stopText is the stored text of each reason, indexed by the reason.
var stopText = [...]string{
	NotStopped:     "",
	StopConverged:  "converged",
	StopBudget:     "budget",
	StopIterations: "iterations",
	StopComplete:   "complete",
	StopCancelled:  "cancelled",
	StopDeadline:   "deadline",
	StopStalled:    "stalled",
}

// String returns the reason's text: "converged", "budget", "iterations",
// "complete", "cancelled", "deadline" or "stalled"; "" for NotStopped.
func (s StopReason) String() string {
	if s < 0 || int(s) >= len(stopText) {
		return fmt.Sprintf("StopReason(%d)", int(s))
	}
	return stopText[s]
}

// ParseStopReason reads the text String writes ("" is NotStopped).
func ParseStopReason(text string) (StopReason, error) {
	for s, t := range stopText {
		if t == text {
			return StopReason(s), nil
		}
	}
	return NotStopped, fmt.Errorf("mdo: stop reason %q is not one of %s", text, strings.Join(stopText[1:], ", "))
}

// MarshalText implements encoding.TextMarshaler with String's text.
func (s StopReason) MarshalText() ([]byte, error) {
	if s < 0 || int(s) >= len(stopText) {
		return nil, fmt.Errorf("mdo: StopReason(%d) is not a stop reason", int(s))
	}
	return []byte(stopText[s]), nil
}

// UnmarshalText implements encoding.TextUnmarshaler with ParseStopReason.
func (s *StopReason) UnmarshalText(text []byte) error {
	r, err := ParseStopReason(string(text))
	if err != nil {
		return err
	}
	*s = r
	return nil
}
