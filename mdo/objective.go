package mdo

import "fmt"

// Objective is a quantity to minimise (or maximise): a system variable or
// a Go function of the analysis values.
type Objective struct {
	// Name labels the objective; when Func is nil it is also the system
	// variable whose value is the objective.
	Name string
	// Func computes the objective from the values of an analysis. It may
	// be called from several goroutines at once.
	Func func(Values) float64
	// Maximize turns the objective into one to maximise.
	Maximize bool
	// Unit is the unit of a Func objective, shown beside its values
	// (empty: that of the variable Name, or none); see WithUnit.
	Unit string
}

// WithUnit returns a copy of o whose values are in unit.
func (o Objective) WithUnit(unit string) Objective {
	o.Unit = unit
	return o
}

// Minimize returns the objective "minimise the variable name".
func Minimize(name string) Objective { return Objective{Name: name} }

// Maximize returns the objective "maximise the variable name".
func Maximize(name string) Objective { return Objective{Name: name, Maximize: true} }

// MinimizeFunc returns the objective "minimise fn", labelled name.
func MinimizeFunc(name string, fn func(Values) float64) Objective {
	return Objective{Name: name, Func: fn}
}

// MaximizeFunc returns the objective "maximise fn", labelled name.
func MaximizeFunc(name string, fn func(Values) float64) Objective {
	return Objective{Name: name, Func: fn, Maximize: true}
}

// sense returns +1 to minimise and −1 to maximise.
func (o Objective) sense() float64 {
	if o.Maximize {
		return -1
	}
	return 1
}

// String describes the objective.
func (o Objective) String() string {
	verb := "minimise"
	if o.Maximize {
		verb = "maximise"
	}
	return fmt.Sprintf("%s %s", verb, o.Name)
}
