package repl

import (
	"context"
	"fmt"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestExternalProgramsNeedApproval runs a script that wraps cat as an
// external discipline: the sandbox refuses it unless the user approved
// the program (Policy.Programs, --allow-program) or trusts the script.
func TestExternalProgramsNeedApproval(t *testing.T) {
	cat, err := exec.LookPath("cat")
	if err != nil {
		t.Skip("no cat on PATH")
	}
	src := `import "couplet/mdo/external"
out := make([]float64, 1)
d, err := external.New(external.Program{Name: "echo", Outputs: []mdo.Var{{Name: "a"}}, Command: []string{"cat"}, Stdin: true, Template: "a = 2.5\n", WorkDir: ` + fmt.Sprintf("%q", t.TempDir()) + `}, cell.Programs())
if err == nil {
	err = d.Compute(nil, out)
}
fmt.Sprint(out[0], " ", err)`
	cases := []struct {
		name   string
		policy Policy
		want   string
	}{
		{"sandbox", Policy{}, "0 external: discipline echo: program " + canonicalPath(t, cat) + " is not approved to run"},
		{"another program approved", Policy{Programs: []string{"/bin/true"}}, "--allow-program PATH"},
		{"this program approved", Policy{Programs: []string{cat}}, "2.5 <nil>"},
		{"trusted", Policy{Trusted: true}, "2.5 <nil>"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, err := NewSession(Options{Policy: c.policy})
			if err != nil {
				t.Fatal(err)
			}
			res := s.Exec(context.Background(), src)
			if res.Err != nil {
				t.Fatal(res.Err)
			}
			if got := fmt.Sprint(res.Value); !strings.Contains(got, c.want) {
				t.Errorf("the cell gave %q, want it to contain %q", got, c.want)
			}
		})
	}
}

// TestScriptCannotApproveItsOwnPrograms checks that the gate makers are
// not in the interpreter's tables.
func TestScriptCannotApproveItsOwnPrograms(t *testing.T) {
	s, err := NewSession(Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, call := range []string{"external.AllowAll()", `external.Allow("", "/bin/cat")`} {
		res := s.Exec(context.Background(), "import \"couplet/mdo/external\"\n"+call)
		if res.Err == nil {
			t.Errorf("%s ran in a script (value %v); it must not exist there", call, res.Value)
		}
	}
}

// canonicalPath resolves links in path as the gate does.
func canonicalPath(t *testing.T, path string) string {
	t.Helper()
	r, err := filepath.EvalSymlinks(path)
	if err != nil {
		t.Fatal(err)
	}
	return r
}
