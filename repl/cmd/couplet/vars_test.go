package main

import (
	"bytes"
	"strings"
	"testing"
)

// couplet vars lists the aircraft model's variables with a prefix. The
// producer checked is this model's own wiring (disciplines/mission.go
// computes the fuel mass), not a published value.
func TestVars(t *testing.T) {
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
		{[]string{"--wrong"}, 2, nil, nil, "couplet vars: unknown flag --wrong"},
	}
	for _, tc := range tests {
		var out, errb bytes.Buffer
		code := varsCommand(tc.args, &out, &errb)
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
