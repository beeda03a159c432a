package mdo

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/lapack/gonum"
)

// branchSweeps is the number of Gauss–Seidel sweeps of the stability
// check; the gain is the ratio of the displacements after the last two.
// A gain of 1 or more after branchSweeps is confirmed by sweeping on to
// branchSweepsMax: a loop that converges with a rate near 1 can displace
// more in its first sweeps than it finally contracts.
// A short check that settles is confirmed by one sweep more, ritzSweeps
// in all: the Ritz values of its displacements (ritzGain) must all have
// real parts below 1.
const (
	branchSweeps    = 3
	ritzSweeps      = branchSweeps + 1
	branchSweepsMax = 8
)

// A coupled group can have several solutions: a sizing loop typically
// has a light aircraft, where the mass balance is a contraction, and a
// heavy "runaway" one, where a little more mass asks for still more. The
// physical branch — the one connected to a study's reference state, and
// the only one a designer iterating the loop by hand can reach — is the
// stable one. Plain Gauss–Seidel converges only to stable fixed points;
// a state found by any other method is checked: the coupling variables
// are pushed up by 1e-4 of their scale, branchSweeps (at most
// branchSweepsMax) Gauss–Seidel sweeps run from there, and the ratio of the last two displacement norms (a
// power-iteration estimate of the loop's dominant eigenvalue) must stay
// below 1 unless the displacement flips sign from sweep to sweep (its
// scalar product with the last sweep's is negative: an iteration that
// oscillates about the state, not one that runs away). A short check
// that settles is confirmed by one sweep more: the Ritz values of the
// push and the displacements (ritzGain, the eigenvalues of the loop's
// Jacobian on their Krylov space) must all have real parts below 1, or
// the check sweeps on to branchSweepsMax — a growing mode still hidden
// under a shrinking transient shows in them before it shows in the
// displacements' norms. A state that fails is held back with a *BranchError while the
// fallback chain looks for a stable one. With no reference state to
// march from, the last attempt starts plain Gauss–Seidel beside the held
// state, off it along the direction the iteration leaves it by
// (fallback.go descend): the stable closure on the far side of the
// saddle, when there is one. When none is found the unstable state is
// the workspace's answer, every group after the unstable one computed on
// it, and Workspace.Path and Workspace.Unstable say so (a linear loop of
// gain above 1, say, has no other solution); a study's Evaluator refuses
// it, as a point's answer and as the study's reference state.

// checkedPlain reports whether a state plain Gauss–Seidel converged in
// iterations iterations is checked all the same: an iteration that
// starts on an unstable fixed point (the guesses of a study whose
// reference state is one) stops there before it could run away, so only
// an iteration longer than the check itself shows the state stable.
func checkedPlain(iterations int) bool { return iterations <= branchSweeps }

// BranchError reports a coupled group that converged to an unstable
// fixed point of its Gauss–Seidel loop (a runaway branch), not to the
// branch of the study's reference state.
type BranchError struct {
	Group []string
	Path  string  // the solver path that found the state
	Gain  float64 // estimated loop gain (> 1)
	Var   string  // the coupling variable moving most along the unstable mode
	Value float64 // its value in the rejected state
	Unit  string
	// group is the index of the group in the system's execution order:
	// the groups after it were not run on the rejected state
	group int
	// mode is the displacement of the group's coupling variables, in
	// units of their scales, after the check's last sweep: the direction
	// in which the iteration leaves the state
	mode []float64
}

// Error implements error.
func (e *BranchError) Error() string {
	unit := ""
	if e.Unit != "" && e.Unit != "-" {
		unit = " " + e.Unit
	}
	return fmt.Sprintf("does not close on the branch of the reference state: {%s} reached, by %s, only a runaway state (%s = %.6g%s) where the loop gain is %.3g > 1; remedy: %s",
		strings.Join(e.Group, ", "), e.Path, e.Var, e.Value, unit, e.Gain, DoesNotClose.Remedy())
}

// stableBranch checks the converged state of group g (see above). Plain
// Gauss–Seidel's states are checked only when it converged within
// branchSweeps iterations (checkedPlain).
func (w *Workspace) stableBranch(g *group, set SolverSettings, p solvePath) error {
	nt := len(g.tear)
	y, d := w.y[:nt], w.gy[:nt]
	copy(w.saved, w.val)
	defer copy(w.val, w.saved)
	for i, v := range g.tear {
		y[i] = w.val[v]
	}
	const eps = 1e-4
	for i, v := range g.tear {
		w.val[v] = y[i] + eps*g.scale[i]
	}
	prev, gain, worst := eps, 0.0, 0
	flips, flipped := false, false
	// dp is the previous sweep's displacement (rPrev is free once the
	// group is solved): the push itself before the first sweep
	dp := w.rPrev[:nt]
	for i := range dp {
		dp[i] = eps
	}
	copy(w.br.d[:nt], dp)
	w.solving = true
	defer func() { w.solving = false }()
	// short is true once the short check has settled: one more sweep
	// (ritzSweeps in all) then decides by the displacements' Ritz values
	short := false
	for s := 0; s < branchSweepsMax; s++ {
		// a push the sweeps have amplified (prev > eps) is still a
		// transient: near a fold of the closure the ratio of two early
		// displacements can dip below 1 at a state whose loop gain is
		// above 1 (Kestrel's heavy closure at Mach 0.9288, 1 500 km:
		// 4.55, 1.72, 0.91, then 1.53, 1.21, 1.34, 1.28, 1.30)
		// a flip does not settle it: two early displacements can turn
		// against each other in the transient of a state whose loop gain
		// is above 1 (the trijet's heavy closure at 79.4 t: 1.8e-4, 3.1e-5,
		// 5.0e-5, the last two opposed; swept on, its gain is 1.5)
		if s == branchSweeps && gain < 1 && prev <= eps {
			short = true // settled on the short check, unless the Ritz values say otherwise
		}
		// nor does a shrinking displacement: a transient can shrink the
		// first displacements while the loop's growing mode is still
		// small (the trijet's heavy closure at 80.7 t, Mach 1.976, 95.8
		// m²: 1.75e-4, 3.96e-5, 3.87e-5, the last two opposed, then
		// 3.0e-5, 4.7e-5, 6.5e-5...; swept on, its gain is 1.44). The
		// Ritz values of the displacements after ritzSweeps sweeps see
		// that mode (1.44 there, where the ratio of the last two
		// displacements is 0.77): the short check settles only when none
		// reaches 1, and is swept on to the full check otherwise
		if short && s == ritzSweeps {
			if w.br.ritzGain(nt, ritzSweeps) < 1 {
				return nil // settled
			}
			short = false
		}
		if err := w.sweep(g, false, false); err != nil {
			return w.loopError(g, err, p)
		}
		n, dot := 0.0, 0.0
		for i, v := range g.tear {
			d[i] = (w.val[v] - y[i]) / g.scale[i]
			dot += d[i] * dp[i]
			if a := math.Abs(d[i]); a > n {
				n, worst = a, i
			}
		}
		// the displacement turned against the last one, the same
		// variables compared: the largest can change from sweep to sweep,
		// and the signs of two variables say nothing of a flip (the
		// trijet's heavy closure, 279.5 t: engine.mass +2.2e-4, then
		// stability.tail_lift_cruise +3.5e-5, then engine.mass -7.6e-5
		// read as a flip and accepted it; swept on, its gain is 1.49)
		flipped, flips = flips, s > 0 && dot < 0
		copy(dp, d)
		if s < ritzSweeps {
			copy(w.br.d[(s+1)*nt:(s+2)*nt], d)
		}
		if n == 0 {
			// the push is absorbed exactly (a loop of gain 0, such as a
			// mass balance linear in the take-off mass): stable; the
			// ratio 0/0 would read as a NaN gain and reject it
			return nil
		}
		gain, prev = n/prev, n
	}
	// a displacement that flips sign from sweep to sweep (over the last
	// three sweeps) is an oscillation of the iteration about the state
	// (a negative eigenvalue), not a balance that runs away from it
	if gain < 1 || flips && flipped {
		return nil
	}
	spec := w.sys.vars.At(g.tear[worst])
	return &BranchError{Group: g.names, Path: p.String(), Gain: gain, Var: spec.Name, Value: y[worst], Unit: spec.Unit, group: w.groupIndex(g), mode: append([]float64(nil), d...)}
}

// groupIndex returns the index of group g in the system's execution order.
func (w *Workspace) groupIndex(g *group) int {
	for gi := range w.sys.groups {
		if &w.sys.groups[gi] == g {
			return gi
		}
	}
	return -1
}

// branchScratch holds the stability check's displacements and the small
// matrices of their Ritz values, sized once by NewWorkspace so that the
// check allocates nothing.
type branchScratch struct {
	// d holds the push and the displacements after the check's first
	// branchSweeps sweeps, one after the other, each as long as the
	// group's coupling variables (in units of their scales)
	d []float64
	// r is the upper triangle of the displacements' QR factorisation,
	// (branchSweeps+1)², h the loop's projection on them, branchSweeps²
	r, h []float64
	// wr and wi are the real and imaginary parts of h's eigenvalues
	wr, wi []float64
}

func newBranchScratch(maxTear int) *branchScratch {
	m := ritzSweeps
	return &branchScratch{d: make([]float64, (m+1)*maxTear), r: make([]float64, (m+1)*(m+1)), h: make([]float64, m*m),
		wr: make([]float64, m), wi: make([]float64, m)}
}

// ritzGain estimates the largest real part of the eigenvalues of the
// Gauss–Seidel loop's Jacobian J from the displacements d₀ (the push),
// d₁ = J d₀, …, d_m = J d_{m-1} held in b.d (nt values each): the
// Rayleigh–Ritz values of J on the Krylov space of d₀ … d_{m-1}
// (Arnoldi's method on the stored displacements; Saad, Numerical Methods
// for Large Eigenvalue Problems, 2nd ed. 2011, ch. 6, from memory). With
// the QR factorisation [d₀ … d_m] = Q R, J Q_m = Q_{m+1} R[:, 1:] R_m⁻¹,
// and the Ritz values are the eigenvalues of the upper Hessenberg
// H = R[:m, 1:] R_m⁻¹. Unlike the ratio of two displacements' norms,
// they see a growing mode that a shrinking transient still hides. The
// space stops at a displacement that is (to ritzTol of its length) a
// combination of the earlier ones: the Ritz values are then those of an
// invariant subspace. The stored displacements are overwritten (Q).
func (b *branchScratch) ritzGain(nt, m int) float64 {
	q := func(j int) []float64 { return b.d[j*nt : (j+1)*nt] }
	r := b.r[:(m+1)*(m+1)]
	for i := range r {
		r[i] = 0
	}
	k := m // the space's dimension
	// modified Gram–Schmidt, column by column
	for j := 0; j <= m; j++ {
		v := q(j)
		n0 := norm2(v)
		for i := 0; i < j; i++ {
			qi := q(i)
			c := 0.0
			for t := range v {
				c += qi[t] * v[t]
			}
			r[i*(m+1)+j] = c
			for t := range v {
				v[t] -= c * qi[t]
			}
		}
		n := norm2(v)
		r[j*(m+1)+j] = n
		if !(n > ritzTol*n0) {
			// d_j lies in the space of the earlier ones (or is zero, or
			// not finite): the space is invariant from j on
			k = min(k, j)
			break
		}
		for t := range v {
			v[t] /= n
		}
	}
	if k == 0 {
		return 0 // the push itself is absorbed: nothing grows
	}
	// H R_k = R[:k, 1:k+1], row by row (forward over the columns)
	h := b.h[:k*k]
	for row := 0; row < k; row++ {
		for c := 0; c < k; c++ {
			x := r[row*(m+1)+c+1]
			for i := 0; i < c; i++ {
				x -= h[row*k+i] * r[i*(m+1)+c]
			}
			h[row*k+c] = x / r[c*(m+1)+c]
		}
	}
	for _, x := range h {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return math.Inf(1) // no estimate: let the full check decide
		}
	}
	wr, wi := b.wr[:k], b.wi[:k]
	if (gonum.Implementation{}).Dlahqr(false, false, k, 0, k-1, h, k, wr, wi, 0, 0, nil, 1) != 0 {
		return math.Inf(1) // the QR iteration did not converge: as above
	}
	g := math.Inf(-1)
	for _, x := range wr {
		g = math.Max(g, x)
	}
	return g
}

// ritzTol is the relative length below which a displacement counts as a
// combination of the earlier ones in ritzGain.
const ritzTol = 1e-6

// norm2 returns the Euclidean norm of v.
func norm2(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s += x * x
	}
	return math.Sqrt(s)
}
