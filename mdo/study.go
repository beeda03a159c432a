package mdo

import (
	"errors"
	"fmt"
	"math"
)

// Formulation says how a Study treats the coupling of its System.
type Formulation int

const (
	// MDF (multidisciplinary feasible): every point gets a full coupled
	// analysis. The default.
	MDF Formulation = iota
	// IDF (individual discipline feasible): the coupling variables become
	// design variables, each discipline runs once per point, and equality
	// constraints ask the coupling to be consistent at the optimum.
	IDF
)

// String returns "MDF" or "IDF".
func (f Formulation) String() string {
	switch f {
	case MDF:
		return "MDF"
	case IDF:
		return "IDF"
	}
	return fmt.Sprintf("formulation(%d)", int(f))
}

// DesignVar is a design variable: a parameter of the System (or, under
// IDF, a coupling variable) varied between bounds.
type DesignVar struct {
	Name         string
	Lower, Upper float64
	// Integer restricts the variable to whole numbers (counts such as the
	// number of engines). Only the evolutionary optimisers and designs of
	// experiments accept integer variables.
	Integer bool
}

// Continuous returns a continuous design variable.
func Continuous(name string, lower, upper float64) DesignVar {
	return DesignVar{Name: name, Lower: lower, Upper: upper}
}

// Integer returns an integer design variable.
func Integer(name string, lower, upper int) DesignVar {
	return DesignVar{Name: name, Lower: float64(lower), Upper: float64(upper), Integer: true}
}

// Study is an optimisation problem over a System: design variables with
// bounds, one or more objectives, constraints, fixed parameter values and
// a formulation. Optimisers search the unit box; the Study maps it to the
// physical bounds.
type Study struct {
	Name        string
	System      *System
	Design      []DesignVar
	Objectives  []Objective
	Constraints []Constraint
	// Fixed holds parameter values other than the variables' defaults; a
	// design variable listed here starts from that value.
	Fixed       map[string]float64
	Formulation Formulation
	// Seed drives every random choice of the optimisers.
	Seed uint64
	// Workers is the number of parallel analyses; 0 means all cores, at
	// most 1024 (each worker holds a workspace of the system and the
	// machine has far fewer cores). Results do not depend on it.
	Workers int
	// CouplingBounds overrides, under IDF, the bounds of coupling
	// variables (name → [lower, upper]); the others take their validity
	// ranges. Tight, physically sensible bounds shorten the search.
	CouplingBounds map[string][2]float64
	// ConsistencyTolerance is the tolerance of the IDF consistency
	// constraints on the scaled coupling residual; default 1e-4, must be
	// >= 0 and finite.
	ConsistencyTolerance float64
	// CacheLimit caps the number of cached evaluations; default 50 000,
	// negative disables the cache, at most 1 000 000 (each cached
	// evaluation holds every output of the system, about 2 kB for 250
	// variables: 2 GB at the limit).
	CacheLimit int
	// Recorder, if not nil, receives every evaluation.
	Recorder Recorder
	// Progress, if not nil, is called at every optimiser iteration.
	Progress func(Progress)
	// Script is the source text of the study, kept for provenance.
	Script string
	// Notes are lines of provenance the Result, its summary.json and its
	// report carry, such as where fixed parameters came from (a
	// calibration's CalibrationResult.Apply writes one).
	Notes []string
}

// maxWorkers is the largest Workers a study accepts.
const maxWorkers = 1024

// maxCacheLimit is the largest CacheLimit a study accepts.
const maxCacheLimit = 1_000_000

// Check validates the study against its system, as NewEvaluator does:
// its declarations, and a dry run of its objective and constraint
// functions on the defaults that refuses a misspelt name they read, with
// the closest names. cell.Attach calls it, so that a script learns of a
// misspelt name when it attaches the study, before anything runs.
func (s *Study) Check() error { return s.validate() }

// validate checks the study's declarations against its system.
func (s *Study) validate() error {
	if s.System == nil {
		return fmt.Errorf("mdo: study %q has no System", s.Name)
	}
	if len(s.Design) == 0 {
		return fmt.Errorf("mdo: study %q has no design variables", s.Name)
	}
	if len(s.Objectives) == 0 {
		return fmt.Errorf("mdo: study %q has no objective", s.Name)
	}
	seen := map[string]bool{}
	for _, d := range s.Design {
		v, err := s.System.Var(d.Name)
		if err != nil {
			return fmt.Errorf("mdo: design variable: %w", err)
		}
		if seen[d.Name] {
			return fmt.Errorf("mdo: design variable %s listed twice; list each variable once", d.Name)
		}
		seen[d.Name] = true
		if !s.System.IsParameter(d.Name) {
			return fmt.Errorf("mdo: design variable %s is produced by discipline %s; only parameters can be design variables (IDF adds coupling variables itself)", d.Name, s.System.Producer(d.Name))
		}
		if math.IsNaN(d.Lower) || math.IsNaN(d.Upper) || math.IsInf(d.Lower, 0) || math.IsInf(d.Upper, 0) || !(d.Lower < d.Upper) {
			return fmt.Errorf("mdo: design variable %s: bounds [%g, %g] must be finite with lower < upper", d.Name, d.Lower, d.Upper)
		}
		if !v.Unbounded() && (d.Lower < v.Min || d.Upper > v.Max) {
			unit := ""
			if v.Unit != "" && v.Unit != "-" {
				unit = " " + v.Unit // a dimensionless "-" would read as a dash
			}
			which := fmt.Sprintf("the lower bound %g is below %g", d.Lower, v.Min)
			if d.Upper > v.Max {
				which = fmt.Sprintf("the upper bound %g is above %g", d.Upper, v.Max)
			}
			return fmt.Errorf("mdo: design variable %s: bounds [%g, %g]%s leave its validity range [%g, %g]%s (%s); choose bounds within it", d.Name, d.Lower, d.Upper, unit, v.Min, v.Max, unit, which)
		}
		if d.Integer && (d.Lower != math.Round(d.Lower) || d.Upper != math.Round(d.Upper)) {
			return fmt.Errorf("mdo: integer design variable %s needs whole-number bounds, got [%g, %g]", d.Name, d.Lower, d.Upper)
		}
	}
	for name, x := range s.Fixed {
		v, err := s.System.Var(name)
		if err != nil {
			return fmt.Errorf("mdo: fixed value: %w", err)
		}
		if !s.System.IsParameter(name) {
			return fmt.Errorf("mdo: fixed value for %s, which is produced by discipline %s", name, s.System.Producer(name))
		}
		if err := v.Check(x); err != nil {
			return err
		}
	}
	for _, o := range s.Objectives {
		if o.Func == nil {
			if _, err := s.System.Var(o.Name); err != nil {
				return fmt.Errorf("mdo: objective: %w", err)
			}
		}
	}
	for _, c := range s.Constraints {
		if err := c.validate(); err != nil {
			return err
		}
		if c.Func == nil {
			if _, err := s.System.Var(c.Name); err != nil {
				return fmt.Errorf("mdo: constraint: %w", err)
			}
		}
	}
	for name, b := range s.CouplingBounds {
		if _, err := s.System.Var(name); err != nil {
			return fmt.Errorf("mdo: coupling bounds: %w", err)
		}
		if !(b[0] < b[1]) || math.IsInf(b[0], 0) || math.IsInf(b[1], 0) {
			return fmt.Errorf("mdo: coupling bounds of %s: [%g, %g] must be finite with lower < upper", name, b[0], b[1])
		}
	}
	if err := s.dryRun(); err != nil {
		return err
	}
	if s.Workers < 0 || s.Workers > maxWorkers {
		return fmt.Errorf("mdo: study %q: Workers = %d, must be in [0, %d] (0 = all cores; each worker holds a workspace of the system)", s.Name, s.Workers, maxWorkers)
	}
	if s.CacheLimit > maxCacheLimit {
		return fmt.Errorf("mdo: study %q: CacheLimit = %d, must be at most %d (negative disables the cache, 0 means the default 50 000): each cached evaluation holds every output of the system, about 2 kB for 250 variables", s.Name, s.CacheLimit, maxCacheLimit)
	}
	if c := s.ConsistencyTolerance; !(c >= 0) || math.IsInf(c, 0) {
		return fmt.Errorf("mdo: study %q: ConsistencyTolerance = %g, must be >= 0 and finite (0 means the default 1e-4)", s.Name, c)
	}
	if s.Formulation != MDF && s.Formulation != IDF {
		return fmt.Errorf("mdo: study %q: unknown formulation %d (allowed MDF, IDF)", s.Name, int(s.Formulation))
	}
	return nil
}

// dryRun calls every objective and constraint function once on the
// system's default values (with the fixed values and the design
// variables' lower bounds), so that a misspelt name one of them reads is
// refused when the study is attached, not found after the run has begun
// (or, before Values.Get panicked, never). Only an unknown name is an
// error here: whatever else the function does with values that were not
// computed is left to the run.
func (s *Study) dryRun() error {
	n := s.System.vars.Len()
	val := make([]float64, n)
	for i := 0; i < n; i++ {
		val[i] = s.System.vars.At(i).Default
	}
	for name, x := range s.Fixed {
		val[s.System.Index(name)] = x
	}
	for _, d := range s.Design {
		val[s.System.Index(d.Name)] = d.Lower
	}
	vals := Values{sys: s.System, val: val}
	for _, o := range s.Objectives {
		if o.Func != nil {
			if err := readsKnownNames(o.Func, vals); err != nil {
				return fmt.Errorf("mdo: study %q: objective %s: %w", s.Name, o.Name, err)
			}
		}
	}
	for _, c := range s.Constraints {
		if c.Func != nil {
			if err := readsKnownNames(c.Func, vals); err != nil {
				return fmt.Errorf("mdo: study %q: constraint %s: %w", s.Name, c.Name, err)
			}
		}
	}
	return nil
}

// readsKnownNames calls fn on vals and returns the *UnknownVariableError
// it panics with, if any; any other panic is not its business.
func readsKnownNames(fn func(Values) float64, vals Values) (err error) {
	defer func() {
		if r := recover(); r != nil {
			var unknown *UnknownVariableError
			if e, ok := r.(error); ok && errors.As(e, &unknown) {
				err = e
			}
		}
	}()
	fn(vals)
	return nil
}
