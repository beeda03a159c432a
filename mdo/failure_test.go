package mdo

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"testing"
)

// refusal is a discipline error naming the variable it refuses.
type refusal struct{ name string }

func (r refusal) Error() string    { return fmt.Sprintf("%s is not allowed here", r.name) }
func (r refusal) Variable() string { return r.name }

func TestFailureClasses(t *testing.T) {
	p := Var{Name: "p", Default: 1, Min: 0, Max: 10}
	q := Var{Name: "q", Default: 1, Min: 0, Max: 10}
	tests := []struct {
		name  string
		fn    func(in, out []float64) error
		class FailureClass
		want  string
	}{
		{"refuses its parameter", func(in, out []float64) error { return refusal{"p"} }, InvalidInput, "remedy: correct the value"},
		{"refuses a name that is no parameter", func(in, out []float64) error { return refusal{"elsewhere"} }, DisciplineFailed, "elsewhere"},
		{"plain error", func(in, out []float64) error { return errors.New("broken") }, DisciplineFailed, "broken"},
		{"panics", func(in, out []float64) error { panic("boom") }, DisciplineFailed, "panic: boom"},
	}
	for _, tc := range tests {
		sys, err := NewSystem(FuncVars("d", []Var{p}, []Var{q}, tc.fn))
		if err != nil {
			t.Fatal(err)
		}
		err = sys.NewWorkspace().Analyze(context.Background())
		if c := Classify(err); c != tc.class || !strings.Contains(fmt.Sprint(err), tc.want) {
			t.Errorf("%s: %v classed %v, want %v and %q", tc.name, err, c, tc.class, tc.want)
		}
	}
	// a value the user sets outside its range
	w := runaway(t).NewWorkspace()
	if c := Classify(w.Set("p", 11)); c != InvalidInput {
		t.Errorf("Set p = 11: class %v, want %v", c, InvalidInput)
	}
	// every class has a name that parses back and a remedy
	for c := DoesNotClose; c <= DisciplineFailed; c++ {
		back, err := ParseFailureClass(c.String())
		if err != nil || back != c || c.Remedy() == "" {
			t.Errorf("class %d: name %q parses to %v (%v), remedy %q", int(c), c, back, err, c.Remedy())
		}
	}
	if _, err := ParseFailureClass("exploded"); err == nil || !strings.Contains(err.Error(), "does-not-close") {
		t.Errorf("ParseFailureClass(exploded): %v, want an error listing the classes", err)
	}
}
