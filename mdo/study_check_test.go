package mdo

import (
	"math"
	"strings"
	"testing"
)

// Every bad declaration of a study is refused by Check with an error that
// names the culprit, its value and what is allowed (each row lists the
// words the message must hold).
func TestStudyCheckRefusesBadDeclarations(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	tests := []struct {
		name   string
		mutate func(*Study)
		want   []string
	}{
		{"bounds outside validity range", func(s *Study) { s.Design[0] = Continuous("x", 0, 20) }, []string{"x", "[0, 20]", "validity range [0, 10]"}},
		// a dimensionless variable's unit "-" is not written (it read
		// "bounds [0, 20] - leave"); the bound past the range is named
		{"upper bound above the validity range", func(s *Study) { s.Design[0] = Continuous("x", 0, 20) }, []string{"bounds [0, 20] leave its validity range [0, 10] (the upper bound 20 is above 10)"}},
		{"lower bound below the validity range", func(s *Study) { s.Design[0] = Continuous("x", -5, 5) }, []string{"bounds [-5, 5] leave its validity range [0, 10] (the lower bound -5 is below 0)"}},
		{"lower bound NaN", func(s *Study) { s.Design[1] = Continuous("z1", nan, 10) }, []string{"z1", "[NaN, 10]", "finite with lower < upper"}},
		{"upper bound NaN", func(s *Study) { s.Design[1] = Continuous("z1", -10, nan) }, []string{"z1", "[-10, NaN]", "finite with lower < upper"}},
		{"infinite bound", func(s *Study) { s.Design[2] = Continuous("z2", 0, inf) }, []string{"z2", "[0, +Inf]", "finite with lower < upper"}},
		{"equal bounds", func(s *Study) { s.Design[2] = Continuous("z2", 3, 3) }, []string{"z2", "[3, 3]", "lower < upper"}},
		{"integer variable with fractional bounds", func(s *Study) { s.Design[0] = DesignVar{Name: "x", Lower: 0.5, Upper: 4, Integer: true} }, []string{"x", "[0.5, 4]", "whole-number bounds"}},
		{"duplicate design variable", func(s *Study) { s.Design = append(s.Design, Continuous("z1", 0, 1)) }, []string{"z1", "listed twice", "once"}},
		{"unknown design variable", func(s *Study) { s.Design[1].Name = "z11" }, []string{"design variable", `"z11"`, "similar: z1"}},
		{"objective naming an unknown variable", func(s *Study) { s.Objectives[0] = Minimize("ff") }, []string{"objective", `"ff"`, "similar: f"}},
		{"objective function reading an unknown variable", func(s *Study) {
			s.Objectives[0] = MinimizeFunc("f2", func(v Values) float64 { return v.Get("g11") })
		}, []string{"objective f2", `"g11"`, "similar: g1"}},
		{"constraint naming an unknown variable", func(s *Study) { s.Constraints[0] = AtLeast("gg1", 3.16) }, []string{"constraint", `"gg1"`, "similar: g1"}},
		{"constraint function reading an unknown variable", func(s *Study) {
			s.Constraints[0] = AtLeast("c", 0).WithFunc(func(v Values) float64 { return v.Get("y11") })
		}, []string{"constraint c", `"y11"`, "similar: y1"}},
		{"constraint bound NaN", func(s *Study) { s.Constraints[0] = AtLeast("g1", nan) }, []string{"g1", "Lower = NaN", "finite number"}},
		{"constraint upper NaN", func(s *Study) { s.Constraints[1] = AtMost("g2", nan) }, []string{"g2", "Upper = NaN", "finite number"}},
		{"constraint bound infinite", func(s *Study) { s.Constraints[1] = AtMost("g2", inf) }, []string{"g2", "Upper = +Inf", "finite number"}},
		{"constraint band reversed", func(s *Study) { s.Constraints[1] = Between("g2", 30, 24) }, []string{"g2", "[30, 24]", "Lower must be <= Upper"}},
		{"constraint tolerance negative", func(s *Study) { s.Constraints[1] = EqualTo("g2", 24, -1) }, []string{"g2", "Tolerance = -1", ">= 0"}},
		{"constraint tolerance NaN", func(s *Study) { s.Constraints[1] = EqualTo("g2", 24, nan) }, []string{"g2", "Tolerance = NaN", "finite number"}},
		{"constraint scale negative", func(s *Study) { s.Constraints[0] = s.Constraints[0].WithScale(-2) }, []string{"g1", "Scale = -2", "> 0"}},
		{"constraint scale infinite", func(s *Study) { s.Constraints[0] = s.Constraints[0].WithScale(inf) }, []string{"g1", "Scale = +Inf", "> 0 and finite"}},
		{"constraint kind unknown", func(s *Study) { s.Constraints[0].Kind = ConstraintKind(9) }, []string{"g1", "Kind = 9", "LessEqual, GreaterEqual, Equal or InBand"}},
		{"constraint without a name", func(s *Study) { s.Constraints[0].Name = "" }, []string{"constraint has no name"}},
		{"fixed value NaN", func(s *Study) { s.Fixed = map[string]float64{"x": nan} }, []string{"x = NaN", "validity range [0, 10]"}},
		{"fixed value of an unknown variable", func(s *Study) { s.Fixed = map[string]float64{"zz2": 1} }, []string{"fixed value", `"zz2"`, "similar: z2"}},
		{"workers negative", func(s *Study) { s.Workers = -2 }, []string{"Workers = -2", "[0, 1024]"}},
		{"workers too many", func(s *Study) { s.Workers = 1 << 20 }, []string{"Workers = 1048576", "[0, 1024]"}},
		{"cache limit too large", func(s *Study) { s.CacheLimit = 1 << 30 }, []string{"CacheLimit = 1073741824", "at most 1000000", "every output of the system"}},
		{"consistency tolerance negative", func(s *Study) { s.ConsistencyTolerance = -1e-3 }, []string{"ConsistencyTolerance = -0.001", ">= 0"}},
		{"consistency tolerance NaN", func(s *Study) { s.ConsistencyTolerance = nan }, []string{"ConsistencyTolerance = NaN", ">= 0 and finite"}},
		{"coupling bounds NaN", func(s *Study) { s.CouplingBounds = map[string][2]float64{"y1": {nan, 3}} }, []string{"y1", "[NaN, 3]", "finite with lower < upper"}},
		{"formulation unknown", func(s *Study) { s.Formulation = Formulation(5) }, []string{"formulation 5", "MDF, IDF"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			st, err := SellarStudy(MDF)
			if err != nil {
				t.Fatal(err)
			}
			if err := st.Check(); err != nil {
				t.Fatalf("the study before the change: %v", err)
			}
			tc.mutate(st)
			err = st.Check()
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
		})
	}
}
