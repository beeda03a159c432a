package distribute

import (
	"context"
	"fmt"
	"io"
	"sync"

	"couplet/mdo"
	"couplet/repl"
)

// studyServer is the worker side's mdo.Dispatcher: the first Evaluator that
// hands it a batch is the study the worker serves. It hands that
// Evaluator over and holds the batch until the run is over (the script
// on the worker goes no further); batches of any other Evaluator run in
// the worker's own pool.
type studyServer struct {
	ready chan *mdo.Evaluator
	mu    sync.Mutex
	first *mdo.Evaluator
}

// Dispatch implements mdo.Dispatcher.
func (s *studyServer) Dispatch(ctx context.Context, b *mdo.Batch) error {
	s.mu.Lock()
	first := s.first == nil
	if first {
		s.first = b.Evaluator()
	}
	mine := s.first == b.Evaluator()
	s.mu.Unlock()
	if !mine {
		return b.RunHere(ctx)
	}
	if first {
		s.ready <- b.Evaluator()
	}
	<-ctx.Done()
	return ctx.Err()
}

// noRecorder makes no recorder: a worker's evaluations are recorded by
// the coordinator.
func noRecorder(*mdo.Study) (mdo.Recorder, error) { return nil, nil }

// replay runs the run's script on this worker, under the worker's own
// policy and in dir, until its first evaluation reaches s (and then until
// ctx ends). It returns the error of a cell that fails, or nil when the
// script ends or ctx does.
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
			return fmt.Errorf("cell %d (line %d): %w", i+1, c.Line, cl.Err)
		}
	}
	return nil
}
