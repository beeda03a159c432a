package main

import (
	"slices"
	"testing"
)

// TestAllowProgramRepeats checks that --allow-program may be given more
// than once and that each path reaches the sandbox policy.
func TestAllowProgramRepeats(t *testing.T) {
	st, pos, err := parse("run", []string{"x.study", "--allow-program", "/opt/vlm/bin/vlm", "--out", "o", "--allow-program=/usr/local/bin/deck"})
	if err != nil {
		t.Fatal(err)
	}
	p := st.policy()
	if want := []string{"/opt/vlm/bin/vlm", "/usr/local/bin/deck"}; !slices.Equal(p.Programs, want) || p.Trusted || !slices.Equal(pos, []string{"x.study"}) {
		t.Errorf("policy %+v, arguments %v; want programs %v, not trusted, arguments [x.study]", p, pos, want)
	}
}
