package repl

import (
	"context"
	"strings"
	"testing"
)

// A session says when a cell publishes a result whose every evaluation
// failed, with the reason of its best point: before, the cell ran to its
// end in silence (only a headless run, which reports it as its failure,
// said so). A result with a point that did not fail, and a headless
// session (NoErrorEcho), give no note.
func TestSessionNamesAPublishedResultThatAllFailed(t *testing.T) {
	publish := "import (\n\t\"context\"\n\t\"couplet/repl/cell\"\n)\nr, err := optimizers.NelderMead{MaxEvaluations: 12}.Minimize(context.Background(), study)\nif err != nil {\n\tpanic(err)\n}\ncell.Publish(r)"
	tests := []struct {
		name, objective string
		headless        bool
		want            string // in stderr; "" for nothing
	}{
		{"objective NaN everywhere", "zero := 0.0\n\t\treturn v.Get(\"f\") * zero / zero", false, `cell 2 published the result of study "bowl", every one of whose `},
		{"the reason of its best point", "zero := 0.0\n\t\treturn v.Get(\"f\") * zero / zero", false, " evaluations failed: objective g = NaN"},
		{"a good result", "return v.Get(\"f\")", false, ""},
		{"headless", "zero := 0.0\n\t\treturn v.Get(\"f\") * zero / zero", true, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, _, errb := newTest(t, Options{NoErrorEcho: tc.headless})
			first := strings.Replace(strings.Replace(bowlCells, "%s", tc.objective, 1), "%c", "", 1)
			if c := s.Exec(context.Background(), first); c.Err != nil {
				t.Fatalf("cell 1: %v", c.Err)
			}
			errb.Reset()
			if c := s.Exec(context.Background(), publish); c.Err != nil {
				t.Fatalf("cell 2: %v", c.Err)
			}
			if tc.want == "" && errb.Len() > 0 {
				t.Errorf("stderr %q, want nothing", errb)
			}
			if tc.want != "" && !strings.Contains(errb.String(), tc.want) {
				t.Errorf("stderr %q lacks %q", errb, tc.want)
			}
		})
	}
}
