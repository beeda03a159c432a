package sensitivity

import (
	"context"
	"fmt"
	"math"
	"slices"

	"couplet/mdo"
)

// Model answers a batch of points of the unit box [0, 1]^d with one value
// per point. A point whose analysis failed is answered with NaN; the
// methods leave it out and count it.
type Model func(ctx context.Context, xs [][]float64) ([]float64, error)

// FuncModel makes a Model of a plain function of the physical values, the
// unit box being mapped onto [lower[i], upper[i]] in each variable.
func FuncModel(f func(x []float64) float64, lower, upper []float64) (Model, error) {
	if f == nil {
		return nil, fmt.Errorf("sensitivity: FuncModel: the function is nil")
	}
	if len(lower) != len(upper) || len(lower) == 0 {
		return nil, fmt.Errorf("sensitivity: FuncModel: %d lower and %d upper bounds, want the same positive number", len(lower), len(upper))
	}
	for i := range lower {
		if !(lower[i] < upper[i]) {
			return nil, fmt.Errorf("sensitivity: FuncModel: variable %d has bounds [%g, %g]; the lower must be below the upper", i, lower[i], upper[i])
		}
	}
	lo, hi := slices.Clone(lower), slices.Clone(upper)
	return func(ctx context.Context, xs [][]float64) ([]float64, error) {
		out := make([]float64, len(xs))
		p := make([]float64, len(lo))
		for i, x := range xs {
			if i%1024 == 0 {
				if err := ctx.Err(); err != nil {
					return nil, err
				}
			}
			for k := range p {
				p[k] = lo[k] + x[k]*(hi[k]-lo[k])
			}
			out[i] = f(p)
		}
		return out, nil
	}, nil
}

// StudyModel makes a Model of one quantity of a study, evaluated through
// ev (made by Study.NewEvaluator, begun or not): an objective (in its
// declared sense), a constrained quantity or an output variable of the
// system, looked up in that order. A failed analysis gives NaN. Points
// asked for again are repeats answered from the evaluator's cache, so
// several quantities screened with the same seed cost one analysis per
// point.
func StudyModel(ev *mdo.Evaluator, quantity string) (Model, error) {
	if ev == nil {
		return nil, fmt.Errorf("sensitivity: StudyModel: the evaluator is nil")
	}
	pick, err := QuantityReader(ev, quantity)
	if err != nil {
		return nil, err
	}
	return func(ctx context.Context, xs [][]float64) ([]float64, error) {
		evs, err := ev.Evaluate(ctx, xs)
		if err != nil {
			return nil, fmt.Errorf("sensitivity: %s: %w", quantity, err)
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		out := make([]float64, len(xs))
		for i, e := range evs {
			out[i] = math.NaN()
			if e != nil && e.Converged {
				out[i] = pick(e)
			}
		}
		return out, nil
	}, nil
}

// QuantityReader returns the reader of a study quantity from a converged
// evaluation of ev: an objective (in its declared sense), a constrained
// quantity or an output variable, looked up in that order; the error
// lists the quantities the study has.
func QuantityReader(ev *mdo.Evaluator, quantity string) (func(*mdo.Evaluation) float64, error) {
	var names []string
	for i, n := range ev.ObjectiveNames() {
		if n == quantity {
			return func(e *mdo.Evaluation) float64 { return at(e.Objectives, i) }, nil
		}
		names = append(names, n)
	}
	for i, c := range ev.Constraints() {
		if c.Name == quantity {
			return func(e *mdo.Evaluation) float64 { return at(e.Constraints, i) }, nil
		}
		names = append(names, c.Name)
	}
	for i, v := range ev.OutputVars() {
		if v.Name == quantity {
			return func(e *mdo.Evaluation) float64 { return at(e.Outputs, i) }, nil
		}
		names = append(names, v.Name)
	}
	return nil, fmt.Errorf("sensitivity: quantity %q is no objective, constraint or output of study %q; it has %v", quantity, ev.Study().Name, names)
}

// at returns v[i], or NaN when v is too short.
func at(v []float64, i int) float64 {
	if i < len(v) {
		return v[i]
	}
	return math.NaN()
}

// MaxRuns bounds the model runs of a screening or of Sobol' indices:
// their points are drawn before the first run, d + 3 words each (a slice
// of d values and its header), so 10⁷ points of 10 variables hold about
// 1 GB. Far more than a conceptual model is run for.
const MaxRuns = 10_000_000

// MaxResamples bounds Sobol.Resamples: every resample's first-order and
// total indices are kept for the percentile intervals (2d values), and
// each resample costs N(d + 2) operations.
const MaxResamples = 100_000
