package optimizers

import (
	"errors"
	"fmt"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distmv"
	"gonum.org/v1/gonum/stat/samplemv"

	"couplet/mdo"
)

// startTries is the number of points analysableStart tries when the start
// does not analyse (the start itself included).
const startTries = 16

// errNothingAnalysed ends an inner search of Nelder–Mead or CMA-ES whose
// first batch, the first of the run, failed to analyse entirely: the
// outer loop then looks for an analysable start (analysableStart).
var errNothingAnalysed = errors.New("optimizers: nothing analysed")

// analysable reports whether ev is an analysis a search can use.
func analysable(ev *mdo.Evaluation) bool { return ev != nil && ev.Converged && ev.Err == "" }

// analysableStart returns the first point to search from: u0 when it
// analyses, otherwise the first analysable one of the points toward the
// centre of the box, u0 + t(½ − u0) for t = ¼, ½, ¾, 1, and then of a
// scrambled Halton sequence drawn from the study's seed, startTries
// points in all, evaluated one at a time (a search needs a point where
// the functions are defined; a failed analysis is met by moving toward
// the interior). It returns the point and its evaluation (nil when none
// analyses) and, when u0 did not analyse, the words that say so; a stop
// reason other than mdo.NotStopped or an error ends the run.
func (r *run) analysableStart(u0 []float64) (u []float64, ev *mdo.Evaluation, detail string, stop mdo.StopReason, err error) {
	var failed *mdo.Evaluation
	try := func(u []float64) (*mdo.Evaluation, mdo.StopReason, error) {
		evs, stop, err := r.evaluate([][]float64{u})
		if err != nil || stop != mdo.NotStopped {
			return nil, stop, err
		}
		if !analysable(evs[0]) {
			failed = evs[0]
			return nil, mdo.NotStopped, nil
		}
		return evs[0], mdo.NotStopped, nil
	}
	if ev, stop, err := try(u0); ev != nil || stop != mdo.NotStopped || err != nil {
		return u0, ev, "", stop, err
	}
	why := "its analysis failed"
	if failed != nil && failed.Err != "" {
		why = failed.Err
	}
	n := len(u0)
	var tries [][]float64
	for _, t := range []float64{0.25, 0.5, 0.75, 1} {
		u := make([]float64, n)
		for j := range u {
			u[j] = u0[j] + t*(0.5-u0[j])
		}
		tries = append(tries, u)
	}
	if m := startTries - 1 - len(tries); m > 0 && n <= maxHaltonDim {
		seed := r.ev.Seed()
		batch := mat.NewDense(m, n, nil)
		samplemv.Halton{Kind: samplemv.Owen, Q: distmv.NewUnitUniform(n, nil), Src: rand.NewPCG(seed, mix(seed, 17))}.Sample(batch)
		tries = append(tries, rows(batch)...)
	}
	for _, u := range tries {
		ev, stop, err := try(u)
		if err != nil || stop != mdo.NotStopped {
			return nil, nil, "", stop, err
		}
		if ev != nil {
			return u, ev, fmt.Sprintf("the start %s does not analyse (%s); started from %s instead, the first analysable point found toward the centre of the box", r.physical(u0), why, r.physical(u)), mdo.NotStopped, nil
		}
	}
	return nil, nil, fmt.Sprintf("no analysable start: the start %s does not analyse (%s), nor do %d points toward the centre of the box and spread over it", r.physical(u0), why, len(tries)), mdo.NotStopped, nil
}
