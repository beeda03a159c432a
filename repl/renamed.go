package repl

import (
	"regexp"
	"strings"
)

// renamedNames are the framework names that study files written before
// the vocabulary was settled may use, with what to write instead. A
// compile error about one of them gets the hint appended.
var renamedNames = map[string]string{
	"Output":         "mdo.Result.Output is now Result.Lookup(name) (value, error), or Result.Get(name) for the value alone",
	"CacheHits":      "the counter CacheHits is now Repeats (points asked for again; they are not evaluations)",
	"Restored":       "the counter Restored is now PickedUp (points answered from the store of the run picked up)",
	"Restore":        "mdo.Evaluator.Restore is now Evaluator.PickUp",
	"Restorable":     "Restorable is now PickedUp (mdo.PickUpRecorder)",
	"Resume":         "store.Resume is now store.PickUp",
	"Cached":         "mdo.Evaluation.Cached is now PickedUp",
	"Value":          "Solution.Value(name) is now Solution.Get(name), and Workspace.Value(i) is Workspace.At(i)",
	"StopConverged":  "optimizers.StopConverged is now mdo.StopConverged",
	"StopBudget":     "optimizers.StopBudget is now mdo.StopBudget",
	"StopIterations": "optimizers.StopIterations is now mdo.StopIterations",
	"StopComplete":   "optimizers.StopComplete is now mdo.StopComplete",
	"StopCancelled":  "optimizers.StopCancelled is now mdo.StopCancelled",
	"StopDeadline":   "optimizers.StopDeadline is now mdo.StopDeadline",
}

// undefinedRE finds the name in the "undefined" errors of the interpreter
// and of the type check.
var undefinedRE = regexp.MustCompile(`(?:undefined method: |undefined selector: |has no symbol |undefined: (?:\w+\.)?|has no field or method )(\w+)`)

// getTwoValuesRE finds a two-value assignment from a Get call, which the
// value accessors no longer allow (Get returns the value alone).
var getTwoValuesRE = regexp.MustCompile(`,\s*\w+\s*:?=\s*[\w.]+\.Get\(`)

// renamedHint returns the hint for an interpreter error about a renamed
// framework name ("" when there is none); line is the source line the
// error is on.
func renamedHint(msg, line string) string {
	if m := undefinedRE.FindStringSubmatch(msg); m != nil {
		if h, ok := renamedNames[m[1]]; ok {
			return "; if this is the framework's name, it was renamed: " + h
		}
	}
	if strings.Contains(msg, "assignment mismatch: 2 variables") && getTwoValuesRE.MatchString(line) {
		return "; Get now returns the value alone (a misspelt name stops with an error naming it): use Lookup(name) for (value, error)"
	}
	return ""
}
