package repl

import (
	"fmt"
	"math"
	"reflect"
	"strconv"

	"couplet/mdo"
)

// declType is the type of the value the interpreter returns for a
// declaration or a call without results: nothing to show.
var declType = reflect.TypeOf((*any)(nil))

// formatValue formats the value of a trailing expression for display.
// Framework types show through their String methods (tables for results,
// variable listings, the design structure matrix); strings are shown as
// they are, floats in the shortest form that reads back exactly.
func formatValue(v reflect.Value) (text string, val any, ok bool) {
	if !v.IsValid() || v.Type() == declType {
		return "", nil, false
	}
	if k := v.Kind(); (k == reflect.Pointer || k == reflect.Interface || k == reflect.Map || k == reflect.Slice || k == reflect.Func) && v.IsNil() {
		return "<nil>", nil, true
	}
	defer func() {
		// a value's own String method may fail; the session goes on
		if r := recover(); r != nil {
			text, val, ok = fmt.Sprintf("<%s that cannot be shown: %v>", v.Type(), r), nil, true
		}
	}()
	if !v.CanInterface() {
		return v.String(), nil, true
	}
	x := v.Interface()
	switch t := x.(type) {
	case nil:
		return "<nil>", nil, true
	case error:
		return "error: " + t.Error(), x, true
	case fmt.Stringer:
		return t.String(), x, true
	case []mdo.Var:
		return mdo.FormatVars(t), x, true
	case mdo.Var:
		return mdo.FormatVars([]mdo.Var{t}), x, true
	case string:
		return t, x, true
	case float64:
		return formatFloat(t), x, true
	case float32:
		return formatFloat(float64(t)), x, true
	}
	return fmt.Sprintf("%+v", x), x, true
}

// formatFloat prints x in the shortest form that reads back exactly.
func formatFloat(x float64) string {
	switch {
	case math.IsInf(x, 1):
		return "+Inf"
	case math.IsInf(x, -1):
		return "-Inf"
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}
