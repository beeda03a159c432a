package mdo

import (
	"context"
	"slices"
	"strings"
	"testing"
)

// fakeSurrogate marks a discipline as a surrogate.
type fakeSurrogate struct{ Discipline }

func (fakeSurrogate) Surrogate() string { return "a fitted table" }

// TestSurrogateUses: the result names the surrogate's outputs and the
// objectives and constraints downstream of them (a function's,
// conservatively), and leaves out those that do not read them.
func TestSurrogateUses(t *testing.T) {
	a := FuncVars("upstream", []Var{{Name: "x", Min: 0, Max: 1}}, []Var{{Name: "p"}}, func(in, out []float64) error { out[0] = 2 * in[0]; return nil })
	b := FuncVars("middle", []Var{{Name: "p"}}, []Var{{Name: "q"}}, func(in, out []float64) error { out[0] = in[0] + 1; return nil })
	c := FuncVars("aside", []Var{{Name: "x", Min: 0, Max: 1}}, []Var{{Name: "r"}}, func(in, out []float64) error { out[0] = -in[0]; return nil })
	tests := []struct {
		name    string
		discs   []Discipline
		affects []string
	}{
		{"surrogate upstream", []Discipline{fakeSurrogate{a}, b, c}, []string{"q", "by_function", "p"}},
		{"surrogate aside", []Discipline{a, b, fakeSurrogate{c}}, []string{"by_function", "r"}},
		{"no surrogate", []Discipline{a, b, c}, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sys, err := NewSystem(tc.discs...)
			if err != nil {
				t.Fatal(err)
			}
			s := &Study{Name: "chain", System: sys, Design: []DesignVar{Continuous("x", 0, 1)},
				Objectives:  []Objective{Minimize("q"), {Name: "by_function", Func: func(v Values) float64 { return v.Get("x") }}},
				Constraints: []Constraint{AtMost("p", 5), AtLeast("r", -2)}, Workers: 1}
			ev, err := s.NewEvaluator()
			if err != nil {
				t.Fatal(err)
			}
			if _, err := ev.Evaluate(context.Background(), [][]float64{{0.5}}); err != nil {
				t.Fatal(err)
			}
			r, err := ev.Finish(StopComplete)
			if err != nil {
				t.Fatal(err)
			}
			if tc.affects == nil {
				if len(r.Surrogates) != 0 || strings.Contains(r.String(), "SURROGATE") {
					t.Errorf("a study without a surrogate reports %v", r.Surrogates)
				}
				return
			}
			if len(r.Surrogates) != 1 || r.Surrogates[0].Model != "a fitted table" || !slices.Equal(r.Surrogates[0].Affects, tc.affects) {
				t.Fatalf("surrogates %+v, want affects %v", r.Surrogates, tc.affects)
			}
			if !strings.Contains(r.String(), "SURROGATE: the values of "+r.Surrogates[0].Outputs[0]) {
				t.Errorf("result text:\n%s", r)
			}
		})
	}
}
