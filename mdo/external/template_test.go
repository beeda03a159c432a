package external_test

import (
	"math"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/mdo/external"
)

// echoProgram declares /bin/cat on the filled input (Stdin) as a
// discipline with the given template, reads and output file, so that
// what it reads back is what the template wrote.
func echoProgram(t *testing.T, template string, reads []external.Read, outputs []mdo.Var) external.Program {
	t.Helper()
	return external.Program{
		Name:     "echo",
		Inputs:   []mdo.Var{{Name: "wing.area", Unit: "m2"}, {Name: "sweep", Unit: "deg"}},
		Outputs:  outputs,
		Command:  []string{"cat"},
		Stdin:    true,
		Template: template,
		Read:     reads,
		WorkDir:  t.TempDir(),
	}
}

// TestTemplateAndReading fills templates and reads the echoed text back.
// Unit factors: 1 ft = 0.3048 m exactly (international yard and pound
// agreement, 1959).
func TestTemplateAndReading(t *testing.T) {
	area := mdo.Var{Name: "area", Unit: "m2"}
	cases := []struct {
		name     string
		template string
		reads    []external.Read
		in       []float64
		want     float64
	}{
		{"named marker, shortest exact form", "area = @{wing.area}\n", nil, []float64{0.1 + 0.2, 0}, 0.1 + 0.2},
		{"format", "area = @{wing.area fmt=%.3f}\n", nil, []float64{12.34567, 0}, 12.346},
		{"unit and back", "AREA(FT2) @{wing.area unit=ft2 fmt=%.12e}\n",
			[]external.Read{{Output: "area", Pattern: `AREA\(FT2\)\s+(\S+)`, Unit: "ft2"}}, []float64{10, 0}, 10},
		{"literal @@ and a Fortran exponent", "@@{not a marker}\narea = 1.5D+02\n", nil, []float64{0, 0}, 150},
		{"key", "S_ref = @{wing.area}\n", []external.Read{{Output: "area", Key: "S_ref"}}, []float64{42, 0}, 42},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, err := external.New(echoProgram(t, c.template, c.reads, []mdo.Var{area}), external.AllowAll())
			if err != nil {
				t.Fatal(err)
			}
			out := make([]float64, 1)
			if err := d.Compute(c.in, out); err != nil {
				t.Fatal(err)
			}
			if math.Abs(out[0]-c.want) > 1e-12*math.Abs(c.want) {
				t.Errorf("read %v, want %v", out[0], c.want)
			}
		})
	}
}

// TestBadDeclarations checks that New names what is wrong.
func TestBadDeclarations(t *testing.T) {
	area := []mdo.Var{{Name: "area", Unit: "m2"}}
	cases := []struct {
		name     string
		template string
		reads    []external.Read
		want     string
	}{
		{"unknown input", "@{wing.span}", nil, `"wing.span" is not an input of the program (inputs: wing.area, sweep)`},
		{"unclosed marker", "x @{wing.area", nil, "is not closed"},
		{"bad format", "@{wing.area fmt=%d}", nil, "fmt=%d is not a number format"},
		{"unknown option", "@{wing.area scale=2}", nil, `option "scale=2" is not known`},
		{"wrong quantity", "@{wing.area unit=kg}", nil, `unit "m2" is a area and "kg" a mass`},
		{"read of a non-output", "", []external.Read{{Output: "span"}}, `Read names "span"`},
		{"pattern without a group", "", []external.Read{{Output: "area", Pattern: `area`}}, "has no capture group"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := external.New(echoProgram(t, c.template, c.reads, area), external.AllowAll())
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one saying %q", err, c.want)
			}
		})
	}
}

// TestGate checks that a program runs only when its gate approves it.
func TestGate(t *testing.T) {
	area := []mdo.Var{{Name: "area", Unit: "m2"}}
	p := echoProgram(t, "area = 1\n", nil, area)
	cases := []struct {
		name string
		gate *external.Gate
		ok   bool
	}{
		{"nil gate", nil, false},
		{"zero gate", &external.Gate{}, false},
		{"another program", external.Allow("--allow-program PATH approves one", "/bin/true"), false},
		{"this program", external.Allow("", "/bin/cat"), true},
		{"every program", external.AllowAll(), true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := external.New(p, c.gate)
			if c.ok != (err == nil) {
				t.Fatalf("New: %v; want approved = %v", err, c.ok)
			}
			if err != nil && !strings.Contains(err.Error(), "is not approved to run") {
				t.Errorf("refusal %q does not say the program is not approved", err)
			}
		})
	}
}
