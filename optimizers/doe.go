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
	return runDesign(ctx, s, o.Name(), o, "Halton", o.Samples, o.BatchSize, func(n, d int, seed uint64) ([][]float64, error) {
		if d > 1000 {
			return nil, fmt.Errorf("optimizers: Halton handles at most 1000 variables, the study has %d", d)
		}
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
	if err := checkInt("FullFactorial", "Levels", o.Levels, 1); err != nil {
		return nil, err
	}
	if err := checkInt("FullFactorial", "MaxPoints", o.MaxPoints, 1); err != nil {
		return nil, err
	}
	for _, name := range sortedKeys(o.VariableLevels) {
		if l := o.VariableLevels[name]; l < 1 {
			return nil, settingError("FullFactorial", "VariableLevels["+name+"]", l, "must be >= 1")
		}
	}
	var specs []mdo.DesignSpec
	gen := func(_, d int, _ uint64) ([][]float64, error) {
		names := make([]string, len(specs))
		for k, sp := range specs {
			names[k] = sp.Name
		}
		for _, name := range sortedKeys(o.VariableLevels) {
			if !slices.Contains(names, name) {
				return nil, settingError("FullFactorial", "VariableLevels["+name+"]", o.VariableLevels[name],
					fmt.Sprintf("names no design variable of the study; allowed: %s", strings.Join(names, ", ")))
			}
		}
		levels := make([]int, d)
		total := 1.0
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
		}
		if max := float64(or(o.MaxPoints, 100000)); total > max {
			return nil, fmt.Errorf("optimizers: FullFactorial: %v levels give %g points, more than MaxPoints = %g", levels, total, max)
		}
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
	return runDesignSpecs(ctx, s, o.Name(), o, "FullFactorial", 0, false, o.BatchSize, &specs, gen)
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

// runDesignSpecs evaluates a design; when hasSamples is false the
// generator chooses the number of points; specs, when not nil, receives
// the design variables before gen is called.
func runDesignSpecs(ctx context.Context, s *mdo.Study, name string, settings any, method string, samples int, hasSamples bool, batch int, specs *[]mdo.DesignSpec, gen designFunc) (*mdo.Result, error) {
	if hasSamples {
		if err := checkInt(method, "Samples", samples, 1); err != nil {
			return nil, err
		}
	}
	if err := checkInt(method, "BatchSize", batch, 1); err != nil {
		return nil, err
	}
	r, err := begin(ctx, s, name, settings)
	if err != nil {
		return nil, err
	}
	if specs != nil {
		*specs = r.ev.DesignSpecs()
	}
	xs, err := gen(or(samples, 100), r.ev.Dim(), r.ev.Seed())
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
