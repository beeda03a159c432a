package distribute

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"sync"
	"weak"

	"couplet/mdo"
	"couplet/repl"
)

// errDiverged wraps the reason a worker's replay of a run went another way
// than the coordinator's: it cannot serve the run any more.
var errDiverged = errors.New("the script ran differently on this worker than on the coordinator")

// studyServer is the worker side's mdo.Dispatcher. The worker's replay of
// the script follows the coordinator's run: its Evaluators take their
// turns by the coordinator's rules (see Coordinator), so the k-th served
// one here is the coordinator's k-th, and each of their batches is
// answered with the results the run's workers published for the
// coordinator's batch of the same numbers (the worker serves them too),
// after checking that the designs are the same bits. The replay thus
// reaches every later optimisation of the script with the state the
// coordinator had, and the worker can serve it.
type studyServer struct {
	ready chan *mdo.Evaluator // the first served Evaluator

	mu       sync.Mutex
	changed  chan struct{} // closed and replaced when anything below changes
	served   *mdo.Evaluator
	ordinal  int
	batch    uint64
	inflight int
	seen     map[weak.Pointer[mdo.Evaluator]]bool
	turns    map[int]*turn
	results  map[slot]reply
	ended    map[int]uint64 // the coordinator's word: Evaluator k had this many spread batches
	taken    map[int]uint64 // the last batch of Evaluator k answered here
	lost     error          // why the replay cannot follow the run any more
}

// turn is an Evaluator of the replay served in its turn: the worker
// analyses the coordinator's requests for it only while the replay is in
// one of its Dispatch calls (open), when the Evaluator itself does not
// touch its state, and no more once the turn is over.
type turn struct {
	a      *mdo.Analyst
	print  string
	open   bool
	over   bool
	active int // analyses running
}

// slot names a request: the Evaluator's number, the batch, the index.
type slot struct {
	ev    int
	batch uint64
	index int
}

func newStudyServer() *studyServer {
	return &studyServer{
		ready: make(chan *mdo.Evaluator, 1), changed: make(chan struct{}),
		seen: map[weak.Pointer[mdo.Evaluator]]bool{}, turns: map[int]*turn{},
		results: map[slot]reply{}, ended: map[int]uint64{}, taken: map[int]uint64{},
	}
}

// notify wakes those waiting for a change; s.mu is held.
func (s *studyServer) notify() {
	close(s.changed)
	s.changed = make(chan struct{})
}

// wait waits, s.mu held, until ok() holds or ctx ends (then ctx's error).
func (s *studyServer) wait(ctx context.Context, ok func() bool) error {
	for !ok() {
		ch := s.changed
		s.mu.Unlock()
		select {
		case <-ch:
		case <-ctx.Done():
		}
		s.mu.Lock()
		if ctx.Err() != nil {
			return ctx.Err()
		}
	}
	return nil
}

// take files a reply the run's result stream delivered.
func (s *studyServer) take(r reply) {
	s.mu.Lock()
	defer s.mu.Unlock()
	switch {
	case r.Ended:
		s.ended[r.Evaluator] = r.Batch
	case r.Batch <= s.taken[r.Evaluator] || (s.turns[r.Evaluator] != nil && s.turns[r.Evaluator].over):
		return // answered here already, or of a turn over
	default:
		k := slot{r.Evaluator, r.Batch, r.Index}
		if _, ok := s.results[k]; ok {
			return // the first result of a request is the one taken
		}
		s.results[k] = r
	}
	s.notify()
}

// diverge records why the replay cannot follow the run; s.mu is held.
func (s *studyServer) diverge(format string, args ...any) error {
	err := fmt.Errorf("%w: "+format, append([]any{errDiverged}, args...)...)
	if s.lost == nil {
		s.lost = err
	}
	s.notify()
	return err
}

// Dispatch implements mdo.Dispatcher.
func (s *studyServer) Dispatch(ctx context.Context, b *mdo.Batch) error {
	s.mu.Lock()
	defer s.mu.Unlock()
	e := b.Evaluator()
	if e != s.served {
		key := weak.Make(e)
		if _, seen := s.seen[key]; seen || s.inflight > 0 {
			s.seen[key] = false
			s.mu.Unlock()
			defer s.mu.Lock()
			return b.RunHere(ctx) // as the coordinator does
		}
		if s.served != nil {
			s.seen[weak.Make(s.served)] = true
			t := s.turns[s.ordinal]
			t.over, t.open = true, false
		}
		s.served, s.ordinal, s.batch = e, s.ordinal+1, 0
		s.turns[s.ordinal] = &turn{a: e.Analyst(), print: e.Fingerprint()}
		if s.ordinal == 1 {
			s.ready <- e
		}
	}
	ev, t := s.ordinal, s.turns[s.ordinal]
	s.batch++
	batch := s.batch
	if n, ok := s.ended[ev]; ok && batch > n {
		return s.diverge("study %q asks for a batch %d here; on the coordinator its turn ended after %d", e.Study().Name, batch, n)
	}
	s.inflight++
	t.open = true
	s.notify()
	defer func() {
		// the Evaluator takes its answers: no analysis of it may run then
		t.open = false
		for t.active > 0 {
			ch := s.changed
			s.mu.Unlock()
			<-ch
			s.mu.Lock()
		}
		s.inflight--
		s.taken[ev] = batch
		for k := range b.Len() {
			delete(s.results, slot{ev, batch, k})
		}
		s.notify()
	}()
	for k := range b.Len() {
		var r reply
		err := s.wait(ctx, func() bool {
			var ok bool
			r, ok = s.results[slot{ev, batch, k}]
			if n, end := s.ended[ev]; !ok && end && n < batch {
				s.diverge("study %q asks for a batch %d here; on the coordinator its turn ended after %d", e.Study().Name, batch, n)
			}
			return ok || s.lost != nil
		})
		switch {
		case err != nil:
			return err
		case s.lost != nil:
			return s.lost
		case r.Refused != "":
			// the coordinator stops on it: so does the replay
			return fmt.Errorf("distribute: worker %s refused request %d of batch %d: %s", r.Worker, k, batch, r.Refused)
		}
		want := b.Request(k).Design
		if !slices.EqualFunc(want, r.Design, func(x, y float64) bool { return math.Float64bits(x) == math.Float64bits(y) }) {
			return s.diverge("analysis %d of batch %d of study %q is at %v here, at %v on the coordinator (does the script read files, the environment or the clock, or run optimisations at the same time?)", k+1, batch, e.Study().Name, want, r.Design)
		}
		if _, err := b.Finish(k, r.Result); err != nil {
			return s.diverge("%v", err)
		}
	}
	return nil
}

// errStale says a request is of an Evaluator whose turn is over here:
// the coordinator needs its answer no more.
var errStale = errors.New("the turn of its study is over")

// analyst waits until the replay serves Evaluator ev and is in one of its
// Dispatch calls, and returns its turn with an analysis counted as
// running (release it with done). It returns errStale when the turn is
// over, the reason when the replay cannot follow the run, or ctx's error.
func (s *studyServer) analyst(ctx context.Context, ev int) (*turn, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	var t *turn
	err := s.wait(ctx, func() bool {
		t = s.turns[ev]
		return s.lost != nil || (t != nil && (t.open || t.over))
	})
	switch {
	case err != nil:
		return nil, err
	case s.lost != nil:
		return nil, s.lost
	case t.over:
		return nil, errStale
	}
	t.active++
	return t, nil
}

// done ends an analysis analyst counted.
func (s *studyServer) done(t *turn) {
	s.mu.Lock()
	defer s.mu.Unlock()
	t.active--
	s.notify()
}

// noRecorder makes no recorder: a worker's evaluations are recorded by
// the coordinator.
func noRecorder(*mdo.Study) (mdo.Recorder, error) { return nil, nil }

// replay runs the run's script on this worker, under the worker's own
// policy and in dir, its spread Evaluators dispatching to s. It returns
// the error of a cell that fails, or nil when the script ends or ctx
// does.
func replay(ctx context.Context, info runInfo, policy repl.Policy, dir string, s *studyServer) error {
	f, err := repl.ParseStudy(info.Script)
	if err != nil {
		return err
	}
	sess, err := repl.NewSession(repl.Options{
		Policy: policy, Stdout: io.Discard, Stderr: io.Discard, NoErrorEcho: true, OutDir: dir,
		Seed: info.Seed, SeedSet: info.SeedSet, Script: info.Script, Recorder: noRecorder,
	})
	if err != nil {
		return err
	}
	defer sess.Close()
	ctx = mdo.WithDispatcher(ctx, s)
	for i, c := range f.Cells {
		if ctx.Err() != nil {
			return nil
		}
		if cl := sess.Exec(ctx, c.Source); cl.Err != nil {
			if ctx.Err() != nil {
				return nil
			}
			s.mu.Lock()
			lost := s.lost
			s.mu.Unlock()
			if lost != nil {
				return lost
			}
			return fmt.Errorf("cell %d (line %d): %w", i+1, c.Line, cl.Err)
		}
	}
	return nil
}
