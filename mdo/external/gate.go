package external

import (
	"fmt"
	"path/filepath"
	"sort"
	"strings"
)

// Gate decides which programs may run. The zero Gate and a nil *Gate
// approve nothing; AllowAll and Allow make gates that approve something.
// Study scripts cannot call those two: the interpreter's symbol tables
// leave them out, and a script gets its session's gate from the host.
type Gate struct {
	all   bool
	paths map[string]bool
	// hint is what the refusal tells the user to do.
	hint string
}

// AllowAll returns a gate that approves every program (a trusted script,
// or a Go program of the user's own).
func AllowAll() *Gate { return &Gate{all: true} }

// Allow returns a gate that approves exactly the programs at paths (made
// absolute; symbolic links are resolved where they exist). hint, if not
// empty, is added to a refusal (e.g. the flag that approves a program).
func Allow(hint string, paths ...string) *Gate {
	g := &Gate{paths: map[string]bool{}, hint: hint}
	for _, p := range paths {
		g.paths[canonical(p)] = true
	}
	return g
}

// canonical returns the absolute, link-resolved form of path (as far as
// it exists).
func canonical(path string) string {
	abs, err := filepath.Abs(path)
	if err != nil {
		return filepath.Clean(path)
	}
	if r, err := filepath.EvalSymlinks(abs); err == nil {
		return r
	}
	return abs
}

// Approves reports whether the program at path may run.
func (g *Gate) Approves(path string) bool {
	if g == nil {
		return false
	}
	return g.all || g.paths[canonical(path)]
}

// check returns nil when the gate approves path, and a *RefusedError
// otherwise.
func (g *Gate) check(name, path string) error {
	if g.Approves(path) {
		return nil
	}
	e := &RefusedError{Discipline: name, Path: canonical(path)}
	if g != nil {
		e.Hint = g.hint
		for p := range g.paths {
			e.Approved = append(e.Approved, p)
		}
		sort.Strings(e.Approved)
	}
	return e
}

// RefusedError reports a program that the gate does not approve.
type RefusedError struct {
	Discipline string
	Path       string
	// Approved lists the programs the gate approves.
	Approved []string
	Hint     string
}

// Error implements error.
func (e *RefusedError) Error() string {
	s := fmt.Sprintf("external: discipline %s: program %s is not approved to run: an external program is user code and runs only for a trusted script or when the user names it on the command line", e.Discipline, e.Path)
	if len(e.Approved) > 0 {
		s += " (approved: " + strings.Join(e.Approved, ", ") + ")"
	}
	if e.Hint != "" {
		s += "; " + e.Hint
	}
	return s
}
