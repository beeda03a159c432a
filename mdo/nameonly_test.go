package mdo

import (
	"context"
	"strings"
	"testing"
)

// A variable a discipline declares by its name alone (Func, Specs) takes
// the specification another discipline of the system gives it, so that a
// discipline of a few lines reads and feeds the variables of a larger
// model; before, NewSystem refused the system ("declared in unit "" by
// discipline cost but in "kg" elsewhere"). Two specifications that name
// different units are still refused, and a second producer is named as
// such.
func TestNameOnlyVariablesTakeTheOtherDeclaration(t *testing.T) {
	fuel := FuncVars("mission", []Var{{Name: "range", Unit: "m", Default: 1e6, Min: 1e5, Max: 2e7}},
		[]Var{{Name: "fuel", Unit: "kg", Default: 5000, Min: 0, Max: 1e6, Description: "mission fuel"}},
		func(in, out []float64) error { out[0] = 2e-3 * in[0]; return nil })
	payload := FuncVars("weights", []Var{{Name: "payload", Unit: "kg", Default: 1000, Min: 0, Max: 20000}},
		[]Var{{Name: "takeoff", Unit: "kg", Default: 30000, Min: 500, Max: 1e6}},
		func(in, out []float64) error { out[0] = 20000 + 2.5*in[0]; return nil })
	cost := Func("cost", []string{"fuel"}, []string{"cost"}, func(in, out []float64) error { out[0] = 0.9 * in[0]; return nil })
	cabin := Func("cabin", []string{"seats"}, []string{"payload"}, func(in, out []float64) error { out[0] = 100 * in[0]; return nil })
	tests := []struct {
		name  string
		ds    []Discipline
		check map[string]Var // the specification the system holds
		err   string         // the error NewSystem gives, if any
	}{
		{"a name-only input reads a declared output", []Discipline{fuel, cost},
			map[string]Var{"fuel": {Unit: "kg", Min: 0, Max: 1e6}, "cost": {}}, ""},
		{"the same, declared in the other order", []Discipline{cost, fuel},
			map[string]Var{"fuel": {Unit: "kg", Min: 0, Max: 1e6}}, ""},
		{"a name-only output feeds a declared input", []Discipline{cabin, payload},
			map[string]Var{"payload": {Unit: "kg", Min: 0, Max: 20000}}, ""},
		{"two units are still refused", []Discipline{fuel, FuncVars("burn", []Var{{Name: "fuel", Unit: "lb"}}, Specs("burn"), func(in, out []float64) error { return nil })},
			nil, `variable fuel declared in unit "lb" by discipline burn but in "kg" elsewhere`},
		{"a second producer is named as one", []Discipline{fuel, Func("fuel_again", []string{"range"}, []string{"fuel"}, func(in, out []float64) error { return nil })},
			nil, "variable fuel has two producers: disciplines mission and fuel_again"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sys, err := NewSystem(tc.ds...)
			if tc.err != "" {
				if err == nil || !strings.Contains(err.Error(), tc.err) {
					t.Fatalf("NewSystem error %v, want one containing %q", err, tc.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			for name, want := range tc.check {
				v, err := sys.Var(name)
				if err != nil {
					t.Fatal(err)
				}
				if v.Unit != want.Unit || v.Min != want.Min || v.Max != want.Max {
					t.Errorf("%s: unit %q range [%g, %g], want %q [%g, %g]", name, v.Unit, v.Min, v.Max, want.Unit, want.Min, want.Max)
				}
			}
		})
	}
	// the name-only discipline computes on the declared variable:
	// fuel = 2e-3 × 3e6 m = 6000 kg, cost = 0.9 × 6000 = 5400
	sys, err := NewSystem(fuel, cost)
	if err != nil {
		t.Fatal(err)
	}
	sol, err := sys.Analyze(context.Background(), map[string]float64{"range": 3e6})
	if err != nil {
		t.Fatal(err)
	}
	if got := sol.Get("cost"); got != 5400 {
		t.Errorf("cost = %g, want 5400", got)
	}
	// and the declared range holds for the name-only producer's value:
	// 200 seats give 20 000 kg, at the payload's upper limit; 201 are
	// refused by weights
	sys, err = NewSystem(cabin, payload)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := sys.Analyze(context.Background(), map[string]float64{"seats": 201}); err == nil || !strings.Contains(err.Error(), "payload") {
		t.Errorf("201 seats: error %v, want the payload named out of its range", err)
	}
}
