package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"sync"
	"time"

	"couplet/mdo"
	"couplet/repl"
)

// cellRecord is a cell of a session as the two processes tell each other
// of it: the parent keeps the records, and a fresh interpreter process
// starts with them (repl.Options.Kept).
type cellRecord struct {
	Number      int           `json:"number"`
	Source      string        `json:"source"`
	Err         string        `json:"err,omitempty"`
	Interrupted bool          `json:"interrupted,omitempty"`
	Elapsed     time.Duration `json:"elapsed,omitempty"`
}

// recordOf is the record of a cell.
func recordOf(c *repl.Cell) *cellRecord {
	r := &cellRecord{Number: c.Number, Source: c.Source, Interrupted: c.Interrupted, Elapsed: c.Elapsed}
	if c.Err != nil {
		r.Err = c.Err.Error()
	}
	return r
}

// cell is the kept cell of a record (its error only says what it was).
func (r *cellRecord) cell() *repl.Cell {
	c := &repl.Cell{Number: r.Number, Source: r.Source, Interrupted: r.Interrupted, Elapsed: r.Elapsed}
	if r.Err != "" {
		c.Err = errors.New(r.Err)
	}
	return c
}

// request is what the terminal side asks of a session's interpreter
// process: first "start" with the cells to keep, then "exec" (a cell)
// and "command" (an @-command line), each answered by a "done" event.
type request struct {
	Op   string       `json:"op"`
	Text string       `json:"text,omitempty"`
	Kept []cellRecord `json:"kept,omitempty"`
}

// counted counts the bytes written through it.
type counted struct {
	mu sync.Mutex
	w  io.Writer
	n  int64
}

func (c *counted) Write(p []byte) (int, error) {
	c.mu.Lock()
	defer c.mu.Unlock()
	n, err := c.w.Write(p)
	c.n += int64(n)
	return n, err
}

// count is the number of bytes written so far.
func (c *counted) count() int64 {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.n
}

// interpreterSession is the interpreter process of a notebook session:
// it runs the cells and commands its parent sends (requestsFD) in a
// repl.Session, writing their output to its standard output and its
// error reports to stderrFD, and tells the parent what it does (ev).
// memCap is the process's memory cap (--memory-cap), of which a quarter
// may hold the evaluations of the session's runs for @report
// (repl.RunOutputs.KeepWithin).
func interpreterSession(ev *events, st *settings, seed uint64, seedSet bool, memCap uint64) int {
	reqs := json.NewDecoder(os.NewFile(requestsFD, "couplet-requests"))
	var start request
	if err := reqs.Decode(&start); err != nil || start.Op != "start" {
		fmt.Fprintln(os.Stderr, "couplet: the interpreter process got no start request:", err)
		return 1
	}
	stdout := &counted{w: os.Stdout}
	stderr := &counted{w: os.NewFile(stderrFD, "couplet-stderr")}
	opts := repl.Options{
		Policy: st.policy(), Stdout: stdout, Stderr: stderr,
		OutDir: st.out, Seed: seed, SeedSet: seedSet,
	}
	var outs *repl.RunOutputs
	if st.out != "" {
		// the parent holds the folder's lock and checked the folder; what
		// it holds now is an earlier interpreter's of this session
		outs = repl.NewRunOutputs(st.out)
		if err := outs.TakeExisting(); err != nil {
			fmt.Fprintln(os.Stderr, "couplet:", err)
			return 1
		}
		// a quarter of the cap: the rest is the running study's, the
		// interpreter's and the report's (our choice, no source)
		outs.KeepWithin = int64(min(memCap/4, 1<<62))
		opts.Outputs = outs
	}
	if isTerminal(os.Stdout) {
		opts.Progress = repl.NewProgress(os.Stdout)
	}
	for _, r := range start.Kept {
		opts.Kept = append(opts.Kept, r.cell())
	}
	opts.OnCell = func(c *repl.Cell, finished bool) {
		kind := "started"
		if finished {
			kind = "ended"
		}
		ev.send(message{RunEvent: repl.RunEvent{Kind: kind, Cell: c.Number}, Record: recordOf(c)})
	}
	opts.OnPanicLine = func(cell, line int) {
		ev.send(message{RunEvent: repl.RunEvent{Kind: "frame", Cell: cell, Line: line}})
	}
	opts.OnPublish = func(r *mdo.Result) {
		e := repl.RunEvent{Kind: "published", Study: r.Study}
		if outs != nil {
			e.Store = outs.StorePath(r)
		}
		ev.send(message{RunEvent: e})
	}
	s, err := repl.NewSession(opts)
	if err != nil {
		fmt.Fprintln(stderr, "couplet:", err)
		return 1
	}
	defer s.Close()
	// Ctrl-C, passed on by the parent, cancels the running cell.
	sig := make(chan os.Signal, 1)
	signal.Notify(sig, os.Interrupt)
	defer signal.Stop(sig)
	go func() {
		for range sig {
			if s.Interrupt() {
				fmt.Fprintln(stderr, "\n(cancelling the cell; Ctrl-C again stops it at once)")
			}
		}
	}()
	ev.send(message{RunEvent: repl.RunEvent{Kind: "ready"}, Next: s.NextNumber()})
	ctx := context.Background()
	for {
		var r request
		if err := reqs.Decode(&r); err != nil {
			return 0 // the session ended
		}
		ev.send(message{RunEvent: repl.RunEvent{Kind: "accepted"}})
		quit := false
		switch r.Op {
		case "exec":
			s.Exec(ctx, r.Text)
		case "command":
			quit = s.Command(ctx, r.Text)
		}
		ev.send(message{RunEvent: repl.RunEvent{Kind: "done"}, Out: stdout.count(), ErrOut: stderr.count(), Quit: quit, Next: s.NextNumber()})
		if quit {
			return 0
		}
	}
}
