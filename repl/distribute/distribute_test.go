package distribute

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/nats-io/nats.go/jetstream"

	"couplet/mdo"
	"couplet/repl"
)

// gaScript is a short GA on the Sellar problem (Sellar, Batill & Renaud
// 1996); its seed comes from cell.Seed.
const gaScript = `//~ couplet-study 1 (couplet 0.1.0)

//~ cell 1
import (
	"couplet/mdo"
	"couplet/optimizers"
	"couplet/repl/cell"
)

study, err := mdo.SellarStudy(mdo.MDF)
if err != nil {
	panic(err)
}
study.Seed = cell.Seed(5)
study.Workers = 2
cell.Attach(study)
res, err := optimizers.GA{Evolution: optimizers.Evolution{Population: 12, Generations: 4}}.Minimize(cell.Context(), study)
if err != nil {
	panic(err)
}
cell.Publish(res)
`

// logBuffer is a log that tests can wait on.
type logBuffer struct {
	mu      sync.Mutex
	b       bytes.Buffer
	changed chan struct{}
}

func newLog() *logBuffer { return &logBuffer{changed: make(chan struct{}, 1)} }

// Write implements io.Writer.
func (l *logBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	select {
	case l.changed <- struct{}{}:
	default:
	}
	return l.b.Write(p)
}

// String returns what was written.
func (l *logBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

// waitFor waits until the log holds text, or the test's context ends.
func (l *logBuffer) waitFor(ctx context.Context, t *testing.T, text string) {
	t.Helper()
	for !strings.Contains(l.String(), text) {
		select {
		case <-l.changed:
		case <-ctx.Done():
			t.Fatalf("the log never said %q; it holds:\n%s", text, l.String())
		}
	}
}

// startHub starts an embedded server for a test.
func startHub(t *testing.T) *Hub {
	t.Helper()
	h, err := StartHub(HubConfig{Token: "test-token", StoreDir: t.TempDir()})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { _ = h.Close() })
	return h
}

// dial connects to the hub.
func dial(t *testing.T, h *Hub, name string) *Conn {
	t.Helper()
	c, err := Connect(context.Background(), h.URL(), name, Auth{Token: h.Token()})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(c.Close)
	return c
}

// startWorker runs a worker goroutine until the test ends.
func startWorker(t *testing.T, h *Hub, cfg WorkerConfig) {
	t.Helper()
	c := dial(t, h, cfg.Name)
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- Serve(ctx, c, cfg) }()
	t.Cleanup(func() {
		cancel()
		if err := <-done; err != nil {
			t.Errorf("worker %s: %v", cfg.Name, err)
		}
	})
}

// runScript replays text with couplet run's machinery under ctx and
// returns the published result.
func runScript(ctx context.Context, t *testing.T, text string) *mdo.Result {
	t.Helper()
	rec, err := repl.Run(ctx, repl.RunOptions{File: writeStudy(t, text), OutDir: t.TempDir()})
	if err != nil {
		t.Fatal(err)
	}
	if rec.Result == nil || rec.Result.Best == nil {
		t.Fatal("the run published no best point")
	}
	return rec.Result
}

// writeStudy writes a study file for a test.
func writeStudy(t *testing.T, text string) string {
	t.Helper()
	file := filepath.Join(t.TempDir(), "study.study")
	if err := os.WriteFile(file, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return file
}

// coordinate makes a Coordinator of text on the hub.
func coordinate(t *testing.T, h *Hub, text string, ack time.Duration, log *logBuffer) *Coordinator {
	t.Helper()
	co, err := NewCoordinator(context.Background(), dial(t, h, "coordinator"), CoordinatorConfig{Script: text, AckWait: ack, Build: "test-build", Log: log})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		if err := co.Close(); err != nil {
			t.Error(err)
		}
	})
	return co
}

// sameBest fails unless the two results have the same best point and
// the same counts, bit for bit.
func sameBest(t *testing.T, want, got *mdo.Result) {
	t.Helper()
	w, g := want.Best, got.Best
	for k := range w.Design {
		if math.Float64bits(w.Design[k]) != math.Float64bits(g.Design[k]) {
			t.Errorf("best design %d: %v here, %v spread", k, w.Design[k], g.Design[k])
		}
	}
	if math.Float64bits(w.F[0]) != math.Float64bits(g.F[0]) || w.ID != g.ID {
		t.Errorf("best point: evaluation %d f = %v here, evaluation %d f = %v spread", w.ID, w.F[0], g.ID, g.F[0])
	}
	if want.EvalCounters != got.EvalCounters {
		t.Errorf("counts: %+v here, %+v spread", want.EvalCounters, got.EvalCounters)
	}
}

// reference runs the GA in-process and starts a hub: what the tests of a
// spread run start from.
func reference(t *testing.T) (context.Context, *mdo.Result, *Hub) {
	ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
	t.Cleanup(cancel)
	return ctx, runScript(ctx, t, gaScript), startHub(t)
}

func TestSpreadRunIsBitIdentical(t *testing.T) {
	ctx, here, h := reference(t)
	co := coordinate(t, h, gaScript, 5*time.Second, newLog())
	for i := range 2 {
		startWorker(t, h, WorkerConfig{Name: fmt.Sprintf("w%d", i+1), Build: "test-build", Parallel: 2})
	}
	spread := runScript(mdo.WithDispatcher(ctx, co), t, gaScript)
	sameBest(t, here, spread)
	if taken, _ := co.Counts(); taken != spread.EvalCounters.Analyses {
		t.Errorf("%d results taken for %d analyses", taken, spread.EvalCounters.Analyses)
	}
}

func TestStalledWorkIsRedelivered(t *testing.T) {
	ctx, here, h := reference(t)
	co := coordinate(t, h, gaScript, 300*time.Millisecond, newLog())
	got := make(chan *mdo.Result, 1)
	go func() { got <- runScript(mdo.WithDispatcher(ctx, co), t, gaScript) }()
	// A consumer that takes one request and never answers it, nor says
	// it is at work: a worker that stalled. The run cannot end unless
	// the request goes to another worker.
	stalled := dial(t, h, "stalled")
	cons, err := stalled.js.Consumer(ctx, workStream, consumerName(co.Run()))
	if err != nil {
		t.Fatal(err)
	}
	for held := false; !held; {
		msgs, err := cons.Fetch(1, jetstream.FetchMaxWait(time.Second))
		if err != nil {
			t.Fatal(err)
		}
		for range msgs.Messages() {
			held = true
		}
	}
	log := newLog()
	startWorker(t, h, WorkerConfig{Name: "w1", Build: "test-build", Log: log, Verbose: true})
	spread := <-got
	sameBest(t, here, spread)
	if !strings.Contains(log.String(), "(delivery 2)") {
		t.Errorf("no request was delivered a second time; the worker's log:\n%s", log)
	}
}

func TestWorkerRefusesAnotherBuild(t *testing.T) {
	ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
	defer cancel()
	h := startHub(t)
	log := newLog()
	co := coordinate(t, h, gaScript, time.Second, log)
	startWorker(t, h, WorkerConfig{Name: "old", Build: "another-build"})
	log.waitFor(ctx, t, `couplet run: worker old: refused: another build of couplet; the coordinator runs "test-build", this worker "another-build"`)
	// with no worker to answer, the run says so until it is stopped
	runCtx, stop := context.WithCancel(ctx)
	ended := make(chan error, 1)
	var rec *repl.RunRecord
	go func() {
		var err error
		rec, err = repl.Run(mdo.WithDispatcher(runCtx, co), repl.RunOptions{File: writeStudy(t, gaScript), OutDir: t.TempDir()})
		ended <- err
	}()
	log.waitFor(ctx, t, "couplet run: no worker has answered for 2s: 12 of the 12 analyses of batch 1 wait")
	stop()
	// the GA comes back from a cancelled batch with what it has: nothing
	if err := <-ended; err == nil && (rec.Result == nil || rec.Result.Evaluations != 0) {
		t.Errorf("the stopped run: %+v", rec.Result)
	}
}

func TestWorkerRefusesAScriptItCannotRun(t *testing.T) {
	ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
	defer cancel()
	h := startHub(t)
	log := newLog()
	coordinate(t, h, strings.Replace(gaScript, `"couplet/mdo"`, `"couplet/mdo"
	"os"`, 1)+"\nos.Getpid()\n", time.Second, log)
	startWorker(t, h, WorkerConfig{Name: "sandboxed", Build: "test-build"})
	log.waitFor(ctx, t, "couplet run: worker sandboxed: refused: the script does not reach its first evaluation on this worker: cell 1")
	if !strings.Contains(log.String(), `"os"`) {
		t.Errorf("the refusal does not name the import the sandbox refused:\n%s", log)
	}
}
