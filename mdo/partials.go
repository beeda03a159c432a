package mdo

import (
	"fmt"
	"math"
	"strings"
)

// Differentiable is a Discipline that gives the analytic partial
// derivatives of its outputs with respect to its inputs. The total
// derivatives of a System (Workspace.Totals) use Partials where a
// discipline implements it and finite differences (FDPartials) for every
// other discipline.
//
// Partials receives the inputs in the order of Inputs and writes the
// Jacobian row-major into jac: jac[i*len(in)+j] = ∂out_i/∂in_j, for the
// outputs in the order of Outputs. jac has len(Outputs)·len(Inputs)
// entries and is zero on entry, so only the non-zero partials need be
// written. Like Compute it must not retain either slice.
type Differentiable interface {
	Discipline
	Partials(in, jac []float64) error
}

// PartialsFunc is the signature of a discipline's analytic partials (see
// Differentiable).
type PartialsFunc func(in, jac []float64) error

// FuncPartialsDiscipline is a FuncDiscipline with analytic partials.
type FuncPartialsDiscipline struct {
	*FuncDiscipline
	partials PartialsFunc
}

// WithPartials returns d with the analytic partials p: a Differentiable.
func WithPartials(d *FuncDiscipline, p PartialsFunc) *FuncPartialsDiscipline {
	return &FuncPartialsDiscipline{FuncDiscipline: d, partials: p}
}

// Partials implements Differentiable.
func (d *FuncPartialsDiscipline) Partials(in, jac []float64) error {
	if d.partials == nil {
		return fmt.Errorf("discipline %s has no partials function", d.name)
	}
	return d.partials(in, jac)
}

// Differences chooses the finite-difference formula.
type Differences int

const (
	// Central differences: (F(x+h) − F(x−h))/2h, error O(h²), two calls
	// per input. The default.
	Central Differences = iota
	// Forward differences: (F(x+h) − F(x))/h, error O(h), one call per
	// input.
	Forward
)

// String names the formula.
func (d Differences) String() string {
	if d == Forward {
		return "forward"
	}
	return "central"
}

// FDStep returns the finite-difference step of an input with
// specification v at value x:
//
//	h = r · max(|x|, scale(v)),   r = 1e-6 (forward) or 6e-6 (central),
//
// where scale(v) is the variable's Scale, else max(|Default|, 1) (the
// residual scale of the coupling solvers), and r is about the square root
// (forward) or cube root (central) of the float64 unit round-off, the
// steps that balance truncation against rounding. For a bounded variable
// the step is at most 1e-3 of its range. Near a bound the difference is
// taken one-sided, away from the bound (see FDPartials).
func FDStep(v Var, x float64, d Differences) float64 {
	r := 6e-6
	if d == Forward {
		r = 1e-6
	}
	h := r * math.Max(math.Abs(x), v.scale())
	if !v.Unbounded() && v.Max > v.Min {
		h = math.Min(h, 1e-3*(v.Max-v.Min))
	}
	return h
}

// FDPartials computes the partial derivatives of discipline d at the
// inputs in by finite differences, row-major into jac as for
// Differentiable, with steps from FDStep. out0 must hold the outputs at
// in (they are used by forward and one-sided differences); in is
// restored on return. A central difference that would leave an input's
// validity range becomes the one-sided second-order difference away from
// the limit, (−3F(x) + 4F(x±h) − F(x±2h))/(±2h); a forward step that
// would leave it is taken backwards.
func FDPartials(d Discipline, in, out0, jac []float64, how Differences) error {
	specs := d.Inputs()
	nin, nout := len(in), len(out0)
	if len(jac) != nin*nout {
		return fmt.Errorf("mdo: partials of %s: jac has %d entries, want %d×%d", d.Name(), len(jac), nout, nin)
	}
	a := make([]float64, nout)
	b := make([]float64, nout)
	call := func(dst []float64) error {
		if err := d.Compute(in, dst); err != nil {
			return err
		}
		for k, x := range dst {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return &NonFiniteError{Discipline: d.Name(), Var: d.Outputs()[k].Name, Value: x}
			}
		}
		return nil
	}
	for j := 0; j < nin; j++ {
		v := specs[j]
		x := in[j]
		h := FDStep(v, x, how)
		up := v.Unbounded() || x+2*h <= v.Max
		down := v.Unbounded() || x-2*h >= v.Min
		var err error
		switch {
		case how == Forward:
			if !up && down {
				h = -h
			}
			in[j] = x + h
			err = call(a)
			for i := 0; i < nout; i++ {
				jac[i*nin+j] = (a[i] - out0[i]) / h
			}
		case up && down:
			in[j] = x + h
			if err = call(a); err == nil {
				in[j] = x - h
				err = call(b)
			}
			for i := 0; i < nout; i++ {
				jac[i*nin+j] = (a[i] - b[i]) / (2 * h)
			}
		default:
			if !up {
				h = -h
			}
			in[j] = x + h
			if err = call(a); err == nil {
				in[j] = x + 2*h
				err = call(b)
			}
			for i := 0; i < nout; i++ {
				jac[i*nin+j] = (-3*out0[i] + 4*a[i] - b[i]) / (2 * h)
			}
		}
		in[j] = x
		if err != nil {
			return fmt.Errorf("mdo: finite differences of %s in %s = %g (step %g): %w", d.Name(), v.Name, x, h, err)
		}
	}
	return nil
}

// disciplinePartials gives the partials of d at in: analytic when d is
// Differentiable, else by finite differences.
func disciplinePartials(d Discipline, in, out0, jac []float64, how Differences) error {
	if dd, ok := d.(Differentiable); ok {
		for i := range jac {
			jac[i] = 0
		}
		if err := dd.Partials(in, jac); err != nil {
			return fmt.Errorf("mdo: partials of %s: %w", d.Name(), err)
		}
		return nil
	}
	return FDPartials(d, in, out0, jac, how)
}

// PartialsCheck compares a discipline's analytic partials with central
// finite differences (CheckPartials).
type PartialsCheck struct {
	Discipline string
	Inputs     []string
	Outputs    []string
	// Analytic and FD are the two Jacobians, row-major as for
	// Differentiable.
	Analytic, FD []float64
	// Worst is the entry with the largest relative difference
	// |analytic − fd| / max(|fd|, Floor).
	Worst PartialsEntry
}

// PartialsEntry is one entry of a partials comparison.
type PartialsEntry struct {
	Output, Input      string
	Analytic, FD       float64
	RelativeDifference float64
}

// String says the worst entry: "sellar1: worst ∂y1/∂z1 analytic 10 fd 10.0000001 (relative difference 1e-08)".
func (c *PartialsCheck) String() string {
	var b strings.Builder
	w := c.Worst
	fmt.Fprintf(&b, "%s: %d×%d partials, worst ∂%s/∂%s: analytic %.10g, finite differences %.10g (relative difference %.3g)",
		c.Discipline, len(c.Outputs), len(c.Inputs), w.Output, w.Input, w.Analytic, w.FD, w.RelativeDifference)
	return b.String()
}

// CheckPartials compares the analytic partials of d at the inputs in
// (nil: the inputs' defaults) with central finite differences and names
// the worst entry. Relative differences are taken against
// max(|fd|, floor) so that zero partials compare absolutely; floor = 0
// means 1e-8. It is an error if d is not Differentiable or an input is
// outside its range.
func CheckPartials(d Discipline, in []float64, floor float64) (*PartialsCheck, error) {
	dd, ok := d.(Differentiable)
	if !ok {
		return nil, fmt.Errorf("mdo: discipline %s has no analytic partials (it does not implement mdo.Differentiable)", d.Name())
	}
	specs, outs := d.Inputs(), d.Outputs()
	if in == nil {
		in = make([]float64, len(specs))
		for j, v := range specs {
			in[j] = v.Default
		}
	}
	if len(in) != len(specs) {
		return nil, fmt.Errorf("mdo: checking partials of %s: %d inputs given, it has %d", d.Name(), len(in), len(specs))
	}
	in = append([]float64(nil), in...)
	for j, v := range specs {
		if err := v.Check(in[j]); err != nil {
			return nil, fmt.Errorf("mdo: checking partials of %s: %w", d.Name(), err)
		}
	}
	if floor <= 0 {
		floor = 1e-8
	}
	out0 := make([]float64, len(outs))
	if err := d.Compute(in, out0); err != nil {
		return nil, fmt.Errorf("mdo: checking partials of %s: %w", d.Name(), err)
	}
	c := &PartialsCheck{Discipline: d.Name(), Analytic: make([]float64, len(outs)*len(in)), FD: make([]float64, len(outs)*len(in))}
	for _, v := range specs {
		c.Inputs = append(c.Inputs, v.Name)
	}
	for _, v := range outs {
		c.Outputs = append(c.Outputs, v.Name)
	}
	if err := dd.Partials(in, c.Analytic); err != nil {
		return nil, fmt.Errorf("mdo: partials of %s: %w", d.Name(), err)
	}
	if err := FDPartials(d, in, out0, c.FD, Central); err != nil {
		return nil, err
	}
	c.Worst.RelativeDifference = -1
	for i := range outs {
		for j := range in {
			a, f := c.Analytic[i*len(in)+j], c.FD[i*len(in)+j]
			rel := math.Abs(a-f) / math.Max(math.Abs(f), floor)
			if math.IsNaN(rel) {
				rel = math.Inf(1)
			}
			if rel > c.Worst.RelativeDifference {
				c.Worst = PartialsEntry{Output: c.Outputs[i], Input: c.Inputs[j], Analytic: a, FD: f, RelativeDifference: rel}
			}
		}
	}
	return c, nil
}
