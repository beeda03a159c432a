package mdo

import "math"

// Settings of Anderson acceleration, chosen on the aircraft convergence
// benchmark (disciplines.BenchmarkConvergence: 2 010 points of five
// aircraft): the fewest discipline calls per converged point without a
// point more that lands on the runaway branch.
const (
	// andersonDepth is the number of previous differences combined (m in
	// Walker & Ni 2011).
	andersonDepth = 3
	// andersonDelay is the number of plain Gauss–Seidel iterations before
	// the first accelerated one: far from the solution the sweep's early
	// differences describe the loop badly, and an extrapolation from them
	// can jump to the runaway branch.
	andersonDelay = 3
	// andersonReach bounds the extrapolation: the accelerated iterate lies
	// at most andersonReach times the plain step's largest scaled change
	// from the plain iterate.
	andersonReach = 5
)

// andersonDrop is the share of a difference column's length below which
// its part orthogonal to the newer columns counts as dependent on them;
// the column is then left out of the least-squares problem.
const andersonDrop = 1e-8

// andersonScratch holds the history of Anderson acceleration for groups of
// at most n coupling variables, in scaled units (value/scale): the last
// andersonDepth differences of the residuals and of the sweep's outputs,
// newest first, and the QR factors of the residual differences.
type andersonScratch struct {
	n            int
	cols         int // differences held
	dF, dG       []float64
	fPrev, gPrev []float64
	q            []float64
	r            [andersonDepth * andersonDepth]float64
	gamma        [andersonDepth]float64
	kept         [andersonDepth]int
}

// newAndersonScratch allocates the history for groups of n coupling
// variables.
func newAndersonScratch(n int) *andersonScratch {
	return &andersonScratch{n: n, dF: make([]float64, andersonDepth*n), dG: make([]float64, andersonDepth*n),
		fPrev: make([]float64, n), gPrev: make([]float64, n), q: make([]float64, andersonDepth*n)}
}

// reset forgets the history.
func (a *andersonScratch) reset() { a.cols = 0 }

// step records the residual f = (P(G(y)) − y)/scale and the output
// gs = P(G(y))/scale of iteration it (1 for the first) and writes the next
// iterate, in scaled units, to next: the output minus the combination of
// the output differences whose residual differences best cancel f in the
// least-squares sense (Anderson acceleration, type II with mixing 1; H. F.
// Walker and P. Ni, "Anderson acceleration for fixed-point iterations",
// SIAM J. Numer. Anal. 49(4), 2011), the combination bounded by
// andersonReach. The first andersonDelay iterations, and one whose
// differences are all dependent, take the plain step next = gs.
func (a *andersonScratch) step(it int, f, gs, next []float64) {
	n := len(f)
	if it > 1 {
		// shift the history and put the newest differences first
		if a.cols < andersonDepth {
			a.cols++
		}
		copy(a.dF[n:a.cols*n], a.dF[:(a.cols-1)*n])
		copy(a.dG[n:a.cols*n], a.dG[:(a.cols-1)*n])
		for k := 0; k < n; k++ {
			a.dF[k] = f[k] - a.fPrev[k]
			a.dG[k] = gs[k] - a.gPrev[k]
		}
	}
	copy(a.fPrev[:n], f)
	copy(a.gPrev[:n], gs)
	copy(next, gs)
	if a.cols == 0 || it <= andersonDelay {
		return
	}
	// modified Gram–Schmidt on the residual differences, newest first,
	// leaving out the columns that depend on the newer ones
	kept := 0
	for j := 0; j < a.cols; j++ {
		col := a.dF[j*n : (j+1)*n]
		q := a.q[kept*n : (kept+1)*n]
		copy(q, col)
		norm0 := dot(q, q)
		for i := 0; i < kept; i++ {
			qi := a.q[i*n : (i+1)*n]
			c := dot(qi, q)
			a.r[i*andersonDepth+kept] = c
			for k := range q {
				q[k] -= c * qi[k]
			}
		}
		norm := math.Sqrt(dot(q, q))
		if !(norm > andersonDrop*math.Sqrt(norm0)) {
			continue
		}
		for k := range q {
			q[k] /= norm
		}
		a.r[kept*andersonDepth+kept] = norm
		a.kept[kept] = j
		kept++
	}
	if kept == 0 {
		return
	}
	// γ solves R γ = Qᵀ f
	g := a.gamma[:kept]
	for i := 0; i < kept; i++ {
		g[i] = dot(a.q[i*n:(i+1)*n], f)
	}
	for i := kept - 1; i >= 0; i-- {
		s := g[i]
		for j := i + 1; j < kept; j++ {
			s -= a.r[i*andersonDepth+j] * g[j]
		}
		g[i] = s / a.r[i*andersonDepth+i]
	}
	for i := 0; i < kept; i++ {
		dg := a.dG[a.kept[i]*n : (a.kept[i]+1)*n]
		for k := range next {
			next[k] -= g[i] * dg[k]
		}
	}
	// keep the extrapolation within andersonReach times the plain step
	fn, cn := 0.0, 0.0
	for k := range next {
		if a := math.Abs(f[k]); a > fn {
			fn = a
		}
		if a := math.Abs(next[k] - gs[k]); a > cn {
			cn = a
		}
	}
	if cn > andersonReach*fn {
		c := andersonReach * fn / cn
		for k := range next {
			next[k] = gs[k] + c*(next[k]-gs[k])
		}
	}
}

// dot returns the inner product of a and b (of equal length).
func dot(a, b []float64) float64 {
	s := 0.0
	for k := range a {
		s += a[k] * b[k]
	}
	return s
}
