package main

import (
	"strings"

	"couplet/repl"
)

// pathList is a repeatable flag of paths.
type pathList []string

// String implements flag.Value.
func (l *pathList) String() string { return strings.Join(*l, ", ") }

// Set implements flag.Value.
func (l *pathList) Set(path string) error {
	*l = append(*l, path)
	return nil
}

// policy is the sandbox policy the flags ask for.
func (st *settings) policy() repl.Policy {
	return repl.Policy{Trusted: st.trust, Programs: append([]string(nil), st.programs...)}
}
