package sensitivity

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
)

// Morris is the elementary-effects screening of Morris (1991): R random
// one-at-a-time trajectories on a grid of Levels levels per variable, each
// of d+1 points moving every variable once by Δ = Levels/(2(Levels−1)) of
// its range. A variable's elementary effect is the change of the output
// over that step divided by Δ (so effects are in output units per whole
// range of the variable and compare across variables). Its mean absolute
// value μ* (Campolongo, Cariboni and Saltelli 2007) ranks the variables by
// importance; its standard deviation σ tells non-linear or interacting
// effects from linear ones. Zero values take the defaults.
type Morris struct {
	// Trajectories is R; default 20 (Morris 1991 and Saltelli et al.
	// 2008 suggest 10 to 50); R(d + 1) for d variables at most MaxRuns
	// (the points are drawn before the first run).
	Trajectories int
	// Levels is the number of grid levels p, even; default 4. It sizes
	// no allocation, so it has no upper limit.
	Levels int
}

// MorrisResult holds the elementary-effect statistics per variable.
type MorrisResult struct {
	// Names are the variables, in the order of the model's coordinates.
	Names []string
	// MuStar is the mean absolute elementary effect, Mu the mean and
	// Sigma the standard deviation (n − 1 divisor) of the effects.
	MuStar, Mu, Sigma []float64
	// Effects are the elementary effects found, per variable; effects
	// that needed a failed point are left out.
	Effects [][]float64
	// Runs counts the model points asked for; Failed those answered NaN.
	Runs, Failed int
	// Quantity names the screened output.
	Quantity string
}

// Screen runs the screening of a model of len(names) variables with the
// random choices drawn from seed.
func (m Morris) Screen(ctx context.Context, model Model, names []string, seed uint64) (*MorrisResult, error) {
	r, p := m.Trajectories, m.Levels
	if r == 0 {
		r = 20
	}
	if p == 0 {
		p = 4
	}
	if r < 2 {
		return nil, fmt.Errorf("sensitivity: Morris.Trajectories = %d, allowed 2 or more", r)
	}
	if p < 2 || p%2 != 0 {
		return nil, fmt.Errorf("sensitivity: Morris.Levels = %d, allowed an even number of 2 or more", p)
	}
	if model == nil {
		return nil, fmt.Errorf("sensitivity: Morris: the model is nil")
	}
	d := len(names)
	if d == 0 {
		return nil, fmt.Errorf("sensitivity: Morris: no variables named")
	}
	if runs := float64(r) * float64(d+1); runs > MaxRuns {
		return nil, fmt.Errorf("sensitivity: Morris.Trajectories = %d, allowed at most %d for %d variables: the R(d + 1) = %g points are drawn before the first run and the limit is %d runs", m.Trajectories, MaxRuns/(d+1), d, runs, MaxRuns)
	}
	if ctx == nil {
		ctx = context.Background()
	}
	delta := float64(p) / (2 * float64(p-1))
	rng := rand.New(rand.NewPCG(seed, 0x6d6f72726973))
	xs := make([][]float64, 0, r*(d+1))
	moved := make([][]int, r)
	steps := make([][]float64, r)
	for t := 0; t < r; t++ {
		x := make([]float64, d)
		step := make([]float64, d)
		for k := range x {
			// Base levels where both a step up and a step down stay on the
			// grid for p even: a step is p/2 levels.
			lvl := rng.IntN(p)
			x[k] = float64(lvl) / float64(p-1)
			if x[k]+delta <= 1+1e-12 {
				step[k] = delta
			} else {
				step[k] = -delta
			}
		}
		order := rng.Perm(d)
		moved[t] = order
		steps[t] = step
		xs = append(xs, append([]float64(nil), x...))
		for _, k := range order {
			x[k] = clamp01(x[k] + step[k])
			xs = append(xs, append([]float64(nil), x...))
		}
	}
	ys, err := model(ctx, xs)
	if err != nil {
		return nil, fmt.Errorf("sensitivity: Morris: %w", err)
	}
	if len(ys) != len(xs) {
		return nil, fmt.Errorf("sensitivity: Morris: the model answered %d of %d points", len(ys), len(xs))
	}
	res := &MorrisResult{Names: append([]string(nil), names...), MuStar: make([]float64, d), Mu: make([]float64, d),
		Sigma: make([]float64, d), Effects: make([][]float64, d), Runs: len(xs)}
	for _, y := range ys {
		if math.IsNaN(y) {
			res.Failed++
		}
	}
	for t := 0; t < r; t++ {
		base := t * (d + 1)
		for j, k := range moved[t] {
			y0, y1 := ys[base+j], ys[base+j+1]
			if math.IsNaN(y0) || math.IsNaN(y1) {
				continue
			}
			res.Effects[k] = append(res.Effects[k], (y1-y0)/steps[t][k])
		}
	}
	for k, ee := range res.Effects {
		n := float64(len(ee))
		if n == 0 {
			res.MuStar[k], res.Mu[k], res.Sigma[k] = math.NaN(), math.NaN(), math.NaN()
			continue
		}
		for _, e := range ee {
			res.Mu[k] += e / n
			res.MuStar[k] += math.Abs(e) / n
		}
		if n > 1 {
			for _, e := range ee {
				res.Sigma[k] += (e - res.Mu[k]) * (e - res.Mu[k])
			}
			res.Sigma[k] = math.Sqrt(res.Sigma[k] / (n - 1))
		}
	}
	return res, nil
}

// Ranking returns the variable indices from the most to the least
// important by μ* (variables without effects last).
func (r *MorrisResult) Ranking() []int {
	idx := make([]int, len(r.MuStar))
	for i := range idx {
		idx[i] = i
	}
	key := func(i int) float64 {
		if math.IsNaN(r.MuStar[i]) {
			return math.Inf(-1)
		}
		return r.MuStar[i]
	}
	sort.SliceStable(idx, func(a, b int) bool { return key(idx[a]) > key(idx[b]) })
	return idx
}

// String lists the variables by importance with μ*, μ and σ.
func (r *MorrisResult) String() string {
	s := fmt.Sprintf("Morris screening of %s: %d runs, %d failed\n", orName(r.Quantity), r.Runs, r.Failed)
	s += fmt.Sprintf("%-28s %12s %12s %12s %6s\n", "variable", "mu*", "mu", "sigma", "n")
	for _, i := range r.Ranking() {
		s += fmt.Sprintf("%-28s %12.4g %12.4g %12.4g %6d\n", r.Names[i], r.MuStar[i], r.Mu[i], r.Sigma[i], len(r.Effects[i]))
	}
	return s
}

// orName returns name, or "the model" when it is empty.
func orName(name string) string {
	if name == "" {
		return "the model"
	}
	return name
}

// clamp01 clips u into [0, 1].
func clamp01(u float64) float64 { return math.Max(0, math.Min(1, u)) }
