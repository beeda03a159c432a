package mdo

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"sync"
	"testing"
)

// farSide is a Dispatcher that answers each batch with an Analyst of a
// second Evaluator of the same study, as a worker process would: results
// come back in reverse order, each twice, from goroutines of their own.
type farSide struct {
	analyst *Analyst
	name    string
	batches int
	taken   int
}

// Dispatch implements Dispatcher.
func (f *farSide) Dispatch(ctx context.Context, b *Batch) error {
	f.batches++
	var wg sync.WaitGroup
	var mu sync.Mutex
	var firstErr error
	for k := b.Len() - 1; k >= 0; k-- {
		req := b.Request(k)
		wg.Add(1)
		go func() {
			defer wg.Done()
			r, err := f.analyst.Analyse(ctx, req.Design)
			if err != nil {
				mu.Lock()
				firstErr = err
				mu.Unlock()
				return
			}
			r.Worker = f.name
			for range 2 {
				took, err := b.Finish(req.Index, r)
				mu.Lock()
				if took {
					f.taken++
				}
				if err != nil {
					firstErr = err
				}
				mu.Unlock()
			}
		}()
	}
	wg.Wait()
	return firstErr
}

// sellarAnalyst builds a second Evaluator of the Sellar study, as a
// worker that rebuilt it would, and returns its Analyst.
func sellarAnalyst(t *testing.T, form Formulation) (*Analyst, string) {
	far := sellarEvaluator(t, form, 3)
	return far.Analyst(), far.Fingerprint()
}

// sellarEvaluator returns an Evaluator of the Sellar study.
func sellarEvaluator(t *testing.T, form Formulation, workers int) *Evaluator {
	t.Helper()
	st, err := SellarStudy(form)
	if err != nil {
		t.Fatal(err)
	}
	st.Workers = workers
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	return ev
}

func TestDispatchedRunIsBitIdentical(t *testing.T) {
	for _, form := range []Formulation{MDF, IDF} {
		t.Run(form.String(), func(t *testing.T) {
			run := func(ctx context.Context) ([]*Evaluation, *Evaluator) {
				ev := sellarEvaluator(t, form, 2)
				var all []*Evaluation
				for batch := range 3 {
					xs := randomPoints(16, ev.Dim(), uint64(batch+1))
					xs = append(xs, xs[0]) // a repeat within the batch
					out, err := ev.Evaluate(ctx, xs)
					if err != nil {
						t.Fatal(err)
					}
					all = append(all, out...)
				}
				for _, e := range all {
					e.Wall = 0
				}
				return all, ev
			}
			here, hereEv := run(context.Background())
			analyst, print := sellarAnalyst(t, form)
			far := &farSide{analyst: analyst, name: "w1"}
			there, thereEv := run(WithDispatcher(context.Background(), far))
			for i := range here {
				h, th := fmt.Sprintf("%+v", *here[i]), fmt.Sprintf("%+v", *there[i])
				// a failure says which worker ran it; nothing else differs
				th = strings.Replace(th, "Err:on worker w1: ", "Err:", 1)
				if h != th {
					t.Fatalf("evaluation %d differs:\nhere  %s\nthere %s", i, h, th)
				}
			}
			if far.batches != 3 || far.taken != 48 {
				t.Errorf("dispatcher saw %d batches and %d results taken, want 3 and 48 (each sent twice)", far.batches, far.taken)
			}
			if hereEv.Counters() != thereEv.Counters() {
				t.Errorf("counters differ: %+v and %+v", hereEv.Counters(), thereEv.Counters())
			}
			if hereEv.Fingerprint() != print || thereEv.Fingerprint() != print {
				t.Error("the same study has different fingerprints")
			}
		})
	}
}

func TestFingerprintTellsStudiesApart(t *testing.T) {
	base, _ := SellarStudy(MDF)
	eb, err := base.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name   string
		change func(st *Study)
	}{
		{"seed", func(st *Study) { st.Seed++ }},
		{"bounds", func(st *Study) { st.Design[0].Upper = 9 }},
		{"fixed value", func(st *Study) { st.Fixed = map[string]float64{"x": 0.5} }},
		{"name", func(st *Study) { st.Name += "-2" }},
	} {
		st, _ := SellarStudy(MDF)
		tc.change(st)
		e, err := st.NewEvaluator()
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if e.Fingerprint() == eb.Fingerprint() {
			t.Errorf("a change of %s leaves the fingerprint as it was", tc.name)
		}
	}
}

func TestDispatchedFailureNamesTheWorker(t *testing.T) {
	study := func() *Study {
		return &Study{Name: "runaway", System: runaway(t), Design: []DesignVar{Continuous("p", 0, 10)},
			Objectives: []Objective{Minimize("y2")}, Workers: 1}
	}
	far, err := study().NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	ev, err := study().NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	ctx := WithDispatcher(context.Background(), &farSide{analyst: far.Analyst(), name: "bench-7"})
	e, err := ev.EvaluateOne(ctx, []float64{0.5})
	if err != nil {
		t.Fatal(err)
	}
	if e.Converged || e.Failure != DoesNotClose || !strings.HasPrefix(e.Err, "on worker bench-7: ") || !strings.Contains(e.Err, "y1") {
		t.Errorf("failed point recorded as Err %q, Failure %v", e.Err, e.Failure)
	}
	if e.Outputs != nil || ev.Counters().Failed != 1 {
		t.Errorf("a failed analysis keeps outputs %v, failed count %d", e.Outputs, ev.Counters().Failed)
	}
}

// refusing is a Dispatcher that checks what it is given and fails.
type refusing struct{ t *testing.T }

// Dispatch implements Dispatcher.
func (r refusing) Dispatch(ctx context.Context, b *Batch) error {
	if _, err := b.Finish(b.Len(), AnalysisResult{}); err == nil || !strings.Contains(err.Error(), "request 1 of a batch of 1") {
		r.t.Errorf("out of range: %v", err)
	}
	if took, err := b.Finish(0, AnalysisResult{Analysis: Evaluation{Objectives: []float64{1}}, Worker: "odd"}); took || err == nil || !strings.Contains(err.Error(), `(worker "odd"): it has 0 minimised objectives, the study has 1`) {
		r.t.Errorf("misfit result taken %v: %v", took, err)
	}
	return errors.New("no worker is connected")
}

func TestDispatcherErrorsReachTheCaller(t *testing.T) {
	st, _ := SellarStudy(MDF)
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	out, err := ev.EvaluateOne(WithDispatcher(context.Background(), refusing{t}), []float64{0.5, 0.5, 0.5})
	if out != nil || err == nil || !strings.Contains(err.Error(), `study "sellar": dispatching 1 analyses: no worker is connected`) {
		t.Errorf("got %v, %v", out, err)
	}
	if c := ev.Counters(); c.Evaluations != 0 {
		t.Errorf("an unanswered point was counted: %+v", c)
	}
}

// handBack is a Dispatcher that sends everything back to the pool.
type handBack struct{}

// Dispatch implements Dispatcher.
func (handBack) Dispatch(ctx context.Context, b *Batch) error { return b.RunHere(ctx) }

func TestBatchRunHereIsThePool(t *testing.T) {
	run := func(ctx context.Context) []*Evaluation {
		ev := sellarEvaluator(t, MDF, 0)
		out, err := ev.Evaluate(ctx, randomPoints(12, 3, 5))
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range out {
			e.Wall = 0
		}
		return out
	}
	if a, b := describe(run(context.Background())), describe(run(WithDispatcher(context.Background(), handBack{}))); a != b {
		t.Fatal("RunHere differs from the pool")
	}
}

func TestAnalystRefusesBadDesigns(t *testing.T) {
	a, _ := sellarAnalyst(t, MDF)
	for _, tc := range []struct {
		design []float64
		want   string
	}{
		{[]float64{1, 2}, "design of 2 values, the study \"sellar\" has 3 coordinates"},
		{[]float64{20, 2, 1}, "design value x = 20 is outside its bounds [0, 10]"},
	} {
		if _, err := a.Analyse(context.Background(), tc.design); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%v: got %v, want %q", tc.design, err, tc.want)
		}
	}
}

// describe writes out every field of the evaluations (NaN and all: %v
// writes a float64 in the shortest form that reads back to the same bits).
func describe(evs []*Evaluation) string {
	var b strings.Builder
	for _, e := range evs {
		fmt.Fprintf(&b, "%+v\n", *e)
	}
	return b.String()
}
