package mdo

import (
	"context"
	"errors"
	"strings"
	"testing"
)

// Values, Solution, Workspace and Result read variables the same way: Get
// returns the value or panics with an *UnknownVariableError, Lookup
// returns that error; a misspelt name is never a silent NaN or 0.
func TestValueAccessConvention(t *testing.T) {
	sys, err := NewSystem(Sellar()...)
	if err != nil {
		t.Fatal(err)
	}
	ws := sys.NewWorkspace()
	if err := ws.Analyze(context.Background()); err != nil {
		t.Fatal(err)
	}
	sol := ws.Snapshot()
	st, err := SellarStudy(MDF)
	if err != nil {
		t.Fatal(err)
	}
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Evaluate(context.Background(), [][]float64{ev.Start()}); err != nil {
		t.Fatal(err)
	}
	res, err := ev.Finish(StopComplete)
	if err != nil {
		t.Fatal(err)
	}
	want := sol.values[sys.Index("y1")]
	resWant := res.Best.Outputs[sys.Index("y1")]
	vals := NewValues(sys, ws.Values())
	tests := []struct {
		name   string
		want   float64
		get    func(string) float64
		lookup func(string) (float64, error)
	}{
		{"Values", want, vals.Get, vals.Lookup},
		{"Solution", want, sol.Get, sol.Lookup},
		{"Workspace", want, ws.Get, ws.Lookup},
		{"Result", resWant, res.Get, res.Lookup},
	}
	for _, tc := range tests {
		if got := tc.get("y1"); got != tc.want {
			t.Errorf("%s.Get(y1) = %g, want %g", tc.name, got, tc.want)
		}
		if got, err := tc.lookup("y1"); err != nil || got != tc.want {
			t.Errorf("%s.Lookup(y1) = %g, %v; want %g", tc.name, got, err, tc.want)
		}
		_, err := tc.lookup("y11")
		var unknown *UnknownVariableError
		if !errors.As(err, &unknown) || unknown.Name != "y11" || !strings.Contains(err.Error(), `no variable "y11"`) {
			t.Errorf("%s.Lookup(y11): err = %v, want an *UnknownVariableError naming y11", tc.name, err)
		}
		func() {
			defer func() {
				r := recover()
				perr, ok := r.(error)
				if !ok || !errors.As(perr, &unknown) || unknown.Name != "y11" {
					t.Errorf("%s.Get(y11) panicked with %v, want an *UnknownVariableError naming y11", tc.name, r)
				}
			}()
			got := tc.get("y11")
			t.Errorf("%s.Get(y11) = %g without a panic", tc.name, got)
		}()
	}
	_, err = sys.Var("z")
	if err == nil || !strings.Contains(err.Error(), `similar: z1, z2`) {
		t.Errorf("System.Var(z): err = %v, want the similar names z1, z2", err)
	}
	if got := ws.At(sys.Index("y1")); got != want {
		t.Errorf("Workspace.At = %g, want %g", got, want)
	}
}

// An objective or constraint function that reads a variable the system
// does not have stops the batch with an error naming the function and the
// variable; no point is accepted, recorded or counted. (The reads here
// depend on x > 0, so that they get past the dry run of the attach, which
// puts the design variables at their lower bounds; see
// TestMisspeltNameRefusedAtAttach.)
func TestMisspeltNameStopsTheRun(t *testing.T) {
	tests := []struct {
		name string
		edit func(*Study)
		want string
	}{
		{"objective", func(s *Study) {
			s.Objectives = []Objective{MinimizeFunc("f", func(v Values) float64 {
				if v.Get("x") > 0 {
					return v.Get("f") + v.Get("y11")
				}
				return v.Get("f")
			})}
		}, `study "sellar": objective f: mdo: the system has no variable "y11"`},
		{"constraint", func(s *Study) {
			s.Constraints = []Constraint{AtLeast("g1", 3.16).WithFunc(func(v Values) float64 {
				if v.Get("x") > 0 {
					return v.Get("y1.x")
				}
				return 0
			})}
		}, `study "sellar": constraint g1: mdo: the system has no variable "y1.x"; similar: y1`},
	}
	for _, tc := range tests {
		st, err := SellarStudy(MDF)
		if err != nil {
			t.Fatal(err)
		}
		tc.edit(st)
		ev, err := st.NewEvaluator()
		if err != nil {
			t.Fatal(err)
		}
		out, err := ev.Evaluate(context.Background(), [][]float64{ev.Start(), {0.5, 0.5, 0.5}})
		var unknown *UnknownVariableError
		if err == nil || !errors.As(err, &unknown) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v, want one saying %q", tc.name, err, tc.want)
		}
		if out[0] != nil || out[1] != nil || ev.Counters().Evaluations != 0 || ev.Best() != nil {
			t.Errorf("%s: points %v accepted (counters %v)", tc.name, out, ev.Counters())
		}
	}
}
