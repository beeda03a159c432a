package repl

import (
	"context"
	"math"
	"testing"
)

func TestPreludeAndRepeatedImports(t *testing.T) {
	s, err := NewSession(Options{})
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	tests := []struct {
		src  string
		want any
	}{
		{"len(mdo.Sellar())", 3},               // the prelude needs no import line
		{"import \"math\"\nmath.Sqrt(4)", 2.0}, // a prelude package imported again
		{"import (\n\t\"strings\"\n\t\"math\"\n)\nstrings.ToUpper(\"ok\")", "OK"},
		{"import \"strings\"\nstrings.Repeat(\"a\", 2)", "aa"}, // again, in a later cell
		{"import m \"math\"\nm.Pi", math.Pi},                   // an alias is a new name
	}
	for _, tc := range tests {
		c := s.Exec(ctx, tc.src)
		if c.Err != nil {
			t.Fatalf("%q: %v", tc.src, c.Err)
		}
		if c.Value != tc.want {
			t.Errorf("%q = %v (%T), want %v", tc.src, c.Value, c.Value, tc.want)
		}
	}
	// @fresh starts a new interpreter, which has the prelude again
	if err := s.reset(); err != nil {
		t.Fatal(err)
	}
	if c := s.Exec(ctx, "import \"couplet/mdo\"\nlen(mdo.Methods())"); c.Err != nil || c.Value != 6 {
		t.Errorf("after a reset: %v %v", c.Value, c.Err)
	}
}

func TestNilResultShownNotCrashing(t *testing.T) {
	s, err := NewSession(Options{OutDir: t.TempDir() + "/not/yet/there"})
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	// a typed nil of a framework type with a String method is shown, not
	// dereferenced
	if c := s.Exec(ctx, "var r *mdo.Result\nr"); c.Err != nil {
		t.Fatalf("showing a nil result: %v", c.Err)
	}
	// the output folder is created on first use by the recorder
	src := "study, _ := mdo.SellarStudy(mdo.MDF)\ncell.Attach(study)\nres, err := optimizers.NelderMead{MaxEvaluations: 50}.Minimize(cell.Context(), study)\nerr"
	if c := s.Exec(ctx, src); c.Err != nil || c.Value != nil {
		t.Fatalf("optimisation with an output folder to create: value %v, err %v", c.Value, c.Err)
	}
}
