package mdo

import (
	"fmt"
	"math"
)

// ConstraintKind says how a constraint bounds its value.
type ConstraintKind int

const (
	// LessEqual: value ≤ Upper.
	LessEqual ConstraintKind = iota
	// GreaterEqual: value ≥ Lower.
	GreaterEqual
	// Equal: |value − Lower| ≤ Tolerance.
	Equal
	// InBand: Lower ≤ value ≤ Upper.
	InBand
)

// String returns the relation's symbol.
func (k ConstraintKind) String() string {
	switch k {
	case LessEqual:
		return "<="
	case GreaterEqual:
		return ">="
	case Equal:
		return "=="
	case InBand:
		return "in"
	}
	return fmt.Sprintf("kind(%d)", int(k))
}

// Constraint limits a system variable or a function of the analysis
// values.
type Constraint struct {
	// Name labels the constraint; when Func is nil it is also the
	// constrained system variable.
	Name string
	// Func computes the constrained quantity; it may be called from
	// several goroutines at once.
	Func func(Values) float64
	Kind ConstraintKind
	// Lower and Upper are the bounds the kind uses (Equal uses Lower as
	// its target).
	Lower, Upper float64
	// Tolerance is the allowed deviation of an equality; default 1e-6
	// times Scale.
	Tolerance float64
	// Scale normalises the constraint for penalties and violation sums;
	// default max(|bound|, 1).
	Scale float64
	// Unit is the unit of a Func constraint's quantity, shown beside its
	// values (empty: that of the variable Name, or none); see WithUnit.
	Unit string
}

// WithUnit returns a copy of c whose quantity is in unit.
func (c Constraint) WithUnit(unit string) Constraint {
	c.Unit = unit
	return c
}

// AtMost returns the constraint name ≤ upper.
func AtMost(name string, upper float64) Constraint {
	return Constraint{Name: name, Kind: LessEqual, Upper: upper}
}

// AtLeast returns the constraint name ≥ lower.
func AtLeast(name string, lower float64) Constraint {
	return Constraint{Name: name, Kind: GreaterEqual, Lower: lower}
}

// EqualTo returns the constraint |name − target| ≤ tol.
func EqualTo(name string, target, tol float64) Constraint {
	return Constraint{Name: name, Kind: Equal, Lower: target, Tolerance: tol}
}

// Between returns the constraint lower ≤ name ≤ upper.
func Between(name string, lower, upper float64) Constraint {
	return Constraint{Name: name, Kind: InBand, Lower: lower, Upper: upper}
}

// WithFunc returns a copy of c that constrains fn instead of a variable.
func (c Constraint) WithFunc(fn func(Values) float64) Constraint {
	c.Func = fn
	return c
}

// WithScale returns a copy of c with the given normalising scale.
func (c Constraint) WithScale(scale float64) Constraint {
	c.Scale = scale
	return c
}

// validate checks the bounds: each must be a finite number (the bound
// the kind does not use may be anything but NaN), the tolerance >= 0 and
// finite, the scale > 0 and finite or 0 (the default), the kind known.
func (c Constraint) validate() error {
	if c.Name == "" {
		return fmt.Errorf("mdo: a constraint has no name")
	}
	for _, b := range []struct {
		field string
		v     float64
	}{{"Lower", c.Lower}, {"Upper", c.Upper}, {"Tolerance", c.Tolerance}, {"Scale", c.Scale}} {
		if math.IsNaN(b.v) {
			return fmt.Errorf("mdo: constraint %s: %s = NaN, must be a finite number", c.Name, b.field)
		}
	}
	used := map[ConstraintKind][]string{LessEqual: {"Upper"}, GreaterEqual: {"Lower"}, Equal: {"Lower"}, InBand: {"Lower", "Upper"}}
	fields, ok := used[c.Kind]
	if !ok {
		return fmt.Errorf("mdo: constraint %s: Kind = %d, must be LessEqual, GreaterEqual, Equal or InBand", c.Name, int(c.Kind))
	}
	for _, f := range fields {
		v := c.Lower
		if f == "Upper" {
			v = c.Upper
		}
		if math.IsInf(v, 0) {
			return fmt.Errorf("mdo: constraint %s (%s): %s = %g, must be a finite number", c.Name, c.Kind, f, v)
		}
	}
	if c.Kind == InBand && c.Lower > c.Upper {
		return fmt.Errorf("mdo: constraint %s: band [%g, %g] has lower > upper; Lower must be <= Upper", c.Name, c.Lower, c.Upper)
	}
	if c.Tolerance < 0 || math.IsInf(c.Tolerance, 0) {
		return fmt.Errorf("mdo: constraint %s: Tolerance = %g, must be >= 0 and finite (0 means the default)", c.Name, c.Tolerance)
	}
	if c.Scale < 0 || math.IsInf(c.Scale, 0) {
		return fmt.Errorf("mdo: constraint %s: Scale = %g, must be > 0 and finite (0 means the default max(|bound|, 1))", c.Name, c.Scale)
	}
	return nil
}

// EffectiveScale returns the scale that normalises the constraint: Scale
// when set, else max(|bound|, 1).
func (c Constraint) EffectiveScale() float64 { return c.scale() }

// scale returns the normalising scale.
func (c Constraint) scale() float64 {
	if c.Scale > 0 {
		return c.Scale
	}
	switch c.Kind {
	case LessEqual:
		return math.Max(math.Abs(c.Upper), 1)
	case InBand:
		return math.Max(math.Max(math.Abs(c.Lower), math.Abs(c.Upper)), 1)
	}
	return math.Max(math.Abs(c.Lower), 1)
}

// tolerance returns the equality tolerance.
func (c Constraint) tolerance() float64 {
	if c.Tolerance > 0 {
		return c.Tolerance
	}
	return 1e-6 * c.scale()
}

// Margin returns how far value is inside the constraint (positive when
// satisfied, negative when violated), in the constraint's own unit.
func (c Constraint) Margin(value float64) float64 {
	if math.IsNaN(value) {
		return math.Inf(-1)
	}
	switch c.Kind {
	case LessEqual:
		return c.Upper - value
	case GreaterEqual:
		return value - c.Lower
	case Equal:
		return c.tolerance() - math.Abs(value-c.Lower)
	default:
		return math.Min(value-c.Lower, c.Upper-value)
	}
}

// String describes the constraint.
func (c Constraint) String() string {
	switch c.Kind {
	case LessEqual:
		return fmt.Sprintf("%s <= %g", c.Name, c.Upper)
	case GreaterEqual:
		return fmt.Sprintf("%s >= %g", c.Name, c.Lower)
	case Equal:
		return fmt.Sprintf("%s == %g ± %g", c.Name, c.Lower, c.tolerance())
	default:
		return fmt.Sprintf("%g <= %s <= %g", c.Lower, c.Name, c.Upper)
	}
}
