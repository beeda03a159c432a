package mdo

import "math"

// Values gives read access, by name, to the variables of one analysis. It
// is what objective and constraint functions receive.
type Values struct {
	sys *System
	val []float64
}

// NewValues wraps a value slice indexed like sys.Vars().
func NewValues(sys *System, val []float64) Values { return Values{sys: sys, val: val} }

// Get returns the value of a variable, or NaN if the system has no
// variable of that name (an objective returning NaN makes the point
// infeasible with a reason, so a misspelt name cannot pass unnoticed).
func (v Values) Get(name string) float64 {
	i := v.sys.Index(name)
	if i < 0 {
		return math.NaN()
	}
	return v.val[i]
}

// Lookup returns the value of a variable or an error naming it.
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

// nan returns a quiet NaN.
func nan() float64 { return math.NaN() }
