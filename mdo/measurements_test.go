package mdo

import (
	"math"
	"strings"
	"testing"
)

// polarSystem is a small system for the measurements tests: a lift slope
// and a drag coefficient computed from a Mach number and an angle.
func polarSystem(t *testing.T) *System {
	t.Helper()
	d := FuncVars("polar",
		[]Var{{Name: "flow.mach", Unit: "-", Default: 0.5, Min: 0, Max: 3}, {Name: "flow.alpha", Unit: "deg", Default: 2, Min: -10, Max: 20}, {Name: "k", Unit: "-", Default: 1, Min: 0, Max: 5}},
		[]Var{{Name: "aero.cla", Unit: "1/rad", Default: 5, Min: 0, Max: 20}, {Name: "aero.cd", Unit: "-", Default: 0.02, Min: 0, Max: 1}},
		func(in, out []float64) error {
			out[0] = in[2] * 2 * math.Pi / math.Sqrt(1-math.Min(in[0], 0.9)*math.Min(in[0], 0.9))
			out[1] = 0.02 + 0.05*in[1]*in[1]/1000
			return nil
		})
	sys, err := NewSystem(d)
	if err != nil {
		t.Fatal(err)
	}
	return sys
}

func TestReadMeasurements(t *testing.T) {
	sys := polarSystem(t)
	text := `# invented test data
flow.mach [-], flow.alpha [deg], aero.cla [1/rad], u(aero.cla) [1/rad], aero.cd [-]
0.3, 0, 6.5, 0.1, 0.021
0.5, 4, , , 0.022
`
	m, err := ReadMeasurements(strings.NewReader(text), "test.csv", sys)
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Conditions) != 2 || m.Conditions[1].Name != "flow.alpha" || len(m.Quantities) != 2 || m.Quantities[0].Name != "aero.cla" {
		t.Fatalf("columns %v / %v", m.Conditions, m.Quantities)
	}
	if len(m.Rows) != 2 || m.Rows[0].Line != 3 || m.Rows[1].Line != 4 {
		t.Fatalf("rows %+v", m.Rows)
	}
	r := m.Rows[0]
	if r.Conditions[0] != 0.3 || r.Values[0] != 6.5 || r.Uncertainty[0] != 0.1 || !math.IsNaN(r.Uncertainty[1]) || r.Values[1] != 0.021 {
		t.Errorf("row 1 %+v", r)
	}
	if !math.IsNaN(m.Rows[1].Values[0]) {
		t.Errorf("row 2: an empty cell is not measured, got %g", m.Rows[1].Values[0])
	}
	if m.Points() != 3 {
		t.Errorf("%d points, want 3", m.Points())
	}
}

func TestReadMeasurementsRefusesBadFiles(t *testing.T) {
	sys := polarSystem(t)
	cases := []struct {
		name, text string
		want       []string
	}{
		{"unknown name", "flow.mach [-],aero.cl [-]\n0.3,1\n", []string{"line 1, column 2", `"aero.cl"`}},
		{"missing unit", "flow.mach [-],aero.cd\n0.3,1\n", []string{"line 1, column 2", "unit in brackets"}},
		{"wrong unit", "flow.mach [-],flow.alpha [rad],aero.cd [-]\n0.3,0,1\n", []string{"column 2", `in "deg" in the model, not "rad"`}},
		{"non-numeric", "flow.mach [-],aero.cd [-]\n0.3,0.02\n0.4,abc\n", []string{"line 3, column 2 (aero.cd [-])", `"abc" is not a finite number`}},
		{"comment lines counted", "# source\nflow.mach [-],aero.cd [-]\n0.3,x\n", []string{"line 3, column 2"}},
		{"empty condition", "flow.mach [-],aero.cd [-]\n,0.02\n", []string{"line 2, column 1", "condition is empty"}},
		{"condition out of range", "flow.mach [-],aero.cd [-]\n7,0.02\n", []string{"line 2, column 1", "flow.mach"}},
		{"lonely uncertainty", "flow.mach [-],u(aero.cd) [-]\n0.3,0.02\n", []string{"u(aero.cd) has no column aero.cd"}},
		{"zero uncertainty", "flow.mach [-],aero.cd [-],u(aero.cd) [-]\n0.3,0.02,0\n", []string{"line 2, column 3", "must be > 0"}},
		{"no quantity", "flow.mach [-]\n0.3\n", []string{"no measured quantity"}},
		{"no rows", "flow.mach [-],aero.cd [-]\n", []string{"no data rows"}},
		{"duplicate", "flow.mach [-],aero.cd [-],aero.cd [-]\n0.3,1,1\n", []string{"column 3", "also column 2"}},
		{"short row", "flow.mach [-],aero.cd [-]\n0.3\n", []string{"line 2", "wrong number of fields"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadMeasurements(strings.NewReader(c.text), "bad.csv", sys)
			if err == nil {
				t.Fatal("accepted")
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not contain %q", err, w)
				}
			}
		})
	}
}
