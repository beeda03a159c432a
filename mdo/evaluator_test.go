package mdo

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

// randomPoints draws n seeded points in the unit box.
func randomPoints(n, dim int, seed uint64) [][]float64 {
	r := rand.New(rand.NewPCG(seed, 1))
	xs := make([][]float64, n)
	for i := range xs {
		xs[i] = make([]float64, dim)
		for k := range xs[i] {
			xs[i][k] = r.Float64()
		}
	}
	return xs
}

func TestEvaluatorWorkersIdentical(t *testing.T) {
	run := func(workers int) []*Evaluation {
		ev := sellarEvaluator(t, MDF, workers)
		xs := randomPoints(64, 3, 7)
		xs = append(xs, xs[3]) // a repeat, answered by the cache
		out, err := ev.Evaluate(context.Background(), xs)
		if err != nil {
			t.Fatal(err)
		}
		if c := ev.Counters(); c.Repeats != 1 || c.Analyses != 64 || c.Evaluations != 64 {
			t.Errorf("workers %d: counters %+v", workers, c)
		}
		for _, e := range out {
			e.Wall = 0
		}
		return out
	}
	a, b := run(1), run(2)
	if !reflect.DeepEqual(a, b) {
		t.Fatal("evaluations differ between 1 and 2 workers")
	}
}

func TestEvaluatorFailureIsInfeasible(t *testing.T) {
	// The runaway loop does not close at any p: the evaluation fails,
	// is infeasible and says why.
	st := &Study{Name: "runaway", System: runaway(t), Design: []DesignVar{Continuous("p", 0, 10)},
		Objectives: []Objective{Minimize("y2")}, Workers: 1}
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	e, err := ev.EvaluateOne(context.Background(), []float64{0.5})
	if err != nil {
		t.Fatal(err)
	}
	if e.Converged || e.Feasible || !math.IsInf(e.Violation, 1) || !strings.Contains(e.Err, "y1") || e.Failure != DoesNotClose {
		t.Errorf("failed point recorded as %+v", e)
	}
	if ev.Counters().Failed != 1 {
		t.Errorf("failed count %d", ev.Counters().Failed)
	}
}

func TestEvaluatorAtSellarOptimum(t *testing.T) {
	for _, form := range []Formulation{MDF, IDF} {
		st, _ := SellarStudy(form)
		ev, err := st.NewEvaluator()
		if err != nil {
			t.Fatal(err)
		}
		p := []float64{0, 1.97764, 0}
		if form == IDF {
			// coupling targets at the published optimum (Sellar et al. 1996)
			p = append(p, 3.16, 3.75528)
		}
		e, err := ev.EvaluateOne(context.Background(), ev.ToUnit(p))
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(e.Objectives[0]-3.18339) > 1e-4 {
			t.Errorf("%s: f = %.6f, published 3.18339", form, e.Objectives[0])
		}
		if len(e.G) != map[Formulation]int{MDF: 2, IDF: 4}[form] {
			t.Errorf("%s: %d constraints", form, len(e.G))
		}
		if form == IDF && !e.Feasible {
			t.Errorf("IDF at the optimum should be consistent within 1e-4: G = %v", e.G)
		}
		r, err := ev.Finish(StopComplete)
		if err != nil || r.Best != e || !strings.Contains(r.String(), "g1 >= 3.16") {
			t.Errorf("result %v:\n%s", err, r)
		}
	}
}

func TestStudyValidation(t *testing.T) {
	tests := []struct {
		name   string
		mutate func(*Study)
		want   string
	}{
		{"unknown design variable", func(s *Study) { s.Design[0].Name = "xx" }, `"xx"`},
		{"produced design variable", func(s *Study) { s.Design[0] = Continuous("y1", 0, 1) }, "produced by discipline sellar1"},
		{"bounds reversed", func(s *Study) { s.Design[0] = Continuous("x", 5, 1) }, "lower < upper"},
		{"bounds outside range", func(s *Study) { s.Design[0] = Continuous("x", 0, 20) }, "validity range"},
		{"unknown objective", func(s *Study) { s.Objectives[0] = Minimize("ff") }, `"ff"`},
		{"fixed out of range", func(s *Study) { s.Fixed = map[string]float64{"x": -1} }, "x = -1"},
		{"band reversed", func(s *Study) { s.Constraints = append(s.Constraints, Between("f", 2, 1)) }, "lower > upper"},
		{"negative workers", func(s *Study) { s.Workers = -1 }, "Workers = -1"},
	}
	for _, tc := range tests {
		st, _ := SellarStudy(MDF)
		tc.mutate(st)
		_, err := st.NewEvaluator()
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v, want mention of %s", tc.name, err, tc.want)
		}
	}
}

func TestConstraintMargins(t *testing.T) {
	tests := []struct {
		c      Constraint
		value  float64
		margin float64
	}{
		{AtMost("a", 10), 8, 2},
		{AtMost("a", 10), 12, -2},
		{AtLeast("a", 3), 2, -1},
		{Between("a", 0, 10), 9, 1},
		{Between("a", 0, 10), -1, -1},
		{EqualTo("a", 5, 0.5), 5.25, 0.25},
	}
	for _, tc := range tests {
		if got := tc.c.Margin(tc.value); math.Abs(got-tc.margin) > 1e-12 {
			t.Errorf("%s at %g: margin %g, want %g", tc.c, tc.value, got, tc.margin)
		}
	}
}

func TestParetoArchive(t *testing.T) {
	sys, _ := NewSystem(Func("two", []string{"a"}, []string{"f1", "f2"}, func(in, out []float64) error {
		out[0] = in[0]
		out[1] = (1 - in[0]) * (1 - in[0])
		return nil
	}))
	st := &Study{Name: "pareto", System: sys, Design: []DesignVar{Continuous("a", 0, 1)},
		Objectives: []Objective{Minimize("f1"), Minimize("f2")}, Workers: 1}
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	// every point of a ∈ [0, 1] is Pareto optimal for (a, (1−a)²)
	xs := [][]float64{{0.5}, {0.1}, {0.9}, {0.3}}
	if _, err := ev.Evaluate(context.Background(), xs); err != nil {
		t.Fatal(err)
	}
	front := ev.Front()
	if len(front) != 4 || front[0].Design[0] != 0.1 || front[3].Design[0] != 0.9 {
		t.Errorf("front %v", front)
	}
}

func TestCouplingBounds(t *testing.T) {
	st, _ := SellarStudy(IDF)
	st.CouplingBounds = map[string][2]float64{"y1": {1, 30}, "y2": {1, 30}}
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	specs := ev.DesignSpecs()
	if got := specs[3]; got.Name != "y1" || got.Lower != 1 || got.Upper != 30 {
		t.Errorf("coupling slot %+v", got)
	}
	st.CouplingBounds = map[string][2]float64{"x": {0, 1}}
	if _, err := st.NewEvaluator(); err == nil || !strings.Contains(err.Error(), "not a coupling variable") {
		t.Errorf("bounds on a parameter accepted: %v", err)
	}
}

// memRecorder keeps evaluations in memory and can hand them back.
type memRecorder struct {
	evals  []*Evaluation
	script string
	seed   uint64
}

func (m *memRecorder) Begin(RunInfo) error        { return nil }
func (m *memRecorder) Record(e *Evaluation) error { m.evals = append(m.evals, e); return nil }
func (m *memRecorder) End(*Result) error          { return nil }
func (m *memRecorder) PickedUp(script string, seed uint64) ([]*Evaluation, error) {
	if script != m.script || seed != m.seed {
		return nil, fmt.Errorf("recorded run is of another script or seed")
	}
	return m.evals, nil
}

func TestPickUpFromRecorder(t *testing.T) {
	xs := randomPoints(40, 3, 3)
	full := func(rec Recorder, points [][]float64) (*Evaluator, []*Evaluation) {
		st, _ := SellarStudy(MDF)
		st.Script, st.Seed, st.Recorder, st.Workers = "s", 9, rec, 1
		ev, err := st.NewEvaluator()
		if err != nil {
			t.Fatal(err)
		}
		out, err := ev.Evaluate(context.Background(), points)
		if err != nil {
			t.Fatal(err)
		}
		return ev, out
	}
	// an interrupted run recorded the first 25 points
	partial := &memRecorder{script: "s", seed: 9}
	full(partial, xs[:25])
	// the picked-up run asks for all 40 again
	pickedUp, got := full(partial, xs)
	ref, want := full(nil, xs)
	if c := pickedUp.Counters(); c.PickedUp != 25 || c.Analyses != 15 {
		t.Errorf("picked-up counters %+v, want 25 picked up and 15 analysed", c)
	}
	for i := range want {
		if got[i].ID != want[i].ID || !reflect.DeepEqual(got[i].Design, want[i].Design) || got[i].F[0] != want[i].F[0] {
			t.Fatalf("point %d differs after picking up: %+v vs %+v", i, got[i], want[i])
		}
	}
	if pickedUp.Best().ID != ref.Best().ID {
		t.Errorf("best %d after picking up, %d without", pickedUp.Best().ID, ref.Best().ID)
	}
	// another seed is refused
	st, _ := SellarStudy(MDF)
	st.Script, st.Seed, st.Recorder = "s", 10, partial
	if _, err := st.NewEvaluator(); err == nil || !strings.Contains(err.Error(), "another script or seed") {
		t.Errorf("foreign record accepted: %v", err)
	}
}

// Cost counts what a batch would add to the evaluations: new points once
// each, a picked-up point the first time it is asked for; repeats nothing.
func TestEvaluatorCost(t *testing.T) {
	st, err := SellarStudy(MDF)
	if err != nil {
		t.Fatal(err)
	}
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	xs := randomPoints(6, 3, 11)
	earlier, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	prev, err := earlier.Evaluate(context.Background(), xs[4:6])
	if err != nil {
		t.Fatal(err)
	}
	failed := *prev[0] // a failed analysis of the earlier session
	failed.failed("stands for a failed analysis")
	ev.PickUp([]*Evaluation{&failed, prev[1]})
	if _, err := ev.Evaluate(context.Background(), xs[:2]); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		xs   [][]float64
		want int
	}{
		{"answered before", [][]float64{xs[0], xs[1]}, 0},
		{"new", [][]float64{xs[2], xs[3]}, 2},
		{"new, twice in the batch", [][]float64{xs[2], xs[2], xs[0]}, 1},
		{"picked up, not yet asked for", [][]float64{xs[4], xs[4], xs[5]}, 2},
	}
	for _, tc := range tests {
		if got := ev.Cost(tc.xs); got != tc.want {
			t.Errorf("%s: Cost = %d, want %d", tc.name, got, tc.want)
		}
	}
	before := ev.Counters()
	if _, err := ev.Evaluate(context.Background(), [][]float64{xs[4], xs[4], xs[2], xs[0]}); err != nil {
		t.Fatal(err)
	}
	c := ev.Counters()
	if c.Evaluations-before.Evaluations != 2 || c.PickedUp != 1 || c.Analyses != 3 || c.Repeats-before.Repeats != 2 || c.Evaluations != c.Analyses+c.PickedUp {
		t.Errorf("after a batch costing 2: counters %+v (before %+v); want 2 more evaluations (1 picked up, 1 analysed) and 2 more repeats", c, before)
	}
	if c.Failed != 1 {
		t.Errorf("failed = %d, want 1: the picked-up point whose analysis failed counts", c.Failed)
	}
}
