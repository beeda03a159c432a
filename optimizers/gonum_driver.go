package optimizers

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/optimize"

	"couplet/mdo"
)

// The gonum methods know no bounds. They search an unbounded space u that
// the periodic map x = (1 − cos(π u))/2 folds onto the unit box: every u
// is a valid point, the map is smooth, and a bound (x = 0 or 1) is an
// ordinary stationary point of the folded function, so optima on a bound
// are reached without penalty.

// toBox maps an unbounded coordinate onto [0, 1].
func toBox(u float64) float64 { return (1 - math.Cos(math.Pi*u)) / 2 }

// fromBox is the inverse of toBox on [0, 1] → [0, 1].
func fromBox(x float64) float64 { return math.Acos(1-2*clip01(x)) / math.Pi }

// boxPoint maps a whole point.
func boxPoint(u []float64) []float64 {
	x := make([]float64, len(u))
	for k, v := range u {
		x[k] = toBox(v)
	}
	return x
}

// unboxPoint maps a whole point back.
func unboxPoint(x []float64) []float64 {
	u := make([]float64, len(x))
	for k, v := range x {
		u[k] = fromBox(v)
	}
	return u
}

// batchFunc answers a batch of points of the method's space with function
// values; a stop reason other than mdo.NotStopped or an error ends the run.
type batchFunc func(us [][]float64) (fs []float64, stop mdo.StopReason, err error)

// majorFunc is told of each major iteration of the method; a returned
// reason other than mdo.NotStopped ends the run.
type majorFunc func(loc *optimize.Location) mdo.StopReason

// drive runs a gonum optimize.Method through its task protocol, the way
// optimize.Minimize does, but evaluates the function itself: it collects
// the method's evaluation tasks until all of the method's concurrent tasks
// are out (a CMA-ES population, a single Nelder–Mead point) and answers
// them as one batch. Everything happens in the order the method asks, so
// the run is deterministic. It returns why the run stopped.
func drive(method optimize.Method, u0 []float64, tasks int, eval batchFunc, major majorFunc) (stop mdo.StopReason, err error) {
	dim := len(u0)
	n := method.Init(dim, tasks)
	if n < 1 {
		n = 1
	}
	ops := make(chan optimize.Task, n)
	res := make(chan optimize.Task, n)
	ts := make([]optimize.Task, n)
	ts[0].Location = &optimize.Location{X: append([]float64(nil), u0...)}
	ts[0].Op = optimize.NoOperation
	for i := 1; i < n; i++ {
		ts[i].Location = &optimize.Location{X: make([]float64, dim)}
	}
	panicked := make(chan any, 1)
	go func() {
		defer func() {
			if r := recover(); r != nil {
				panicked <- r
				close(ops)
			}
		}()
		method.Run(ops, res, ts)
	}()
	var pending []optimize.Task
loop:
	for {
		t, ok := <-ops
		if !ok {
			select {
			case p := <-panicked:
				return mdo.NotStopped, fmt.Errorf("optimizers: the gonum method failed: %v", p)
			default:
			}
			return mdo.StopConverged, nil
		}
		switch {
		case t.Op == optimize.MajorIteration:
			if stop = major(t.Location); stop != mdo.NotStopped {
				break loop
			}
			res <- t
		case t.Op == optimize.MethodDone:
			stop = mdo.StopConverged
			break loop
		case t.Op == optimize.NoOperation:
			res <- t
		case t.Op&optimize.FuncEvaluation != 0:
			pending = append(pending, t)
			if len(pending) < n {
				continue
			}
			us := make([][]float64, len(pending))
			for i, p := range pending {
				us[i] = append([]float64(nil), p.X...)
			}
			var fs []float64
			fs, stop, err = eval(us)
			if stop != mdo.NotStopped || err != nil {
				break loop
			}
			for i := range pending {
				pending[i].F = fs[i]
				res <- pending[i]
			}
			pending = pending[:0]
		default:
			err = fmt.Errorf("optimizers: the gonum method asked for %v, which a gradient-free driver cannot answer", t.Op)
			break loop
		}
	}
	res <- optimize.Task{Op: optimize.PostIteration}
	close(res)
	for range ops {
	}
	return stop, err
}
