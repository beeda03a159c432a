package distribute

import (
	"context"
	"crypto/rand"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"sync"
	"time"
	"weak"

	"github.com/nats-io/nats.go"
	"github.com/nats-io/nats.go/jetstream"

	"couplet/mdo"
)

// CoordinatorConfig configures a Coordinator.
type CoordinatorConfig struct {
	// Script is the study file the run replays; workers replay it too.
	Script string
	// Seed, when SeedSet, is the --seed override of the run, which the
	// workers apply as well.
	Seed    uint64
	SeedSet bool
	// AckWait is the acknowledgement deadline: a request whose worker
	// neither answers nor says it is still working within it goes to
	// another worker. Default 30 s; at least 100 ms.
	AckWait time.Duration
	// Build identifies this program (BuildID); workers of another build
	// refuse the run.
	Build string
	// Log receives the workers' notices; nil discards them.
	Log io.Writer
}

// Coordinator sends the analyses of a run's studies to workers over
// JetStream and collects their results: the mdo.Dispatcher of the
// coordinating process. Its Dispatch serves one Evaluator at a time, each
// in turn: an Evaluator whose first batch comes while no batch of the
// served one is out becomes the served one (the optimisations of a script
// run one after another are spread, every one of them). A batch of an
// Evaluator served before, or one that comes while a batch of the served
// one is out (an optimisation the script runs at the same time as
// another), runs in that Evaluator's own pool, which the log says once.
type Coordinator struct {
	conn *Conn
	info runInfo
	log  io.Writer

	cons    jetstream.ConsumeContext
	replies chan reply
	closed  chan struct{} // closed by Close: results are not taken any more
	notes   *nats.Subscription

	mu       sync.Mutex // guards what Dispatch keeps between calls and the counts
	served   *mdo.Evaluator
	ordinal  int    // the served Evaluator's number, from 1
	print    string // its fingerprint
	batch    uint64 // its batches so far
	inflight int    // Dispatch calls of the served Evaluator not returned yet
	// the Evaluators served before (true) and those whose batches ran
	// here, said once (false); weak, so that a loop of optimisations does
	// not keep every one alive
	seen     map[weak.Pointer[mdo.Evaluator]]bool
	duplic   int
	answered int
}

// NewCoordinator registers a run on the server: its durable consumer, its
// entry in the runs bucket (which the workers watch) and the consumers of
// its results and notices.
func NewCoordinator(ctx context.Context, conn *Conn, cfg CoordinatorConfig) (*Coordinator, error) {
	if cfg.AckWait == 0 {
		cfg.AckWait = 30 * time.Second
	}
	if cfg.AckWait < 100*time.Millisecond {
		return nil, fmt.Errorf("distribute: acknowledgement deadline %v: want at least 100ms", cfg.AckWait)
	}
	if cfg.Build == "" {
		return nil, errors.New("distribute: the coordinator's build is not given (BuildID)")
	}
	var id [8]byte
	if _, err := rand.Read(id[:]); err != nil {
		return nil, fmt.Errorf("distribute: making a run id: %w", err)
	}
	host, _ := os.Hostname()
	sum := sha256.Sum256([]byte(cfg.Script))
	c := &Coordinator{conn: conn, log: cfg.Log, replies: make(chan reply, 256), closed: make(chan struct{}), seen: map[weak.Pointer[mdo.Evaluator]]bool{}}
	if c.log == nil {
		c.log = io.Discard
	}
	c.info = runInfo{
		Run: hex.EncodeToString(id[:]), Build: cfg.Build, Script: cfg.Script, ScriptHash: hex.EncodeToString(sum[:]),
		Seed: cfg.Seed, SeedSet: cfg.SeedSet, AckWait: cfg.AckWait, Coordinator: fmt.Sprintf("%s pid %d", host, os.Getpid()),
	}
	run := c.info.Run
	if _, err := conn.js.CreateOrUpdateConsumer(ctx, workStream, jetstream.ConsumerConfig{
		Durable: consumerName(run), FilterSubject: workPrefix + run, AckPolicy: jetstream.AckExplicitPolicy,
		AckWait: cfg.AckWait, MaxDeliver: -1, MaxAckPending: -1,
	}); err != nil {
		return nil, fmt.Errorf("distribute: the run's work consumer: %w", err)
	}
	res, err := conn.js.OrderedConsumer(ctx, resultStream, jetstream.OrderedConsumerConfig{
		FilterSubjects: []string{resultPrefix + run}, DeliverPolicy: jetstream.DeliverAllPolicy,
	})
	if err != nil {
		c.dropConsumer()
		return nil, fmt.Errorf("distribute: the run's result consumer: %w", err)
	}
	if c.cons, err = res.Consume(c.take); err != nil {
		c.dropConsumer()
		return nil, fmt.Errorf("distribute: consuming the run's results: %w", err)
	}
	if c.notes, err = conn.nc.Subscribe(noticePrefix+run, c.noticed); err != nil {
		c.cons.Stop()
		c.dropConsumer()
		return nil, fmt.Errorf("distribute: the run's notices: %w", err)
	}
	b, err := json.Marshal(c.info)
	if err != nil {
		c.Close()
		return nil, fmt.Errorf("distribute: the run's entry: %w", err)
	}
	if _, err := conn.runs.Put(ctx, run, b); err != nil {
		c.Close()
		return nil, fmt.Errorf("distribute: announcing the run in %s: %w", runsBucket, err)
	}
	return c, nil
}

// Run returns the run's id.
func (c *Coordinator) Run() string { return c.info.Run }

// Counts returns how many results were taken and how many were ignored
// as second copies of a result already taken.
func (c *Coordinator) Counts() (taken, duplicates int) {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.answered, c.duplic
}

// take is the result consumer's handler.
func (c *Coordinator) take(m jetstream.Msg) {
	var r reply
	if err := decode(m.Data(), &r); err != nil {
		fmt.Fprintf(c.log, "couplet run: a result of run %s could not be read: %v\n", c.info.Run, err)
		return
	}
	if r.Ended {
		return // the coordinator's own word to the workers
	}
	select {
	case c.replies <- r:
	case <-c.closed:
	}
}

// noticed prints a worker's notice.
func (c *Coordinator) noticed(m *nats.Msg) {
	var n notice
	if err := json.Unmarshal(m.Data, &n); err != nil {
		return
	}
	fmt.Fprintf(c.log, "couplet run: worker %s: %s\n", n.Worker, n.Text)
}

// Dispatch implements mdo.Dispatcher: it publishes one request per point
// and waits for their results.
func (c *Coordinator) Dispatch(ctx context.Context, b *mdo.Batch) error {
	ev, batch, print, here, err := c.serve(ctx, b.Evaluator())
	if err != nil {
		return err
	}
	if here {
		return b.RunHere(ctx)
	}
	defer func() {
		c.mu.Lock()
		c.inflight--
		c.mu.Unlock()
	}()
	run := c.info.Run
	var acks []jetstream.PubAckFuture
	for k := 0; k < b.Len(); k++ {
		req := b.Request(k)
		data, err := encode(request{Evaluator: ev, Batch: batch, Index: k, Fingerprint: print, Design: req.Design})
		if err != nil {
			return err
		}
		f, err := c.conn.js.PublishAsync(workPrefix+run, data, jetstream.WithMsgID(msgID(run, ev, batch, k)))
		if err != nil {
			return fmt.Errorf("distribute: sending request %d of batch %d: %w", k, batch, err)
		}
		acks = append(acks, f)
	}
	for k, f := range acks {
		select {
		case <-f.Ok():
		case err := <-f.Err():
			return fmt.Errorf("distribute: the server did not store request %d of batch %d: %w", k, batch, err)
		case <-ctx.Done():
			c.dropWork()
			return ctx.Err()
		}
	}
	// a run whose workers are all gone (or never came) says so
	quiet := 2 * c.info.AckWait
	timer := time.NewTimer(quiet)
	defer timer.Stop()
	for b.Left() > 0 {
		select {
		case <-ctx.Done():
			c.dropWork()
			return ctx.Err()
		case <-timer.C:
			fmt.Fprintf(c.log, "couplet run: no worker has answered for %v: %d of the %d analyses of batch %d wait (start `couplet worker --connect URL` where the server can be reached)\n", quiet, b.Left(), b.Len(), batch)
			timer.Reset(quiet)
		case r := <-c.replies:
			timer.Reset(quiet)
			if r.Evaluator != ev || r.Batch != batch {
				continue // a late answer to a batch cut short
			}
			if r.Refused != "" {
				c.dropWork()
				return fmt.Errorf("distribute: worker %s refused request %d of batch %d: %s", r.Worker, r.Index, batch, r.Refused)
			}
			took, err := b.Finish(r.Index, r.Result)
			if err != nil {
				c.dropWork()
				return err
			}
			c.mu.Lock()
			if took {
				c.answered++
			} else {
				c.duplic++
			}
			c.mu.Unlock()
		}
	}
	return nil
}

// serve decides where a batch of e goes. It returns the number of the
// spread Evaluator and of the batch, with e's fingerprint, or here when
// the batch runs in e's own pool. An Evaluator that becomes the served one
// ends the turn of the one before: the workers are told how many batches
// it had, so that one replaying the run answers any later batch of it in
// its own pool, as this process does.
func (c *Coordinator) serve(ctx context.Context, e *mdo.Evaluator) (ev int, batch uint64, print string, here bool, err error) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if e != c.served {
		key := weak.Make(e)
		if served, seen := c.seen[key]; seen || c.inflight > 0 {
			if !seen || served {
				why := "another optimisation (study %q) is being spread at the same time: only optimisations run one after another are spread"
				if served {
					why = "its turn ended when the analyses of study %q began to be spread"
				}
				fmt.Fprintf(c.log, "couplet run: the analyses of study %q run on this process: "+why+"\n", e.Study().Name, c.served.Study().Name)
				c.seen[key] = false
			}
			return 0, 0, "", true, nil
		}
		if c.served != nil {
			data, err := encode(reply{Evaluator: c.ordinal, Batch: c.batch, Ended: true})
			if err != nil {
				return 0, 0, "", false, err
			}
			if _, err := c.conn.js.Publish(ctx, resultPrefix+c.info.Run, data, jetstream.WithMsgID(fmt.Sprintf("%s.%d.ended", c.info.Run, c.ordinal))); err != nil {
				return 0, 0, "", false, fmt.Errorf("distribute: telling the workers that the turn of study %q ended: %w", c.served.Study().Name, err)
			}
			c.seen[weak.Make(c.served)] = true
		}
		c.served, c.ordinal, c.print, c.batch = e, c.ordinal+1, e.Fingerprint(), 0
	}
	c.batch++
	c.inflight++
	return c.ordinal, c.batch, c.print, false, nil
}

// dropWork removes the requests of the run not taken yet (a batch cut
// short needs them no more).
func (c *Coordinator) dropWork() {
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	_ = c.conn.work.Purge(ctx, jetstream.WithPurgeSubject(workPrefix+c.info.Run))
}

// dropConsumer deletes the run's work consumer.
func (c *Coordinator) dropConsumer() {
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	_ = c.conn.js.DeleteConsumer(ctx, workStream, consumerName(c.info.Run))
}

// Close ends the run on the server: it deletes the run's entry (the
// workers let go of it), its requests, its consumer and its results.
func (c *Coordinator) Close() error {
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	run := c.info.Run
	close(c.closed)
	err := c.conn.runs.Delete(ctx, run)
	if c.notes != nil {
		_ = c.notes.Unsubscribe()
	}
	if c.cons != nil {
		c.cons.Stop()
	}
	c.dropWork()
	c.dropConsumer()
	_ = c.conn.res.Purge(ctx, jetstream.WithPurgeSubject(resultPrefix+run))
	if err != nil && !errors.Is(err, jetstream.ErrKeyNotFound) {
		return fmt.Errorf("distribute: ending run %s: %w", run, err)
	}
	return nil
}
