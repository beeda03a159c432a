package repl

import (
	"bytes"
	"strings"
	"testing"
)

// couplet vars lists the aircraft model's variables with a prefix. The
// producer checked is this model's own wiring (disciplines/mission.go
// computes the fuel mass), not a published value.
func TestVarsCommand(t *testing.T) {
	tests := []struct {
		args       []string
		code       int
		out, noOut []string
		err        string
	}{
		{[]string{"--prefix", "mass.fuel"}, 0, []string{"producer", "consumers", "mass.fuel ", "mission", "kg"}, []string{"wing.area"}, ""},
		{[]string{"--prefix", "mass.fuel_capacity", "--markdown"}, 0, []string{"| `mass.fuel_capacity` | kg |"}, []string{"mass.fuel "}, ""},
		{nil, 0, []string{"wing.area", "mass.fuel"}, nil, ""},
		{[]string{"--prefix", "mass.fule"}, 2, nil, nil, `"mass.fule"`},
		{[]string{"mass."}, 2, nil, nil, "--prefix"},
		{[]string{"--wrong"}, 2, nil, nil, "wrong"},
	}
	for _, tc := range tests {
		var out, errb bytes.Buffer
		code := VarsCommand(tc.args, &out, &errb)
		if code != tc.code {
			t.Errorf("vars %v: exit %d, want %d (%s)", tc.args, code, tc.code, errb.String())
		}
		for _, w := range tc.out {
			if !strings.Contains(out.String(), w) {
				t.Errorf("vars %v: output lacks %q", tc.args, w)
			}
		}
		for _, w := range tc.noOut {
			if strings.Contains(out.String(), w) {
				t.Errorf("vars %v: output holds %q", tc.args, w)
			}
		}
		if !strings.Contains(errb.String(), tc.err) {
			t.Errorf("vars %v: stderr %q lacks %q", tc.args, errb.String(), tc.err)
		}
	}
}

// @catalogue lists a session's system or study, filtered by a prefix.
func TestCatalogueCommand(t *testing.T) {
	s, out, errb := newTest(t, Options{})
	defer s.Close()
	serve(t, s, "st, err := mdo.SellarStudy(mdo.MDF)\n@catalogue st y\n@catalogue st.System z2\n@catalogue st q\nn := 3\n@catalogue n\n@catalogue\n")
	for _, w := range []string{"y1    -     1", "sellar2, sellar_functions", "z2 "} {
		if !strings.Contains(out.String(), w) {
			t.Errorf("output lacks %q:\n%s", w, out)
		}
	}
	for _, w := range []string{`starts with "q"`, "want a *mdo.System or a *mdo.Study", "needs a system or a study"} {
		if !strings.Contains(errb.String(), w) {
			t.Errorf("stderr lacks %q:\n%s", w, errb)
		}
	}
}
