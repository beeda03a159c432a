package designmap

import (
	"fmt"
	"math"
	"slices"

	"couplet/mdo"
	"couplet/optimizers/surrogate"
)

// Recorded is a recorded analysis shown on a map drawn from a run's
// results: its place on the map's axes (the other design variables
// projected away), whether it was feasible and, if it failed, its class.
type Recorded struct {
	X, Y     float64
	Feasible bool
	Failure  mdo.FailureClass
}

// FromEvaluations builds the map of spec from a run's recorded
// evaluations (a design of experiments, say) without a further analysis:
// the quantity and each constraint's margin are interpolated on the grid
// by a cubic radial-basis-function interpolant (surrogate.FitRBF) through
// the converged analyses, in all the design variables, the others at
// spec.At or else at the result's best design. A grid point whose nearest
// recorded analysis (in the unit box) failed is left blank, since the
// interpolant knows nothing of failures there. The Data say so
// (Interpolated), keep the recorded points (Samples) and mark the
// result's best design, which is a true analysis, instead of a grid
// point.
func FromEvaluations(r *mdo.Result, evs []*mdo.Evaluation, spec Spec) (*Data, error) {
	if r == nil {
		return nil, fmt.Errorf("designmap: FromEvaluations: the result is nil")
	}
	n := spec.Points
	if n == 0 {
		n = 41
	}
	if n < 2 || n > 201 {
		return nil, fmt.Errorf("designmap: Spec.Points = %d, allowed 2 to 201", spec.Points)
	}
	names := make([]string, len(r.Design))
	for k, d := range r.Design {
		names[k] = d.Name
	}
	ix, iy := slices.Index(names, spec.X), slices.Index(names, spec.Y)
	if ix < 0 || iy < 0 || ix == iy {
		return nil, fmt.Errorf("designmap: axes X = %q and Y = %q must be two different design variables of study %q, which has %v", spec.X, spec.Y, r.Study, names)
	}
	q := spec.Quantity
	if q == "" && len(r.Objectives) > 0 {
		q = r.Objectives[0].Name
	}
	read, err := resultReader(r, q)
	if err != nil {
		return nil, err
	}
	base := make([]float64, len(names))
	for k, d := range r.Design {
		base[k] = (d.Lower + d.Upper) / 2
		if r.Best != nil && k < len(r.Best.Design) {
			base[k] = r.Best.Design[k]
		}
	}
	for name, v := range spec.At {
		k := slices.Index(names, name)
		if k < 0 {
			return nil, fmt.Errorf("designmap: Spec.At names %q, which is no design variable of study %q (%v)", name, r.Study, names)
		}
		if v < r.Design[k].Lower || v > r.Design[k].Upper {
			return nil, fmt.Errorf("designmap: Spec.At[%q] = %g, allowed [%g, %g]", name, v, r.Design[k].Lower, r.Design[k].Upper)
		}
		base[k] = v
	}
	unit := func(x []float64) []float64 {
		u := make([]float64, len(x))
		for k, d := range r.Design {
			u[k] = (x[k] - d.Lower) / (d.Upper - d.Lower)
		}
		return u
	}
	d := &Data{X: spec.X, Y: spec.Y, Quantity: q, Best: [2]int{-1, -1}, BestAt: [2]float64{math.NaN(), math.NaN()}, BestValue: math.NaN()}
	d.XUnit, d.YUnit, d.QuantityUnit = r.Design[ix].Unit, r.Design[iy].Unit, r.Unit(q)
	var good [][]float64
	var goodU, badU [][]float64
	var zs []float64
	margins := make([][]float64, len(r.Constraints))
	for _, e := range evs {
		if e == nil || len(e.Design) != len(names) {
			continue
		}
		s := Recorded{X: e.Design[ix], Y: e.Design[iy], Feasible: e.Feasible, Failure: mdo.ClassOf(e)}
		d.Samples = append(d.Samples, s)
		if !e.Converged {
			badU = append(badU, unit(e.Design))
			continue
		}
		v := read(e)
		if math.IsNaN(v) || math.IsInf(v, 0) || len(e.Margins) < len(r.Constraints) {
			continue
		}
		good = append(good, e.Design)
		goodU = append(goodU, unit(e.Design))
		zs = append(zs, v)
		for c := range margins {
			margins[c] = append(margins[c], e.Margins[c])
		}
	}
	fits, err := surrogate.FitRBFs(good, append([][]float64{zs}, margins...))
	if err != nil {
		return nil, fmt.Errorf("designmap: FromEvaluations: %d converged analyses of %d recorded: %w", len(good), len(evs), err)
	}
	fit, fits := fits[0], fits[1:]
	lo, hi := r.Design[ix], r.Design[iy]
	for i := 0; i < n; i++ {
		t := float64(i) / float64(n-1)
		d.Xs = append(d.Xs, lo.Lower+t*(lo.Upper-lo.Lower))
		d.Ys = append(d.Ys, hi.Lower+t*(hi.Upper-hi.Lower))
	}
	for _, c := range r.Constraints {
		d.Constraints = append(d.Constraints, c.Name)
	}
	d.allocate(n)
	blank := 0
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			x := slices.Clone(base)
			x[ix], x[iy] = d.Xs[i], d.Ys[j]
			if nearestFailed(unit(x), goodU, badU) {
				blank++
				continue
			}
			d.Z[j][i] = fit.Predict(x)
			for c := range d.Margins {
				d.Margins[c][j][i] = fits[c].Predict(x)
			}
		}
	}
	if r.Best != nil && r.Best.Converged && len(r.Best.Design) == len(names) {
		d.BestAt = [2]float64{r.Best.Design[ix], r.Best.Design[iy]}
		d.BestValue = read(r.Best)
		d.BestFeasible = r.Best.Feasible
	}
	d.Interpolated = fmt.Sprintf("interpolated by a cubic radial-basis function through %d converged of %d recorded analyses (leave-one-out RMS error %s), not analysed on the grid", len(good), len(evs), withUnit(fit.LOOError(), d.QuantityUnit))
	if blank > 0 {
		d.Interpolated += fmt.Sprintf("; %d grid points left blank, their nearest recorded analysis failed", blank)
	}
	return d, nil
}

// nearestFailed reports whether the point nearest u among the converged
// (good) and failed (bad) points is a failed one.
func nearestFailed(u []float64, good, bad [][]float64) bool {
	near := func(ps [][]float64) float64 {
		best := math.Inf(1)
		for _, p := range ps {
			var s float64
			for k := range p {
				s += (p[k] - u[k]) * (p[k] - u[k])
			}
			best = math.Min(best, s)
		}
		return best
	}
	return len(bad) > 0 && near(bad) < near(good)
}

// resultReader returns the reader of a quantity from an evaluation of a
// run: an objective (as declared), a constrained quantity or an output.
func resultReader(r *mdo.Result, q string) (func(*mdo.Evaluation) float64, error) {
	var names []string
	for i, o := range r.Objectives {
		if o.Name == q {
			return func(e *mdo.Evaluation) float64 { return at(e.Objectives, i) }, nil
		}
		names = append(names, o.Name)
	}
	for i, c := range r.Constraints {
		if c.Name == q {
			return func(e *mdo.Evaluation) float64 { return at(e.Constraints, i) }, nil
		}
		names = append(names, c.Name)
	}
	for i, v := range r.Outputs {
		if v.Name == q {
			return func(e *mdo.Evaluation) float64 { return at(e.Outputs, i) }, nil
		}
		names = append(names, v.Name)
	}
	return nil, fmt.Errorf("designmap: quantity %q is no objective, constraint or output of study %q; it has %v", q, r.Study, names)
}

// at returns v[i], or NaN when v is too short.
func at(v []float64, i int) float64 {
	if i < len(v) {
		return v[i]
	}
	return math.NaN()
}

// withUnit formats a value with its unit, if any.
func withUnit(v float64, unit string) string {
	if unit == "" || unit == "-" {
		return fmt.Sprintf("%.3g", v)
	}
	return fmt.Sprintf("%.3g %s", v, unit)
}
