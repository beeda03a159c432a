package repl

import (
	"context"
	"io"
	"strings"
	"testing"
)

// A study written before the vocabulary was settled fails on the first
// renamed name with an error that says what to write instead; a
// misspelt variable stops with an error naming it, never a silent 0.
func TestRenamedNamesSayWhatToWrite(t *testing.T) {
	s, err := NewSession(Options{Stdout: io.Discard, Stderr: io.Discard})
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	setup := "st, _ := mdo.SellarStudy(mdo.MDF)\nr, _ := optimizers.RandomDesign{Samples: 3}.Minimize(cell.Context(), st)\nsys, _ := mdo.NewSystem(mdo.Sellar()...)\nws := sys.NewWorkspace()"
	if c := s.Exec(ctx, setup); c.Err != nil {
		t.Fatal(c.Err)
	}
	tests := []struct {
		name, src string
		want      []string
	}{
		{"Result.Output", `r.Output("y1")`, []string{"r.Output undefined (type *mdo.Result has no field or method Output)", "Result.Lookup(name) (value, error)", "Result.Get(name)"}},
		{"CacheHits", `r.CacheHits`, []string{"CacheHits is now Repeats"}},
		{"Restored", `r.Restored`, []string{"Restored is now PickedUp"}},
		{"optimizers.StopBudget", `optimizers.StopBudget`, []string{"StopBudget", "is now mdo.StopBudget"}},
		{"two values from Get", `y, err := r.Get("y1")`, []string{"assignment mismatch", "use Lookup(name) for (value, error)"}},
		{"Workspace.Value", `ws.Value(0)`, []string{"Workspace.Value(i) is Workspace.At(i)"}},
		{"misspelt name", `r.Get("y11")`, []string{"panic", `has no variable "y11"`}},
		{"misspelt name in an objective", "st2, _ := mdo.SellarStudy(mdo.MDF)\nst2.Objectives = []mdo.Objective{mdo.MinimizeFunc(\"f\", func(v mdo.Values) float64 { return v.Get(\"f\") + v.Get(\"y11\") })}\n_, err := optimizers.RandomDesign{Samples: 3}.Minimize(cell.Context(), st2)\nif err != nil {\n\tpanic(err)\n}",
			[]string{`study "sellar": objective f: mdo: the system has no variable "y11"`}},
	}
	for _, tc := range tests {
		c := s.Exec(ctx, tc.src)
		if c.Err == nil {
			t.Errorf("%s: %q ran without an error", tc.name, tc.src)
			continue
		}
		for _, w := range tc.want {
			if !strings.Contains(c.Err.Error(), w) {
				t.Errorf("%s: error %q does not say %q", tc.name, c.Err, w)
			}
		}
	}
}
