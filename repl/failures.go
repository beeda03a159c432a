package repl

import (
	"fmt"
	"regexp"
	"sort"
	"strings"

	"couplet/mdo"
	"couplet/mdo/store"
)

// AllFailedError reports a study in which every evaluation failed: its
// result says nothing about the design, so `couplet run` exits 1.
type AllFailedError struct {
	Study       string
	Evaluations int
	// Reasons are the commonest failure reasons, commonest first.
	Reasons []FailureReason
}

// FailureReason is one kind of failure and how many evaluations it ended.
type FailureReason struct {
	// Example is the message of the first evaluation of its kind;
	// messages that differ only in their numbers count as one kind.
	Example string
	// Count is 0 when unknown (a study run without a store).
	Count int
}

// Error implements error.
func (e *AllFailedError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "study %q: every one of its %d evaluations failed; the commonest reasons:", e.Study, e.Evaluations)
	for _, r := range e.Reasons {
		if r.Count > 0 {
			fmt.Fprintf(&b, "\n  %d × %s", r.Count, r.Example)
		} else {
			fmt.Fprintf(&b, "\n  for example: %s", r.Example)
		}
	}
	return b.String()
}

// numberRun matches the numbers in a failure message.
var numberRun = regexp.MustCompile(`[-+]?[0-9]+(\.[0-9]+)?([eE][-+]?[0-9]+)?`)

// commonestFailures reads the evaluations of a store one by one and
// returns at most n failure reasons, commonest first (ties in the order
// first seen).
func commonestFailures(st *store.Store, n int) ([]FailureReason, error) {
	index := map[string]int{}
	var reasons []FailureReason
	err := st.Scan(func(e *mdo.Evaluation) error {
		if e.Err == "" {
			return nil
		}
		key := numberRun.ReplaceAllString(e.Err, "#")
		i, ok := index[key]
		if !ok {
			i = len(reasons)
			index[key] = i
			reasons = append(reasons, FailureReason{Example: e.Err})
		}
		reasons[i].Count++
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("repl: reading the failed evaluations: %w", err)
	}
	sort.SliceStable(reasons, func(a, b int) bool { return reasons[a].Count > reasons[b].Count })
	if len(reasons) > n {
		reasons = reasons[:n]
	}
	return reasons, nil
}

// allFailedNote is what a session says of a result a cell published
// whose every evaluation failed (a constraint that is NaN everywhere, an
// analysis that never closes): the cell ran to its end, and the result,
// which the cell need not show, has no point to speak of. "" for a
// result with a point that did not fail.
func allFailedNote(cell int, r *mdo.Result) string {
	if r == nil || r.Evaluations == 0 || r.Failed < r.Evaluations {
		return ""
	}
	note := fmt.Sprintf("cell %d published the result of study %q, every one of whose %d evaluations failed", cell, r.Study, r.Evaluations)
	if r.Best != nil && r.Best.Err != "" {
		note += ": " + r.Best.Err
	}
	return note
}
