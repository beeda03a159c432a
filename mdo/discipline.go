package mdo

import "fmt"

// Discipline is one analysis of a coupled System. It declares its inputs
// and outputs and computes the outputs from the inputs.
//
// Compute receives the input values in the order of Inputs and writes the
// output values in the order of Outputs. It must not retain either slice,
// must not allocate on its normal path if the System is to run allocation
// free, and returns an error rather than panicking. A Discipline value is
// shared by all workspaces of a System, so Compute must not mutate the
// discipline (keep scratch space on the stack or inside in/out).
type Discipline interface {
	Name() string
	Inputs() []Var
	Outputs() []Var
	Compute(in, out []float64) error
}

// ComputeFunc is the signature of a discipline's computation.
type ComputeFunc func(in, out []float64) error

// FuncDiscipline is a Discipline made from a plain Go function.
type FuncDiscipline struct {
	name    string
	inputs  []Var
	outputs []Var
	fn      ComputeFunc
}

// Func makes a discipline from a function and the names of its inputs and
// outputs. Variables named only by a string are unbounded with default 1,
// unless another discipline of the system declares them (a variable of
// the aircraft, say): they then take its specification, unit and range
// included (see NewSystem). Use FuncVars to give full specifications.
func Func(name string, inputs, outputs []string, fn ComputeFunc) *FuncDiscipline {
	return FuncVars(name, Specs(inputs...), Specs(outputs...), fn)
}

// FuncVars makes a discipline from a function and full variable
// specifications.
func FuncVars(name string, inputs, outputs []Var, fn ComputeFunc) *FuncDiscipline {
	return &FuncDiscipline{name: name, inputs: inputs, outputs: outputs, fn: fn}
}

// Specs returns unbounded specifications with default 1 for names.
func Specs(names ...string) []Var {
	out := make([]Var, len(names))
	for i, n := range names {
		out[i] = Var{Name: n, Default: 1}
	}
	return out
}

// Name implements Discipline.
func (d *FuncDiscipline) Name() string { return d.name }

// Inputs implements Discipline.
func (d *FuncDiscipline) Inputs() []Var { return d.inputs }

// Outputs implements Discipline.
func (d *FuncDiscipline) Outputs() []Var { return d.outputs }

// Compute implements Discipline. A panic in the function is not
// recovered here: Workspace.Analyze recovers it, once per analysis, as it
// does for every discipline.
func (d *FuncDiscipline) Compute(in, out []float64) error {
	if d.fn == nil {
		return fmt.Errorf("discipline %s has no function", d.name)
	}
	return d.fn(in, out)
}
