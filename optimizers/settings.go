package optimizers

import (
	"fmt"
	"math"
	"reflect"
)

// settingsMap records a settings struct as field name → value.
func settingsMap(settings any) map[string]string {
	out := map[string]string{}
	if settings == nil {
		return out
	}
	v := reflect.ValueOf(settings)
	for v.Kind() == reflect.Pointer {
		if v.IsNil() {
			return out
		}
		v = v.Elem()
	}
	if v.Kind() != reflect.Struct {
		return out
	}
	t := v.Type()
	for i := 0; i < t.NumField(); i++ {
		if !t.Field(i).IsExported() {
			continue
		}
		f := v.Field(i)
		if f.Kind() == reflect.Struct && t.Field(i).Anonymous {
			// an embedded settings block: its fields read as the method's
			for k, s := range settingsMap(f.Interface()) {
				out[k] = s
			}
			continue
		}
		if f.Kind() == reflect.Struct {
			for k, s := range settingsMap(f.Interface()) {
				out[t.Field(i).Name+"."+k] = s
			}
			continue
		}
		out[t.Field(i).Name] = fmt.Sprint(f.Interface())
	}
	return out
}

// settingError is the error of a setting out of its allowed range.
func settingError(method, setting string, value any, allowed string) error {
	return fmt.Errorf("optimizers: %s.%s = %v, %s", method, setting, value, allowed)
}

// checkInt checks an integer setting: 0 means the default, else it must be
// at least min.
func checkInt(method, setting string, v, min int) error {
	if v != 0 && v < min {
		return settingError(method, setting, v, fmt.Sprintf("must be >= %d (0 means the default)", min))
	}
	return nil
}

// checkRange checks a float setting: 0 means the default, else it must lie
// in (lo, hi] (open at lo when open is true, closed otherwise).
func checkRange(method, setting string, v, lo, hi float64, openLo bool) error {
	bad := math.IsNaN(v) || v > hi || v < lo || (openLo && v == lo)
	if v == 0 && !math.IsNaN(v) {
		bad = false
	}
	if bad {
		lb := "["
		if openLo {
			lb = "("
		}
		return settingError(method, setting, v, fmt.Sprintf("must lie in %s%g, %g] (0 means the default)", lb, lo, hi))
	}
	return nil
}

// or returns v, or def when v is zero.
func or[T int | float64](v, def T) T {
	if v == 0 {
		return def
	}
	return v
}

// firstError returns the first non-nil error, for a settings check that
// lists its checks in order.
func firstError(errs ...error) error {
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}
