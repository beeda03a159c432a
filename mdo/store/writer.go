package store

import (
	"context"
	"fmt"
	"sync"
	"time"

	"couplet/mdo"
)

// minQueue is the smallest queue of the background writer, so that a
// store with small batches still lets the caller run ahead of the writer.
const minQueue = 256

// writer is the store's background writer. Record and Iteration put rows
// in its queue under mu and return; the writer goroutine takes up to
// BatchSize evaluations (and the iterations queued among them) at a
// time, encodes them and commits them in one transaction: when BatchSize
// evaluations are waiting, when FlushInterval has passed since the last
// commit, or when a flush is asked for. The queue is bounded (limit
// evaluations, limit iterations): a caller that outruns the writer waits
// for room. The first write error is kept and returned by every later
// call.
type writer struct {
	mu   sync.Mutex
	cond sync.Cond // broadcast when rows are taken or committed and when the writer fails or stops

	evs   []*mdo.Evaluation // queued evaluations
	its   []iterRow         // queued iterations
	spare []*mdo.Evaluation // the writer's previous batch, reused as the next queue
	limit int

	queuedEvs int64 // evaluations queued so far
	queued    int64 // rows (evaluations and iterations) queued so far
	committed int64 // rows committed so far
	flushTo   int64 // commit at least this many rows now
	last      time.Time
	stop      bool
	err       error
	rows      int // evaluation rows the store holds

	kick   chan struct{} // wakes the writer goroutine
	exited chan struct{} // closed when the writer goroutine returns
}

// iterRow is a queued optimiser iteration, after the first after
// evaluations.
type iterRow struct {
	p     mdo.Progress
	at    time.Time
	after int64
}

// startWriter starts the background writer; the store holds rows
// committed rows.
func (s *Store) startWriter(rows int) {
	w := &writer{
		limit:  max(4*s.opt.BatchSize, minQueue),
		last:   time.Now(),
		rows:   rows,
		kick:   make(chan struct{}, 1),
		exited: make(chan struct{}),
	}
	w.cond.L = &w.mu
	s.w = w
	go s.writeLoop(w)
}

// inFlight is the most evaluations the store holds by reference: a full
// queue and the batch being written.
func (s *Store) inFlight() int { return max(4*s.opt.BatchSize, minQueue) + s.opt.BatchSize }

// wake wakes the writer goroutine without waiting.
func (w *writer) wake() {
	select {
	case w.kick <- struct{}{}:
	default:
	}
}

// push queues an evaluation, waiting while the queue is full. It returns
// the writer's error, if it has failed.
func (w *writer) push(e *mdo.Evaluation, batch int) error {
	w.mu.Lock()
	for len(w.evs) >= w.limit && w.err == nil && !w.stop {
		w.cond.Wait()
	}
	if err := w.refusal(); err != nil {
		w.mu.Unlock()
		return err
	}
	w.evs = append(w.evs, e)
	w.queuedEvs++
	w.queued++
	n := len(w.evs)
	w.mu.Unlock()
	// the first row of a batch arms the writer's flush timer; a full
	// batch is written at once
	if n == 1 || n == batch {
		w.wake()
	}
	return nil
}

// pushIteration queues an iteration, waiting while the queue is full.
func (w *writer) pushIteration(p mdo.Progress) error {
	w.mu.Lock()
	for len(w.its) >= w.limit && w.err == nil && !w.stop {
		w.cond.Wait()
	}
	if err := w.refusal(); err != nil {
		w.mu.Unlock()
		return err
	}
	w.its = append(w.its, iterRow{p: p, at: time.Now(), after: w.queuedEvs})
	w.queued++
	first := len(w.its) == 1 && len(w.evs) == 0
	w.mu.Unlock()
	if first {
		w.wake()
	}
	return nil
}

// refusal is the writer's error, or an error if it has stopped; mu is held.
func (w *writer) refusal() error {
	if w.err != nil {
		return w.err
	}
	if w.stop {
		return fmt.Errorf("store: the run has ended; no more rows are recorded")
	}
	return nil
}

// flush asks the writer to commit every row queued so far and waits
// until it has, returning the writer's error.
func (w *writer) flush() error {
	w.mu.Lock()
	want := w.queued
	if w.committed < want && w.err == nil {
		w.flushTo = max(w.flushTo, want)
		w.mu.Unlock()
		w.wake()
		w.mu.Lock()
		for w.committed < want && w.err == nil {
			w.cond.Wait()
		}
	}
	err := w.err
	w.mu.Unlock()
	return err
}

// close commits what is queued, stops the writer goroutine and returns
// its error.
func (w *writer) close() error {
	w.mu.Lock()
	w.stop = true
	w.cond.Broadcast()
	w.mu.Unlock()
	w.wake()
	<-w.exited
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.err
}

// committedRows is the number of evaluation rows the store holds.
func (w *writer) committedRows() int {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.rows
}

// writeLoop is the writer goroutine.
func (s *Store) writeLoop(w *writer) {
	defer close(w.exited)
	timer := time.NewTimer(time.Hour)
	timer.Stop()
	defer timer.Stop()
	var batch []*mdo.Evaluation
	var its []iterRow
	for {
		w.mu.Lock()
		for {
			n := len(w.evs) + len(w.its)
			if w.err != nil || (n == 0 && w.stop) {
				w.mu.Unlock()
				return
			}
			if n > 0 {
				wait := s.opt.FlushInterval - time.Since(w.last)
				if len(w.evs) >= s.opt.BatchSize || w.flushTo > w.committed || w.stop || wait <= 0 {
					break
				}
				timer.Reset(wait)
			}
			w.mu.Unlock()
			select {
			case <-w.kick:
			case <-timer.C:
			}
			w.mu.Lock()
		}
		// take a batch: up to BatchSize evaluations and the iterations
		// queued before the last of them
		if len(w.evs) <= s.opt.BatchSize {
			batch, w.evs = w.evs, w.spare[:0]
		} else {
			batch = append(w.spare[:0], w.evs[:s.opt.BatchSize]...)
			rest := copy(w.evs, w.evs[s.opt.BatchSize:])
			clear(w.evs[rest:])
			w.evs = w.evs[:rest]
		}
		w.spare = nil
		taken := w.queuedEvs - int64(len(w.evs))
		k := 0
		for k < len(w.its) && w.its[k].after <= taken {
			k++
		}
		its = append(its[:0], w.its[:k]...)
		rest := copy(w.its, w.its[k:])
		w.its = w.its[:rest]
		w.cond.Broadcast()
		w.mu.Unlock()

		err := s.commit(batch, its)

		w.mu.Lock()
		if err != nil {
			w.err = fmt.Errorf("store: %s: committing %d evaluations: %w", s.path, len(batch), err)
			w.evs, w.its = nil, nil
		} else {
			w.committed += int64(len(batch) + len(its))
			w.rows += len(batch) // a replaced row counts too until End recounts
		}
		w.last = time.Now()
		rows := w.rows
		clear(batch)
		w.spare = batch[:0]
		w.cond.Broadcast()
		w.mu.Unlock()
		if err == nil && s.opt.OnCommit != nil {
			s.opt.OnCommit(rows)
		}
	}
}

// commit writes evaluations and iterations in one transaction.
func (s *Store) commit(evs []*mdo.Evaluation, its []iterRow) error {
	ctx := context.Background()
	return s.inTx(func() error {
		return s.conn.Raw(func(any) error {
			p := evs
			for s.stmtBatch != nil && len(p) >= s.batchRows {
				if _, err := s.stmtBatch.ExecContext(ctx, s.bind(p[:s.batchRows])); err != nil {
					return err
				}
				p = p[s.batchRows:]
			}
			for k := range p {
				if _, err := s.stmtOne.ExecContext(ctx, s.bind(p[k:k+1])); err != nil {
					return err
				}
			}
			for _, it := range its {
				s.args = s.args[:0]
				s.add(int64(s.session), it.p.Optimizer, int64(it.p.Iteration), int64(it.p.Evaluations),
					nanNull(it.p.Best), it.p.Feasible, nanNull(it.p.Violation), it.at.UTC().Format(time.RFC3339Nano))
				if _, err := s.stmtIt.ExecContext(ctx, s.args); err != nil {
					return err
				}
			}
			return nil
		})
	})
}
