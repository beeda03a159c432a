package main

import (
	"bufio"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"os/signal"
	"strconv"
	"strings"
	"sync"

	"couplet/repl"
)

// notebook is the terminal side of an interactive session: it reads the
// input (line editor, history and completion stay in this process) and
// runs the cells and the commands that need the interpreter in an
// interpreter process of its own, this program started again. When that
// process dies, the notebook says which cell and what ended it, writes
// the results published before (with --out), ends the programs the
// cells started, and starts a fresh interpreter that keeps the cells
// (repl.Options.Kept): @cells, @save and @again go on working, and
// @restore runs them again there. It implements repl.Runner.
type notebook struct {
	st     *settings
	args   []string // the session's arguments, passed on
	cap    uint64   // memory cap of the interpreter process, bytes
	stdout io.Writer
	stderr io.Writer

	cells     []*cellRecord   // every cell of the session, in order
	next      int             // the number of the next cell
	published []repl.RunEvent // the results published, in order
	broken    bool            // no interpreter could be started

	mu sync.Mutex // guards ip for the forwarding of Ctrl-C
	ip *interpreter
}

// interpreter is one interpreter process of a session.
type interpreter struct {
	cmd     *exec.Cmd
	req     *os.File
	events  chan message // closed when the process closes its end
	crash   *crashWatch
	crashed chan struct{} // closed when its standard error is read to the end
	out     *relay
	errOut  *relay
	running *cellRecord // the cell that started and has not ended
	// frame is the innermost frame of the last panic in the running
	// cell that the interpreter placed, Line 0 if none
	frame repl.RunEvent
}

// start starts a fresh interpreter process that keeps the session's
// cells, and waits until it takes requests.
func (n *notebook) start() error {
	exe, err := os.Executable()
	if err != nil {
		return fmt.Errorf("finding this program to start its interpreter process: %w", err)
	}
	var closeAfter []*os.File
	closeAll := func() {
		for _, f := range closeAfter {
			f.Close()
		}
	}
	evR, evW, err := os.Pipe()
	if err != nil {
		return err
	}
	reqR, reqW, err := os.Pipe()
	if err != nil {
		evR.Close()
		evW.Close()
		return err
	}
	crashR, crashW, err := os.Pipe()
	if err != nil {
		closeAll()
		return err
	}
	closeAfter = append(closeAfter, evW, reqR, crashW)
	ip := &interpreter{req: reqW, events: make(chan message, 16), crash: &crashWatch{w: n.stderr}, crashed: make(chan struct{})}
	outF, out, err := newRelay(n.stdout)
	if err != nil {
		closeAll()
		return err
	}
	errF, errOut, err := newRelay(n.stderr)
	if err != nil {
		closeAll()
		return err
	}
	ip.out, ip.errOut = out, errOut
	if out != nil {
		closeAfter = append(closeAfter, outF)
	}
	if errOut != nil {
		closeAfter = append(closeAfter, errF)
	}
	cmd := exec.Command(exe, n.args...)
	cmd.Env = append(os.Environ(), childEnv+"="+strconv.Itoa(os.Getpid()), capEnv+"="+strconv.FormatUint(n.cap, 10))
	cmd.Stdout = outF
	cmd.Stderr = crashW
	cmd.ExtraFiles = []*os.File{evW, errF, reqR}
	cmd.SysProcAttr = interpreterAttr()
	if err := cmd.Start(); err != nil {
		closeAll()
		evR.Close()
		reqW.Close()
		crashR.Close()
		return fmt.Errorf("starting the interpreter process: %w", err)
	}
	closeAll()
	ip.cmd = cmd
	go func() { defer close(ip.crashed); ip.crash.copy(crashR); crashR.Close() }()
	go func() {
		defer close(ip.events)
		defer evR.Close()
		sc := bufio.NewScanner(evR)
		sc.Buffer(make([]byte, 64<<10), 64<<20)
		for sc.Scan() {
			var m message
			if json.Unmarshal(sc.Bytes(), &m) == nil {
				ip.events <- m
			}
		}
	}()
	kept := make([]cellRecord, len(n.cells))
	for i, c := range n.cells {
		kept[i] = *c
	}
	n.mu.Lock()
	n.ip = ip
	n.mu.Unlock()
	if err := n.send(request{Op: "start", Kept: kept}); err != nil {
		return n.failedStart(err)
	}
	for m := range ip.events {
		if m.Kind == "ready" {
			n.next = m.Next
			return nil
		}
	}
	return n.failedStart(errors.New("it ended before it was ready"))
}

// failedStart ends an interpreter process that did not become ready and
// says what ended it.
func (n *notebook) failedStart(err error) error {
	ip := n.ip
	_ = ip.cmd.Process.Kill()
	werr := n.reap()
	return fmt.Errorf("starting the interpreter process: %v: %s", err, deathCause(werr, ip.crash, n.cap))
}

// reap waits for the interpreter process, which ended or is ending, and
// what it wrote, ends the programs left in its session, and forgets it.
func (n *notebook) reap() error {
	ip := n.ip
	for range ip.events {
	}
	werr := ip.cmd.Wait()
	<-ip.crashed
	ip.out.wait(-1)
	ip.errOut.wait(-1)
	ip.req.Close()
	endLeftovers(ip.cmd.Process.Pid)
	n.mu.Lock()
	n.ip = nil
	n.mu.Unlock()
	return werr
}

// send writes a request to the interpreter process.
func (n *notebook) send(r request) error {
	b, err := json.Marshal(r)
	if err != nil {
		return err
	}
	_, err = n.ip.req.Write(append(b, '\n'))
	return err
}

// interrupt passes Ctrl-C on to the interpreter process.
func (n *notebook) interrupt(s os.Signal) {
	n.mu.Lock()
	defer n.mu.Unlock()
	if n.ip != nil {
		_ = n.ip.cmd.Process.Signal(s)
	}
}

// NextNumber implements repl.Runner.
func (n *notebook) NextNumber() int { return n.next }

// Exec implements repl.Runner: the cell runs in the interpreter process.
func (n *notebook) Exec(_ context.Context, src string) *repl.Cell {
	number := n.next
	n.do(request{Op: "exec", Text: src})
	for _, c := range n.cells {
		if c.Number == number {
			return c.cell()
		}
	}
	return &repl.Cell{Number: number, Source: src}
}

// Command implements repl.Runner: @help and @quit are answered here,
// the other commands in the interpreter process, which holds the cells.
func (n *notebook) Command(_ context.Context, line string) bool {
	name, _, _ := strings.Cut(strings.TrimPrefix(strings.TrimSpace(line), repl.CommandPrefix), " ")
	switch name {
	case "help":
		fmt.Fprint(n.stdout, repl.HelpText())
		return false
	case "quit":
		return true
	}
	return n.do(request{Op: "command", Text: line})
}

// do runs a request in the interpreter process and waits until it is
// done; if the process dies, it reports the death and starts a fresh
// one. A process found dead before it took the request (it died between
// requests) is reported, and the request is sent to the fresh one. It
// reports whether the request asks to end the session.
func (n *notebook) do(r request) (quit bool) {
	for attempt := 0; attempt < 2; attempt++ {
		if n.ip == nil && !n.restart() {
			return true
		}
		accepted := false
		if n.send(r) == nil {
			for m := range n.ip.events {
				switch m.Kind {
				case "accepted":
					accepted = true
				case "started":
					n.ip.running, n.ip.frame = m.Record, repl.RunEvent{}
				case "frame":
					if n.ip.frame.Line == 0 {
						n.ip.frame = m.RunEvent
					}
				case "ended":
					n.keep(m.Record)
					n.ip.running = nil
				case "published":
					if n.ip.running != nil {
						m.Cell = n.ip.running.Number
					}
					n.published = append(n.published, m.RunEvent)
				case "done":
					n.ip.out.wait(m.Out)
					n.ip.errOut.wait(m.ErrOut)
					if m.Next == 1 {
						n.cells = nil // @fresh
					}
					n.next = m.Next
					return m.Quit
				}
			}
		}
		n.died(accepted)
		if accepted {
			return false
		}
	}
	return false
}

// keep records a cell that ended, in its place.
func (n *notebook) keep(r *cellRecord) {
	for i, c := range n.cells {
		if c.Number == r.Number {
			n.cells[i] = r
			return
		}
	}
	n.cells = append(n.cells, r)
	n.next = max(n.next, r.Number+1)
}

// died reports the death of the interpreter process, writes the results
// published before it and starts a fresh interpreter.
func (n *notebook) died(accepted bool) {
	running, frame, crash := n.ip.running, n.ip.frame, n.ip.crash
	werr := n.reap()
	cause := deathCause(werr, crash, n.cap)
	switch {
	case running != nil:
		where, raised := fmt.Sprintf("cell %d", running.Number), ""
		if frame.Line > 0 && strings.HasPrefix(cause, "panic: ") {
			if frame.Cell == running.Number {
				where += fmt.Sprintf(", line %d", frame.Line)
			} else {
				raised = fmt.Sprintf(" (raised in cell %d, line %d)", frame.Cell, frame.Line)
			}
		}
		fmt.Fprintf(n.stderr, "%s: the interpreter process died: %s%s\n", where, cause, raised)
		running.Err = "the interpreter process died: " + cause
		n.keep(running)
	case accepted:
		fmt.Fprintf(n.stderr, "the interpreter process died: %s\n", cause)
	default:
		fmt.Fprintf(n.stderr, "the interpreter process died between cells: %s\n", cause)
	}
	n.writePublished()
	if n.restart() {
		kept := ""
		if len(n.cells) > 0 {
			kept = fmt.Sprintf("; it keeps the %d cells, not their variables: %scells lists them, %ssave saves them, %sagain N runs one, %srestore runs again those that had run to their end",
				len(n.cells), repl.CommandPrefix, repl.CommandPrefix, repl.CommandPrefix, repl.CommandPrefix)
		}
		fmt.Fprintf(n.stderr, "a fresh interpreter is running%s\n", kept)
	}
}

// restart starts a fresh interpreter; if none can be started, it says so
// and the session ends.
func (n *notebook) restart() bool {
	if n.broken {
		return false
	}
	if err := n.start(); err != nil {
		n.broken = true
		fmt.Fprintf(n.stderr, "couplet: %v; the session ends\n", err)
		return false
	}
	return true
}

// writePublished writes the results published so far from their case
// stores, as `couplet run` does when its interpreter process dies.
func (n *notebook) writePublished() {
	if len(n.published) == 0 {
		return
	}
	var stores []string
	for _, p := range n.published {
		if p.Store != "" {
			stores = append(stores, p.Store)
		}
	}
	if n.st.out == "" || len(stores) == 0 {
		fmt.Fprintf(n.stderr, "the %d results published were recorded in no case store (the session has no --out DIR), so they cannot be written\n", len(n.published))
		return
	}
	var srcs []string
	for _, c := range n.cells {
		if c.Err == "" {
			srcs = append(srcs, c.Source)
		}
	}
	dir, err := repl.WriteStored(context.Background(), n.st.out, repl.FormatStudy(srcs), stores, nil, false)
	if err != nil {
		fmt.Fprintf(n.stderr, "writing the results published before the death: %v\n", err)
		return
	}
	last := n.published[len(n.published)-1]
	fmt.Fprintf(n.stderr, "the results published are written into %s; the last, of study %s published in cell %d, into %s\n", n.st.out, last.Study, last.Cell, dir)
}

// sources are the sources of the cells that ran to their end, for the
// completion of the names they declare.
func (n *notebook) sources() []string {
	var out []string
	for _, c := range n.cells {
		if c.Err == "" {
			out = append(out, c.Source)
		}
	}
	return out
}

// close ends the interpreter process: its requests end, and it closes
// its session.
func (n *notebook) close() {
	if n.ip == nil {
		return
	}
	n.ip.req.Close()
	n.reap()
}

// relay passes what the interpreter process writes into a pipe on to a
// writer that is not a file (a test's buffer), counting the bytes, so
// that the notebook can wait for the output of a request before it
// writes anything itself. A nil relay (the writer is a file, which the
// process writes itself) waits for nothing.
type relay struct {
	mu   sync.Mutex
	cond *sync.Cond
	n    int64
	done bool
}

// newRelay returns the file the interpreter process writes to for w, and
// the relay to w if w is not a file.
func newRelay(w io.Writer) (*os.File, *relay, error) {
	if f, ok := w.(*os.File); ok {
		return f, nil, nil
	}
	r, pw, err := os.Pipe()
	if err != nil {
		return nil, nil, err
	}
	rl := &relay{}
	rl.cond = sync.NewCond(&rl.mu)
	go func() {
		defer r.Close()
		b := make([]byte, 32<<10)
		for {
			k, err := r.Read(b)
			if k > 0 {
				_, _ = w.Write(b[:k])
				rl.mu.Lock()
				rl.n += int64(k)
				rl.cond.Broadcast()
				rl.mu.Unlock()
			}
			if err != nil {
				rl.mu.Lock()
				rl.done = true
				rl.cond.Broadcast()
				rl.mu.Unlock()
				return
			}
		}
	}()
	return pw, rl, nil
}

// wait waits until count bytes are passed on, or the pipe ends (count
// -1 waits for its end).
func (r *relay) wait(count int64) {
	if r == nil {
		return
	}
	r.mu.Lock()
	defer r.mu.Unlock()
	for !r.done && (count < 0 || r.n < count) {
		r.cond.Wait()
	}
}

// runNotebook runs the interactive session with its interpreter in a
// process of its own and returns the exit status.
func runNotebook(n *notebook, in repl.LineReader) int {
	if err := n.start(); err != nil {
		fmt.Fprintln(n.stderr, "couplet:", err)
		return 1
	}
	defer n.close()
	// Ctrl-C while a cell runs reaches this process alone (the
	// interpreter leads a session of its own): it is passed on.
	sig := make(chan os.Signal, 1)
	signal.Notify(sig, os.Interrupt)
	defer signal.Stop(sig)
	go func() {
		for s := range sig {
			n.interrupt(s)
		}
	}()
	err := repl.ServeLines(context.Background(), n, &endable{in: in, n: n}, n.stderr)
	if err != nil {
		fmt.Fprintln(n.stderr, "couplet:", err)
		return 1
	}
	if n.broken {
		return 1
	}
	return 0
}

// endable ends the input when no interpreter can be started any more.
type endable struct {
	in repl.LineReader
	n  *notebook
}

// ReadLine implements repl.LineReader.
func (e *endable) ReadLine(prompt string) (string, error) {
	if e.n.broken {
		return "", io.EOF
	}
	return e.in.ReadLine(prompt)
}
