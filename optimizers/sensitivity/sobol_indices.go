package sensitivity

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
)

// Sobol estimates Sobol' variance-based indices: the first-order index
// S_i (the share of the output variance explained by variable i alone) by
// the estimator of Saltelli et al. (2010, table 2, (b)), and the total
// index ST_i (the share involving variable i at all) by Jansen's (1999)
// estimator, from N base points of a 2d-dimensional Sobol' sequence (the
// matrices A and B) and the d matrices A_B^i: N(d+2) model runs. The
// confidence intervals are percentile bootstrap intervals (Efron and
// Tibshirani 1993) over the N base rows. Zero values take the defaults.
type Sobol struct {
	// N is the number of base points; default 4096. A power of two keeps
	// the sequence balanced. N(d + 2) for d variables at most MaxRuns
	// (the points are drawn before the first run).
	N int
	// Resamples is the number of bootstrap resamples; default 500, at
	// most MaxResamples.
	Resamples int
	// Confidence is the level of the intervals; default 0.95.
	Confidence float64
}

// SobolResult holds the indices and their intervals per variable.
type SobolResult struct {
	// Names are the variables, in the order of the model's coordinates.
	Names []string
	// S1 and ST are the first-order and total indices; S1Low/S1High and
	// STLow/STHigh their confidence intervals.
	S1, S1Low, S1High []float64
	ST, STLow, STHigh []float64
	// Confidence is the level of the intervals.
	Confidence float64
	// Variance is the output variance estimated from A and B.
	Variance float64
	// Runs counts the model points asked for; Failed the base rows left
	// out because one of their points failed.
	Runs, Failed int
	// Quantity names the analysed output.
	Quantity string
}

// Indices estimates the indices of a model of len(names) variables; seed
// drives the bootstrap (the Sobol' sequence itself is deterministic).
func (o Sobol) Indices(ctx context.Context, model Model, names []string, seed uint64) (*SobolResult, error) {
	n, nb, conf := o.N, o.Resamples, o.Confidence
	if n == 0 {
		n = 4096
	}
	if nb == 0 {
		nb = 500
	}
	if conf == 0 {
		conf = 0.95
	}
	switch {
	case n < 2:
		return nil, fmt.Errorf("sensitivity: Sobol.N = %d, allowed 2 or more", n)
	case nb < 10:
		return nil, fmt.Errorf("sensitivity: Sobol.Resamples = %d, allowed 10 or more", nb)
	case !(conf > 0 && conf < 1):
		return nil, fmt.Errorf("sensitivity: Sobol.Confidence = %g, allowed strictly between 0 and 1", conf)
	case model == nil:
		return nil, fmt.Errorf("sensitivity: Sobol: the model is nil")
	}
	d := len(names)
	if d == 0 || 2*d > MaxSobolDim {
		return nil, fmt.Errorf("sensitivity: Sobol: %d variables, allowed 1 to %d", d, MaxSobolDim/2)
	}
	if runs := float64(n) * float64(d+2); runs > MaxRuns {
		return nil, fmt.Errorf("sensitivity: Sobol.N = %d, allowed at most %d for %d variables: the N(d + 2) = %g points are drawn before the first run and the limit is %d runs", o.N, MaxRuns/(d+2), d, runs, MaxRuns)
	}
	if nb > MaxResamples {
		return nil, fmt.Errorf("sensitivity: Sobol.Resamples = %d, allowed at most %d: every resample's indices are kept for the percentiles and each costs N(d + 2) operations", nb, MaxResamples)
	}
	if ctx == nil {
		ctx = context.Background()
	}
	seq, err := NewSobolSequence(2 * d)
	if err != nil {
		return nil, err
	}
	base := seq.Points(n)
	xs := make([][]float64, 0, n*(d+2))
	for _, p := range base {
		xs = append(xs, p[:d:d])
	}
	for _, p := range base {
		xs = append(xs, p[d:])
	}
	for i := 0; i < d; i++ {
		for _, p := range base {
			x := append([]float64(nil), p[:d]...)
			x[i] = p[d+i]
			xs = append(xs, x)
		}
	}
	ys, err := model(ctx, xs)
	if err != nil {
		return nil, fmt.Errorf("sensitivity: Sobol: %w", err)
	}
	if len(ys) != len(xs) {
		return nil, fmt.Errorf("sensitivity: Sobol: the model answered %d of %d points", len(ys), len(xs))
	}
	// Rows of (f(A), f(B), f(A_B^1..d)) with no failed point.
	var rows [][]float64
	for j := 0; j < n; j++ {
		row := make([]float64, d+2)
		ok := true
		for c := range row {
			row[c] = ys[c*n+j]
			if math.IsNaN(row[c]) || math.IsInf(row[c], 0) {
				ok = false
			}
		}
		if ok {
			rows = append(rows, row)
		}
	}
	res := &SobolResult{Names: append([]string(nil), names...), Confidence: conf, Runs: len(xs), Failed: n - len(rows)}
	if len(rows) < 2 {
		return nil, fmt.Errorf("sensitivity: Sobol: only %d of %d base rows have no failed point", len(rows), n)
	}
	all := make([]int, len(rows))
	for i := range all {
		all[i] = i
	}
	var s1, st []float64
	s1, st, res.Variance = sobolEstimate(rows, all, d)
	if !(res.Variance > 0) {
		return nil, fmt.Errorf("sensitivity: Sobol: the output does not vary (variance %g)", res.Variance)
	}
	res.S1, res.ST = s1, st
	rng := rand.New(rand.NewPCG(seed, 0x736f626f6c))
	bs1 := make([][]float64, d)
	bst := make([][]float64, d)
	pick := make([]int, len(rows))
	for b := 0; b < nb; b++ {
		if b%50 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		for i := range pick {
			pick[i] = rng.IntN(len(rows))
		}
		a1, at, _ := sobolEstimate(rows, pick, d)
		for i := 0; i < d; i++ {
			bs1[i] = append(bs1[i], a1[i])
			bst[i] = append(bst[i], at[i])
		}
	}
	lo, hi := (1-conf)/2, 1-(1-conf)/2
	for i := 0; i < d; i++ {
		res.S1Low = append(res.S1Low, quantile(bs1[i], lo))
		res.S1High = append(res.S1High, quantile(bs1[i], hi))
		res.STLow = append(res.STLow, quantile(bst[i], lo))
		res.STHigh = append(res.STHigh, quantile(bst[i], hi))
	}
	return res, nil
}

// sobolEstimate returns the indices from the chosen rows.
func sobolEstimate(rows [][]float64, pick []int, d int) (s1, st []float64, variance float64) {
	n := float64(len(pick))
	var mean float64
	for _, j := range pick {
		mean += (rows[j][0] + rows[j][1]) / (2 * n)
	}
	for _, j := range pick {
		a, b := rows[j][0]-mean, rows[j][1]-mean
		variance += (a*a + b*b) / (2*n - 1)
	}
	s1 = make([]float64, d)
	st = make([]float64, d)
	for i := 0; i < d; i++ {
		var v1, vt float64
		for _, j := range pick {
			fa, fb, fab := rows[j][0], rows[j][1], rows[j][2+i]
			v1 += fb * (fab - fa)
			vt += (fa - fab) * (fa - fab)
		}
		s1[i] = v1 / n / variance
		st[i] = vt / (2 * n) / variance
	}
	return s1, st, variance
}

// quantile returns the q-quantile of v by linear interpolation (v is
// sorted in place).
func quantile(v []float64, q float64) float64 {
	sort.Float64s(v)
	h := q * float64(len(v)-1)
	i := int(math.Floor(h))
	if i+1 >= len(v) {
		return v[len(v)-1]
	}
	return v[i] + (h-float64(i))*(v[i+1]-v[i])
}

// String lists the indices with their intervals.
func (r *SobolResult) String() string {
	s := fmt.Sprintf("Sobol' indices of %s: %d runs, %d base rows left out, %g%% intervals\n", orName(r.Quantity), r.Runs, r.Failed, 100*r.Confidence)
	s += fmt.Sprintf("%-28s %8s %19s %8s %19s\n", "variable", "S1", "interval", "ST", "interval")
	for i, n := range r.Names {
		s += fmt.Sprintf("%-28s %8.4f [%8.4f, %8.4f] %8.4f [%8.4f, %8.4f]\n", n, r.S1[i], r.S1Low[i], r.S1High[i], r.ST[i], r.STLow[i], r.STHigh[i])
	}
	return s
}
