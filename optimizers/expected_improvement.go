package optimizers

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat/distmv"
	"gonum.org/v1/gonum/stat/distuv"
	"gonum.org/v1/gonum/stat/samplemv"

	"couplet/mdo"
	"couplet/optimizers/surrogate"
)

// ExpectedImprovement is efficient global optimisation (Jones, Schonlau
// and Welch 1998) for costly analyses: after a Latin-hypercube design it
// fits Gaussian processes (package surrogate) to the objective and to
// every constraint's scaled form G, and analyses next the point that
// maximises the expected improvement over the best feasible analysed point
// times the probability that every constraint holds (Schonlau, Welch and
// Jones 1998); with no feasible point yet, the probability of feasibility
// alone. Each chosen point is analysed with the true model, so every
// number of the Result (best point, objective, constraints) comes from a
// true analysis, never from a surrogate. It refuses integer variables and
// several objectives. Zero values take the defaults.
type ExpectedImprovement struct {
	// InitialSamples is the size of the starting Latin-hypercube design;
	// default 10 per design variable, at most half of MaxEvaluations.
	InitialSamples int
	// MaxEvaluations caps the true evaluations of the whole run; default
	// 60, at most 2000 (the Gaussian processes are refitted to every
	// analysed point at each iteration, each holding at least two n × n matrices,
	// 64 MB at the limit, and costing n³ operations).
	MaxEvaluations int
	// Candidates is the number of random points the acquisition is tried
	// at before the best few are refined; default 2000, at most
	// 1 000 000 (drawn and scored at every iteration).
	Candidates int
}

// Name implements Optimizer.
func (ExpectedImprovement) Name() string { return "expected improvement" }

// validate checks the settings.
func (o ExpectedImprovement) validate() error {
	const m = "ExpectedImprovement"
	var within error
	if budget := or(o.MaxEvaluations, 60); o.InitialSamples > budget {
		within = settingError(m, "InitialSamples", o.InitialSamples, fmt.Sprintf("must be at most MaxEvaluations (%d)", budget))
	}
	return firstError(
		checkInt(m, "InitialSamples", o.InitialSamples, 3),
		checkInt(m, "MaxEvaluations", o.MaxEvaluations, 4),
		checkInt(m, "Candidates", o.Candidates, 10),
		checkMax(m, "Candidates", o.Candidates, maxCandidates, "the candidates are drawn and scored by the surrogates at every iteration"),
		checkMax(m, "MaxEvaluations", o.MaxEvaluations, maxSurrogatePoints, "the Gaussian processes are refitted to every analysed point at each iteration, each holding at least two n × n matrices (64 MB at the limit) and costing n³ operations"),
		within,
	)
}

// Minimize implements Optimizer.
func (o ExpectedImprovement) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	if err := o.validate(); err != nil {
		return nil, err
	}
	r, err := beginLocal(ctx, s, o.Name(), o, nil)
	if err != nil {
		return nil, err
	}
	d := r.ev.Dim()
	r.maxEvals = or(o.MaxEvaluations, 60)
	n0 := o.InitialSamples
	if n0 == 0 {
		n0 = min(10*d, r.maxEvals/2)
	}
	if n0 > r.maxEvals {
		n0 = r.maxEvals
	}
	seed := r.ev.Seed()
	design := mat.NewDense(n0, d, nil)
	samplemv.LatinHypercube{Q: distmv.NewUnitUniform(d, nil), Src: rand.NewPCG(seed, mix(seed, 11))}.Sample(design)
	evs, stop, err := r.evaluate(rows(design))
	if stop != mdo.NotStopped || err != nil {
		return r.finish(stop, err)
	}
	r.iteration()
	all := append([]*mdo.Evaluation(nil), evs...)
	rng := rand.New(rand.NewPCG(seed, mix(seed, 12)))
	var theta [][]float64
	for r.ev.Counters().Evaluations < r.maxEvals {
		var x []float64
		x, theta = o.next(all, d, rng, theta, seed+uint64(len(all)))
		evs, stop, err := r.evaluate([][]float64{x})
		if stop != mdo.NotStopped || err != nil {
			return r.finish(stop, err)
		}
		all = append(all, evs...)
		r.iteration()
	}
	return r.finish(mdo.StopBudget, nil)
}

// next returns the point of the unit box to analyse next, and the fitted
// θ of the objective's and the constraints' processes, the starts of the
// next fits (nil: fit afresh).
func (o ExpectedImprovement) next(all []*mdo.Evaluation, d int, rng *rand.Rand, theta [][]float64, seed uint64) ([]float64, [][]float64) {
	var xs [][]float64
	var f []float64
	var g [][]float64
	fmin, feasible := math.Inf(1), false
	for _, e := range all {
		if !e.Converged || len(e.F) == 0 {
			continue
		}
		xs = append(xs, e.X)
		f = append(f, e.F[0])
		for j := range e.G {
			if len(g) <= j {
				g = append(g, nil)
			}
			g[j] = append(g[j], e.G[j])
		}
		if e.Feasible && e.F[0] < fmin {
			fmin, feasible = e.F[0], true
		}
	}
	random := func() []float64 {
		x := make([]float64, d)
		for k := range x {
			x[k] = rng.Float64()
		}
		return x
	}
	fit := func(j int, y []float64) (*surrogate.GP, error) {
		if j < len(theta) {
			return surrogate.FitGPFrom(xs, y, theta[j], seed)
		}
		return surrogate.FitGP(xs, y, seed)
	}
	fgp, err := fit(0, f)
	if err != nil {
		return random(), nil
	}
	fitted := [][]float64{fgp.Theta()}
	var ggp []*surrogate.GP
	for j, gj := range g {
		m, err := fit(j+1, gj)
		if err != nil {
			return random(), nil
		}
		ggp = append(ggp, m)
		fitted = append(fitted, m.Theta())
	}
	norm := distuv.UnitNormal
	acq := func(x []float64) float64 {
		for _, v := range x {
			if v < 0 || v > 1 {
				return 0
			}
		}
		a := 1.0
		if feasible {
			mu, sd := fgp.Predict(x)
			imp := fmin - mu
			if sd < 1e-12 {
				a = math.Max(imp, 0)
			} else {
				z := imp / sd
				a = imp*norm.CDF(z) + sd*norm.Prob(z)
			}
		}
		for _, m := range ggp {
			mu, sd := m.Predict(x)
			if sd < 1e-12 {
				if mu > 0 {
					return 0
				}
				continue
			}
			a *= norm.CDF(-mu / sd)
		}
		return a
	}
	nc := or(o.Candidates, 2000)
	type cand struct {
		x []float64
		a float64
	}
	top := make([]cand, 0, 4)
	for i := 0; i < nc; i++ {
		x := random()
		c := cand{x, acq(x)}
		top = append(top, c)
		for k := len(top) - 1; k > 0 && top[k].a > top[k-1].a; k-- {
			top[k], top[k-1] = top[k-1], top[k]
		}
		if len(top) > 3 {
			top = top[:3]
		}
	}
	best := top[0]
	for _, c := range top {
		res, _ := optimize.Minimize(optimize.Problem{Func: func(x []float64) float64 { return -acq(x) }}, c.x,
			&optimize.Settings{FuncEvaluations: 100 * d}, &optimize.NelderMead{SimplexSize: 0.05})
		if res != nil && -res.F > best.a {
			best = cand{res.X, -res.F}
		}
	}
	x := best.x
	for k := range x {
		x[k] = clip01(x[k])
	}
	// A point already analysed would be a repeat and teach nothing: take
	// the candidate farthest from every analysed point instead.
	if nearest(x, xs) < 1e-9 {
		far, fd := x, -1.0
		for i := 0; i < 200; i++ {
			c := random()
			if dd := nearest(c, xs); dd > fd {
				far, fd = c, dd
			}
		}
		x = far
	}
	return x, fitted
}

// nearest returns the distance from x to the closest of xs.
func nearest(x []float64, xs [][]float64) float64 {
	best := math.Inf(1)
	for _, p := range xs {
		var s float64
		for k := range x {
			s += (x[k] - p[k]) * (x[k] - p[k])
		}
		best = math.Min(best, math.Sqrt(s))
	}
	return best
}

var _ Optimizer = ExpectedImprovement{}
