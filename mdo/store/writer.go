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
// in its queue under mu and return. Two goroutines do the rest, as a
// pipeline: the encoder takes up to BatchSize evaluations (and the
// iterations queued among them) at a time, when BatchSize evaluations are
// waiting, when FlushInterval has passed since the last batch was taken,
// or when a flush is asked for, and formats them into an encoded batch;
// the committer inserts an encoded batch (in the REAL column layout
// through the batch table, see batch_table.go) and commits it in one
// transaction while the encoder formats the next. The queue is bounded
// (limit evaluations, limit iterations): a caller that outruns the
// writer waits for room. The first write error is kept and returned by
// every later call.
type writer struct {
	mu   sync.Mutex
	cond sync.Cond // broadcast when rows are taken or committed and when the writer fails or stops

	evs   []*mdo.Evaluation // queued evaluations
	its   []iterRow         // queued iterations
	spare []*mdo.Evaluation // a taken batch given back, reused as the next queue
	limit int

	queuedEvs int64 // evaluations queued so far
	queued    int64 // rows (evaluations and iterations) queued so far
	taken     int64 // rows taken by the encoder so far
	committed int64 // rows committed so far
	flushTo   int64 // take at least this many rows now
	last      time.Time
	stop      bool
	err       error
	rows      int // evaluation rows the store holds
	// lastID is the ID of the last evaluation row committed, while every
	// row committed had a greater ID than those before it (ascending);
	// once a row's ID is not above lastID, or the store held rows before
	// the writer started, a row may have replaced another and rows may
	// count it twice (see replacedNone); anyID says that lastID is set
	lastID           int
	ascending, anyID bool

	kick    chan struct{}  // wakes the encoder
	free    chan *encBatch // encoded batches the committer has finished with
	encoded chan *encBatch // encoded batches for the committer
	exited  chan struct{}  // closed when the committer returns
}

// encodedBatches is the number of encoded batches in the pipeline: one
// being committed, one being encoded.
const encodedBatches = 2

// encBatch is a batch of rows formatted for the inserts. The rows' JSON
// arrays are formatted into arena and then copied once into a string
// that the rows' numbers and outputs are cut from: one copy per batch,
// none per row, and nothing that depends on the driver copying bound
// text. The vectors blobs are cut from blobs; the driver has copied them
// (as a bound []byte, or a value of the batch table) before the insert
// returns, and blobs is reused only for the next batch, after this one's
// commit.
type encBatch struct {
	evs   []*mdo.Evaluation
	rows  []encRow
	its   []iterRow
	arena []byte
	blobs []byte
	cuts  []rowCuts
	// columns: the layout keeps the values in REAL columns, which the
	// batch table reads from the evaluation; only the vectors blob is
	// encoded
	columns bool
}

// encRow is an evaluation with its numbers and outputs arrays and its
// vectors blob.
type encRow struct {
	e                *mdo.Evaluation
	numbers, outputs string
	vectors          []byte
}

// rowCuts are the offsets of one row's parts: numbers in arena[start:mid],
// outputs in arena[mid:end], vectors in blobs[blob:blobEnd].
type rowCuts struct{ start, mid, end, blob, blobEnd int }

// encode formats the rows of b.evs.
func (b *encBatch) encode() {
	b.rows = b.rows[:0]
	b.cuts = b.cuts[:0]
	b.arena = b.arena[:0]
	b.blobs = b.blobs[:0]
	for _, e := range b.evs {
		c := rowCuts{start: len(b.arena), blob: len(b.blobs)}
		if !b.columns {
			b.arena = appendNumbers(b.arena, e.Design, e.Objectives, e.Constraints, e.Margins)
			c.mid = len(b.arena)
			b.arena = appendNumbers(b.arena, e.Outputs)
		}
		c.mid = max(c.mid, c.start)
		c.end = len(b.arena)
		for _, xs := range [3][]float64{e.X, e.F, e.G} {
			b.blobs = appendFloats(b.blobs, xs)
		}
		c.blobEnd = len(b.blobs)
		b.cuts = append(b.cuts, c)
	}
	// cut the rows once the buffers have stopped moving
	text := string(b.arena)
	for i, e := range b.evs {
		c := b.cuts[i]
		b.rows = append(b.rows, encRow{e: e,
			numbers: text[c.start:c.mid],
			outputs: text[c.mid:c.end],
			vectors: b.blobs[c.blob:c.blobEnd:c.blobEnd]})
	}
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
		limit: max(4*s.opt.BatchSize, minQueue),
		last:  time.Now(),
		rows:  rows,
		// the rows a store picked up holds have IDs of their own
		ascending: rows == 0,
		kick:      make(chan struct{}, 1),
		free:      make(chan *encBatch, encodedBatches),
		encoded:   make(chan *encBatch, encodedBatches),
		exited:    make(chan struct{}),
	}
	w.cond.L = &w.mu
	for range encodedBatches {
		w.free <- &encBatch{columns: s.lay.columns}
	}
	s.w = w
	go s.encodeLoop(w)
	go s.commitLoop(w)
}

// inFlight is the most evaluations the store holds by reference: a full
// queue and the batches in the pipeline.
func (s *Store) inFlight() int {
	return max(4*s.opt.BatchSize, minQueue) + encodedBatches*s.opt.BatchSize
}

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

// committedRows is the number of evaluation rows committed (a row that
// replaced another counts too); none replaced another if replacedNone.
func (w *writer) committedRows() (rows int, replacedNone bool) {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.rows, w.ascending
}

// encodeLoop is the encoder goroutine: it takes batches from the queue,
// formats them and hands them to the committer.
func (s *Store) encodeLoop(w *writer) {
	defer close(w.encoded)
	timer := time.NewTimer(time.Hour)
	timer.Stop()
	defer timer.Stop()
	for {
		// wait for a free batch first, so that rows gather in the queue
		// while the committer is busy
		b := <-w.free
		w.mu.Lock()
		for {
			n := len(w.evs) + len(w.its)
			if w.err != nil || (n == 0 && w.stop) {
				w.mu.Unlock()
				return
			}
			if n > 0 {
				wait := s.opt.FlushInterval - time.Since(w.last)
				if len(w.evs) >= s.opt.BatchSize || w.flushTo > w.taken || w.stop || wait <= 0 {
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
		// take up to BatchSize evaluations and the iterations queued
		// before the last of them
		if len(w.evs) <= s.opt.BatchSize {
			b.evs, w.evs = w.evs, w.spare[:0]
		} else {
			b.evs = append(w.spare[:0], w.evs[:s.opt.BatchSize]...)
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
		b.its = append(b.its[:0], w.its[:k]...)
		rest := copy(w.its, w.its[k:])
		w.its = w.its[:rest]
		w.taken += int64(len(b.evs) + len(b.its))
		w.last = time.Now()
		w.cond.Broadcast()
		w.mu.Unlock()

		b.encode()
		w.encoded <- b
	}
}

// commitLoop is the committer goroutine: it commits the encoded batches
// in order. After a failure it drops what is left.
func (s *Store) commitLoop(w *writer) {
	defer close(w.exited)
	for b := range w.encoded {
		w.mu.Lock()
		failed := w.err != nil
		w.mu.Unlock()
		var err error
		if !failed {
			err = s.commit(b.rows, b.its)
		}
		if err == nil && !failed {
			// kept before they count as committed, so that a flush
			// sees them
			s.keepCommitted(b.evs)
		}
		w.mu.Lock()
		if err != nil {
			w.err = fmt.Errorf("store: %s: committing %d evaluations: %w", s.path, len(b.rows), err)
			w.evs, w.its = nil, nil
		} else if !failed {
			w.committed += int64(len(b.rows) + len(b.its))
			w.rows += len(b.rows) // a replaced row counts too until End recounts
			for _, r := range b.rows {
				if w.anyID && r.e.ID <= w.lastID {
					w.ascending = false
				}
				w.lastID, w.anyID = r.e.ID, true
			}
		}
		rows := w.rows
		clear(b.evs)
		if w.spare == nil {
			w.spare = b.evs[:0]
		}
		b.evs = nil
		clear(b.rows)
		w.cond.Broadcast()
		w.mu.Unlock()
		w.free <- b
		// wake the encoder: after a failure it must see the error and stop
		if err != nil {
			w.wake()
		}
		if err == nil && !failed && s.opt.OnCommit != nil {
			s.opt.OnCommit(rows)
		}
	}
}

// insertBound inserts encoded rows of the JSON text layout as bound
// parameters: batchRows rows per statement, then one by one.
func (s *Store) insertBound(ctx context.Context, p []encRow) error {
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
	return nil
}

// commit writes encoded evaluations and iterations in one transaction.
func (s *Store) commit(evs []encRow, its []iterRow) error {
	ctx := context.Background()
	return s.inTx(func() error {
		return s.conn.Raw(func(any) error {
			if s.lay.columns {
				// the whole batch in one statement, read from the batch table
				if len(evs) > 0 {
					s.batch.rows = evs
					_, err := s.stmtBatch.ExecContext(ctx, nil)
					s.batch.rows = nil
					if err != nil {
						return err
					}
				}
			} else if err := s.insertBound(ctx, evs); err != nil {
				return err
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
