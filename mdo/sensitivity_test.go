package mdo

import (
	"math"
	"strings"
	"testing"
)

// demoSensitivity is an invented sensitivity of a take-off mass.
func demoSensitivity() *Sensitivity {
	return &Sensitivity{Objective: "mass.takeoff", Unit: "kg",
		Limits: []LimitCost{
			{Constraint: "perf.landing_field_length", Bound: "upper", Limit: 1950, Unit: "m"},
			{Constraint: "perf.takeoff_field_length", Bound: "upper", Limit: 2400, Unit: "m", Active: true, PerUnit: -12.5},
			{Constraint: "stability.static_margin_takeoff", Bound: "lower", Limit: 0.05, Unit: "-", Active: true, PerUnit: 840},
			{Constraint: "perf.climb_gradient_second_segment", Bound: "lower", Limit: 0.024, Active: true, PerUnit: math.NaN(),
				NotDefined: "the constraint does not vary with the design here"},
		},
		Parameters: []ParameterCost{{Parameter: "mission.payload", Value: 1200, Unit: "kg", PerUnit: 3.25}},
	}
}

// TestSensitivityString: the tables name every limit (active first) and
// parameter with the derivative in objective units per unit, and carry
// the first-order caution.
func TestSensitivityString(t *testing.T) {
	tests := []struct {
		name string
		s    *Sensitivity
		want []string
	}{
		{"nil", nil, []string{"no post-optimality sensitivity"}},
		{"demo", demoSensitivity(), []string{
			"post-optimality sensitivity of mass.takeoff [kg]", SensitivityCaution,
			"perf.takeoff_field_length           upper  2400   m     active    -12.5 kg/m",
			"perf.landing_field_length           upper  1950   m     inactive  0 kg/m",
			// a dimensionless limit: per 1.0 of it
			"stability.static_margin_takeoff     lower  0.05   -     active    840 kg per unit",
			"perf.climb_gradient_second_segment  lower  0.024  -     active    not defined: the constraint does not vary with the design here",
			"mission.payload  1200   kg    3.25 kg/kg",
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := tc.s.String()
			for _, w := range tc.want {
				if !strings.Contains(got, w) {
					t.Errorf("missing %q in\n%s", w, got)
				}
			}
			if tc.s != nil && strings.Index(got, "takeoff_field") > strings.Index(got, "landing_field") {
				t.Errorf("the active limit is not listed first:\n%s", got)
			}
		})
	}
}

// TestPerUnitLabel: the unit of a derivative of the objective, with a
// dimensionless quantity counted in units of itself.
func TestPerUnitLabel(t *testing.T) {
	for _, c := range []struct{ objective, of, want string }{
		{"kg", "m", "kg/m"},
		{"kg", "-", "kg per unit"},
		{"kg", "", "kg per unit"},
		{"", "m", "per m"},
		{"-", "-", "per unit"},
	} {
		s := &Sensitivity{Unit: c.objective}
		if got := s.PerUnitLabel(c.of); got != c.want {
			t.Errorf("objective in %q, quantity in %q: %q, want %q", c.objective, c.of, got, c.want)
		}
	}
}

// TestResultShowsSensitivity: a result's text ends with its sensitivity
// when it has one, and says nothing of it otherwise.
func TestResultShowsSensitivity(t *testing.T) {
	r := &Result{Study: "wing", Optimizer: "Sextant", Design: []DesignSpec{{Name: "wing.area", Unit: "m2", Lower: 100, Upper: 220}},
		Objectives: []Objective{Minimize("mass.takeoff")},
		Best:       &Evaluation{Design: []float64{150}, Objectives: []float64{35000}, Feasible: true}}
	if strings.Contains(r.String(), "sensitivity") {
		t.Errorf("a result without sensitivity mentions it:\n%s", r)
	}
	r.Sensitivity = demoSensitivity()
	if got := r.String(); !strings.HasSuffix(got, r.Sensitivity.String()) {
		t.Errorf("the result does not end with its sensitivity:\n%s", got)
	}
}
