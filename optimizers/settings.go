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

// checkBudget checks the population and budget settings shared by the
// population-based methods.
func checkBudget(method string, population, minPopulation, generations, maxEvaluations int) error {
	if err := checkInt(method, "Population", population, minPopulation); err != nil {
		return err
	}
	if err := checkInt(method, "Generations", generations, 1); err != nil {
		return err
	}
	return checkInt(method, "MaxEvaluations", maxEvaluations, 1)
}

// checkEquality checks the equality-handling settings (gradient-based
// mutation rate and ε-level relaxation) of the evolutionary methods.
func checkEquality(method string, gradientRate, relax float64) error {
	if gradientRate > 1 || math.IsNaN(gradientRate) {
		return settingError(method, "GradientRate", gradientRate, "must be at most 1 (0 means the default 0.05, negative means none)")
	}
	if relax > 1 || math.IsNaN(relax) {
		return settingError(method, "Relax", relax, "must be at most 1 (0 means the default 0.5, negative means no relaxation)")
	}
	return nil
}
