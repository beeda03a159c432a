package mdo

import (
	"errors"
	"strings"
	"testing"
)

// A misspelt name that a scripted objective or constraint reads is refused
// when the study is attached (NewEvaluator runs each function once on the
// defaults), with the closest names; before, the run began and stopped at
// its first evaluation (and, before Values.Get panicked, ran on NaN).
// Design variables and fixed parameters get the closest names too.
func TestMisspeltNameRefusedAtAttach(t *testing.T) {
	tests := []struct {
		name string
		edit func(*Study)
		want string
	}{
		{"objective", func(s *Study) {
			s.Objectives = []Objective{MinimizeFunc("f", func(v Values) float64 { return v.Get("f") + v.Get("y11") })}
		}, `study "sellar": objective f: mdo: the system has no variable "y11"; similar: y1`},
		{"constraint", func(s *Study) {
			s.Constraints = append(s.Constraints, AtMost("g3", 1).WithFunc(func(v Values) float64 { return v.Get("z_2") }))
		}, `study "sellar": constraint g3: mdo: the system has no variable "z_2"; similar: z2`},
		{"design variable", func(s *Study) { s.Design[1] = Continuous("zz1", -10, 10) }, `design variable: mdo: the system has no variable "zz1"; similar: z1`},
		{"fixed parameter", func(s *Study) { s.Fixed = map[string]float64{"xx": 1} }, `fixed value: mdo: the system has no variable "xx"; similar: x`},
	}
	for _, tc := range tests {
		st, err := SellarStudy(MDF)
		if err != nil {
			t.Fatal(err)
		}
		tc.edit(st)
		_, err = st.NewEvaluator()
		var unknown *UnknownVariableError
		if err == nil || !errors.As(err, &unknown) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: NewEvaluator err = %v, want one saying %q", tc.name, err, tc.want)
		}
	}
	// a function that reads only known names passes, whatever it computes
	st, err := SellarStudy(MDF)
	if err != nil {
		t.Fatal(err)
	}
	st.Objectives = []Objective{MinimizeFunc("f", func(v Values) float64 { return v.Get("f") / v.Get("x") })}
	if _, err := st.NewEvaluator(); err != nil {
		t.Errorf("a function of known names is refused: %v", err)
	}
}

func TestClosestNames(t *testing.T) {
	vars := []Var{{Name: "mass.takeoff"}, {Name: "mass.fuel_capacity"}, {Name: "mass.empty"}, {Name: "mass.fuel"},
		{Name: "wing.span"}, {Name: "wing.area"}, {Name: "x"}, {Name: "z1"}, {Name: "z2"}}
	tests := []struct {
		name string
		want string
	}{
		{"mass.takeof", "mass.takeoff"},
		{"mass.fuel_capcity", "mass.fuel_capacity"},
		{"fuel_capacity", "mass.fuel_capacity"}, // the prefix left out
		{"wing.sapn", "wing.span"},              // two letters swapped
		{"z", "z1 z2"},                          // too short for edits: the prefix
		{"engine.thrust", ""},                   // nothing near
	}
	for _, tc := range tests {
		if got := strings.Join(closestNames(tc.name, vars), " "); got != tc.want {
			t.Errorf("closestNames(%q) = %q, want %q", tc.name, got, tc.want)
		}
	}
}
