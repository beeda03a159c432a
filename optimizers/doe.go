package optimizers

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distmv"
	"gonum.org/v1/gonum/stat/samplemv"

	"couplet/mdo"
)

// Designs of experiments evaluate a fixed set of points of the unit box,
// in batches of BatchSize (one progress report each), and return the best
// point by Deb's rules and, for two or more objectives, the front of the
// feasible non-dominated points. They accept integer design variables
// (the Evaluator rounds them, so repeated points come from the cache).

// defaultBatch is the default number of points evaluated per batch.
const defaultBatch = 256

// RandomDesign draws Samples points uniformly from the unit box with a
// generator seeded from the study's seed. Zero values take the defaults.
type RandomDesign struct {
	// Samples is the number of points; default 100.
	Samples int
	// BatchSize is the number of points per batch; default 256.
	BatchSize int
}

// Name implements Optimizer.
func (RandomDesign) Name() string { return "random design" }

// Minimize implements Optimizer.
func (o RandomDesign) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	return runDesign(ctx, s, o.Name(), o, "RandomDesign", o.Samples, o.BatchSize, func(n, d int, seed uint64) ([][]float64, error) {
		rng := rand.New(rand.NewPCG(seed, mix(seed, 5)))
		xs := make([][]float64, n)
		for i := range xs {
			xs[i] = make([]float64, d)
			for k := range xs[i] {
				xs[i][k] = rng.Float64()
			}
		}
		return xs, nil
	})
}

// LatinHypercube is a Latin hypercube design (gonum's
// stat/samplemv.LatinHypercube): each variable's range is cut into
// Samples equal strata and each stratum holds exactly one point. Zero
// values take the defaults.
type LatinHypercube struct {
	// Samples is the number of points; default 100.
	Samples int
	// BatchSize is the number of points per batch; default 256.
	BatchSize int
}

// Name implements Optimizer.
func (LatinHypercube) Name() string { return "Latin hypercube" }

// Minimize implements Optimizer.
func (o LatinHypercube) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	return runDesign(ctx, s, o.Name(), o, "LatinHypercube", o.Samples, o.BatchSize, func(n, d int, seed uint64) ([][]float64, error) {
		src := rand.NewPCG(seed, mix(seed, 6))
		batch := mat.NewDense(n, d, nil)
		samplemv.LatinHypercube{Q: distmv.NewUnitUniform(d, nil), Src: src}.Sample(batch)
		return rows(batch), nil
	})
}

// maxHaltonDim is the most variables a Halton sequence handles (gonum's
// samplemv.Halton has the first 1000 primes).
const maxHaltonDim = 1000

// Halton is a scrambled Halton sequence (gonum's stat/samplemv.Halton,
// Owen's randomised van der Corput scrambling seeded from the study's
// seed): a low-discrepancy design. Zero values take the defaults.
type Halton struct {
	// Samples is the number of points; default 100.
	Samples int
	// BatchSize is the number of points per batch; default 256.
	BatchSize int
}

// Name implements Optimizer.
func (Halton) Name() string { return "Halton" }

// Minimize implements Optimizer.
func (o Halton) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	plan := func(specs []mdo.DesignSpec) (int, error) {
		if len(specs) > maxHaltonDim {
			return 0, fmt.Errorf("optimizers: Halton handles at most %d variables, the study has %d; use LatinHypercube or RandomDesign", maxHaltonDim, len(specs))
		}
		return or(o.Samples, 100), nil
	}
	return runDesignSpecs(ctx, s, o.Name(), o, "Halton", o.Samples, true, o.BatchSize, plan, func(n, d int, seed uint64) ([][]float64, error) {
		src := rand.NewPCG(seed, mix(seed, 7))
		batch := mat.NewDense(n, d, nil)
		samplemv.Halton{Kind: samplemv.Owen, Q: distmv.NewUnitUniform(d, nil), Src: src}.Sample(batch)
		return rows(batch), nil
	})
}

// FullFactorial evaluates every combination of equally spaced levels of
// the variables, bounds included (one level means the middle). An integer
// variable takes each of its whole values unless Levels or VariableLevels
// sets fewer. Zero values take the defaults.
type FullFactorial struct {
	// Levels per variable; default 3.
	Levels int
	// VariableLevels overrides Levels by design-variable name.
	VariableLevels map[string]int
	// MaxPoints refuses a design larger than this; default 100 000.
	MaxPoints int
	// BatchSize is the number of points per batch; default 256.
	BatchSize int
}

// Name implements Optimizer.
func (FullFactorial) Name() string { return "full factorial" }

// Minimize implements Optimizer.
func (o FullFactorial) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	const m = "FullFactorial"
	if err := firstError(
		checkInt(m, "Levels", o.Levels, 1),
		checkInt(m, "MaxPoints", o.MaxPoints, 1),
		checkMax(m, "MaxPoints", o.MaxPoints, maxDesignPoints, designPointsWhy),
	); err != nil {
		return nil, err
	}
	for _, name := range sortedKeys(o.VariableLevels) {
		if l := o.VariableLevels[name]; l < 1 {
			return nil, settingError(m, "VariableLevels["+name+"]", l, "must be >= 1")
		}
	}
	var levels []int
	plan := func(specs []mdo.DesignSpec) (int, error) {
		names := make([]string, len(specs))
		for k, sp := range specs {
			names[k] = sp.Name
		}
		for _, name := range sortedKeys(o.VariableLevels) {
			if !slices.Contains(names, name) {
				return 0, settingError(m, "VariableLevels["+name+"]", o.VariableLevels[name],
					fmt.Sprintf("names no design variable of the study; allowed: %s", strings.Join(names, ", ")))
			}
		}
		levels = make([]int, len(specs))
		total := 1.0
		each, factors := make([]string, len(specs)), make([]string, len(specs))
		for k, sp := range specs {
			l, set := o.VariableLevels[sp.Name]
			if !set {
				l = or(o.Levels, 3)
				if sp.Integer {
					if n := int(sp.Upper-sp.Lower) + 1; o.Levels == 0 || n < l {
						l = n
					}
				}
			}
			levels[k] = l
			total *= float64(l)
			each[k], factors[k] = fmt.Sprintf("%s %d", sp.Name, l), fmt.Sprint(l)
		}
		if max := float64(or(o.MaxPoints, 100000)); total > max {
			return 0, fmt.Errorf("optimizers: FullFactorial: the levels (%s) give %s = %.4g points, more than MaxPoints = %d (at most %d: %s); lower Levels or VariableLevels",
				strings.Join(each, ", "), strings.Join(factors, " × "), total, int(max), maxDesignPoints, designPointsWhy)
		}
		return int(total), nil
	}
	gen := func(_, d int, _ uint64) ([][]float64, error) {
		xs := [][]float64{make([]float64, 0, d)}
		for k := 0; k < d; k++ {
			var next [][]float64
			for _, x := range xs {
				for j := 0; j < levels[k]; j++ {
					u := 0.5
					if levels[k] > 1 {
						u = float64(j) / float64(levels[k]-1)
					}
					next = append(next, append(append(make([]float64, 0, d), x...), u))
				}
			}
			xs = next
		}
		return xs, nil
	}
	return runDesignSpecs(ctx, s, o.Name(), o, m, 0, false, o.BatchSize, plan, gen)
}

// sortedKeys returns the keys of m in order, so that the first bad one
// reported does not depend on the map's order.
func sortedKeys(m map[string]int) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// rows copies the rows of a matrix.
func rows(m *mat.Dense) [][]float64 {
	n, _ := m.Dims()
	out := make([][]float64, n)
	for i := range out {
		out[i] = append([]float64(nil), m.RawRowView(i)...)
	}
	return out
}

// designFunc generates n points of a d-dimensional unit box from a seed.
type designFunc func(n, d int, seed uint64) ([][]float64, error)

// runDesign evaluates a design of samples points.
func runDesign(ctx context.Context, s *mdo.Study, name string, settings any, method string, samples, batch int, gen designFunc) (*mdo.Result, error) {
	return runDesignSpecs(ctx, s, name, settings, method, samples, true, batch, nil, gen)
}

// designPointsWhy says why a design's points are bounded.
const designPointsWhy = "every point is drawn before the first evaluation, a slice of 8 bytes a variable"

// runDesignSpecs evaluates a design; when hasSamples is false the
// generator chooses the number of points, which plan returns from the
// design variables before the run begins.
func runDesignSpecs(ctx context.Context, s *mdo.Study, name string, settings any, method string, samples int, hasSamples bool, batch int, plan func([]mdo.DesignSpec) (int, error), gen designFunc) (*mdo.Result, error) {
	if hasSamples {
		if err := firstError(
			checkInt(method, "Samples", samples, 1),
			checkMax(method, "Samples", samples, maxDesignPoints, designPointsWhy),
		); err != nil {
			return nil, err
		}
	}
	if err := firstError(
		checkInt(method, "BatchSize", batch, 1),
		checkMax(method, "BatchSize", batch, maxBatch, "a batch's evaluations, each with every output of the system, are held together"),
	); err != nil {
		return nil, err
	}
	n := or(samples, 100)
	check := func(ev *mdo.Evaluator) error {
		if plan != nil {
			var err error
			if n, err = plan(ev.DesignSpecs()); err != nil {
				return err
			}
		}
		if bytes := float64(n) * float64(ev.Dim()) * 8; bytes > maxDesignBytes {
			setting := "Samples"
			if !hasSamples {
				setting = "MaxPoints"
			}
			return fmt.Errorf("optimizers: %s: %d points of %d variables take %.3g GB, more than the limit of %.3g GB (every point is drawn before the first evaluation); lower %s", method, n, ev.Dim(), bytes/1e9, maxDesignBytes/1e9, setting)
		}
		return nil
	}
	r, err := beginChecked(ctx, s, name, settings, check)
	if err != nil {
		return nil, err
	}
	xs, err := gen(n, r.ev.Dim(), r.ev.Seed())
	if err != nil {
		return nil, err
	}
	b := or(batch, defaultBatch)
	for start := 0; start < len(xs); start += b {
		end := int(math.Min(float64(start+b), float64(len(xs))))
		_, stop, err := r.evaluate(xs[start:end])
		if stop != mdo.NotStopped || err != nil {
			return r.finish(stop, err)
		}
		r.iteration()
	}
	return r.finish(mdo.StopComplete, nil)
}
