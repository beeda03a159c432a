// Package surrogate fits cheap models to a few costly analyses: radial
// basis function interpolation (cubic kernel with a linear tail, Powell
// 1992) and Gaussian-process regression (ordinary Kriging with a Gaussian
// correlation and one length scale per variable, hyperparameters by
// maximum likelihood, Jones, Schonlau and Welch 1998), both on gonum's
// linear algebra, both reporting their leave-one-out cross-validation
// error (Rippa 1999 for the interpolant, Dubrule 1983 for Kriging).
//
// A surrogate can stand in for a costly analysis inside a study: for one
// discipline (FitDiscipline: the same name and variables, fitted to
// samples of the discipline) or for the whole analysis (StandIn: a study
// whose system is one surrogate of the true study). Such a discipline is
// an mdo.SurrogateDiscipline, so the study's result says which of its
// numbers are estimates (mdo.Result.Surrogates, shown in the result's
// text, summary.json and the report).
//
// A surrogate's prediction is an estimate of the analysis it was fitted
// to; results found on one must be checked with the true analysis
// (Confirm does so for a stand-in's best design; the expected-improvement
// search of package optimizers does so for every point it chooses, and
// states its answer from the true analyses only).
package surrogate

import (
	"fmt"
	"math"
)

// checkData validates a training set: n ≥ min points of one dimension
// with finite values.
func checkData(what string, x [][]float64, y []float64, min int) (int, error) {
	if len(x) != len(y) {
		return 0, fmt.Errorf("surrogate: %s: %d points but %d values", what, len(x), len(y))
	}
	if len(x) < min {
		return 0, fmt.Errorf("surrogate: %s: %d points, need at least %d", what, len(x), min)
	}
	d := len(x[0])
	if d == 0 {
		return 0, fmt.Errorf("surrogate: %s: points have no coordinates", what)
	}
	for i, p := range x {
		if len(p) != d {
			return 0, fmt.Errorf("surrogate: %s: point %d has %d coordinates, point 0 has %d", what, i, len(p), d)
		}
		for k, v := range p {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return 0, fmt.Errorf("surrogate: %s: point %d coordinate %d is %g, allowed finite values", what, i, k, v)
			}
		}
		if math.IsNaN(y[i]) || math.IsInf(y[i], 0) {
			return 0, fmt.Errorf("surrogate: %s: value %d is %g, allowed finite values", what, i, y[i])
		}
	}
	return d, nil
}

// scaler maps the data's bounding box onto the unit box.
type scaler struct{ lo, span []float64 }

// newScaler returns the scaler of the bounding box of x.
func newScaler(x [][]float64) scaler {
	d := len(x[0])
	s := scaler{lo: make([]float64, d), span: make([]float64, d)}
	for k := 0; k < d; k++ {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, p := range x {
			lo, hi = math.Min(lo, p[k]), math.Max(hi, p[k])
		}
		s.lo[k], s.span[k] = lo, hi-lo
		if !(s.span[k] > 0) {
			s.span[k] = 1
		}
	}
	return s
}

// apply returns the scaled copy of p.
func (s scaler) apply(p []float64) []float64 {
	u := make([]float64, len(p))
	s.into(u, p)
	return u
}

// into writes the scaled p into u.
func (s scaler) into(u, p []float64) {
	for k := range p {
		u[k] = (p[k] - s.lo[k]) / s.span[k]
	}
}
