package repl

import (
	"context"
	"fmt"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// bowlCells declares a one-variable study over a paraboloid discipline;
// %s is replaced by the objective's body (it reads v and returns a
// float64) and %c by the discipline's.
const bowlCells = `import (
	"couplet/mdo"
	"couplet/optimizers"
)
seats := []float64{12, 64}
_ = seats
bowl := mdo.FuncVars("bowl",
	[]mdo.Var{{Name: "a", Default: 0.9, Min: 0, Max: 1}},
	[]mdo.Var{{Name: "f", Default: 1, Min: -1e9, Max: 1e9}},
	func(in, out []float64) error {
		%c
		out[0] = (in[0] - 0.3) * (in[0] - 0.3)
		return nil
	})
sys, err := mdo.NewSystem(bowl)
if err != nil {
	panic(err)
}
study := &mdo.Study{
	Name:   "bowl",
	System: sys,
	Design: []mdo.DesignVar{mdo.Continuous("a", 0, 1)},
	Objectives: []mdo.Objective{mdo.MinimizeFunc("g", func(v mdo.Values) float64 {
		%s
	})},
	Seed:    3,
	Workers: 1,
}`

// A panic of the cells' code that the framework recovers (an objective
// or a discipline that panics fails that evaluation) is named when the
// cell ends, with its place and count: before, the cell ran to its end
// and the session said nothing, though every evaluation had failed.
// Panics the cells' own recover calls take back, and a cell that itself
// fails, give no note.
func TestSessionNamesPanicsTheFrameworkRecovered(t *testing.T) {
	run := "r, err := optimizers.NelderMead{MaxEvaluations: 20}.Minimize(context.Background(), study)\nif err != nil {\n\tpanic(err)\n}\nfmt.Println(r.Failed, r.Evaluations)"
	tests := []struct {
		name, objective, discipline, run string
		notes                            []string // in the second cell's stderr; none when empty
		allFailed                        bool     // every evaluation failed (else none or some)
	}{
		{"objective indexes past its slice", "return v.Get(\"f\") / (seats[0] + seats[2])", "", run,
			[]string{"cell 2 ran to its end, but code of the cells panicked ", " times in calls the framework recovered", "× runtime error: index out of range (cell 1, line 24)"}, true},
		{"objective panics on part of the box", "if v.Get(\"a\") > 0.5 {\n\t\t\tpanic(\"a past the rim\")\n\t\t}\n\t\treturn v.Get(\"f\")", "", run,
			[]string{"× a past the rim (cell 1, line 25)"}, false},
		{"objective indexes past its slice, study attached", "return v.Get(\"f\") / (seats[0] + seats[2])", "", "if err := cell.Attach(study); err != nil {\n\tpanic(err)\n}\n" + run,
			[]string{"× runtime error: index out of range (cell 1, line 24)"}, true},
		{"discipline panics", "return v.Get(\"f\")", "if in[0] < 2 {\n\t\t\tpanic(\"the spar cracks\")\n\t\t}", run,
			[]string{"× the spar cracks (cell 1, line 12)"}, true},
		{"the script recovers its own panic", "return v.Get(\"f\")", "",
			"func() {\n\tdefer func() { _ = recover() }()\n\t_ = seats[2]\n}()\n" + run,
			nil, false},
		{"no panic", "return v.Get(\"f\")", "", run, nil, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, out, errb := newTest(t, Options{})
			first := strings.Replace(strings.Replace(bowlCells, "%s", tc.objective, 1), "%c", tc.discipline, 1)
			if c := s.Exec(context.Background(), first); c.Err != nil {
				t.Fatalf("cell 1: %v", c.Err)
			}
			errb.Reset()
			out.Reset()
			c := s.Exec(context.Background(), "import (\n\t\"context\"\n\t\"fmt\"\n\n\t\"couplet/repl/cell\"\n)\n_ = cell.Seed\n"+tc.run)
			if c.Err != nil {
				t.Fatalf("cell 2: %v", c.Err)
			}
			var failed, evals int
			if _, err := fmt.Sscan(out.String(), &failed, &evals); err != nil || evals == 0 {
				t.Fatalf("cell 2 printed %q: %v", out.String(), err)
			}
			if all := failed == evals; all != tc.allFailed || (tc.notes == nil && failed > 0) {
				t.Errorf("%d of %d evaluations failed", failed, evals)
			}
			// every failed evaluation is one of the panics the note
			// counts, and the note counts nothing else: not the call
			// Study.Check makes of each function (the optimiser's
			// start, cell.Attach), which counted one more before
			if tc.notes != nil {
				m := regexp.MustCompile(`panicked (once|\d+ times) in`).FindStringSubmatch(errb.String())
				if m == nil {
					t.Fatalf("no count of panics: %s", errb)
				}
				if n, _ := strconv.Atoi(strings.TrimSuffix(m[1], " times")); (m[1] == "once" && failed != 1) || (m[1] != "once" && n != failed) {
					t.Errorf("the note counts %s panicked calls for %d failed evaluations: %s", m[1], failed, errb)
				}
			}
			for _, w := range tc.notes {
				if !strings.Contains(errb.String(), w) {
					t.Errorf("stderr lacks %q:\n%s", w, errb)
				}
			}
			if len(tc.notes) == 0 && errb.Len() > 0 {
				t.Errorf("stderr %q, want nothing", errb)
			}
		})
	}
	// a cell that fails of its own panic reports that alone
	s, _, errb := newTest(t, Options{})
	if c := s.Exec(context.Background(), "xs := []int{1}\nk := 2\n_ = xs[k]"); c.Err == nil {
		t.Fatal("the cell did not fail")
	}
	if strings.Contains(errb.String(), "ran to its end") {
		t.Errorf("a failed cell has a note of recovered panics: %s", errb)
	}
}
