package mdo

import (
	"context"
	"fmt"
	"sort"
	"strings"
	"text/tabwriter"
)

// Solution is the outcome of one analysis of a System: every variable's
// value and the coupling reports. It is a snapshot, independent of the
// workspace that computed it.
type Solution struct {
	vars            []Var
	values          []float64
	CouplingReports []CouplingReport
	Counters
}

// Analyze runs one analysis on a fresh workspace with the given parameter
// values (the others at their defaults) and returns its snapshot. It is
// the convenient form for scripts; loops should reuse a Workspace.
func (s *System) Analyze(ctx context.Context, params map[string]float64) (*Solution, error) {
	w := s.NewWorkspace()
	names := make([]string, 0, len(params))
	for n := range params {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		if err := w.Set(n, params[n]); err != nil {
			return nil, err
		}
	}
	err := w.Analyze(ctx)
	return w.Snapshot(), err
}

// Snapshot copies the workspace's current state into a Solution.
func (w *Workspace) Snapshot() *Solution {
	sol := &Solution{vars: w.sys.vars.All(), values: append([]float64(nil), w.val...), Counters: w.cnt}
	for _, r := range w.CouplingReports() {
		sol.CouplingReports = append(sol.CouplingReports, r.Clone())
	}
	return sol
}

// Get returns a variable's value. It panics with Lookup's error (an
// *UnknownVariableError) when the solution has no variable of that name
// (see Values for the convention).
func (s *Solution) Get(name string) float64 { return mustValue(s.Lookup(name)) }

// Lookup returns a variable's value, or an error naming it when the
// solution has no variable of that name.
func (s *Solution) Lookup(name string) (float64, error) {
	for i, v := range s.vars {
		if v.Name == name {
			return s.values[i], nil
		}
	}
	return 0, unknownIn("the solution", name, s.vars)
}

// Converged reports whether every coupled group converged.
func (s *Solution) Converged() bool {
	for _, r := range s.CouplingReports {
		if !r.Converged {
			return false
		}
	}
	return true
}

// Table formats the variables whose name starts with prefix ("" for all).
func (s *Solution) Table(prefix string) string {
	var b strings.Builder
	w := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(w, "variable\tvalue\tunit\tdescription")
	for i, v := range s.vars {
		if strings.HasPrefix(v.Name, prefix) {
			fmt.Fprintf(w, "%s\t%.6g\t%s\t%s\n", v.Name, s.values[i], unitOr(v.Unit), v.Description)
		}
	}
	w.Flush()
	return b.String()
}

// String formats the reports and every variable.
func (s *Solution) String() string {
	var b strings.Builder
	for _, r := range s.CouplingReports {
		b.WriteString(r.String())
	}
	b.WriteString(s.Table(""))
	return b.String()
}
