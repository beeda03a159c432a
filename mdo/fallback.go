package mdo

import (
	"context"
	"errors"
	"fmt"
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
	// pathDescent is plain Gauss–Seidel started next to an unstable
	// state, off it along the direction the iteration leaves it by
	// (descend below).
	pathDescent
)

var pathNames = [...]string{"configured", "fallback: gauss-seidel", "fallback: relaxed gauss-seidel", "fallback: newton", "fallback: continuation",
	"fallback: gauss-seidel from beside the unstable state"}

// String names the path.
func (p solvePath) String() string { return pathNames[p] }

// damped reports whether the path keeps Aitken's factor an
// under-relaxation.
func (p solvePath) damped() bool { return p == pathRelaxed || p == pathContinuation }

// settings returns the solver settings of a group on this path.
func (p solvePath) settings(s SolverSettings) SolverSettings {
	switch p {
	case pathPlain, pathDescent:
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
		name += " (unstable branch: no stable state found; see Unstable)"
	}
	return name
}

// Unstable returns, when the last Analyze kept a state on an unstable
// branch because no path of the fallback chain found a stable one, the
// *BranchError that names the coupled group, the loop gain and the
// coupling variable moving most along the unstable mode; nil otherwise.
// The state is then not a closure a designer iterating the loop could
// reach: a study's Evaluator refuses it (the point fails with this error).
// Every group after the unstable one is computed on that state.
func (w *Workspace) Unstable() error {
	if !w.unstable || w.fb == nil || w.fb.held == nil {
		return nil
	}
	return w.fb.held
}

// fallbackScratch holds the buffers of the fallback chain, allocated the
// first time a fallback runs.
type fallbackScratch struct {
	target, guess, state, unstable []float64
	// held is the unstable state's error when the last analysis kept it
	held *BranchError
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
//     (SetReference);
//  5. without a reference state, when an attempt found only an unstable
//     state: plain Gauss–Seidel started beside it (descend).
//
// When the configured solver converged onto a range limit (a balance
// that runs away, *NotClosingError) only the continuation runs: it is the one path
// that can still reach a solution on the branch of the reference state.
//
// When every attempt fails the most informative error is returned: a
// balance that runs away (not closing) before a numerical failure. Once
// an attempt has returned such an error, Newton and the continuation's
// solves give up when they stall (newtonStall, continuationStall) and
// the continuation gives up at its continuationFailures-th failed step:
// their failures could no longer change the error, only a success
// matters. SolverSettings.Exhaustive turns this and the shortcuts of
// Newton and the continuation off.
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
	w.fb.held = nil
	settle := func(best error) error {
		if held == nil || w.ref != nil {
			// with a reference state the continuation decided: no
			// stable state connects to it, and the point does not close
			return best
		}
		if err := w.descend(ctx, held); err == nil || ctx.Err() != nil {
			return err
		}
		copy(w.val, w.fb.unstable)
		w.path, w.unstable, w.fb.held = heldPath, true, held
		// the groups after the unstable one were not run on this state
		// (the check failed before them): they still hold defaults or
		// an earlier point's values, which would read as computed
		if err := w.analyzeFrom(ctx, heldPath, held.group+1); err != nil {
			w.unstable = false
			return fmt.Errorf("%w; the groups after it, computed on that state: %w", held, err)
		}
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
		failures := 0
		if !exhaustive && Classify(best) == DoesNotClose {
			w.stall, failures = stallLimit(pathContinuation), continuationFailures
		}
		err := w.continuation(ctx, exhaustive, failures)
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

// descentPush is the distance, as a share of the runaway variable's
// value (at least its scale), by which descend starts off an unstable
// state.
const descentPush = 1e-2

// descend looks for a stable closure beside the unstable state be was
// held with (in fb.unstable): an unstable fixed point of the loop is a
// saddle of the iteration, which leaves it along its unstable mode
// (be.mode) toward the runaway on one side and, when one exists, toward a
// stable closure on the other (the light aircraft of a mass closure whose
// heavy one is unstable). Plain Gauss–Seidel starts from the state pushed
// off along the mode, first against the direction the check's push grew
// in, then along it; the first that converges is the answer (plain
// Gauss–Seidel converges only to stable states, and a short solve is
// checked: checkedPlain). The guesses are restored afterwards.
func (w *Workspace) descend(ctx context.Context, be *BranchError) error {
	g := &w.sys.groups[be.group]
	if len(be.mode) != len(g.tear) {
		return be
	}
	worst, n := 0, 0.0
	for k, d := range be.mode {
		if a := math.Abs(d); a > n {
			worst, n = k, a
		}
	}
	if !(n > 0) || math.IsInf(n, 0) {
		return be
	}
	saved := w.fb.guess
	for _, v := range g.tear {
		saved[v] = w.guess[v]
	}
	defer func() {
		for _, v := range g.tear {
			w.guess[v] = saved[v]
		}
	}()
	v := g.tear[worst]
	push := descentPush * math.Max(math.Abs(w.fb.unstable[v])/g.scale[worst], 1) / n
	var err error
	for _, sign := range [...]float64{-1, 1} {
		for k, v := range g.tear {
			w.guess[v] = w.fb.unstable[v] + sign*push*be.mode[k]*g.scale[k]
		}
		if err = w.analyzeWith(ctx, pathDescent); err == nil {
			w.path = pathDescent
			return nil
		}
		if ctx.Err() != nil {
			return err
		}
	}
	return err
}

// Stall limits of the fallback chain's attempts once the point already
// holds a does-not-close error. The error the chain returns is then
// settled (no later failure replaces it), and an attempt only matters if
// it succeeds: Newton gives up after newtonStall iterations without
// halving its smallest residual (newtonShrink), a continuation step's
// solve after continuationStall without a new smallest one. They were
// set on the convergence benchmark's points
// (disciplines/convergence_test.go) and the business-jet GA run, where
// no attempt that found a state went more than 3 (Newton, 46 solves) or
// 13 (continuation steps, 7 400 solves) iterations without a new
// smallest residual, while the attempts that fail spend most of their
// iterations after their best: with these limits every point of both sets gets the answer it
// got without them, bit for bit. The relaxed Gauss–Seidel attempt keeps
// its whole budget (one of its solves that closed went 49 iterations
// without a new smallest residual).
const (
	newtonStall       = 15
	continuationStall = 40
)

// continuationFailures is the number of failed steps at which the
// continuation gives up on a point that already holds a does-not-close
// error (a step skipped because it would repeat the solve that just
// failed counts as failed: it would fail as that one did). A march that
// fails where the branch of the reference state ends (a fold of the
// closure before the point) fails again at every halved step until the
// step is below 1/64: five to fourteen failed steps on the convergence
// benchmark's points, the business-jet GA run's and the test suite's,
// where every march that reached its point had at most one failed step
// (3 043 marches; the sizing loop of TestFallbackShortcutsChangeNothing
// has eight points that reach it after one, so a limit of 1 fails that
// test). With this limit every point of those sets gets the answer it
// got without it, bit for bit; the marches that fail on the business-jet
// GA run (population 100, 99 generations) cost 154 000 discipline calls
// in place of 423 000.
const continuationFailures = 3

// newtonShrink is the factor by which Newton's residual must fall below
// its smallest so far for the stall limit to count a new smallest one:
// Newton converging on a solution halves its residual at least every
// few iterations (quadratically, once it is near), while one that does
// not find a solution creeps down by small fractions between long
// stretches without progress. On the convergence benchmark's points, the
// business-jet GA run's and the test suite's, no Newton attempt that
// converged under the stall limit went more than 9 iterations without
// halving its smallest residual (7 without a new smallest one; 229
// attempts), and every point gets the answer it got with any smaller
// residual counted, bit for bit; the Newton attempts that fail under the
// limit stop after 36 % fewer iterations (115 017 in all, 73 389).
const newtonShrink = 0.5

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
//
// With failures > 0 the march gives up at its failures-th failed step
// (a step not solved again counts as failed); 0 sets no limit.
func (w *Workspace) continuation(ctx context.Context, exhaustive bool, failures int) error {
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
	nfailed := 0   // the failed steps so far
	for steps := 0; steps < continuationSteps; steps++ {
		tn := math.Min(1, t+h)
		if tn == failed && !exhaustive {
			// the same solve as the step that just failed
			if ctx.Err() != nil {
				return ctx.Err()
			}
			if nfailed++; nfailed == failures {
				break
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
		if nfailed++; nfailed == failures {
			break
		}
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
