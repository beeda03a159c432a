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

// Upper limits of the sizes the methods allocate for, so that a setting
// that would exhaust the memory is refused before the run, not met as a
// run that swaps or dies. Each is documented at its field; they are
// generous (far above what a conceptual study needs) and fixed, so that
// whether a setting is accepted does not depend on the machine.
const (
	// maxPopulation bounds a population (GA, DifferentialEvolution,
	// ParticleSwarm, NSGA2, CMAES): each individual and each offspring
	// holds its point and an evaluation with every output of the system
	// (8 bytes a value: about 2 kB for a system of 250 variables), so
	// 100 000 individuals and their offspring hold about 0.4 GB.
	maxPopulation = 100_000
	// maxPlannedEvaluations bounds Population × (Generations + 1) of a
	// population-based run without MaxEvaluations: beyond 10⁹ analyses a
	// run cannot end in a working day even at a microsecond each, and
	// its record (a few hundred bytes an evaluation) would take hundreds
	// of gigabytes.
	maxPlannedEvaluations = 1_000_000_000
	// maxStarts bounds Sextant's Starts and Restarts: their points are
	// drawn before the first start (8 bytes a variable each) and each
	// start is a whole SQP run that keeps its report.
	maxStarts = 10_000
	// maxDesignPoints bounds the points of a design of experiments
	// (Samples, FullFactorial's MaxPoints and its product of levels):
	// every point is drawn before the first evaluation, a slice of 8
	// bytes a variable plus 24 of header, and evaluated in batches.
	maxDesignPoints = 1_000_000
	// maxDesignBytes bounds points × variables × 8 bytes of a design of
	// experiments: 1 GiB (a million points of 134 variables).
	maxDesignBytes = 1 << 30
	// maxBatch bounds BatchSize: a batch's evaluations (each with every
	// output of the system) are held together.
	maxBatch = 100_000
	// maxCandidates bounds ExpectedImprovement's Candidates, drawn and
	// scored at every iteration (a point and two surrogate predictions
	// each).
	maxCandidates = 1_000_000
	// maxSurrogatePoints bounds ExpectedImprovement's MaxEvaluations:
	// the Gaussian processes are refitted to every analysed point at each
	// iteration, each holding at least two n × n matrices (2 × 32 MB at 2000
	// points) and costing n³ operations.
	maxSurrogatePoints = 2000
)

// checkMax refuses an integer setting above max, saying why.
func checkMax(method, setting string, v, max int, why string) error {
	if v > max {
		return settingError(method, setting, v, fmt.Sprintf("must be at most %d: %s", max, why))
	}
	return nil
}
