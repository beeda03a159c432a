package distribute

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sync"
	"time"

	"github.com/nats-io/nats.go/jetstream"

	"couplet/mdo"
	"couplet/repl"
)

// maxDeliveries is how many times a request is handed out before the
// worker that gets it last answers it as refused: every worker that took
// it before died or stalled on it, so the point itself is the likely
// cause, and the run should say so rather than wait for ever.
const maxDeliveries = 5

// WorkerConfig configures a worker.
type WorkerConfig struct {
	// Name is the worker's name in results and notices; default
	// HOST-PID.
	Name string
	// Dir is the worker's workspace: each run gets a folder of its own
	// in it (the script's output folder on this worker). Empty makes a
	// temporary one.
	Dir string
	// Policy is the sandbox policy under which the worker replays
	// scripts: the worker's own, whatever the coordinator's is.
	Policy repl.Policy
	// Parallel is how many analyses the worker runs at once; default 1.
	// The study's Workers bounds it too.
	Parallel int
	// Build identifies this program (BuildID); a run of another build is
	// refused.
	Build string
	// Log receives what the worker does: the runs it serves or refuses
	// and, with Verbose, every request it takes and answers.
	Log     io.Writer
	Verbose bool
}

// worker is the state of Serve.
type worker struct {
	conn *Conn
	cfg  WorkerConfig
	mu   sync.Mutex // guards log writes
}

// Serve answers the analysis requests of the runs announced on the
// server, one run at a time, until ctx ends.
func Serve(ctx context.Context, conn *Conn, cfg WorkerConfig) error {
	if cfg.Build == "" {
		return errors.New("distribute: the worker's build is not given (BuildID)")
	}
	if cfg.Parallel < 0 {
		return fmt.Errorf("distribute: worker parallel = %d: want 1 or more (0 means 1)", cfg.Parallel)
	}
	if cfg.Parallel == 0 {
		cfg.Parallel = 1
	}
	if cfg.Name == "" {
		host, _ := os.Hostname()
		cfg.Name = fmt.Sprintf("%s-%d", host, os.Getpid())
	}
	if cfg.Log == nil {
		cfg.Log = io.Discard
	}
	if cfg.Dir == "" {
		dir, err := os.MkdirTemp("", "couplet-worker-*")
		if err != nil {
			return fmt.Errorf("distribute: the worker's workspace: %w", err)
		}
		defer os.RemoveAll(dir)
		cfg.Dir = dir
	}
	w := &worker{conn: conn, cfg: cfg}
	watch, err := conn.runs.WatchAll(ctx)
	if err != nil {
		return fmt.Errorf("distribute: watching %s: %w", runsBucket, err)
	}
	defer watch.Stop()
	w.logf("worker %s: waiting for runs", cfg.Name)
	seen := map[string]bool{}
	for {
		var e jetstream.KeyValueEntry
		select {
		case <-ctx.Done():
			return nil
		case e = <-watch.Updates():
		}
		if e == nil || e.Operation() != jetstream.KeyValuePut || seen[e.Key()] {
			continue
		}
		seen[e.Key()] = true
		if _, err := conn.runs.Get(ctx, e.Key()); err != nil {
			continue // over already
		}
		var info runInfo
		if err := json.Unmarshal(e.Value(), &info); err != nil || validRun(info.Run) != nil || info.Run != e.Key() {
			w.logf("worker %s: run entry %q could not be read", cfg.Name, e.Key())
			continue
		}
		w.serveRun(ctx, info)
	}
}

// logf writes a line of the worker's log.
func (w *worker) logf(format string, args ...any) {
	w.mu.Lock()
	defer w.mu.Unlock()
	fmt.Fprintf(w.cfg.Log, format+"\n", args...)
}

// tell sends a notice to the run's coordinator and logs it.
func (w *worker) tell(run, format string, args ...any) {
	text := fmt.Sprintf(format, args...)
	w.logf("worker %s: run %s: %s", w.cfg.Name, run, text)
	b, err := json.Marshal(notice{Worker: w.cfg.Name, Text: text})
	if err == nil {
		_ = w.conn.nc.Publish(noticePrefix+run, b)
		_ = w.conn.nc.Flush()
	}
}

// errRunOver ends the serving of a run whose entry was deleted.
var errRunOver = errors.New("the run is over")

// serveRun checks a run and answers its requests until it is over.
func (w *worker) serveRun(ctx context.Context, info runInfo) {
	run := info.Run
	if info.Build != w.cfg.Build {
		w.tell(run, "refused: another build of couplet; the coordinator runs %q, this worker %q (run the same build on every machine)", info.Build, w.cfg.Build)
		return
	}
	if sum := sha256.Sum256([]byte(info.Script)); hex.EncodeToString(sum[:]) != info.ScriptHash {
		w.tell(run, "refused: the script received has SHA-256 %s, the coordinator announced %s", hex.EncodeToString(sum[:]), info.ScriptHash)
		return
	}
	runCtx, cancel := context.WithCancelCause(ctx)
	defer cancel(nil)
	kw, err := w.conn.runs.Watch(runCtx, run)
	if err != nil {
		w.logf("worker %s: run %s: watching its entry: %v", w.cfg.Name, run, err)
		return
	}
	defer kw.Stop()
	go func() {
		for e := range kw.Updates() {
			if e != nil && e.Operation() != jetstream.KeyValuePut {
				cancel(errRunOver)
				return
			}
		}
	}()
	dir := filepath.Join(w.cfg.Dir, "run-"+run)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		w.tell(run, "refused: making its folder in the workspace: %v", err)
		return
	}
	w.logf("worker %s: run %s of %s: rebuilding the study from the script (SHA-256 %s)", w.cfg.Name, run, info.Coordinator, info.ScriptHash)
	sv := newStudyServer()
	// the run's results, from its first: the replay answers its batches
	// with them
	res, err := w.conn.js.OrderedConsumer(runCtx, resultStream, jetstream.OrderedConsumerConfig{
		FilterSubjects: []string{resultPrefix + run}, DeliverPolicy: jetstream.DeliverAllPolicy,
	})
	var results jetstream.ConsumeContext
	if err == nil {
		results, err = res.Consume(func(m jetstream.Msg) {
			var r reply
			if decode(m.Data(), &r) == nil {
				sv.take(r)
			}
		})
	}
	if err != nil {
		w.tell(run, "refused: reading the run's results: %v", err)
		return
	}
	defer results.Stop()
	ended := make(chan error, 1)
	go func() {
		err := replay(runCtx, info, w.cfg.Policy, dir, sv)
		if err != nil && runCtx.Err() == nil {
			cancel(err)
		}
		ended <- err
	}()
	var ev *mdo.Evaluator
	select {
	case ev = <-sv.ready:
	case <-runCtx.Done():
		if err := <-ended; err != nil && context.Cause(runCtx) == err {
			w.tell(run, "refused: the script does not reach its first evaluation on this worker: %v", err)
		}
		return
	case err := <-ended:
		if runCtx.Err() == nil || (err != nil && context.Cause(runCtx) == err) {
			if err == nil {
				err = errors.New("it evaluates nothing")
			}
			w.tell(run, "refused: the script does not reach its first evaluation on this worker: %v", err)
		}
		return
	}
	cons, err := w.conn.js.Consumer(runCtx, workStream, consumerName(run))
	if err != nil {
		w.tell(run, "refused: finding the run's work consumer: %v", err)
		cancel(err)
		<-ended
		return
	}
	n := min(w.cfg.Parallel, ev.Analyst().Workers())
	w.logf("worker %s: run %s: serving study %q with %d analyses at a time", w.cfg.Name, run, ev.Study().Name, n)
	st := &runState{w: w, info: info, sv: sv, cancel: cancel}
	var wg sync.WaitGroup
	for range n {
		wg.Add(1)
		go func() { defer wg.Done(); st.loop(runCtx, cons) }()
	}
	wg.Wait()
	if err := context.Cause(runCtx); err != nil && !errors.Is(err, errRunOver) && !errors.Is(err, context.Canceled) {
		w.tell(run, "left the run: %v", err)
	}
	cancel(errRunOver)
	st.acks.Wait()
	<-ended
	w.logf("worker %s: run %s: done (%d answered)", w.cfg.Name, run, st.answered)
}

// runState is what the analysis loops of one run share.
type runState struct {
	w        *worker
	info     runInfo
	sv       *studyServer
	cancel   context.CancelCauseFunc
	acks     sync.WaitGroup // acknowledgements waiting for their result to be stored
	mu       sync.Mutex
	answered int
}

// loop takes requests one at a time until the run is over.
func (st *runState) loop(ctx context.Context, cons jetstream.Consumer) {
	for ctx.Err() == nil {
		batch, err := cons.Fetch(1, jetstream.FetchMaxWait(2*time.Second))
		if err != nil {
			if ctx.Err() != nil || errors.Is(err, jetstream.ErrConsumerNotFound) || errors.Is(err, jetstream.ErrConsumerDeleted) {
				return
			}
			st.w.logf("worker %s: run %s: fetching a request: %v", st.w.cfg.Name, st.info.Run, err)
			select {
			case <-ctx.Done():
			case <-time.After(time.Second):
			}
			continue
		}
		for m := range batch.Messages() {
			st.handle(ctx, m)
		}
	}
}

// handle answers one request: it analyses the point while telling the
// server, at a third of the deadline, that it is still at work, publishes
// the result and only then acknowledges the request.
func (st *runState) handle(ctx context.Context, m jetstream.Msg) {
	w, run := st.w, st.info.Run
	var req request
	if err := decode(m.Data(), &req); err != nil {
		w.tell(run, "a request could not be read: %v", err)
		_ = m.Term()
		return
	}
	delivered := uint64(1)
	if md, err := m.Metadata(); err == nil {
		delivered = md.NumDelivered
	}
	id := fmt.Sprintf("%d.%d.%d", req.Evaluator, req.Batch, req.Index)
	rep := reply{Evaluator: req.Evaluator, Batch: req.Batch, Index: req.Index, Worker: w.cfg.Name, Design: req.Design}
	if w.cfg.Verbose {
		w.logf("worker %s: took request %s (delivery %d)", w.cfg.Name, id, delivered)
	}
	// the server hears that the request is at work while the replay
	// reaches its study and while it is analysed
	stop := make(chan struct{})
	go func() {
		t := time.NewTicker(st.info.AckWait / 3)
		defer t.Stop()
		for {
			select {
			case <-t.C:
				_ = m.InProgress()
			case <-stop:
				return
			}
		}
	}()
	t, err := st.sv.analyst(ctx, req.Evaluator)
	switch {
	case errors.Is(err, errStale):
		close(stop)
		_ = m.Term()
		return
	case err != nil:
		close(stop)
		_ = m.Nak()
		if errors.Is(err, errDiverged) {
			st.cancel(err)
		}
		return
	case req.Fingerprint != t.print:
		close(stop)
		st.sv.done(t)
		w.tell(run, "refused: the study this worker rebuilt from the script is not the coordinator's (fingerprint %.12s…, the coordinator's %.12s…): does the script read files, the environment or the clock?", t.print, req.Fingerprint)
		_ = m.Nak()
		st.cancel(errors.New("the study differs"))
		return
	}
	if delivered > maxDeliveries {
		rep.Refused = fmt.Sprintf("it was handed out %d times and no worker answered it: each one died or stalled on it", delivered-1)
	} else {
		r, err := t.a.Analyse(ctx, req.Design)
		switch {
		case err != nil && ctx.Err() != nil:
			close(stop)
			st.sv.done(t)
			_ = m.Nak()
			return
		case err != nil:
			rep.Refused = err.Error()
		default:
			r.Worker = w.cfg.Name
			rep.Result = r
		}
	}
	close(stop)
	st.sv.done(t)
	data, err := encode(rep)
	var stored jetstream.PubAckFuture
	if err == nil {
		stored, err = w.conn.js.PublishAsync(resultPrefix+run, data, jetstream.WithMsgID(msgID(run, req.Evaluator, req.Batch, req.Index)))
	}
	if err != nil {
		w.logf("worker %s: run %s: publishing the result of request %s: %v", w.cfg.Name, run, id, err)
		_ = m.Nak()
		return
	}
	// the request is acknowledged once the server has stored its result;
	// meanwhile the next request is fetched
	st.acks.Add(1)
	go func() {
		defer st.acks.Done()
		select {
		case <-stored.Ok():
			_ = m.Ack()
		case err := <-stored.Err():
			if ctx.Err() == nil {
				w.logf("worker %s: run %s: the server did not store the result of request %s: %v", w.cfg.Name, run, id, err)
			}
			_ = m.Nak()
			return
		case <-ctx.Done():
			return // handed out again when the deadline passes; a second result is dropped
		}
		st.mu.Lock()
		st.answered++
		n := st.answered
		st.mu.Unlock()
		if w.cfg.Verbose {
			w.logf("worker %s: answered request %s (%d answered)", w.cfg.Name, id, n)
		}
	}()
}
