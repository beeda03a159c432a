package mdo

import (
	"fmt"
	"strings"
)

// Values gives read access, by name, to the variables of one analysis. It
// is what objective and constraint functions receive.
//
// Every type that holds variable values (Values, Solution, Workspace,
// Result) reads them the same way, and a misspelt name is never a silent
// NaN or 0:
//
//   - Get(name) float64 returns the value and panics with an error
//     wrapping an *UnknownVariableError, which names the variable and
//     similar ones, when there is no such variable. It is the form for
//     expressions in objective and constraint functions (the Evaluator
//     then stops the run with an error naming the function and the
//     variable) and in scripts (the session reports the cell and line).
//   - Lookup(name) (float64, error) returns that error instead.
//   - At(i) float64 reads by index (see System.Index), for loops.
type Values struct {
	sys *System
	val []float64
}

// NewValues wraps a value slice indexed like sys.Vars().
func NewValues(sys *System, val []float64) Values { return Values{sys: sys, val: val} }

// Get returns the value of a variable. It panics with Lookup's error (an
// *UnknownVariableError) when the system has no variable of that name.
func (v Values) Get(name string) float64 { return mustValue(v.Lookup(name)) }

// Lookup returns the value of a variable, or an error naming it when the
// system has no variable of that name.
func (v Values) Lookup(name string) (float64, error) {
	i := v.sys.Index(name)
	if i < 0 {
		return 0, v.sys.unknown(name)
	}
	return v.val[i], nil
}

// At returns the value of variable i (see System.Index).
func (v Values) At(i int) float64 { return v.val[i] }

// Len returns the number of variables.
func (v Values) Len() int { return len(v.val) }

// UnknownVariableError is the error of a variable name that the system,
// solution or result does not have.
type UnknownVariableError struct {
	// Name is the name asked for.
	Name string
	// Where says what was asked: "the system", "the solution", ...
	Where string
	// Similar lists the closest names, nearest first: those a few edits
	// from Name (at most 5), else those that share its first dotted part
	// (at most 12; none when there are more).
	Similar []string
}

// Error implements error.
func (e *UnknownVariableError) Error() string {
	hint := ""
	if len(e.Similar) > 0 {
		hint = "; similar: " + strings.Join(e.Similar, ", ")
	}
	return fmt.Sprintf("mdo: %s has no variable %q%s", e.Where, e.Name, hint)
}

// unknownIn is the error of a name missing from vars, described as where,
// with the closest names (closestNames).
func unknownIn(where, name string, vars []Var) error {
	return &UnknownVariableError{Name: name, Where: where, Similar: closestNames(name, vars)}
}

// mustValue returns x, or panics with err.
func mustValue(x float64, err error) float64 {
	if err != nil {
		panic(err)
	}
	return x
}
