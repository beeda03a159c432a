package mdo

import (
	"context"
	"errors"
	"math"
)

// solvePath is one way of solving the coupled groups of an analysis.
type solvePath int

const (
	// pathConfigured is each group's configured solver.
	pathConfigured solvePath = iota
	// pathPlain is plain nonlinear Gauss–Seidel, no relaxation: the
	// sizing loop as an engineer iterates it by hand, which runs into the
	// limit a non-closing balance leaves where extrapolating methods
	// wander.
	pathPlain
	// pathRelaxed is Aitken-relaxed Gauss–Seidel with the relaxation
	// factor kept in [0.05, 1] (an adaptive under-relaxation), starting
	// from at most 0.7.
	pathRelaxed
	// pathNewton is Newton's method with a backtracking line search and
	// Broyden-updated Jacobians (newton.go).
	pathNewton
	// pathContinuation marches the parameters from the reference state to
	// the point (continuation below).
	pathContinuation
)

var pathNames = [...]string{"configured", "fallback: gauss-seidel", "fallback: relaxed gauss-seidel", "fallback: newton", "fallback: continuation"}

// String names the path.
func (p solvePath) String() string { return pathNames[p] }

// damped reports whether the path keeps Aitken's factor an
// under-relaxation.
func (p solvePath) damped() bool { return p == pathRelaxed || p == pathContinuation }

// settings returns the solver settings of a group on this path.
func (p solvePath) settings(s SolverSettings) SolverSettings {
	switch p {
	case pathPlain:
		s.Method = GaussSeidel
		s.Relaxation = 1
	case pathRelaxed, pathContinuation:
		s.Method = AitkenGaussSeidel
		s.Relaxation = math.Min(s.Relaxation, 0.7)
	case pathNewton:
		s.Method = Newton
		if s.MaxIterations > 100 {
			s.MaxIterations = 100
		}
	}
	return s
}

// Path names the solver path that converged the last Analyze: the
// configured method's name, or the fallback that succeeded; a state on an
// unstable branch, kept because no path found a stable one, says so
// ("fallback: gauss-seidel", "fallback: relaxed gauss-seidel",
// "fallback: newton", "fallback: continuation").
func (w *Workspace) Path() string {
	name := w.path.String()
	if w.path == pathConfigured {
		name = "direct"
		for gi, g := range w.sys.groups {
			if g.coupled {
				name = w.settings[gi].Method.String()
				break
			}
		}
	}
	if w.unstable {
		name += " (unstable branch: no stable state found; see BranchError)"
	}
	return name
}

// fallbackScratch holds the buffers of the fallback chain, allocated the
// first time a fallback runs.
type fallbackScratch struct {
	target, guess, state, unstable []float64
}

// fallback runs the fallback chain after the configured solver failed
// with first. The chain is fixed and every attempt starts from the
// workspace's own guesses (or from the reference state), so the answer
// depends on the point alone, never on what was analysed before:
//
//  1. plain Gauss–Seidel (skipped when it was the configured solver of
//     every group);
//  2. relaxed Gauss–Seidel: Aitken relaxation kept in [0.05, 1], from
//     a factor of at most 0.7;
//  3. Newton with a line search (skipped when Newton was the configured
//     solver of every group);
//  4. continuation from the reference state, when one is set
//     (SetReference).
//
// When the configured solver converged onto a range limit (a balance
// that runs away, *NotClosingError) only the continuation runs: it is the one path
// that can still reach a solution on the branch of the reference state.
//
// When every attempt fails the most informative error is returned: a
// balance that runs away (not closing) before a numerical failure. Once
// an attempt has returned such an error, Newton and the continuation's
// solves give up when they stall (newtonStall, continuationStall): their
// failures could no longer change the error, only a success matters.
// SolverSettings.Exhaustive turns this and the shortcuts of Newton and
// the continuation off.
func (w *Workspace) fallback(ctx context.Context, first error) error {
	best := first
	allNewton, allPlain, allowed, exhaustive := true, true, false, false
	for gi, g := range w.sys.groups {
		if g.coupled && w.settings[gi].Exhaustive {
			exhaustive = true
		}
		if g.coupled && w.settings[gi].Method != Newton {
			allNewton = false
		}
		if g.coupled && (w.settings[gi].Method != GaussSeidel || w.settings[gi].Relaxation != 1) {
			allPlain = false
		}
		if g.coupled && !w.settings[gi].NoFallback {
			allowed = true
		}
	}
	if !allowed {
		return first
	}
	// the stall limit holds for one attempt at most, and a panic in a
	// discipline must not leave it to the next analysis
	defer func() { w.stall = 0 }()
	if w.fb == nil {
		n := len(w.val)
		w.fb = &fallbackScratch{target: make([]float64, n), guess: make([]float64, n), state: make([]float64, n), unstable: make([]float64, n)}
	}
	// the first state rejected as an unstable branch is kept: without a
	// reference state to march from it is the answer when no path finds
	// a stable one
	var held *BranchError
	var heldPath solvePath
	hold := func(err error, p solvePath) {
		var be *BranchError
		if held == nil && errors.As(err, &be) {
			held, heldPath = be, p
			copy(w.fb.unstable, w.val)
		}
	}
	hold(first, pathConfigured)
	settle := func(best error) error {
		if held == nil || w.ref != nil {
			// with a reference state the continuation decided: no
			// stable state connects to it, and the point does not close
			return best
		}
		copy(w.val, w.fb.unstable)
		w.path, w.unstable = heldPath, true
		return nil
	}
	// a balance that runs away is physics, not numerics: only the march
	// from the reference state may still find the branch it connects to
	var nc *NotClosingError
	physical := errors.As(first, &nc)
	for _, p := range []solvePath{pathPlain, pathRelaxed, pathNewton} {
		if physical || (p == pathNewton && allNewton) || (p == pathPlain && allPlain) {
			continue
		}
		w.stall = 0
		if !exhaustive && Classify(best) == DoesNotClose {
			w.stall = stallLimit(p)
		}
		err := w.analyzeWith(ctx, p)
		w.stall = 0
		if err == nil {
			w.path = p
			return nil
		}
		if ctx.Err() != nil {
			return err
		}
		hold(err, p)
		best = moreInformative(best, err)
	}
	if w.ref != nil {
		w.stall = 0
		if !exhaustive && Classify(best) == DoesNotClose {
			w.stall = stallLimit(pathContinuation)
		}
		err := w.continuation(ctx, exhaustive)
		w.stall = 0
		if err == nil {
			w.path = pathContinuation
			return nil
		}
		if ctx.Err() != nil {
			return err
		}
		hold(err, pathContinuation)
		best = moreInformative(best, err)
	}
	return settle(best)
}

// Stall limits of the fallback chain's attempts once the point already
// holds a does-not-close error. The error the chain returns is then
// settled (no later failure replaces it), and an attempt only matters if
// it succeeds: Newton gives up after newtonStall iterations, a
// continuation step's solve after continuationStall, without a new
// smallest residual. They were set on the convergence benchmark's points
// (disciplines/convergence_test.go) and the business-jet GA run, where
// no attempt that found a state went more than 3 (Newton, 46 solves) or
// 13 (continuation steps, 7 400 solves) iterations without one, while
// the attempts that fail spend most of their iterations after their
// best: with these limits every point of both sets gets the answer it
// got without them, bit for bit. The relaxed Gauss–Seidel attempt keeps
// its whole budget (one of its solves that closed went 49 iterations
// without a new smallest residual).
const (
	newtonStall       = 15
	continuationStall = 40
)

// stallLimit is the stall limit of path p on a point that does not close.
func stallLimit(p solvePath) int {
	switch p {
	case pathNewton:
		return newtonStall
	case pathContinuation:
		return continuationStall
	}
	return 0
}

// moreInformative returns the error that says more about the design: one
// classed as not closing over any other, else the earlier one.
func moreInformative(a, b error) error {
	if Classify(a) != DoesNotClose && Classify(b) == DoesNotClose {
		return b
	}
	return a
}

// continuationSteps bounds the number of continuation steps.
const continuationSteps = 64

// continuation marches the parameters from the reference state to the
// workspace's parameters: p(t) = p_ref + t (p − p_ref), first in steps of
// t = 1/4, each solve (relaxed Gauss–Seidel) starting from the coupling
// state of the last converged step; a step that fails is halved, a step
// that succeeds lets the next one double (at most 1/4). A parameter whose
// reference and target are both whole numbers takes rounded values. The
// parameters and guesses are restored afterwards.
//
// A halved step that still reaches the same t as the step that just
// failed (both reach t = 1) would solve the same parameters from the same
// state: it is not solved again but fails as that one did, and counts as
// a step all the same, so the march is the one it always was.
func (w *Workspace) continuation(ctx context.Context, exhaustive bool) error {
	fb := w.fb
	copy(fb.target, w.val)
	copy(fb.guess, w.guess)
	copy(fb.state, w.ref)
	defer func() {
		for _, i := range w.sys.params {
			w.val[i] = fb.target[i]
		}
		copy(w.guess, fb.guess)
	}()
	t, h := 0.0, 0.25
	var err error
	failed := -1.0 // the t the last step failed to reach; -1 after a success
	for steps := 0; steps < continuationSteps; steps++ {
		tn := math.Min(1, t+h)
		if tn == failed && !exhaustive {
			// the same solve as the step that just failed
			if ctx.Err() != nil {
				return ctx.Err()
			}
			h /= 2
			if h < 1.0/64 {
				break
			}
			continue
		}
		for _, i := range w.sys.params {
			a, b := w.ref[i], fb.target[i]
			v := a + tn*(b-a)
			if tn == 1 {
				v = b
			} else if a == math.Trunc(a) && b == math.Trunc(b) {
				v = math.Round(v)
			}
			w.val[i] = v
		}
		for _, g := range w.sys.groups {
			for _, v := range g.tear {
				w.guess[v] = fb.state[v]
			}
		}
		err = w.analyzeWith(ctx, pathContinuation)
		if err == nil {
			if tn == 1 {
				return nil
			}
			t = tn
			copy(fb.state, w.val)
			h = math.Min(0.25, 2*h)
			failed = -1
			continue
		}
		if ctx.Err() != nil || !w.loopFailed {
			return err
		}
		failed = tn
		h /= 2
		if h < 1.0/64 {
			break
		}
	}
	if err == nil {
		err = errors.New("mdo: continuation did not reach the point")
	}
	return err
}

// SetReference makes the workspace's current values the reference state
// of its fallback chain: when an analysis fails, continuation marches the
// parameters from these values to the point's, each step starting from
// the last converged coupling state. Call it after a successful Analyze
// of the study's reference point; nil removes the reference.
func (w *Workspace) SetReference(state []float64) error {
	if state == nil {
		w.ref = nil
		return nil
	}
	if len(state) != len(w.val) {
		return errors.New("mdo: a reference state needs one value per variable of the system")
	}
	w.ref = append(w.ref[:0], state...)
	return nil
}
