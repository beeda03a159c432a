package distribute

import (
	"context"
	"fmt"
	"strings"
	"testing"
	"time"

	"couplet/mdo"
)

// sleepScript is a study whose one discipline sleeps for the analysis
// time given (in ms) before it answers, evaluated in ROUNDS batches of
// BATCH points after a first one, as the benchmark's coordinator does:
// the workers replay it to follow the run.
const sleepScript = `//~ couplet-study 1 (couplet 0.1.0)

//~ cell 1
import (
	"time"

	"couplet/mdo"
	"couplet/repl/cell"
)

slow := mdo.FuncVars("sleeper",
	[]mdo.Var{{Name: "a", Default: 0.5, Min: 0, Max: 1}, {Name: "b", Default: 0.5, Min: 0, Max: 1}},
	[]mdo.Var{{Name: "f", Default: 1, Min: -1e9, Max: 1e9}},
	func(in, out []float64) error {
		time.Sleep(SLEEP * time.Millisecond)
		out[0] = in[0]*in[0] + in[1]*in[1]
		return nil
	})
sys, err := mdo.NewSystem(slow)
if err != nil {
	panic(err)
}
study := &mdo.Study{
	Name:       "sleeper",
	System:     sys,
	Design:     []mdo.DesignVar{mdo.Continuous("a", 0, 1), mdo.Continuous("b", 0, 1)},
	Objectives: []mdo.Objective{mdo.Minimize("f")},
	Workers:    1,
}
ev, err := study.NewEvaluator()
if err != nil {
	panic(err)
}
n, rounds := BATCH, ROUNDS
batch := func(i int) [][]float64 {
	xs := make([][]float64, n)
	for k := range xs {
		xs[k] = []float64{float64(i*n+k+1) / float64(n*(rounds+2)), 0.5}
	}
	return xs
}
if _, err := ev.Evaluate(cell.Context(), batch(rounds+1)); err != nil {
	panic(err)
}
for i := 0; i < rounds; i++ {
	if _, err := ev.Evaluate(cell.Context(), batch(i)); err != nil {
		panic(err)
	}
}
`

// sleeperStudy is the study of sleepScript built in Go, as the
// coordinator's side of the benchmark (its fingerprint is the script's).
func sleeperStudy(b *testing.B, sleep time.Duration) *mdo.Study {
	slow := mdo.FuncVars("sleeper",
		[]mdo.Var{{Name: "a", Default: 0.5, Min: 0, Max: 1}, {Name: "b", Default: 0.5, Min: 0, Max: 1}},
		[]mdo.Var{{Name: "f", Default: 1, Min: -1e9, Max: 1e9}},
		func(in, out []float64) error {
			time.Sleep(sleep)
			out[0] = in[0]*in[0] + in[1]*in[1]
			return nil
		})
	sys, err := mdo.NewSystem(slow)
	if err != nil {
		b.Fatal(err)
	}
	return &mdo.Study{
		Name: "sleeper", System: sys, Workers: 1,
		Design:     []mdo.DesignVar{mdo.Continuous("a", 0, 1), mdo.Continuous("b", 0, 1)},
		Objectives: []mdo.Objective{mdo.Minimize("f")},
	}
}

// BenchmarkSpreadSleep sends batches of analyses that sleep 50 ms (and,
// for the bare overhead, 0 ms) to 1, 2 and 4 in-process workers over an
// embedded JetStream server. One op is a batch of 8 analyses per worker.
// It reports the throughput, its share of the ideal (workers / sleep) and
// the overhead per analysis: (elapsed × workers − analyses × sleep) /
// analyses.
//
//	go test -run XXX -bench SpreadSleep -benchtime 10x ./repl/distribute/
func BenchmarkSpreadSleep(b *testing.B) {
	for _, tc := range []struct {
		sleep   time.Duration
		workers int
	}{{50 * time.Millisecond, 1}, {50 * time.Millisecond, 2}, {50 * time.Millisecond, 4}, {0, 1}, {0, 4}} {
		b.Run(fmt.Sprintf("sleep=%v/workers=%d", tc.sleep, tc.workers), func(b *testing.B) {
			h, err := StartHub(HubConfig{Token: "bench", StoreDir: b.TempDir()})
			if err != nil {
				b.Fatal(err)
			}
			defer h.Close()
			conn, err := Connect(context.Background(), h.URL(), "bench", Auth{Token: "bench"})
			if err != nil {
				b.Fatal(err)
			}
			defer conn.Close()
			n := 8 * tc.workers
			script := strings.NewReplacer("SLEEP", fmt.Sprint(tc.sleep.Milliseconds()), "BATCH", fmt.Sprint(n), "ROUNDS", fmt.Sprint(b.N)).Replace(sleepScript)
			co, err := NewCoordinator(context.Background(), conn, CoordinatorConfig{Script: script, Build: "bench", AckWait: 10 * time.Second})
			if err != nil {
				b.Fatal(err)
			}
			defer co.Close()
			ctx, cancel := context.WithCancel(context.Background())
			done := make(chan error, tc.workers)
			for k := range tc.workers {
				wc, err := Connect(ctx, h.URL(), "bench worker", Auth{Token: "bench"})
				if err != nil {
					b.Fatal(err)
				}
				defer wc.Close()
				go func() { done <- Serve(ctx, wc, WorkerConfig{Name: fmt.Sprint("w", k), Build: "bench"}) }()
			}
			ev, err := sleeperStudy(b, tc.sleep).NewEvaluator()
			if err != nil {
				b.Fatal(err)
			}
			dctx := mdo.WithDispatcher(ctx, co)
			batch := func(i int) [][]float64 {
				xs := make([][]float64, n)
				for k := range xs {
					xs[k] = []float64{float64(i*n+k+1) / float64(n*(b.N+2)), 0.5}
				}
				return xs
			}
			// a first batch waits for the workers to rebuild the study
			if _, err := ev.Evaluate(dctx, batch(b.N+1)); err != nil {
				b.Fatal(err)
			}
			b.ResetTimer()
			for i := range b.N {
				if _, err := ev.Evaluate(dctx, batch(i)); err != nil {
					b.Fatal(err)
				}
			}
			b.StopTimer()
			analyses := float64(n * b.N)
			elapsed := b.Elapsed().Seconds()
			b.ReportMetric(analyses/elapsed, "analyses/s")
			if tc.sleep > 0 {
				ideal := float64(tc.workers) / tc.sleep.Seconds()
				b.ReportMetric(100*analyses/elapsed/ideal, "%ideal")
			}
			b.ReportMetric(1e3*(elapsed*float64(tc.workers)-analyses*tc.sleep.Seconds())/analyses, "ms-overhead/analysis")
			if got := ev.Counters().Analyses; got != n*(b.N+1) {
				b.Errorf("%d analyses counted, want %d", got, n*(b.N+1))
			}
			cancel()
			for range tc.workers {
				if err := <-done; err != nil {
					b.Error(err)
				}
			}
		})
	}
}
