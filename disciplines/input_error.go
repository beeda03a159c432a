package disciplines

import (
	"errors"
	"fmt"
)

// InputError reports an input value a method does not accept. It names
// the variable (an aircraft variable name where there is one), the value,
// its unit and what is allowed.
type InputError struct {
	Var     string  // variable name, e.g. "wing.area"
	Value   float64 // the value refused
	Unit    string  // SI unit of the value ("" for dimensionless)
	Allowed string  // what is allowed, e.g. "> 0" or "[0, 2.5]"
}

// Error implements error.
func (e *InputError) Error() string {
	unit := ""
	if e.Unit != "" {
		unit = " " + e.Unit
	}
	return fmt.Sprintf("disciplines: %s = %g%s is not allowed (allowed: %s)", e.Var, e.Value, unit, e.Allowed)
}

// Variable returns the name of the refused variable; the coupled
// solver uses it to tell a balance that runs away from a failed
// discipline.
func (e *InputError) Variable() string { return e.Var }

// inputErr builds an *InputError.
func inputErr(name string, v float64, unit, allowed string) error {
	return &InputError{Var: name, Value: v, Unit: unit, Allowed: allowed}
}

// renameInput returns err with the variable of an *InputError renamed
// (e.g. "altitude" to "cruise.altitude"); other errors are wrapped with
// the name as context.
func renameInput(err error, name string) error {
	var ie *InputError
	if errors.As(err, &ie) {
		c := *ie
		c.Var = name
		return &c
	}
	return fmt.Errorf("%s: %w", name, err)
}
