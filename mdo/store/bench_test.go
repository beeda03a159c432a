package store

import (
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"couplet/mdo"
)

// shape is the size of a synthetic run.
type shape struct{ design, cons, outputs int }

// Run shapes: the Sellar problem's, a small aircraft study's, a wide one
// and studies/business_jet.study's (4 design variables, 9 constraints, 236
// outputs: 269 columns of evaluation_data).
var (
	sellarShape   = shape{3, 2, 8}
	aircraftShape = shape{6, 4, 24}
	wideShape     = shape{10, 8, 100}
	jetShape      = shape{4, 9, 236}
)

// syntheticRunOf describes a run of the given shape with one objective.
func syntheticRunOf(sh shape) mdo.RunInfo {
	info := mdo.RunInfo{Study: "bench", Script: "// bench", Optimizer: "synthetic", Seed: 1, Started: time.Now()}
	for k := 0; k < sh.design; k++ {
		info.Design = append(info.Design, mdo.DesignSpec{Name: fmt.Sprintf("wing.x%d", k), Unit: "m", Lower: 0, Upper: 10})
	}
	info.Objectives = []string{"mass.takeoff"}
	for k := 0; k < sh.cons; k++ {
		info.Constraints = append(info.Constraints, fmt.Sprintf("perf.c%d", k))
	}
	for k := 0; k < sh.outputs; k++ {
		info.Outputs = append(info.Outputs, mdo.Var{Name: fmt.Sprintf("out.v%d", k), Unit: "kg"})
	}
	return info
}

// syntheticRun is the aircraft-shaped run used by the tests.
func syntheticRun() mdo.RunInfo { return syntheticRunOf(aircraftShape) }

// syntheticEval fills an evaluation of an aircraft-shaped run with id i.
func syntheticEval(e *mdo.Evaluation, i int) { syntheticEvalOf(e, i, aircraftShape) }

// syntheticEvalOf fills an evaluation of a run of shape sh with id i.
func syntheticEvalOf(e *mdo.Evaluation, i int, sh shape) {
	if e.X == nil {
		e.X, e.Design = make([]float64, sh.design), make([]float64, sh.design)
		e.Objectives, e.F = make([]float64, 1), make([]float64, 1)
		e.Constraints, e.Margins, e.G = make([]float64, sh.cons), make([]float64, sh.cons), make([]float64, sh.cons)
		e.Outputs = make([]float64, sh.outputs)
	}
	e.ID = i
	f := float64(i)
	for k := range e.X {
		e.X[k] = 1 / (f + float64(k) + 1.5)
		e.Design[k] = 10 * e.X[k]
	}
	e.Objectives[0], e.F[0] = 21000+f/7, 21000+f/7
	for k := range e.G {
		e.Constraints[k] = f / 3
		e.Margins[k] = 1 - f/13
		e.G[k] = f/13 - 1
	}
	for k := range e.Outputs {
		e.Outputs[k] = f*0.1 + float64(k)/3
	}
	e.Feasible, e.Converged = i%3 != 0, true
	e.CouplingIterations, e.DisciplineCalls, e.Wall = 9, 27, 12345*time.Nanosecond
}

// BenchmarkRecord measures the cost of recording one evaluation for runs
// shaped like the Sellar problem (3 design variables, 2 constraints, 8
// outputs), a small aircraft study (6, 4, 24), a wide study (10, 8, 100)
// and the business jet (4, 9, 236), committed in batches of 4096 in WAL mode (COUPLET_BENCH_BATCH
// changes the batch size), in two ways:
//
//   - end-to-end: Record back to back, then Flush; ns/op is the wall time
//     per evaluation until the last one is committed, which is the
//     store's throughput (the caller waits whenever the bounded queue is
//     full), and cpu-ns/op the CPU time of the whole process per
//     evaluation (the caller, the encoder and the committer).
//   - caller-side-2us and caller-side-25us: the caller spins for 2 µs or
//     25 µs (a simulated analysis: a Sellar MDA takes about 1.5 µs in
//     mdo's BenchmarkSellarMDA, an aircraft MDA about 130 µs in
//     disciplines' BenchmarkAircraftMDA) before each Record;
//     record-ns/eval is the time spent inside Record, the cost seen by
//     the optimiser's goroutine while the writer works beside it. When
//     the writer needs more time per row than the analysis, the caller
//     waits for it and record-ns/eval shows the difference.
func BenchmarkRecord(b *testing.B) {
	for _, tc := range []struct {
		name string
		sh   shape
	}{{"sellar", sellarShape}, {"aircraft", aircraftShape}, {"wide", wideShape}, {"business-jet", jetShape}} {
		b.Run(tc.name+"/end-to-end", func(b *testing.B) { benchRecord(b, tc.sh, 0) })
		b.Run(tc.name+"/caller-side-2us", func(b *testing.B) { benchRecord(b, tc.sh, 2*time.Microsecond) })
		b.Run(tc.name+"/caller-side-25us", func(b *testing.B) { benchRecord(b, tc.sh, 25*time.Microsecond) })
	}
}

// benchRecord records b.N evaluations of a run of shape sh, spinning for
// work before each one (none: back to back).
func benchRecord(b *testing.B, sh shape, work time.Duration) {
	path := filepath.Join(b.TempDir(), "bench.db")
	batch, _ := strconv.Atoi(os.Getenv("COUPLET_BENCH_BATCH"))
	s, err := Create(path, Options{ToolVersion: "bench", BatchSize: batch})
	if err != nil {
		b.Fatal(err)
	}
	defer s.Close()
	if err := s.Begin(syntheticRunOf(sh)); err != nil {
		b.Fatal(err)
	}
	// the store keeps the evaluations it has not committed by reference,
	// so the ring of records outlasts them
	evs := make([]mdo.Evaluation, s.inFlight()+1)
	for k := range evs {
		syntheticEvalOf(&evs[k], k, sh)
	}
	var inRecord time.Duration
	b.ReportAllocs()
	cpu0 := cpuTime()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		e := &evs[i%len(evs)]
		syntheticEvalOf(e, i, sh)
		if work > 0 {
			for t0 := time.Now(); time.Since(t0) < work; {
			}
			t0 := time.Now()
			err = s.Record(e)
			inRecord += time.Since(t0)
		} else {
			err = s.Record(e)
		}
		if err != nil {
			b.Fatal(err)
		}
	}
	if err := s.Flush(); err != nil {
		b.Fatal(err)
	}
	b.StopTimer()
	if work > 0 {
		b.ReportMetric(float64(inRecord.Nanoseconds())/float64(b.N), "record-ns/eval")
		return
	}
	// CPU time is less disturbed than wall time by other work on the machine
	b.ReportMetric(float64((cpuTime()-cpu0).Nanoseconds())/float64(b.N), "cpu-ns/op")
}

// cpuTime returns the process's user plus system CPU time.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// BenchmarkRecordMillion records a million evaluations of the
// aircraft-shaped run (6 design variables, 4 constraints, 24 outputs) and
// reports the peak heap and the peak resident set size as metrics.
func BenchmarkRecordMillion(b *testing.B) {
	const n = 1_000_000
	for it := 0; it < b.N; it++ {
		path := filepath.Join(b.TempDir(), "million.db")
		s, err := Create(path, Options{ToolVersion: "bench"})
		if err != nil {
			b.Fatal(err)
		}
		if err := s.Begin(syntheticRun()); err != nil {
			b.Fatal(err)
		}
		evs := make([]mdo.Evaluation, s.inFlight()+1)
		var ms runtime.MemStats
		peakHeap := uint64(0)
		start := time.Now()
		for i := 0; i < n; i++ {
			e := &evs[i%len(evs)]
			syntheticEval(e, i)
			if err := s.Record(e); err != nil {
				b.Fatal(err)
			}
			if i%50000 == 0 {
				runtime.ReadMemStats(&ms)
				peakHeap = max(peakHeap, ms.HeapInuse)
			}
		}
		if err := s.End(nil); err != nil {
			b.Fatal(err)
		}
		el := time.Since(start)
		s.Close()
		r, err := Open(path)
		if err != nil {
			b.Fatal(err)
		}
		if r.Rows() != n {
			b.Fatalf("the store holds %d rows, want %d", r.Rows(), n)
		}
		r.Close()
		runtime.ReadMemStats(&ms)
		peakHeap = max(peakHeap, ms.HeapInuse)
		b.ReportMetric(float64(peakHeap)/(1<<20), "peak-heap-MB")
		b.ReportMetric(float64(ms.Sys)/(1<<20), "go-sys-MB")
		if hwm, ok := peakRSS(); ok {
			b.ReportMetric(hwm/(1<<20), "peak-RSS-MB")
		}
		b.ReportMetric(float64(el.Nanoseconds())/n, "ns/eval")
		if st, err := os.Stat(path); err == nil {
			b.ReportMetric(float64(st.Size())/(1<<20), "file-MB")
		}
	}
}

// peakRSS reads VmHWM (peak resident set) from /proc/self/status.
func peakRSS() (float64, bool) {
	b, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0, false
	}
	for _, line := range strings.Split(string(b), "\n") {
		if strings.HasPrefix(line, "VmHWM:") {
			f := strings.Fields(line)
			if len(f) >= 2 {
				kb, err := strconv.ParseFloat(f[1], 64)
				return kb * 1024, err == nil
			}
		}
	}
	return 0, false
}

// BenchmarkEndAndClose times End and Close of a business-jet-shaped run
// of 2 000 evaluations (4.8 MB of rows, up to 2 MiB of them still in the
// write-ahead log): what a run waits for once the optimiser is done.
// End copies the log into the file (so that the file alone holds the
// run), which Close did before: end-ns is End's share, close-ns Close's.
func BenchmarkEndAndClose(b *testing.B) {
	var inEnd, inClose time.Duration
	for i := 0; i < b.N; i++ {
		b.StopTimer()
		s, err := Create(filepath.Join(b.TempDir(), "bench.db"), Options{ToolVersion: "bench"})
		if err != nil {
			b.Fatal(err)
		}
		if err := s.Begin(syntheticRunOf(jetShape)); err != nil {
			b.Fatal(err)
		}
		for k := 0; k < 2000; k++ {
			e := new(mdo.Evaluation)
			syntheticEvalOf(e, k, jetShape)
			if err := s.Record(e); err != nil {
				b.Fatal(err)
			}
		}
		if err := s.Flush(); err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		t0 := time.Now()
		if err := s.End(&mdo.Result{Stop: mdo.StopBudget}); err != nil {
			b.Fatal(err)
		}
		t1 := time.Now()
		if err := s.Close(); err != nil {
			b.Fatal(err)
		}
		inEnd, inClose = inEnd+t1.Sub(t0), inClose+time.Since(t1)
	}
	b.ReportMetric(float64(inEnd.Nanoseconds())/float64(b.N), "end-ns")
	b.ReportMetric(float64(inClose.Nanoseconds())/float64(b.N), "close-ns")
}
