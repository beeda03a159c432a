package mdo

import (
	"context"
	"math"
	"testing"
)

// TestFromReference starts Sellar's coupled group at every point from the
// converged reference design (x = 1, z = (5, 2), the study's Start). The
// reference design itself then converges in its first iteration; every
// point ends within the tolerance of the answer from the defaults; and the
// answers are bit-identical whatever the order of evaluation and the
// number of workers.
func TestFromReference(t *testing.T) {
	ctx := context.Background()
	points := [][]float64{{0.1, 0.5, 0.2}, {0.9, 0.1, 0.7}, {0.5, 0.75, 0.2}, {0.3, 0.3, 0.9}}
	run := func(fromRef bool, workers int, reverse bool) (ref *Evaluation, evs []*Evaluation) {
		t.Helper()
		st, err := SellarStudy(MDF)
		if err != nil {
			t.Fatal(err)
		}
		set := DefaultSolver()
		set.FromReference = fromRef
		if err := st.System.SetSolver(set); err != nil {
			t.Fatal(err)
		}
		st.Workers = workers
		st.CacheLimit = -1
		e, err := st.NewEvaluator()
		if err != nil {
			t.Fatal(err)
		}
		xs := append([][]float64(nil), points...)
		if reverse {
			for i, j := 0, len(xs)-1; i < j; i, j = i+1, j-1 {
				xs[i], xs[j] = xs[j], xs[i]
			}
		}
		evs, err = e.Evaluate(ctx, xs)
		if err != nil {
			t.Fatal(err)
		}
		if reverse {
			for i, j := 0, len(evs)-1; i < j; i, j = i+1, j-1 {
				evs[i], evs[j] = evs[j], evs[i]
			}
		}
		ref, err = e.EvaluateOne(ctx, e.Start())
		if err != nil {
			t.Fatal(err)
		}
		return ref, evs
	}
	refCold, cold := run(false, 1, false)
	refWarm, warm := run(true, 1, false)
	_, warm2 := run(true, 2, true)
	if refCold.CouplingIterations < 3 {
		t.Errorf("from the defaults the reference design took %d iterations", refCold.CouplingIterations)
	}
	if refWarm.CouplingIterations != 1 {
		t.Errorf("from its own state the reference design took %d iterations, want 1", refWarm.CouplingIterations)
	}
	for i := range points {
		// y1, y2 converge to 1e-10; f follows within a few of that
		a, b := cold[i].Objectives[0], warm[i].Objectives[0]
		if math.Abs(a-b) > 1e-9*math.Max(1, math.Abs(a)) {
			t.Errorf("point %d: f = %.15g from the defaults, %.15g from the reference", i, a, b)
		}
		if warm[i].Objectives[0] != warm2[i].Objectives[0] || warm[i].CouplingIterations != warm2[i].CouplingIterations {
			t.Errorf("point %d: f = %v (%d iterations) with 1 worker in order, %v (%d) with 2 workers reversed",
				i, warm[i].Objectives[0], warm[i].CouplingIterations, warm2[i].Objectives[0], warm2[i].CouplingIterations)
		}
	}
}
