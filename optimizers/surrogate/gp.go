package surrogate

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
)

// GP is a fitted Gaussian process (ordinary Kriging): a constant mean and
// the correlation R(x, x') = exp(−Σ θ_k (x_k − x'_k)²) on inputs scaled to
// the data's bounding box, outputs standardised. The θ_k maximise the
// concentrated likelihood −(n/2) ln σ̂² − ½ ln|R| (Jones, Schonlau and
// Welch 1998, eqs. 4–6) over 10^−3 ≤ θ_k ≤ 10^3, by Nelder–Mead from
// several starts.
type GP struct {
	sc      scaler
	x       [][]float64
	theta   []float64
	chol    mat.Cholesky
	alpha   *mat.VecDense // R⁻¹(y − μ1)
	rinv1   *mat.VecDense // R⁻¹1
	one     float64       // 1'R⁻¹1
	mu, s2  float64       // mean and process variance, standardised
	ym, ys  float64       // output standardisation
	nugget  float64
	logLik  float64
	looRMS  float64
	looTrue []float64
}

// FitGP fits a Gaussian process to the values y at the points x (at
// least 3 points); seed draws the likelihood search's extra starts.
func FitGP(x [][]float64, y []float64, seed uint64) (*GP, error) {
	return fitGP(x, y, nil, 3, seed)
}

// FitGPFrom is FitGP with the likelihood search started from theta (one
// θ_k per variable, as returned by Theta of an earlier fit, for example on
// fewer points) and from one random start.
func FitGPFrom(x [][]float64, y []float64, theta []float64, seed uint64) (*GP, error) {
	if len(x) > 0 && len(theta) != len(x[0]) {
		return nil, fmt.Errorf("surrogate: FitGPFrom: %d starting theta for %d variables", len(theta), len(x[0]))
	}
	for k, v := range theta {
		if !(v > 0) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("surrogate: FitGPFrom: theta[%d] = %g, allowed finite positive values", k, v)
		}
	}
	return fitGP(x, y, theta, 1, seed)
}

// fitGP fits from theta (nil: θ = 1) and extra random starts.
func fitGP(x [][]float64, y []float64, theta []float64, extra int, seed uint64) (*GP, error) {
	d, err := checkData("FitGP", x, y, 3)
	if err != nil {
		return nil, err
	}
	g := &GP{sc: newScaler(x)}
	for _, p := range x {
		g.x = append(g.x, g.sc.apply(p))
	}
	n := float64(len(y))
	for _, v := range y {
		g.ym += v / n
	}
	for _, v := range y {
		g.ys += (v - g.ym) * (v - g.ym) / n
	}
	g.ys = math.Sqrt(g.ys)
	if !(g.ys > 0) {
		g.ys = 1
	}
	ys := make([]float64, len(y))
	for i, v := range y {
		ys[i] = (v - g.ym) / g.ys
	}
	yv := mat.NewVecDense(len(ys), ys)
	negLik := func(p []float64) float64 {
		for _, v := range p {
			if v < -3 || v > 3 {
				return 1e10 + 1e3*sumOutside(p)
			}
		}
		th := make([]float64, d)
		for k, v := range p {
			th[k] = math.Pow(10, v)
		}
		var tmp GP
		tmp.x, tmp.theta = g.x, th
		if err := tmp.factor(yv); err != nil {
			return 1e10
		}
		return -tmp.logLik
	}
	rng := rand.New(rand.NewPCG(seed, 0x6b7269676967))
	p0 := make([]float64, d)
	for k, v := range theta {
		p0[k] = math.Max(-3, math.Min(3, math.Log10(v)))
	}
	starts := [][]float64{p0}
	for s := 0; s < extra; s++ {
		p := make([]float64, d)
		for k := range p {
			p[k] = -2 + 4*rng.Float64()
		}
		starts = append(starts, p)
	}
	best, bestF := starts[0], math.Inf(1)
	for _, p0 := range starts {
		res, err := optimize.Minimize(optimize.Problem{Func: negLik}, p0,
			&optimize.Settings{FuncEvaluations: 100 * d, Converger: &optimize.FunctionConverge{Absolute: 1e-6, Iterations: 20 * d}},
			&optimize.NelderMead{})
		if err != nil && res == nil {
			continue
		}
		if res.F < bestF {
			best, bestF = res.X, res.F
		}
	}
	g.theta = make([]float64, d)
	for k, v := range best {
		g.theta[k] = math.Pow(10, math.Max(-3, math.Min(3, v)))
	}
	if err := g.factor(yv); err != nil {
		return nil, fmt.Errorf("surrogate: FitGP: %w", err)
	}
	g.loo(ys)
	return g, nil
}

// sumOutside measures how far p lies outside [−3, 3]^d.
func sumOutside(p []float64) float64 {
	var s float64
	for _, v := range p {
		s += math.Max(0, math.Abs(v)-3)
	}
	return s
}

// corr returns the correlation of two scaled points.
func (g *GP) corr(a, b []float64) float64 {
	var s float64
	for k := range a {
		t := a[k] - b[k]
		s += g.theta[k] * t * t
	}
	return math.Exp(-s)
}

// factor builds and factors R for the current θ, with a nugget grown from
// 1e−10 until the factorisation succeeds, and sets μ, σ² and the
// likelihood.
func (g *GP) factor(y *mat.VecDense) error {
	n := len(g.x)
	r := mat.NewSymDense(n, nil)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			r.SetSym(i, j, g.corr(g.x[i], g.x[j]))
		}
	}
	ok := false
	for g.nugget = 1e-10; g.nugget < 1e-2; g.nugget *= 10 {
		rn := mat.NewSymDense(n, nil)
		rn.CopySym(r)
		for i := 0; i < n; i++ {
			rn.SetSym(i, i, 1+g.nugget)
		}
		if g.chol.Factorize(rn) {
			ok = true
			break
		}
	}
	if !ok {
		return fmt.Errorf("the correlation matrix of %d points is not positive definite (points repeated?)", n)
	}
	ones := mat.NewVecDense(n, nil)
	for i := 0; i < n; i++ {
		ones.SetVec(i, 1)
	}
	g.rinv1 = mat.NewVecDense(n, nil)
	if err := g.chol.SolveVecTo(g.rinv1, ones); err != nil {
		return err
	}
	g.one = mat.Dot(ones, g.rinv1)
	g.mu = mat.Dot(g.rinv1, y) / g.one
	res := mat.NewVecDense(n, nil)
	res.AddScaledVec(y, -g.mu, ones)
	g.alpha = mat.NewVecDense(n, nil)
	if err := g.chol.SolveVecTo(g.alpha, res); err != nil {
		return err
	}
	g.s2 = mat.Dot(res, g.alpha) / float64(n)
	if !(g.s2 > 0) {
		g.s2 = 1e-300
	}
	g.logLik = -0.5*float64(n)*math.Log(g.s2) - 0.5*g.chol.LogDet()
	return nil
}

// loo sets the leave-one-out residuals of ordinary Kriging (Dubrule
// 1983): e_i = [R⁻¹(y − μ1)]_i / [K⁻¹]_ii, where K⁻¹ = R⁻¹ −
// R⁻¹1 1'R⁻¹/(1'R⁻¹1) is the block of the inverse of the system with the
// mean's equation, so the mean is re-estimated without point i; in output
// units.
func (g *GP) loo(ys []float64) {
	n := len(ys)
	var inv mat.SymDense
	if err := g.chol.InverseTo(&inv); err != nil {
		g.looRMS = math.NaN()
		return
	}
	var ss float64
	g.looTrue = make([]float64, n)
	for i := 0; i < n; i++ {
		ri := g.rinv1.AtVec(i)
		e := g.alpha.AtVec(i) / (inv.At(i, i) - ri*ri/g.one) * g.ys
		g.looTrue[i] = e
		ss += e * e
	}
	g.looRMS = math.Sqrt(ss / float64(n))
}

// Predict returns the mean and the standard deviation of the prediction
// at x (Jones, Schonlau and Welch 1998, eqs. 7 and 9).
func (g *GP) Predict(x []float64) (mean, sd float64) {
	u := g.sc.apply(x)
	n := len(g.x)
	r := mat.NewVecDense(n, nil)
	for i, p := range g.x {
		r.SetVec(i, g.corr(u, p))
	}
	mean = g.mu + mat.Dot(r, g.alpha)
	rinvr := mat.NewVecDense(n, nil)
	if err := g.chol.SolveVecTo(rinvr, r); err != nil {
		return mean*g.ys + g.ym, math.NaN()
	}
	t := 1 - mat.Dot(r, g.rinv1)
	v := g.s2 * (1 - mat.Dot(r, rinvr) + t*t/g.one)
	if v < 0 {
		v = 0
	}
	return mean*g.ys + g.ym, math.Sqrt(v) * g.ys
}

// estimate returns the mean prediction at x, with u (len(x)) as scratch
// space for the scaled point: it allocates nothing.
func (g *GP) estimate(x, u []float64) float64 {
	g.sc.into(u, x)
	mean := g.mu
	for i, p := range g.x {
		mean += g.corr(u, p) * g.alpha.AtVec(i)
	}
	return mean*g.ys + g.ym
}

// Theta returns the fitted θ_k of the scaled inputs.
func (g *GP) Theta() []float64 { return append([]float64(nil), g.theta...) }

// LogLikelihood returns the concentrated log-likelihood at the fitted θ.
func (g *GP) LogLikelihood() float64 { return g.logLik }

// LOOError returns the root-mean-square leave-one-out cross-validation
// error, in output units.
func (g *GP) LOOError() float64 { return g.looRMS }

// LOOResiduals returns the leave-one-out residuals (value minus the
// prediction from the other points), in output units.
func (g *GP) LOOResiduals() []float64 { return append([]float64(nil), g.looTrue...) }

// String summarises the fit.
func (g *GP) String() string {
	return fmt.Sprintf("Gaussian process on %d points: theta %.4g, log-likelihood %.4g, leave-one-out RMS error %.4g", len(g.x), g.theta, g.logLik, g.looRMS)
}
