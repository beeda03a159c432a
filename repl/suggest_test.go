package repl

import (
	"context"
	"errors"
	"strings"
	"testing"
)

// A misspelt name of a package the script imports, or a misspelt field of
// a struct literal of the framework, is answered with the names near it,
// as a misspelt variable of the model is; before, the error said only
// "undefined: optimizers.NelderMaed" or "unknown field Populaton in
// struct literal of type optimizers.NSGA2".
func TestMisspeltFrameworkNamesGetTheNearOnes(t *testing.T) {
	imports := "import (\n\t\"fmt\"\n\t\"couplet/disciplines\"\n\t\"couplet/mdo\"\n\t\"couplet/optimizers\"\n)\n_, _, _, _ = fmt.Sprint, disciplines.Swiftlet, mdo.Minimize, optimizers.NelderMead{}\n"
	tests := []struct {
		name, cell string
		line       int
		want, not  string
	}{
		{"optimiser", "o := optimizers.NelderMaed{}\n_ = o", 1, "undefined: optimizers.NelderMaed; similar: optimizers.NelderMead", ""},
		{"scenario", "jet := disciplines.Swiflet()\n_ = jet", 1, "similar: disciplines.Swiftlet", ""},
		{"British spelling", "x := 1\no := mdo.Minimise(\"mass.fuel\")\n_, _ = x, o", 2, "similar: mdo.Minimize", ""},
		{"standard package", "fmt.Printn(1)", 1, "similar: fmt.Print", ""},
		{"study field", "st := &mdo.Study{Name: \"x\", Objective: nil}\n_ = st", 1, "unknown field Objective in struct literal of type mdo.Study; its fields near it: Objectives", ""},
		{"field of an embedded block", "o := optimizers.NSGA2{Populaton: 8}\n_ = o", 1,
			"its fields near it: Population (of the embedded Evolution: optimizers.NSGA2{Evolution: optimizers.Evolution{Population: …}})", ""},
		{"field far from every one", "o := optimizers.NelderMead{Budget: 10}\n_ = o", 1, "its fields: MaxEvaluations, ", ""},
		{"nothing near", "o := optimizers.Simplex{}\n_ = o", 1, "undefined: optimizers.Simplex", "similar"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, _, _ := newTest(t, Options{})
			if c := s.Exec(context.Background(), imports); c.Err != nil {
				t.Fatal(c.Err)
			}
			c := s.Exec(context.Background(), tc.cell)
			var ce *CellError
			if !errors.As(c.Err, &ce) || ce.Kind != "compile" {
				t.Fatalf("error %v, want a compile error", c.Err)
			}
			if ce.Line != tc.line || !strings.Contains(ce.Msg, tc.want) || (tc.not != "" && strings.Contains(ce.Msg, tc.not)) {
				t.Errorf("line %d: %q\nwant line %d with %q (and not %q)", ce.Line, ce.Msg, tc.line, tc.want, tc.not)
			}
		})
	}
}

func TestLevenshtein(t *testing.T) {
	tests := []struct {
		a, b string
		d    int
	}{
		{"", "", 0}, {"a", "", 1}, {"", "abc", 3}, {"kitten", "sitting", 3}, // Levenshtein 1966's example, common practice (no source)
		{"NelderMaed", "NelderMead", 2}, {"Minimise", "Minimize", 1}, {"flaw", "lawn", 2},
	}
	for _, tc := range tests {
		if d := levenshtein(tc.a, tc.b); d != tc.d {
			t.Errorf("levenshtein(%q, %q) = %d, want %d", tc.a, tc.b, d, tc.d)
		}
	}
}
