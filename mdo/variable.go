package mdo

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"text/tabwriter"
)

// Var is the specification of one variable of a System: a dotted
// lower-snake name, its SI unit, a description, a default value (used as
// the initial guess of coupling variables and the value of parameters that
// are not set) and a physical validity range [Min, Max].
//
// A zero Min and Max both mean "unbounded" (see Unbounded).
type Var struct {
	Name        string
	Unit        string
	Description string
	Default     float64
	Min, Max    float64
	// Scale is the typical magnitude used to scale residuals and the
	// finite-difference steps; zero means max(|Default|, 1).
	Scale float64
}

// Unbounded reports whether the validity range is left open (Min == Max == 0).
func (v Var) Unbounded() bool { return v.Min == 0 && v.Max == 0 }

// InRange reports whether x is finite and within the validity range.
func (v Var) InRange(x float64) bool {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return false
	}
	if v.Unbounded() {
		return true
	}
	return x >= v.Min && x <= v.Max
}

// RangeError returns the error for a value outside the validity range.
func (v Var) RangeError(x float64) error {
	return &RangeError{Var: v.Name, Value: x, Min: v.Min, Max: v.Max, Unit: v.Unit}
}

// Check returns nil when x is valid for v, and a *RangeError naming the
// variable, the value and the allowed range otherwise.
func (v Var) Check(x float64) error {
	if v.InRange(x) {
		return nil
	}
	return v.RangeError(x)
}

// scale returns the residual scale of v.
func (v Var) scale() float64 {
	if v.Scale > 0 {
		return v.Scale
	}
	return math.Max(math.Abs(v.Default), 1)
}

// validName reports whether name is dotted lower-snake: segments of
// [a-z0-9_] beginning with a letter, separated by dots.
func validName(name string) bool {
	if name == "" {
		return false
	}
	for _, seg := range strings.Split(name, ".") {
		if seg == "" || seg[0] < 'a' || seg[0] > 'z' {
			return false
		}
		for _, r := range seg {
			if !(r >= 'a' && r <= 'z' || r >= '0' && r <= '9' || r == '_') {
				return false
			}
		}
	}
	return true
}

// Validate checks the specification itself: a valid name, a finite
// default inside the range, and Min <= Max.
func (v Var) Validate() error {
	if !validName(v.Name) {
		return fmt.Errorf("mdo: variable name %q is not dotted lower-snake (segments of a-z, 0-9, _ starting with a letter)", v.Name)
	}
	if v.Min > v.Max {
		return fmt.Errorf("mdo: variable %s: range [%g, %g] has Min > Max", v.Name, v.Min, v.Max)
	}
	if !v.InRange(v.Default) {
		return fmt.Errorf("mdo: variable %s: default %g outside its range [%g, %g] %s", v.Name, v.Default, v.Min, v.Max, v.Unit)
	}
	return nil
}

// VarTable is an ordered, read-only collection of variable specifications
// with look-up by name. Printing it gives an aligned table.
type VarTable struct {
	vars  []Var
	index map[string]int
}

// NewVarTable builds a table; duplicate names are an error.
func NewVarTable(vars ...Var) (*VarTable, error) {
	t := &VarTable{index: make(map[string]int, len(vars))}
	for _, v := range vars {
		if err := v.Validate(); err != nil {
			return nil, err
		}
		if _, dup := t.index[v.Name]; dup {
			return nil, fmt.Errorf("mdo: variable %s declared twice in one table", v.Name)
		}
		t.index[v.Name] = len(t.vars)
		t.vars = append(t.vars, v)
	}
	return t, nil
}

// Len returns the number of variables.
func (t *VarTable) Len() int { return len(t.vars) }

// At returns the i-th variable.
func (t *VarTable) At(i int) Var { return t.vars[i] }

// All returns a copy of the variables in table order.
func (t *VarTable) All() []Var { return append([]Var(nil), t.vars...) }

// Lookup returns the specification of name.
func (t *VarTable) Lookup(name string) (Var, bool) {
	i, ok := t.index[name]
	if !ok {
		return Var{}, false
	}
	return t.vars[i], true
}

// Index returns the position of name in the table, or -1.
func (t *VarTable) Index(name string) int {
	i, ok := t.index[name]
	if !ok {
		return -1
	}
	return i
}

// Names returns the variable names in table order.
func (t *VarTable) Names() []string {
	out := make([]string, len(t.vars))
	for i, v := range t.vars {
		out[i] = v.Name
	}
	return out
}

// Match returns the variables whose name starts with prefix, sorted by name.
func (t *VarTable) Match(prefix string) []Var {
	var out []Var
	for _, v := range t.vars {
		if strings.HasPrefix(v.Name, prefix) {
			out = append(out, v)
		}
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

// String formats the table with columns name, unit, default, range and
// description.
func (t *VarTable) String() string { return FormatVars(t.vars) }

// FormatVars formats variable specifications as an aligned text table.
func FormatVars(vars []Var) string {
	var b strings.Builder
	w := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(w, "name\tunit\tdefault\trange\tdescription")
	for _, v := range vars {
		rng := "unbounded"
		if !v.Unbounded() {
			rng = fmt.Sprintf("[%s, %s]", fmtNum(v.Min), fmtNum(v.Max))
		}
		unit := v.Unit
		if unit == "" {
			unit = "-"
		}
		fmt.Fprintf(w, "%s\t%s\t%s\t%s\t%s\n", v.Name, unit, fmtNum(v.Default), rng, v.Description)
	}
	w.Flush()
	return b.String()
}

// fmtNum formats a number compactly for tables.
func fmtNum(x float64) string {
	switch {
	case math.IsInf(x, 1):
		return "inf"
	case math.IsInf(x, -1):
		return "-inf"
	}
	return fmt.Sprintf("%.6g", x)
}
